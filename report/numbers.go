package report

import (
	"math"

	"fieldtab/measure"
	"fieldtab/schema"
)

// count prints a count with its thousands grouped as the job's figures are.
func (d *doc) count(n int) string { return formatNumber(float64(n), 0, d.u.si) }

// capAlt restates a capacity (Btu/h or W) in the trade's larger units: MBH,
// and tons of refrigeration (12 000 Btu/h) for cooling only, in IP; kW in SI.
func (u units) capAlt(v float64, cooling bool) string {
	if u.si {
		return nu(u.n(measure.Watts(v).KW(), 2), "kW")
	}
	s := nu(u.n(v/1000, 1), "MBH")
	if cooling {
		s += ", " + nu(u.n(measure.BtuPerHour(v).Tons(), 2), "tons")
	}
	return s
}

// capU is a capacity with its unit and, in brackets, its larger units:
// "221,330 Btu/h (221.3 MBH, 18.44 tons)".
func (u units) capU(v float64, cooling bool) string {
	return u.powerU(v) + " (" + u.capAlt(v, cooling) + ")"
}

// capPM is a capacity with its ±, both rounded to the value's third
// significant figure (a ± of several percent leaves no more to tell), and
// its larger units at the same precision: "221,000 ± 14,000 Btu/h (221 MBH,
// 18.4 tons)".
func (u units) capPM(v, unc float64, cooling bool) string {
	r, dec, place := sig3(v)
	ru := math.Round(unc/place) * place
	s := pm(u.n(r, dec), nu(u.n(ru, dec), u.Power))
	alt := func(x float64, unit string) string {
		xr, xd, _ := sig3(x)
		return nu(u.n(xr, xd), unit)
	}
	if u.si {
		return s + " (" + alt(measure.Watts(v).KW(), "kW") + ")"
	}
	a := alt(v/1000, "MBH")
	if cooling {
		a += ", " + alt(measure.BtuPerHour(v).Tons(), "tons")
	}
	return s + " (" + a + ")"
}

// sig3 rounds v to three significant figures, giving the decimals to print
// it with and the place value of its last figure.
func sig3(v float64) (rounded float64, dec int, place float64) {
	if v == 0 || math.IsNaN(v) || math.IsInf(v, 0) {
		return v, 0, 1
	}
	k := int(math.Floor(math.Log10(math.Abs(v)))) - 2
	place = math.Pow(10, float64(k))
	return math.Round(v/place) * place, max(0, -k), place
}

// flowOnBasis labels a capacity test's airflow by its basis: a
// standard-air figure as such (scfm in IP), one at a measured state's
// density as actual.
func (u units) flowOnBasis(v float64, basis string) string {
	switch basis {
	case "standard":
		if u.si {
			return nu(u.air(v), "L/s") + " of standard air (" + standardAir(true) + ")"
		}
		return nu(u.air(v), "scfm") + " (standard air, " + standardAir(false) + ")"
	case "enter":
		return u.airU(v) + " at the density of the entering air"
	case "leave":
		return u.airU(v) + " at the density of the leaving air"
	}
	return u.airU(v)
}

// tolSource says where the job's tolerance bands come from, after a band.
func tolSource(tol schema.Tolerances) string {
	if tol == schema.DefaultTolerances() {
		return " (fieldtab's default, common practice, not a standard: the project specification governs)"
	}
	return " (entered for this job from the project specification)"
}

// limitsNote says which limits behind the findings are the job's and which
// are common practice.
func (d *doc) limitsNote() string {
	return "Tolerance limits are the job's bands" + tolSource(d.s.Job.Tolerances) + "; a capacity meets at " +
		d.u.pct(schema.CapacityMeetsPct) + " of expected and the air and water sides agree within " +
		d.u.pct(schema.AirWaterAgreementPct) + ", both common practice; any other limit a finding states is common " +
		"practice unless the finding names its source."
}
