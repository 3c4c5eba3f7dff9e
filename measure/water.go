package measure

import (
	"fmt"
	"math"
	"strings"
)

// FluidKind is the heat-transfer liquid in a hydronic circuit.
type FluidKind uint8

// The fluids measure knows. The zero value is not a fluid, so a forgotten field
// is caught rather than read as water.
const (
	Water           FluidKind = iota + 1 // plain water, IAPWS-IF97 region 1
	PropyleneGlycol                      // propylene glycol in water, ASHRAE tables by volume %
	EthyleneGlycol                       // ethylene glycol in water, ASHRAE tables by volume %
)

// ParseFluidKind accepts "water", "pg" or "eg" in any case.
func ParseFluidKind(s string) (FluidKind, error) {
	switch strings.ToLower(strings.TrimSpace(s)) {
	case "water":
		return Water, nil
	case "pg":
		return PropyleneGlycol, nil
	case "eg":
		return EthyleneGlycol, nil
	}
	return 0, fmt.Errorf("fluid %q: accepted values are water, pg and eg", s)
}

// String returns "water", "pg" or "eg", the names ParseFluidKind accepts.
func (k FluidKind) String() string {
	switch k {
	case Water:
		return "water"
	case PropyleneGlycol:
		return "pg"
	case EthyleneGlycol:
		return "eg"
	}
	return fmt.Sprintf("FluidKind(%d)", uint8(k))
}

// Fluid is a hydronic liquid: water, or a glycol solution of VolPct percent
// glycol by volume (the basis of the ASHRAE tables). VolPct is 0 for water.
type Fluid struct {
	Kind   FluidKind
	VolPct float64 // glycol, % by volume: 10 to 60; 0 for water
}

// Water's accepted range for Fluid.Props, in °C: 0.5 °C (32.9 °F) keeps clear of
// ice; 121 °C (249.8 °F) is the top of low-temperature hot water systems
// (250 °F, common practice).
const (
	waterMinC = 0.5
	waterMaxC = 121
	// Liquid is evaluated 1 kPa above saturation when that exceeds 1 atm, so a
	// hot-water state is never on the saturation line itself.
	waterPsatMarginPa = 1000
	atmospherePa      = 101325
)

func (f Fluid) glycol() (*glycolData, error) {
	switch f.Kind {
	case PropyleneGlycol:
		return glycolPG, nil
	case EthyleneGlycol:
		return glycolEG, nil
	case Water:
		if f.VolPct != 0 {
			return nil, invalid("concentration", f.VolPct, "%", "plain water takes 0 %; choose pg or eg for a glycol solution")
		}
		return nil, nil
	}
	return nil, &InputError{Input: "fluid", Value: float64(f.Kind), Min: float64(Water), Max: float64(EthyleneGlycol),
		Reason: "fluid must be water, pg or eg"}
}

// TemperatureRange returns the temperatures Props accepts for f: 0.5 to 121 °C
// for water; for a glycol, from the higher of the solution's freezing point and
// the lowest table row with data at VolPct, up to 100 °C. The error is an
// *InputError for "fluid" or "concentration".
func (f Fluid) TemperatureRange() (lo, hi Temperature, err error) {
	g, err := f.glycol()
	if err != nil {
		return 0, 0, err
	}
	if g == nil {
		return DegC(waterMinC), DegC(waterMaxC), nil
	}
	l, h, _, _, err := g.tempRange(f.VolPct)
	if err != nil {
		return 0, 0, err
	}
	return DegC(l), DegC(h), nil
}

// checkTemp returns an *InputError named input (range in °C) when t is outside
// the fluid's accepted range.
func (f Fluid) checkTemp(input string, t Temperature) error {
	g, err := f.glycol()
	if err != nil {
		return err
	}
	if g == nil {
		if err := checkRange(input, snapC(t.C()), waterMinC, waterMaxC, "°C"); err != nil {
			err.(*InputError).Value = t.C()
			return err
		}
		return nil
	}
	return g.checkTemp(input, f.VolPct, t.C())
}

// Props returns the density (kg/m³) and specific heat (J/(kg·K)) of the fluid at
// temperature t. Water comes from IAPWS-IF97 region 1 at 1 atm, or just above
// the saturation pressure (region 4) where that is higher, over 0.5 to 121 °C.
// Glycol solutions are interpolated bilinearly in temperature and concentration
// in the ASHRAE Handbook—Fundamentals secondary-coolant tables (10 to 60 % by
// volume, -35 to 100 °C), never extrapolated and never below the freezing point.
// Errors are *InputError for "fluid", "concentration" (%) or "temperature" (°C).
func (f Fluid) Props(t Temperature) (Density, SpecificHeat, error) {
	g, err := f.glycol()
	if err != nil {
		return 0, 0, err
	}
	if g != nil {
		return g.props(f.VolPct, t.C())
	}
	if err := f.checkTemp("temperature", t); err != nil {
		return 0, 0, err
	}
	tK := t.K()
	pPa := math.Max(atmospherePa, if97Psat(tK)*1e6+waterPsatMarginPa)
	return WaterProps(t, Pascals(pPa))
}

// WaterResult is the water-side heat transfer of a coil or heat exchanger.
type WaterResult struct {
	// Process is "cooling" when the liquid warms (leaving above entering: the
	// coil takes heat from the air), otherwise "heating".
	Process      string
	Capacity     Power        // W, always ≥ 0
	MassFlow     MassFlow     // kg/s
	Density      Density      // kg/m³ at MeanTemp
	SpecificHeat SpecificHeat // J/(kg·K) at MeanTemp
	MeanTemp     Temperature  // mean of entering and leaving
}

// maxLiquidFlowLps bounds flow so a product can never overflow; it is far above
// any hydronic system (1.6 million gpm), not a physical limit.
const maxLiquidFlowLps = 1e5

// WaterCapacity returns the heat carried by a liquid flow between its entering
// and leaving temperatures: Q = V̇·ρ·cp·|ΔT|, with ρ and cp of f at the mean
// temperature (Fluid.Props). This is the exact form of the trade's
// 500·gpm·ΔT (Btu/h) and 4.2·L/s·ΔT (kW) shortcuts, which fix ρ·cp at one
// temperature. Equal temperatures give zero capacity. Errors are *InputError:
// "flow" (L/s, above 0), "entering_temp" and "leaving_temp" (°C, the fluid's
// range), "fluid", "concentration".
func WaterCapacity(flow VolumeFlow, enter, leave Temperature, f Fluid) (WaterResult, error) {
	q := flow.Lps()
	if err := checkPositive("flow", q, "L/s"); err != nil {
		return WaterResult{}, err
	}
	if err := checkRange("flow", q, 0, maxLiquidFlowLps, "L/s"); err != nil {
		return WaterResult{}, err
	}
	if err := f.checkTemp("entering_temp", enter); err != nil {
		return WaterResult{}, err
	}
	if err := f.checkTemp("leaving_temp", leave); err != nil {
		return WaterResult{}, err
	}
	mean := (enter + leave) / 2
	rho, cp, err := f.Props(mean)
	if err != nil {
		return WaterResult{}, err
	}
	process := "heating"
	if leave > enter {
		process = "cooling"
	}
	m := float64(flow) * float64(rho)
	return WaterResult{
		Process:      process,
		Capacity:     Power(m * float64(cp) * math.Abs(float64(leave-enter))),
		MassFlow:     MassFlow(m),
		Density:      rho,
		SpecificHeat: cp,
		MeanTemp:     mean,
	}, nil
}
