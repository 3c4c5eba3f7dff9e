package measure

import "math"

// Band is a balancing tolerance: the allowed deviation below (LowPct) and above
// (HighPct) design, each in percent of design and given as a positive number, so
// −10 %/+10 % is Band{LowPct: 10, HighPct: 10}. Each is accepted from 0 to 100.
type Band struct {
	LowPct  float64 // allowed shortfall below design, % of design
	HighPct float64 // allowed excess above design, % of design
}

// Default balancing tolerances. These are common practice, not confirmed, from
// memory (see shared/REFERENCES.md, "Balancing tolerances"): the job's
// specification governs, and callers should let it override these.
var (
	// DefaultOutletBand is ±10 % of design for air outlets and inlets.
	DefaultOutletBand = Band{LowPct: 10, HighPct: 10}
	// DefaultFanBand is −5 %/+10 % of design for fans and air handlers.
	DefaultFanBand = Band{LowPct: 5, HighPct: 10}
	// DefaultHydronicBand is ±10 % of design for hydronic flows.
	DefaultHydronicBand = Band{LowPct: 10, HighPct: 10}
)

// Accuracy is an instrument's stated accuracy: ± Pct percent of reading ± Abs in
// the measured value's own unit (e.g. ±3 % of reading ± 7 cfm is {Pct: 3, Abs: 7}).
// The two parts add linearly, the usual meaning of a manufacturer's
// "±3 % of reading ± 7 cfm" (a worst case, not a root-sum-square).
type Accuracy struct {
	Pct float64 // ± percent of reading, 0 to 100
	Abs float64 // ± absolute, in the value's unit, at least 0
}

// Status is the outcome of a tolerance check.
type Status string

// The four outcomes of CheckTolerance.
const (
	StatusWithin       Status = "within"       // the whole uncertainty interval is inside the band
	StatusLow          Status = "low"          // the whole interval is below the band
	StatusHigh         Status = "high"         // the whole interval is above the band
	StatusUndetermined Status = "undetermined" // the interval straddles a limit: this instrument cannot decide
)

// ToleranceResult is the outcome of CheckTolerance. Low, High and Uncertainty
// are in the unit of the measured and design values.
type ToleranceResult struct {
	Status          Status
	PercentOfDesign float64 // measured ÷ design × 100
	Low, High       float64 // the band's limits
	Uncertainty     float64 // ± instrument uncertainty at this reading
	// Side says, for an undetermined result, where the reading itself lies:
	// below the band (low), above it (high) or inside it (within), each within
	// the uncertainty of a limit. Empty for the other statuses.
	Side Status
}

// Sanity limits that keep every result finite; the values are in the caller's
// unit, so they are deliberately wide.
const (
	tolMaxValue  = 1e12 // largest measured, design or absolute accuracy accepted
	tolMinDesign = 1e-9 // smallest design accepted
)

// CheckTolerance compares a measured value with design under a tolerance band,
// carrying the instrument's accuracy through. With u = acc.Pct/100·measured +
// acc.Abs, the true value lies in [measured−u, measured+u]; the band is the closed
// interval [design·(1−LowPct/100), design·(1+HighPct/100)]. The result is within
// when the whole interval lies inside the band, low or high when it lies wholly
// below or above, and undetermined when it straddles a limit (or touches one from
// outside). measured, design and acc.Abs share one unit, any unit. Limits are
// compared with a slack of 1e-9 of design, so a reading exactly on a limit stays
// on it after a round trip through another unit (275 cfm → m³/s → cfm).
//
// Errors: *InputError for "measured" (0 to 1e12), "design" (above 0; 1e-9 to
// 1e12), "band_low_pct", "band_high_pct", "accuracy_pct" (0 to 100) and
// "accuracy_abs" (0 to 1e12).
func CheckTolerance(measured, design float64, band Band, acc Accuracy) (ToleranceResult, error) {
	if err := checkRange("measured", measured, 0, tolMaxValue, ""); err != nil {
		return ToleranceResult{}, err
	}
	if err := checkPositive("design", design, ""); err != nil {
		return ToleranceResult{}, err
	}
	if err := checkRange("design", design, tolMinDesign, tolMaxValue, ""); err != nil {
		return ToleranceResult{}, err
	}
	if err := checkRange("band_low_pct", band.LowPct, 0, 100, "%"); err != nil {
		return ToleranceResult{}, err
	}
	if err := checkRange("band_high_pct", band.HighPct, 0, 100, "%"); err != nil {
		return ToleranceResult{}, err
	}
	if err := checkRange("accuracy_pct", acc.Pct, 0, 100, "%"); err != nil {
		return ToleranceResult{}, err
	}
	if err := checkRange("accuracy_abs", acc.Abs, 0, tolMaxValue, ""); err != nil {
		return ToleranceResult{}, err
	}

	// Multiply before dividing so whole-number inputs give exact limits
	// (200 cfm at 10 % is exactly 180, not 180.00000000000003).
	low := design - design*band.LowPct/100
	high := design + design*band.HighPct/100
	u := measured*acc.Pct/100 + acc.Abs
	lo, hi := measured-u, measured+u

	r := ToleranceResult{
		PercentOfDesign: measured / design * 100,
		Low:             low,
		High:            high,
		Uncertainty:     u,
	}
	eps := design * 1e-9
	switch {
	case lo >= low-eps && hi <= high+eps:
		r.Status = StatusWithin
	case hi < low-eps:
		r.Status = StatusLow
	case lo > high+eps:
		r.Status = StatusHigh
	default:
		r.Status = StatusUndetermined
		switch {
		case measured < low-eps:
			r.Side = StatusLow
		case measured > high+eps:
			r.Side = StatusHigh
		default:
			r.Side = StatusWithin
		}
	}
	if math.IsNaN(r.PercentOfDesign) || math.IsInf(r.PercentOfDesign, 0) {
		// Unreachable within the limits above; kept so a change to them cannot leak NaN.
		return ToleranceResult{}, invalid("design", design, "", "too small for this measured value")
	}
	return r, nil
}
