package report

import (
	"math"
	"strings"
	"time"

	"fieldtab/measure"
	"fieldtab/schema"
)

// Figures are printed as results gives them, rounded for reading only: the
// report derives no number of its own.

// dash stands for a figure that is not there (not read, not computed).
const dash = "—"

// formatNumber rounds v to dec decimals and groups its thousands: with commas
// in an IP job, with no-break spaces in an SI one (and only from 10 000, as SI
// style leaves four digits whole). Negative zero prints as 0.
func formatNumber(v float64, dec int, si bool) string {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return dash
	}
	return schema.FormatNumber(v, dec, si)
}

// units formats the job's figures with the decimals each kind deserves.
type units struct {
	schema.ResultUnits
	si bool
}

func newUnits(u schema.ResultUnits) units {
	if u.System == "" {
		// A job whose unit system is unreadable has no figures; its labels
		// still need a system.
		u = schema.UnitsFor(measure.IP)
	}
	return units{ResultUnits: u, si: u.System == "si"}
}

func (u units) n(v float64, dec int) string { return formatNumber(v, dec, u.si) }

// nu joins a number and its unit with a no-break space, so a wrapped line
// never leaves the unit alone.
func nu(num, unit string) string {
	if unit == "" || num == dash {
		return num
	}
	return num + "\u00a0" + unit
}

func (u units) waterDec() int {
	if u.si {
		return 2
	}
	return 1
}

func (u units) airDec() int {
	if u.si {
		return 1
	}
	return 0
}

// Air flow: cfm or L/s.
func (u units) air(v float64) string       { return u.n(v, u.airDec()) }
func (u units) airU(v float64) string      { return nu(u.air(v), u.AirFlow) }
func (u units) airP(v *float64) string     { return ptr(v, u.airU) }
func (u units) water(v float64) string     { return u.n(v, u.waterDec()) }
func (u units) waterU(v float64) string    { return nu(u.water(v), u.WaterFlow) }
func (u units) power(v float64) string     { return u.n(v, 0) }
func (u units) powerU(v float64) string    { return nu(u.power(v), u.Power) }
func (u units) temp(v float64) string      { return u.n(v, 1) }
func (u units) tempU(v float64) string     { return nu(u.temp(v), u.Temperature) }
func (u units) tempP(v *float64) string    { return ptr(v, u.tempU) }
func (u units) enthalpyU(v float64) string { return nu(u.n(v, 2), u.Enthalpy) }
func (u units) humRatioU(v float64) string { return nu(u.n(v, 5), u.HumRatio) }
func (u units) pct(v float64) string       { return nu(u.n(v, 0), "%") }
func (u units) pct1(v float64) string      { return nu(u.n(v, 1), "%") }
func (u units) pctP(v *float64) string     { return ptr(v, u.pct) }
func (u units) rpm(v float64) string       { return nu(u.n(v, 0), "rpm") }
func (u units) rpmP(v *float64) string     { return ptr(v, u.rpm) }
func (u units) kw(v float64) string        { return nu(u.n(v, 2), "kW") }
func (u units) kwP(v *float64) string      { return ptr(v, u.kw) }

func (u units) density(v float64) string {
	if u.si {
		return nu(u.n(v, 3), u.Density)
	}
	return nu(u.n(v, 4), u.Density)
}

// Duct static pressure: in. w.g. to hundredths, Pa whole.
func (u units) ductU(v float64) string {
	if u.si {
		return nu(u.n(v, 0), u.DuctPressure)
	}
	return nu(u.n(v, 2), u.DuctPressure)
}

// Velocity pressure at a traverse point: a decimal more than a static.
func (u units) vp(v float64) string {
	if u.si {
		return u.n(v, 1)
	}
	return u.n(v, 3)
}

func (u units) velocity(v float64) string {
	if u.si {
		return u.n(v, 2)
	}
	return u.n(v, 0)
}

func (u units) velocityU(v float64) string { return nu(u.velocity(v), u.Velocity) }

// Duct and sheave sizes, depths: in to tenths (sheaves to hundredths), mm whole.
func (u units) length(v float64, fine bool) string {
	switch {
	case u.si:
		return u.n(v, 0)
	case fine:
		return u.n(v, 2)
	}
	return u.n(v, 1)
}

func (u units) lengthU(v float64, fine bool) string { return nu(u.length(v, fine), u.Length) }

func (u units) areaU(v float64) string {
	if u.si {
		return nu(u.n(v, 3), u.Area)
	}
	return nu(u.n(v, 2), u.Area)
}

// barometricU is the site pressure: psia to hundredths, kPa to tenths.
func (u units) barometricU(v float64) string {
	if u.si {
		return nu(u.n(v, 1), u.Barometric)
	}
	return nu(u.n(v, 2), u.Barometric)
}

// elevationU is a site elevation: ft or m, whole.
func (u units) elevationU(v float64) string {
	if u.si {
		return nu(u.n(v, 0), "m")
	}
	return nu(u.n(v, 0), "ft")
}

// pm appends a ± uncertainty to a figure already formatted.
func pm(figure, unc string) string { return figure + " ± " + unc }

func ptr(v *float64, f func(float64) string) string {
	if v == nil {
		return dash
	}
	return f(*v)
}

// label turns a snake-case code into words: "outdoor_air" → "outdoor air".
func label(code string) string {
	if code == "" {
		return dash
	}
	return strings.ReplaceAll(code, "_", " ")
}

// statusLabels are the words for results' statuses.
var statusLabels = map[string]string{
	"within": "within", "low": "low", "high": "high", "undetermined": "undetermined",
	schema.ResultNotRead: "not read", schema.ResultIncomplete: "incomplete", schema.ResultComputed: "computed",
	schema.ResultError: "not computed", schema.ResultMeets: "meets", schema.ResultShort: "short",
	schema.ResultNoExpected: "no rating", schema.ResultConflict: "conflicting readings",
	schema.CalibrationCurrent: "current", schema.CalibrationDueSoon: "due soon", schema.CalibrationOverdue: "overdue",
	schema.CalibrationUnknown: "no due date",
}

func status(s string) string {
	if l, ok := statusLabels[s]; ok {
		return l
	}
	return label(s)
}

// findingLabels name the kinds of finding.
var findingLabels = map[string]string{
	schema.FindingOutletOutOfTolerance:  "Outlet out of tolerance",
	schema.FindingOutletNotRead:         "Outlet not read",
	schema.FindingAirflowOutOfTolerance: "Airflow out of tolerance",
	schema.FindingCapacityShort:         "Capacity short",
	schema.FindingWaterFlowOutOfTol:     "Water flow out of tolerance",
	schema.FindingAirWaterMismatch:      "Air and water sides disagree",
	schema.FindingInstrumentOverdue:     "Instrument past calibration",
	schema.FindingTraverseWarning:       "Traverse caution",
	schema.FindingTraverseConflict:      "Conflicting readings",
	schema.FindingNoInstrument:          "No instrument on record",
	schema.FindingMotorCheck:            "Motor check",
	schema.FindingFanSpeedOffDesign:     "Fan speed off design",
	schema.FindingStaticOffDesign:       "External static off design",
	schema.FindingOutletsVsTraverse:     "Outlets and traverse disagree",
	schema.FindingWaterModeMismatch:     "Water against its mode",
	schema.FindingWaterModeNotGiven:     "Heating or cooling not stated",
}

func findingLabel(kind string) string {
	if l, ok := findingLabels[kind]; ok {
		return l
	}
	return label(kind)
}

// dateTime prints an instant in the report's time zone, to the minute.
func (d *doc) dateTime(t time.Time) string {
	if t.IsZero() {
		return dash
	}
	return t.In(d.loc).Format("2006-01-02 15:04")
}

// orDash stands a dash in for empty text.
func orDash(s string) string {
	if strings.TrimSpace(s) == "" {
		return dash
	}
	return s
}
