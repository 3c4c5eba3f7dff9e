package measure

import (
	"fmt"
	"math"
	"strings"
)

// FlowBasis says at which air density a measured air flow is read, and so how
// volumetric flow becomes dry-air mass flow.
type FlowBasis uint8

// The flow bases. The zero value is not valid.
const (
	// FlowStandard is standard air: 0.075 lb of dry air per ft³ (IP) or 1.2 kg/m³
	// (SI), the convention behind the trade's 1.08 and 4.5 (SI 1.2) factors.
	FlowStandard FlowBasis = iota + 1
	// FlowAtEnter is actual flow at the entering-air state: ṁ = Q / v_enter.
	FlowAtEnter
	// FlowAtLeave is actual flow at the leaving-air state: ṁ = Q / v_leave.
	FlowAtLeave
)

// String returns "standard", "enter" or "leave".
func (b FlowBasis) String() string {
	switch b {
	case FlowStandard:
		return "standard"
	case FlowAtEnter:
		return "enter"
	case FlowAtLeave:
		return "leave"
	}
	return fmt.Sprintf("FlowBasis(%d)", uint8(b))
}

// ParseFlowBasis accepts "standard", "enter" or "leave" in any case.
func ParseFlowBasis(s string) (FlowBasis, error) {
	switch strings.ToLower(strings.TrimSpace(s)) {
	case "standard":
		return FlowStandard, nil
	case "enter":
		return FlowAtEnter, nil
	case "leave":
		return FlowAtLeave, nil
	}
	return 0, fmt.Errorf("flow basis %q: accepted values are standard, enter and leave", s)
}

// CoilResult is the air-side capacity of a coil. Total, Sensible and Latent are
// magnitudes in the sense of Process: heat removed from the air when cooling (the
// entering enthalpy is the higher), heat added when heating. Latent (and, in odd
// processes such as evaporative cooling, Sensible) may be negative: a cooling coil
// that adds moisture has negative latent capacity. SHR is Sensible/Total, 0 when
// Total is 0. MassFlow is the dry-air mass flow. Warnings are plain-English
// cautions for the technician when the process is not what a coil usually does.
type CoilResult struct {
	Process  string // "cooling" or "heating"
	Total    Power
	Sensible Power
	Latent   Power
	SHR      float64
	MassFlow MassFlow
	Warnings []string
}

// CoilCapacity returns the air-side capacity of a coil from the air flow through it
// and its entering and leaving states: dry-air mass flow × enthalpy change (ASHRAE
// Handbook—Fundamentals (2017) ch. 1, enthalpy eq. 30). Sensible is ṁ·[h(t_e, W_l) −
// h(t_l, W_l)], latent the rest. Mass flow is flow × 0.075 lb/ft³ (IP) or 1.2 kg/m³
// (SI) on FlowStandard, and flow ÷ specific volume of that state on FlowAtEnter and
// FlowAtLeave. In IP the arithmetic is lb/h × Btu/lb, in SI kg/s × kJ/kg.
//
// Only the Units, Pressure, DryBulb and HumRatio of each state are read; enthalpy
// and specific volume are recomputed from them. Both states must share one unit
// system and one pressure (within 1e-6 relative). Errors are *InputError values:
// "enter_units"/"leave_units", "enter_pressure"/"leave_pressure",
// "enter_dry_bulb"/"leave_dry_bulb", "enter_hum_ratio"/"leave_hum_ratio", "flow"
// (above 0 and at most 2,000,000 cfm or 1,000,000 L/s) and "flow_basis".
func CoilCapacity(flow VolumeFlow, basis FlowBasis, enter, leave AirState) (CoilResult, error) {
	c, err := psyFor(enter.Units)
	if err != nil {
		return CoilResult{}, prefixInput("enter_", err)
	}
	if leave.Units != enter.Units {
		return CoilResult{}, &InputError{Input: "leave_units", Value: float64(leave.Units), Min: float64(enter.Units),
			Max: float64(enter.Units), Reason: "entering and leaving states must be in the same unit system"}
	}
	if err := c.checkState(enterInputs, enter); err != nil {
		return CoilResult{}, err
	}
	if err := c.checkState(leaveInputs, leave); err != nil {
		return CoilResult{}, err
	}
	if math.Abs(leave.Pressure-enter.Pressure) > 1e-6*enter.Pressure {
		return CoilResult{}, &InputError{Input: "leave_pressure", Value: leave.Pressure, Unit: c.pUnit,
			Min: enter.Pressure, Max: enter.Pressure,
			Reason: fmt.Sprintf("must equal the entering pressure (%s %s)", formatNum(enter.Pressure), c.pUnit)}
	}
	q := flow.AirIn(enter.Units)
	if err := c.checkFlow(q, basis); err != nil {
		return CoilResult{}, err
	}
	m, total, sens := c.coil(q, basis, enter.DryBulb, enter.HumRatio, leave.DryBulb, leave.HumRatio, enter.Pressure)
	r := CoilResult{Process: "cooling"}
	if total < 0 || (total == 0 && enter.DryBulb < leave.DryBulb) {
		r.Process = "heating"
		total, sens = -total, -sens
	}
	shr := 0.0
	if total != 0 {
		shr = sens / total
	}
	r.SHR = shr
	if sens < 0 {
		r.Warnings = append(r.Warnings, "the dry bulb moves against the total heat: a near-adiabatic process "+
			"(evaporative cooling, a humidifier, or readings taken before the coil settled); SHR means little here")
	}
	if r.Process == "cooling" && total-sens < 0 && sens >= 0 {
		r.Warnings = append(r.Warnings, "the air leaves with more moisture than it entered: check the leaving "+
			"humidity reading, or for condensate re-evaporating off a coil that has just cycled off")
	}
	if enter.Units == SI {
		r.Total, r.Sensible, r.Latent = Kilowatts(total), Kilowatts(sens), Kilowatts(total-sens)
		r.MassFlow = KgPerSecond(m)
	} else {
		r.Total, r.Sensible, r.Latent = BtuPerHour(total), BtuPerHour(sens), BtuPerHour(total-sens)
		r.MassFlow = LbPerHour(m)
	}
	return r, nil
}

// coil returns dry-air mass flow (lb/h or kg/s) and the signed total and sensible
// capacity (Btu/h or kW), positive when the air is cooled, for flow q in cfm or L/s.
func (c *psyConst) coil(q float64, basis FlowBasis, te, we, tl, wl, p float64) (m, total, sens float64) {
	perVolume := c.stdAir
	switch basis {
	case FlowAtEnter:
		perVolume = 1 / c.specVolume(te, we, p)
	case FlowAtLeave:
		perVolume = 1 / c.specVolume(tl, wl, p)
	}
	if c == ipConst {
		m = q * 60 * perVolume
	} else {
		m = q / 1000 * perVolume
	}
	hl := c.enthalpy(tl, wl)
	return m, m * (c.enthalpy(te, we) - hl), m * (c.enthalpy(te, wl) - hl)
}

func (c *psyConst) checkFlow(q float64, basis FlowBasis) error {
	if err := checkPositive("flow", q, c.qUnit); err != nil {
		return err
	}
	if err := checkRange("flow", q, 0, c.flowMax, c.qUnit); err != nil {
		return err
	}
	if basis < FlowStandard || basis > FlowAtLeave {
		return &InputError{Input: "flow_basis", Value: float64(basis), Min: float64(FlowStandard), Max: float64(FlowAtLeave),
			Reason: "flow basis must be standard, enter or leave"}
	}
	return nil
}

// stateInputs names the fields of an entering or leaving state in errors.
type stateInputs struct{ pressure, dryBulb, humRatio string }

var (
	enterInputs = stateInputs{"enter_pressure", "enter_dry_bulb", "enter_hum_ratio"}
	leaveInputs = stateInputs{"leave_pressure", "leave_dry_bulb", "leave_hum_ratio"}
)

// checkState validates the fields of s that capacity reads. The humidity ratio may
// exceed saturation by 0.1 % (the ice-film wet-bulb equation gives slightly more
// than saturation for saturated air below 0 °F) and may always reach the 1e-7 floor.
func (c *psyConst) checkState(in stateInputs, s AirState) error {
	if err := checkRange(in.pressure, s.Pressure, c.pMin, c.pMax, c.pUnit); err != nil {
		return err
	}
	if err := checkRange(in.dryBulb, s.DryBulb, c.dbMin, c.tMax, c.tUnit); err != nil {
		return err
	}
	pws := c.pws(s.DryBulb)
	if pws >= s.Pressure {
		return &InputError{Input: in.dryBulb, Value: s.DryBulb, Unit: c.tUnit, Min: c.dbMin,
			Max: c.boilingPoint(s.Pressure), Reason: "at or above the boiling point of water at this pressure"}
	}
	ws := mwRatio * pws / (s.Pressure - pws)
	return checkRange(in.humRatio, s.HumRatio, 0, math.Max(1.001*ws, minHumRatio), c.wUnit)
}

// prefixInput returns err with prefix added to its input name when it is an
// *InputError, so a caller can tell the entering reading from the leaving one.
func prefixInput(prefix string, err error) error {
	if ie, ok := err.(*InputError); ok {
		cp := *ie
		cp.Input = prefix + cp.Input
		return &cp
	}
	return err
}

// AirAccuracy is the stated accuracy of the instruments behind a coil test, each a
// ± bound: FlowPct is percent of reading on the air flow, Temp applies to every dry
// bulb, wet bulb and dew point, RHPoints is percentage points on a relative
// humidity. A humidity ratio given directly is taken as exact.
type AirAccuracy struct {
	FlowPct  float64
	Temp     TempDiff
	RHPoints float64
}

// CoilUncertaintyResult is the ± uncertainty of a coil's total and sensible
// capacity, in the same sense (bounds) as the AirAccuracy it came from.
type CoilUncertaintyResult struct {
	Total    Power
	Sensible Power
}

// CoilUncertainty propagates instrument accuracy into CoilCapacity's total and
// sensible capacity by the first-order method of ISO GUM (JCGM 100:2008 §5.1) and
// ASHRAE Guideline 2: the root-sum-square of sensitivity × uncertainty over the
// independent inputs (air flow; entering and leaving dry bulb; entering and leaving
// humidity reading), each sensitivity by a central finite difference (one-sided
// where a reading sits on its limit, e.g. RH 100 %).
//
// The stated accuracies are taken as ± bounds and the result is those bounds
// combined: the RSS of the ± effect of each input. It is a standard uncertainty
// only if the inputs are given as standard uncertainties; either way it has the
// coverage of its inputs, provided they share one.
//
// u, pressure, flow, basis and the specs are as for AirSpec.State and CoilCapacity;
// spec errors name "enter_…" or "leave_…" inputs. acc errors name "flow_accuracy"
// (0–100 %), "temp_accuracy" (0–18 °F, 0–10 °C) and "rh_accuracy" (0–50 points).
func CoilUncertainty(u UnitSystem, pressure float64, flow VolumeFlow, basis FlowBasis, enter, leave AirSpec, acc AirAccuracy) (CoilUncertaintyResult, error) {
	c, err := psyFor(u)
	if err != nil {
		return CoilUncertaintyResult{}, err
	}
	tAcc := acc.Temp.In(u)
	if err := checkRange("flow_accuracy", acc.FlowPct, 0, 100, "%"); err != nil {
		return CoilUncertaintyResult{}, err
	}
	if err := checkRange("temp_accuracy", tAcc, 0, c.tempAccMax, c.tUnit); err != nil {
		return CoilUncertaintyResult{}, err
	}
	if err := checkRange("rh_accuracy", acc.RHPoints, 0, 50, "%"); err != nil {
		return CoilUncertaintyResult{}, err
	}
	we, _, err := c.humRatio(enter, pressure)
	if err != nil {
		return CoilUncertaintyResult{}, prefixInput("enter_", err)
	}
	wl, _, err := c.humRatio(leave, pressure)
	if err != nil {
		return CoilUncertaintyResult{}, prefixInput("leave_", err)
	}
	q := flow.AirIn(u)
	if err := c.checkFlow(q, basis); err != nil {
		return CoilUncertaintyResult{}, err
	}

	var sumT, sumS float64
	add := func(dT, dS, bound float64) {
		sumT += (dT * bound) * (dT * bound)
		sumS += (dS * bound) * (dS * bound)
	}

	// Capacity is proportional to flow, but the flow term goes through the same
	// difference as the others so the method is uniform.
	if acc.FlowPct > 0 {
		const rel = 1e-4
		_, tp, sp := c.coil(q*(1+rel), basis, enter.DryBulb, we, leave.DryBulb, wl, pressure)
		_, tm, sm := c.coil(q*(1-rel), basis, enter.DryBulb, we, leave.DryBulb, wl, pressure)
		add((tp-tm)/(2*rel*q), (sp-sm)/(2*rel*q), q*acc.FlowPct/100)
	}
	bounds := [4]float64{tAcc, humidityBound(enter.Kind, tAcc, acc.RHPoints), tAcc, humidityBound(leave.Kind, tAcc, acc.RHPoints)}
	for r, bound := range bounds {
		if bound == 0 {
			continue
		}
		dT, dS, ok := c.coilSensitivity(q, basis, pressure, enter, leave, reading(r))
		if !ok {
			name := [4]string{"enter_dry_bulb", "enter_" + enter.Kind.String(), "leave_dry_bulb", "leave_" + leave.Kind.String()}[r]
			return CoilUncertaintyResult{}, invalid(name, bound, "", "capacity cannot be differenced about this reading")
		}
		add(dT, dS, bound)
	}
	uT, uS := math.Sqrt(sumT), math.Sqrt(sumS)
	if u == SI {
		return CoilUncertaintyResult{Total: Kilowatts(uT), Sensible: Kilowatts(uS)}, nil
	}
	return CoilUncertaintyResult{Total: BtuPerHour(uT), Sensible: BtuPerHour(uS)}, nil
}

// reading picks one of the four readings of a coil test.
type reading int

const (
	enterDryBulb reading = iota
	enterHumidity
	leaveDryBulb
	leaveHumidity
)

// nudged returns the specs with reading r moved by d (degrees or RH points).
func nudged(e, l AirSpec, r reading, d float64) (AirSpec, AirSpec) {
	switch r {
	case enterDryBulb:
		e.DryBulb += d
	case enterHumidity:
		e.Humidity += d
	case leaveDryBulb:
		l.DryBulb += d
	case leaveHumidity:
		l.Humidity += d
	}
	return e, l
}

// signedCoil is the signed total and sensible capacity for two specs; ok is false
// when either spec is invalid.
func (c *psyConst) signedCoil(q float64, basis FlowBasis, p float64, e, l AirSpec) (total, sens float64, ok bool) {
	we, _, err := c.humRatio(e, p)
	if err != nil {
		return 0, 0, false
	}
	wl, _, err := c.humRatio(l, p)
	if err != nil {
		return 0, 0, false
	}
	_, total, sens = c.coil(q, basis, e.DryBulb, we, l.DryBulb, wl, p)
	return total, sens, true
}

// coilSensitivity is ∂total/∂x and ∂sensible/∂x for reading x, by a central
// difference over ±0.001 degree or RH point, or a one-sided one where a step leaves
// the reading's valid range (RH 100 %, a wet bulb equal to the dry bulb).
func (c *psyConst) coilSensitivity(q float64, basis FlowBasis, p float64, e, l AirSpec, r reading) (dT, dS float64, ok bool) {
	const h = 1e-3
	ep, lp := nudged(e, l, r, h)
	tp, sp, okp := c.signedCoil(q, basis, p, ep, lp)
	em, lm := nudged(e, l, r, -h)
	tm, sm, okm := c.signedCoil(q, basis, p, em, lm)
	if okp && okm {
		return (tp - tm) / (2 * h), (sp - sm) / (2 * h), true
	}
	t0, s0, _ := c.signedCoil(q, basis, p, e, l)
	switch {
	case okp:
		return (tp - t0) / h, (sp - s0) / h, true
	case okm:
		return (t0 - tm) / h, (s0 - sm) / h, true
	}
	return 0, 0, false
}

// humidityBound is the ± bound on a humidity reading of kind k.
func humidityBound(k HumidityKind, tAcc, rhPoints float64) float64 {
	switch k {
	case RelHum:
		return rhPoints
	case WetBulb, DewPoint:
		return tAcc
	}
	return 0
}
