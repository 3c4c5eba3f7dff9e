package measure

import "math"

// Valve flow coefficients. Cv is the flow in US gpm of 60 °F water through the
// valve at 1 psi drop; Kv the flow in m³/h of water at 1 bar drop. Both follow
// from the square-root law Q = C·√(ΔP/SG) for turbulent liquid flow (ANSI/ISA-75.01
// and IEC 60534-2-1 sizing equations, non-choked liquid).

// kvPerCv is Kv/Cv from the unit definitions: (m³/h per gpm)·√(psi per bar)
// = 0.2271247·√14.503774 = 0.86498.
var kvPerCv = usGallonM3 * 60 * math.Sqrt(1e5/psiPa)

// Overflow guards on valve inputs, far outside any HVAC valve, not physical limits.
const (
	maxFlowCoefficient = 1e6 // Cv or Kv
	maxValveDpPa       = 1e8 // 100 MPa, 14 500 psi
	maxSG              = 10  // heavier than any HVAC liquid
)

// KvFromCv converts a flow coefficient Cv (US gpm at 1 psi) to Kv (m³/h at
// 1 bar): Kv = 0.86498·Cv, from the unit definitions.
func KvFromCv(cv float64) float64 { return cv * kvPerCv }

// CvFromKv converts a flow coefficient Kv (m³/h at 1 bar) to Cv (US gpm at
// 1 psi): Cv = Kv/0.86498 = 1.1561·Kv.
func CvFromKv(kv float64) float64 { return kv / kvPerCv }

// SpecificGravity returns the density d relative to water at 60 °F
// (999.01 kg/m³, IAPWS-IF97 at 1 atm), the reference of Cv and of the
// water-column units. It returns 0, which the valve functions reject, for a
// density that is not finite and above 0.
func SpecificGravity(d Density) float64 {
	v := d.KgM3()
	if math.IsNaN(v) || math.IsInf(v, 0) || v <= 0 {
		return 0
	}
	return v / water60FDensity
}

// ValveFlowCv returns the liquid flow through a valve of coefficient cv (US gpm
// at 1 psi) at pressure drop dp for a liquid of specific gravity sg (water at
// 60 °F = 1): Q(gpm) = Cv·√(ΔP(psi)/SG). Errors are *InputError for "cv",
// "dp" (psi, above 0) and "sg".
func ValveFlowCv(cv float64, dp Pressure, sg float64) (VolumeFlow, error) {
	if err := checkValveInputs("cv", cv, dp.Psi(), Pressure(maxValveDpPa).Psi(), "psi", sg); err != nil {
		return 0, err
	}
	return GPM(cv * math.Sqrt(dp.Psi()/sg)), nil
}

// ValveFlowKv returns the liquid flow through a valve of coefficient kv (m³/h
// at 1 bar) at pressure drop dp for a liquid of specific gravity sg:
// Q(m³/h) = Kv·√(ΔP(bar)/SG). Errors are *InputError for "kv", "dp" (bar,
// above 0) and "sg".
func ValveFlowKv(kv float64, dp Pressure, sg float64) (VolumeFlow, error) {
	bar := dp.Pa() / 1e5
	if err := checkValveInputs("kv", kv, bar, maxValveDpPa/1e5, "bar", sg); err != nil {
		return 0, err
	}
	return CubicMetersPerHour(kv * math.Sqrt(bar/sg)), nil
}

// checkValveInputs checks a flow coefficient, a pressure drop dpU (in unit, for
// the message) and a specific gravity.
func checkValveInputs(coefName string, coef, dpU, dpMax float64, unit string, sg float64) error {
	if err := checkPositive(coefName, coef, ""); err != nil {
		return err
	}
	if err := checkRange(coefName, coef, 0, maxFlowCoefficient, ""); err != nil {
		return err
	}
	switch {
	case math.IsNaN(dpU) || math.IsInf(dpU, 0) || dpU > dpMax:
		return checkRange("dp", dpU, 0, dpMax, unit)
	case dpU == 0:
		return &InputError{Input: "dp", Value: dpU, Unit: unit, Min: 0, Max: dpMax,
			Reason: "no pressure drop across the valve means no flow through it; check the gauge or the taps"}
	case dpU < 0:
		return &InputError{Input: "dp", Value: dpU, Unit: unit, Min: 0, Max: dpMax,
			Reason: "a negative pressure drop means the taps are reversed (or the flow runs backwards); swap the readings"}
	}
	if err := checkPositive("sg", sg, ""); err != nil {
		return err
	}
	return checkRange("sg", sg, 0, maxSG, "")
}
