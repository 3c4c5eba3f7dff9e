package schema

import (
	"errors"
	"math"
	"strconv"
	"strings"
	"time"

	"fieldtab/measure"
)

// Validation of the design records. The ranges are ones a technician would
// recognise as the edge of real equipment, wide enough for any building and
// tight enough to catch a slipped digit or the wrong unit system. Numbers are in
// the job's unit system (see records.go). Every error is an *Error with Code
// Invalid, the JSON name of the field (nested fields as "design.airflow") and a
// message that states the accepted range.

// Text limits, in runes.
const (
	maxTagLen      = 40
	maxNameLen     = 200
	maxUnitLen     = 20
	maxRemarksLen  = 500
	maxPlateLen    = 80        // a nameplate or drive entry
	maxPerfCSVSize = 256 << 10 // bytes
)

// unitRange is an accepted range in each unit system.
type unitRange struct {
	ipMin, ipMax float64
	ipUnit       string
	siMin, siMax float64
	siUnit       string
}

func (r unitRange) in(u measure.UnitSystem) (lo, hi float64, unit string) {
	if u == measure.SI {
		return r.siMin, r.siMax, r.siUnit
	}
	return r.ipMin, r.ipMax, r.ipUnit
}

// The ranges of the design values. A 0 minimum on a System's design value
// means "0 = not given" is accepted.
var (
	rangeOutletFlow  = unitRange{0, 50_000, "cfm", 0, 25_000, "L/s"}
	rangeAk          = unitRange{0, 100, "ft²", 0, 9.29, "m²"}
	rangeElevation   = unitRange{-1_500, 25_000, "ft", -500, 7_500, "m"} // measure.StandardPressure's range
	rangeBarometric  = unitRange{5, 16, "psia", 35, 110, "kPa"}
	rangeDuctSide    = unitRange{1, 390, "in", 25, 10_000, "mm"} // inside measure's 25–10,000 mm
	rangeSysAirflow  = unitRange{0, 500_000, "cfm", 0, 250_000, "L/s"}
	rangeStatic      = unitRange{0, 20, "in. w.g.", 0, 5_000, "Pa"}
	rangeCapacity    = unitRange{0, 100_000_000, "Btu/h", 0, 30_000_000, "W"}
	rangeMotor       = unitRange{0, 2_000, "hp", 0, 1_500, "kW"}
	rangeWaterFlow   = unitRange{0, 100_000, "gpm", 0, 6_300, "L/s"}
	rangeSheave      = unitRange{0, 80, "in", 0, 2_000, "mm"}  // pitch diameter; 0 not given
	rangeServiceF    = [2]float64{1, 2}                        // motor service factor, when given
	rangeValveCoeff  = unitRange{0, 10_000, "", 0, 10_000, ""} // Cv (IP) or Kv (SI)
	rangeFactor      = [2]float64{0.2, 5}                      // flow-hood correction factor, as measure.OutletFlowHood
	rangeConc        = [2]float64{10, 60}                      // glycol, % by volume: the ASHRAE tables' span
	rangeAmps        = 5_000.0
	rangeVolts       = 15_000.0 // as measure.VoltageImbalance
	rangeRPM         = 20_000.0 // as measure.FanLawsToFlow
	rangeAccuracyAbs = 1e6
)

// Accepted values of the enumerated fields.
var (
	jobStatuses         = []string{"open", "closed"}
	outletMethods       = []string{"hood", "ak"}
	traverseShapes      = []string{"rect", "round"}
	traverseMethods     = []string{"log-tchebycheff", "log-linear", "equal-area"}
	capacityModes       = []string{"cooling", "heating"}
	capacityFlowSources = []string{"traverse", "outlets", "direct"}
	capacityFlowBases   = []string{"standard", "enter", "leave"}
	waterFlowSources    = []string{"valve", "meter"}
	waterFluids         = []string{"water", "pg", "eg"}
	waterModes          = []string{"cooling", "heating"}
)

// Job status values.
const (
	JobOpen   = "open"
	JobClosed = "closed"
)

// UnitSystem returns the job's unit system, or an Invalid error for field
// "units" when it is not "ip" or "si".
func (j *Job) UnitSystem() (measure.UnitSystem, error) {
	switch j.Units {
	case "ip":
		return measure.IP, nil
	case "si":
		return measure.SI, nil
	case "":
		return 0, Errorf(Invalid, "units", "is required: ip (inch-pound) or si (metric)")
	}
	return 0, Errorf(Invalid, "units", "%q is not accepted; accepted values are ip, si", j.Units)
}

// Validate checks a job: name (required) and the other texts, units ("ip" or
// "si", required), elevation (-1,500 to 25,000 ft or -500 to 7,500 m),
// barometric pressure (5 to 16 psia or 35 to 110 kPa), tolerances (0 to 100 %
// each) and status ("open", "closed", or "" for not given). An empty ID is
// accepted (the store assigns one). Errors are *Error with Code Invalid.
func (j *Job) Validate() error {
	if err := checkOptionalID("id", j.ID); err != nil {
		return err
	}
	u, err := j.UnitSystem()
	if err != nil {
		return err
	}
	if err := checkTexts(
		textField{"name", j.Name, true, maxNameLen},
		textField{"site_address", j.SiteAddress, false, maxNameLen},
		textField{"client", j.Client, false, maxNameLen},
		textField{"engineer", j.Engineer, false, maxNameLen},
		textField{"contractor", j.Contractor, false, maxNameLen},
		textField{"tab_firm", j.TABFirm, false, maxNameLen},
		textField{"project_number", j.ProjectNumber, false, maxPlateLen},
		textField{"remarks", j.Remarks, false, maxRemarksLen},
	); err != nil {
		return err
	}
	if j.Elevation != nil {
		if err := checkUnitRange("elevation", *j.Elevation, rangeElevation, u); err != nil {
			return err
		}
		if _, err := measure.StandardPressure(u, *j.Elevation); err != nil {
			return fromMeasure("elevation", err)
		}
	}
	if j.Barometric != nil {
		if err := checkUnitRange("barometric", *j.Barometric, rangeBarometric, u); err != nil {
			return err
		}
	}
	t := j.Tolerances
	for _, f := range []struct {
		name string
		v    float64
	}{
		{"outlet_low_pct", t.OutletLowPct}, {"outlet_high_pct", t.OutletHighPct},
		{"fan_low_pct", t.FanLowPct}, {"fan_high_pct", t.FanHighPct},
		{"hydronic_low_pct", t.HydronicLowPct}, {"hydronic_high_pct", t.HydronicHighPct},
	} {
		if err := checkRangeOf("tolerances."+f.name, f.v, 0, 100, "%"); err != nil {
			return err
		}
	}
	if j.Status != "" {
		if err := checkOneOf("status", j.Status, jobStatuses); err != nil {
			return err
		}
	}
	return nil
}

// Validate checks an instrument: tag (required, at most 40 characters), kind
// (one of InstrumentKinds), the texts, calibration dates (YYYY-MM-DD, each
// optional, due not before calibrated), accuracy_pct (0 to 100 %) and
// accuracy_abs (at least 0, with accuracy_unit when above 0). Errors are *Error
// with Code Invalid.
func (r *Instrument) Validate() error {
	if err := checkRecordIDs(r.ID, r.JobID); err != nil {
		return err
	}
	if err := checkTexts(
		textField{"tag", r.Tag, true, maxTagLen},
		textField{"make", r.Make, false, maxNameLen},
		textField{"model", r.Model, false, maxNameLen},
		textField{"serial", r.Serial, false, maxNameLen},
		textField{"accuracy_unit", r.AccuracyUnit, false, maxUnitLen},
		textField{"remarks", r.Remarks, false, maxRemarksLen},
	); err != nil {
		return err
	}
	if err := checkKind("kind", r.Kind, InstrumentKinds); err != nil {
		return err
	}
	cal, err := checkDate("calibrated_on", r.CalibratedOn)
	if err != nil {
		return err
	}
	due, err := checkDate("calibration_due", r.CalibrationDue)
	if err != nil {
		return err
	}
	if !cal.IsZero() && !due.IsZero() && due.Before(cal) {
		return Errorf(Invalid, "calibration_due", "%s is before the calibration date %s; the due date must be on or after it",
			r.CalibrationDue, r.CalibratedOn)
	}
	if err := checkRangeOf("accuracy_pct", r.AccuracyPct, 0, 100, "%"); err != nil {
		return err
	}
	if err := checkRangeOf("accuracy_abs", r.AccuracyAbs, 0, rangeAccuracyAbs, r.AccuracyUnit); err != nil {
		return err
	}
	if r.AccuracyAbs > 0 && strings.TrimSpace(r.AccuracyUnit) == "" {
		return Errorf(Invalid, "accuracy_unit", "is required when the ± value is given (e.g. cfm, °F, %%RH)")
	}
	return nil
}

// Validate checks a system in unit system u: tag (required), kind (one of
// SystemKinds), the texts and its design data. Each design value may be 0 (not
// given) or lie within: airflow and outdoor_air 0 to 500,000 cfm (250,000 L/s),
// outdoor air not above airflow; external_static 0 to 20 in. w.g. (5,000 Pa);
// rated_total and rated_sensible 0 to 100,000,000 Btu/h (30,000,000 W),
// sensible not above total; motor_hp 0 to 2,000 hp (1,500 kW); fla 0 to 5,000
// A; volts 0 to 15,000 V; phase 0, 1 or 3; fan_rpm and motor_rpm 0 to 20,000
// rpm; water_flow 0 to 100,000 gpm (6,300 L/s); perf_table_csv empty or a
// table measure.ParsePerfTableCSV reads, at most 256 KiB. Errors are *Error
// with Code Invalid; design fields are named "design.airflow" and so on.
func (r *System) Validate(u measure.UnitSystem) error {
	if err := checkUnitSystem(u); err != nil {
		return err
	}
	if err := checkRecordIDs(r.ID, r.JobID); err != nil {
		return err
	}
	if err := checkTexts(
		textField{"tag", r.Tag, true, maxTagLen},
		textField{"name", r.Name, false, maxNameLen},
		textField{"location", r.Location, false, maxNameLen},
		textField{"remarks", r.Remarks, false, maxRemarksLen},
	); err != nil {
		return err
	}
	if err := checkKind("kind", r.Kind, SystemKinds); err != nil {
		return err
	}
	return r.Design.validate(u)
}

func (d *SystemDesign) validate(u measure.UnitSystem) error {
	for _, c := range []struct {
		field string
		v     float64
		r     unitRange
	}{
		{"design.airflow", d.Airflow, rangeSysAirflow},
		{"design.outdoor_air", d.OutdoorAir, rangeSysAirflow},
		{"design.external_static", d.ExternalStatic, rangeStatic},
		{"design.rated_total", d.RatedTotal, rangeCapacity},
		{"design.rated_sensible", d.RatedSensible, rangeCapacity},
		{"design.motor_hp", d.MotorHP, rangeMotor},
		{"design.water_flow", d.WaterFlow, rangeWaterFlow},
	} {
		if err := checkUnitRange(c.field, c.v, c.r, u); err != nil {
			return err
		}
	}
	for _, c := range []struct {
		field string
		v     float64
		max   float64
		unit  string
	}{
		{"design.fla", d.FLA, rangeAmps, "A"},
		{"design.volts", d.Volts, rangeVolts, "V"},
		{"design.fan_rpm", d.FanRPM, rangeRPM, "rpm"},
		{"design.motor_rpm", d.MotorRPM, rangeRPM, "rpm"},
	} {
		if err := checkRangeOf(c.field, c.v, 0, c.max, c.unit); err != nil {
			return err
		}
	}
	_, _, flowUnit := rangeSysAirflow.in(u)
	if d.Airflow > 0 && d.OutdoorAir > d.Airflow {
		return Errorf(Invalid, "design.outdoor_air", "%s %s is more than the design airflow %s %s; outdoor air is part of the total",
			fmtValue(d.OutdoorAir), flowUnit, fmtValue(d.Airflow), flowUnit)
	}
	_, _, capUnit := rangeCapacity.in(u)
	if d.RatedTotal > 0 && d.RatedSensible > d.RatedTotal {
		return Errorf(Invalid, "design.rated_sensible", "%s %s is more than the rated total %s %s; sensible capacity is part of the total",
			fmtValue(d.RatedSensible), capUnit, fmtValue(d.RatedTotal), capUnit)
	}
	if err := d.validatePlate(u); err != nil {
		return err
	}
	if d.Phase != 0 && d.Phase != 1 && d.Phase != 3 {
		return Errorf(Invalid, "design.phase", "%d is not accepted; accepted values are 1 and 3 (0 for not given)", d.Phase)
	}
	if d.PerfTableCSV != "" {
		if len(d.PerfTableCSV) > maxPerfCSVSize {
			return Errorf(Invalid, "design.perf_table_csv", "is %d bytes; at most %d are accepted", len(d.PerfTableCSV), maxPerfCSVSize)
		}
		if _, err := measure.ParsePerfTableCSV(strings.NewReader(d.PerfTableCSV)); err != nil {
			return Errorf(Invalid, "design.perf_table_csv", "%s", strings.TrimPrefix(err.Error(), "performance table: ")) // the label says it
		}
	}
	return nil
}

// validatePlate checks the nameplate and drive entries: texts of at most 80
// characters, service_factor 0 (not given) or 1 to 2, and the sheave pitch
// diameters 0 (not given) to 80 in (2,000 mm).
func (d *SystemDesign) validatePlate(u measure.UnitSystem) error {
	if err := checkTexts(
		textField{"design.make", d.Make, false, maxPlateLen},
		textField{"design.model", d.Model, false, maxPlateLen},
		textField{"design.serial", d.Serial, false, maxPlateLen},
		textField{"design.motor_make", d.MotorMake, false, maxPlateLen},
		textField{"design.motor_frame", d.MotorFrame, false, maxPlateLen},
		textField{"design.fan_sheave_size", d.FanSheaveSize, false, maxPlateLen},
		textField{"design.motor_sheave_size", d.MotorSheaveSize, false, maxPlateLen},
		textField{"design.belts", d.Belts, false, maxPlateLen},
		textField{"design.fan_bushing", d.FanBushing, false, maxPlateLen},
		textField{"design.motor_bushing", d.MotorBushing, false, maxPlateLen},
		textField{"design.filters", d.Filters, false, maxNameLen},
	); err != nil {
		return err
	}
	if d.ServiceFactor != 0 {
		if err := checkRangeOf("design.service_factor", d.ServiceFactor, rangeServiceF[0], rangeServiceF[1], ""); err != nil {
			return err
		}
	}
	if err := checkUnitRange("design.fan_sheave_pitch", d.FanSheavePitch, rangeSheave, u); err != nil {
		return err
	}
	return checkUnitRange("design.motor_sheave_pitch", d.MotorSheavePitch, rangeSheave, u)
}

// Validate checks an outlet in unit system u: system_id (required), tag
// (required), room, kind (one of OutletKinds), size (at most 40 characters),
// design_flow (above 0, at most 50,000 cfm or 25,000 L/s), method ("hood" or
// "ak"), factor (0.2 to 5, required for hood; 0 or in range otherwise) and ak
// (above 0, at most 100 ft² or 9.29 m², required for ak; 0 or in range
// otherwise). Errors are *Error with Code Invalid.
func (r *Outlet) Validate(u measure.UnitSystem) error {
	if err := checkUnitSystem(u); err != nil {
		return err
	}
	if err := checkRecordIDs(r.ID, r.JobID); err != nil {
		return err
	}
	if err := checkRequiredID("system_id", r.SystemID); err != nil {
		return err
	}
	if err := checkTexts(
		textField{"tag", r.Tag, true, maxTagLen},
		textField{"room", r.Room, false, maxNameLen},
		textField{"size", r.Size, false, maxTagLen},
		textField{"remarks", r.Remarks, false, maxRemarksLen},
	); err != nil {
		return err
	}
	if err := checkKind("kind", r.Kind, OutletKinds); err != nil {
		return err
	}
	if err := checkAboveZero("design_flow", r.DesignFlow, rangeOutletFlow, u); err != nil {
		return err
	}
	if err := checkKind("method", r.Method, outletMethods); err != nil {
		return err
	}
	if r.Method == "hood" || r.Factor != 0 {
		if err := checkRangeOf("factor", r.Factor, rangeFactor[0], rangeFactor[1], ""); err != nil {
			return err
		}
	}
	if r.Method == "ak" || r.Ak != 0 {
		if err := checkAboveZero("ak", r.Ak, rangeAk, u); err != nil {
			return err
		}
	}
	return nil
}

// Validate checks a traverse in unit system u: system_id and tag (required),
// location, shape ("rect" or "round"), method ("log-tchebycheff", "log-linear"
// or "equal-area"), the duct size (width and height, or diameter: 1 to 390 in
// or 25 to 10,000 mm) and the point counts, which must give a layout
// measure.TraverseLayout.Points accepts (the fields of the other shape are
// ignored). Errors are *Error with Code Invalid.
func (r *Traverse) Validate(u measure.UnitSystem) error {
	if err := checkUnitSystem(u); err != nil {
		return err
	}
	if err := checkRecordIDs(r.ID, r.JobID); err != nil {
		return err
	}
	if err := checkRequiredID("system_id", r.SystemID); err != nil {
		return err
	}
	if err := checkTexts(
		textField{"tag", r.Tag, true, maxTagLen},
		textField{"location", r.Location, false, maxNameLen},
		textField{"remarks", r.Remarks, false, maxRemarksLen},
	); err != nil {
		return err
	}
	if err := checkKind("shape", r.Shape, traverseShapes); err != nil {
		return err
	}
	if err := checkKind("method", r.Method, traverseMethods); err != nil {
		return err
	}
	if _, err := r.Layout(u); err != nil {
		return err
	}
	return nil
}

// Layout returns the traverse's measure.TraverseLayout in unit system u,
// checked by building its points. Errors are *Error with Code Invalid naming
// the field.
func (r *Traverse) Layout(u measure.UnitSystem) (measure.TraverseLayout, error) {
	shape, err := measure.ParseDuctShape(r.Shape)
	if err != nil {
		return measure.TraverseLayout{}, checkOneOf("shape", r.Shape, traverseShapes)
	}
	method, err := measure.ParseTraverseMethod(r.Method)
	if err != nil {
		return measure.TraverseLayout{}, checkOneOf("method", r.Method, traverseMethods)
	}
	l := measure.TraverseLayout{Shape: shape, Method: method}
	if shape == measure.Round {
		if err := checkUnitRange("diameter", r.Diameter, rangeDuctSide, u); err != nil {
			return l, err
		}
		l.Diameter = measure.DuctSizeIn(u, r.Diameter)
		l.PointsPerDiameter, l.Diameters = r.PointsPerDiameter, r.Diameters
	} else {
		if err := checkUnitRange("width", r.Width, rangeDuctSide, u); err != nil {
			return l, err
		}
		if err := checkUnitRange("height", r.Height, rangeDuctSide, u); err != nil {
			return l, err
		}
		l.Width, l.Height = measure.DuctSizeIn(u, r.Width), measure.DuctSizeIn(u, r.Height)
		l.PointsW, l.PointsH = r.PointsW, r.PointsH
	}
	if _, err := l.Points(); err != nil {
		return l, fromMeasure("", err)
	}
	return l, nil
}

// Validate checks a capacity test: system_id and tag (required), mode
// ("cooling" or "heating"), flow_source ("traverse", "outlets" or "direct"),
// traverse_id (required for a traverse, empty otherwise) and flow_basis
// ("standard", "enter" or "leave": required for a direct reading, optional
// otherwise). Errors are *Error with Code Invalid.
func (r *CapacityTest) Validate() error {
	if err := checkRecordIDs(r.ID, r.JobID); err != nil {
		return err
	}
	if err := checkRequiredID("system_id", r.SystemID); err != nil {
		return err
	}
	if err := checkTexts(textField{"tag", r.Tag, true, maxTagLen}, textField{"remarks", r.Remarks, false, maxRemarksLen}); err != nil {
		return err
	}
	if err := checkKind("mode", r.Mode, capacityModes); err != nil {
		return err
	}
	if err := checkKind("flow_source", r.FlowSource, capacityFlowSources); err != nil {
		return err
	}
	if r.FlowSource == "traverse" {
		if err := checkRequiredID("traverse_id", r.TraverseID); err != nil {
			return err
		}
	} else if r.TraverseID != "" {
		return Errorf(Invalid, "traverse_id", "applies only when the airflow comes from a traverse; leave it empty for %s",
			map[string]string{"outlets": "the outlets' sum", "direct": "a direct reading"}[r.FlowSource])
	}
	if r.FlowSource == "direct" || r.FlowBasis != "" {
		if err := checkKind("flow_basis", r.FlowBasis, capacityFlowBases); err != nil {
			return err
		}
	}
	return nil
}

// Validate checks a water test in unit system u: system_id and tag (required),
// mode ("cooling" or "heating", required: the results and cautions follow it),
// flow_source ("valve" or "meter"), valve_cv (the valve's Cv in an IP job, Kv
// in an SI job: above 0, at most 10,000; required for a valve, 0 or in range
// otherwise), valve_accuracy_pct (0 to 50 % of flow; 0 for the default),
// fluid ("water", "pg" or "eg"), concentration (10 to 60 % by
// volume for a glycol, 0 for water), design_flow (above 0, at most 100,000 gpm
// or 6,300 L/s) and capacity_test_id (optional). Errors are *Error with Code
// Invalid.
func (r *WaterTest) Validate(u measure.UnitSystem) error {
	if err := checkUnitSystem(u); err != nil {
		return err
	}
	if err := checkRecordIDs(r.ID, r.JobID); err != nil {
		return err
	}
	if err := checkRequiredID("system_id", r.SystemID); err != nil {
		return err
	}
	if err := checkTexts(textField{"tag", r.Tag, true, maxTagLen}, textField{"remarks", r.Remarks, false, maxRemarksLen}); err != nil {
		return err
	}
	if err := checkKind("mode", r.Mode, waterModes); err != nil {
		return err
	}
	if err := checkKind("flow_source", r.FlowSource, waterFlowSources); err != nil {
		return err
	}
	if r.FlowSource == "valve" || r.ValveCv != 0 {
		if err := checkAboveZero("valve_cv", r.ValveCv, rangeValveCoeff, u); err != nil {
			return err
		}
	}
	if err := checkRangeOf("valve_accuracy_pct", r.ValveAccuracyPct, 0, 50, "% of flow"); err != nil {
		return err
	}
	if err := checkKind("fluid", r.Fluid, waterFluids); err != nil {
		return err
	}
	if r.Fluid == "water" {
		if r.Concentration != 0 {
			return Errorf(Invalid, "concentration", "applies to glycol only; it must be 0 for water")
		}
	} else {
		if err := checkRangeOf("concentration", r.Concentration, rangeConc[0], rangeConc[1], "% by volume"); err != nil {
			return err
		}
		kind, err := measure.ParseFluidKind(r.Fluid)
		if err != nil {
			return checkOneOf("fluid", r.Fluid, waterFluids)
		}
		if _, _, err := (measure.Fluid{Kind: kind, VolPct: r.Concentration}).TemperatureRange(); err != nil {
			return fromMeasure("", err)
		}
	}
	if err := checkAboveZero("design_flow", r.DesignFlow, rangeWaterFlow, u); err != nil {
		return err
	}
	if r.CapacityTest != "" {
		if err := checkRequiredID("capacity_test_id", r.CapacityTest); err != nil {
			return err
		}
	}
	return nil
}

// textField is one text to check with checkText.
type textField struct {
	name     string
	value    string
	required bool
	max      int
}

func checkTexts(fields ...textField) error {
	for _, f := range fields {
		if err := checkText(f.name, f.value, f.required, f.max); err != nil {
			return err
		}
	}
	return nil
}

// checkKind is checkOneOf with a clearer message for a missing value.
func checkKind(field, s string, allowed []string) error {
	if s == "" {
		return Errorf(Invalid, field, "is required: %s", orList(allowed))
	}
	return checkOneOf(field, s, allowed)
}

func checkUnitSystem(u measure.UnitSystem) error {
	if u != measure.IP && u != measure.SI {
		return Errorf(Invalid, "units", "the job's unit system is not set (IP or SI)")
	}
	return nil
}

// checkRecordIDs checks a design record's own id (optional: the store assigns
// one) and its job_id (required).
func checkRecordIDs(id, jobID string) error {
	if err := checkOptionalID("id", id); err != nil {
		return err
	}
	return checkRequiredID("job_id", jobID)
}

func checkOptionalID(field, id string) error {
	if id != "" && !validUUID(id) {
		return Errorf(Invalid, field, "%q is not a UUID in lower-case 8-4-4-4-12 form", id)
	}
	return nil
}

func checkRequiredID(field, id string) error {
	if id == "" {
		return Errorf(Invalid, field, "is required")
	}
	return checkOptionalID(field, id)
}

// checkDate accepts "" (not given, returning the zero time) or a calendar date
// YYYY-MM-DD between 1900 and 2199.
func checkDate(field, s string) (time.Time, error) {
	if s == "" {
		return time.Time{}, nil
	}
	t, err := time.Parse(time.DateOnly, s)
	if err != nil || t.Year() < 1900 || t.Year() > 2199 {
		return time.Time{}, Errorf(Invalid, field, "%q is not a date in the form YYYY-MM-DD (1900 to 2199)", s)
	}
	return t, nil
}

// checkRangeOf requires a finite v in [lo, hi].
func checkRangeOf(field string, v, lo, hi float64, unit string) error {
	if math.IsNaN(v) || math.IsInf(v, 0) || v < lo || v > hi {
		return Errorf(Invalid, field, "%s is outside the accepted range %s to %s",
			fmtValue(v)+unitText(unit), fmtValue(lo), fmtValue(hi)+unitText(unit))
	}
	return nil
}

func checkUnitRange(field string, v float64, r unitRange, u measure.UnitSystem) error {
	lo, hi, unit := r.in(u)
	return checkRangeOf(field, v, lo, hi, unit)
}

// checkAboveZero requires a finite v with 0 < v ≤ the range's maximum.
func checkAboveZero(field string, v float64, r unitRange, u measure.UnitSystem) error {
	_, hi, unit := r.in(u)
	if math.IsNaN(v) || math.IsInf(v, 0) || v <= 0 || v > hi {
		if v == 0 {
			return Errorf(Invalid, field, "is required: above 0, at most %s", fmtValue(hi)+unitText(unit))
		}
		return Errorf(Invalid, field, "%s is outside the accepted range: above 0, at most %s",
			fmtValue(v)+unitText(unit), fmtValue(hi)+unitText(unit))
	}
	return nil
}

// fromMeasure turns a *measure.InputError into an Invalid *Error for field (or
// the input's own name when field is ""; measure's names are our JSON names
// where they are used). Other errors become Invalid errors for field too, since
// measure reports only bad input.
func fromMeasure(field string, err error) error {
	var ie *measure.InputError
	if !errors.As(err, &ie) {
		return Errorf(Invalid, field, "%v", err)
	}
	if field == "" {
		field = ie.Input
	}
	v := fmtValue(ie.Value) + unitText(ie.Unit)
	if ie.Reason != "" && (ie.Input == "method" || ie.Input == "shape" || ie.Input == "fluid") {
		return Errorf(Invalid, field, "%s", ie.Reason) // the value is measure's enum number: no use to anyone
	}
	if ie.Reason != "" {
		return Errorf(Invalid, field, "%s: %s", v, ie.Reason)
	}
	return Errorf(Invalid, field, "%s is outside the accepted range %s", v, ie.RangeText())
}

func fmtValue(v float64) string {
	if math.Abs(v) >= 1e3 && math.Abs(v) < 1e12 && v == math.Trunc(v) {
		return groupThousands(strconv.FormatFloat(v, 'f', 0, 64))
	}
	return strconv.FormatFloat(v, 'g', 6, 64)
}

// groupThousands puts commas in an integer's digits: "-25000" → "-25,000".
func groupThousands(s string) string {
	sign := ""
	if strings.HasPrefix(s, "-") {
		sign, s = "-", s[1:]
	}
	var b strings.Builder
	for i, c := range s {
		if i > 0 && (len(s)-i)%3 == 0 {
			b.WriteByte(',')
		}
		b.WriteRune(c)
	}
	return sign + b.String()
}

func unitText(unit string) string {
	switch unit {
	case "":
		return ""
	case "%":
		return " %"
	}
	return " " + unit
}
