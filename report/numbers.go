package report

import (
	"fieldtab/measure"
	"fieldtab/schema"
)

// count prints a count with its thousands grouped as the job's figures are.
func (d *doc) count(n int) string { return formatNumber(float64(n), 0, d.u.si) }

// capAlt restates a capacity (Btu/h or W) in the trade's larger units: MBH
// and tons of refrigeration (12 000 Btu/h) for IP, kW for SI.
func (u units) capAlt(v float64) string {
	if u.si {
		return nu(u.n(measure.Watts(v).KW(), 2), "kW")
	}
	return nu(u.n(v/1000, 1), "MBH") + ", " + nu(u.n(measure.BtuPerHour(v).Tons(), 2), "tons")
}

// capU is a capacity with its unit and, in brackets, its larger units:
// "221,330 Btu/h (221.3 MBH, 18.44 tons)".
func (u units) capU(v float64) string { return u.powerU(v) + " (" + u.capAlt(v) + ")" }

// capPM is a capacity with its ± and its larger units.
func (u units) capPM(v, unc float64) string {
	return pm(u.power(v), u.powerU(unc)) + " (" + u.capAlt(v) + ")"
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
