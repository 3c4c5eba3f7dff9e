package main

import (
	"fmt"
	"math"

	"fieldtab/measure"
)

var pressureFlags = []flagSpec{
	{name: "elevation", usage: "site elevation, ft or m (standard atmosphere); default sea level"},
	{name: "pressure", usage: "measured barometric pressure, psia or kPa (instead of --elevation)"},
}

// sitePressure returns the barometric pressure in psia (IP) or kPa (SI) from
// --pressure, or from --elevation by the standard atmosphere, or sea level.
func sitePressure(p *params) (float64, error) {
	which, err := p.oneOf("elevation", "pressure")
	if err != nil {
		return 0, err
	}
	if which == "pressure" {
		v, err := p.float("pressure")
		if err != nil {
			return 0, err
		}
		// Checked by the state calculation; name the flag now for a clear message.
		return v, nil
	}
	z, err := p.floatOr("elevation", 0)
	if err != nil {
		return 0, err
	}
	pres, err := measure.StandardPressure(p.units, z)
	return pres, flagErr(err, inputFlags{"elevation": "elevation"})
}

// stateFlagNames are the flags of one air state: --db, --rh, --wb, --dp, or the
// same behind a prefix such as "enter-". Built once, not per line of --batch.
type stateFlagNames struct{ db, rh, wb, dp string }

func newStateFlagNames(prefix string) stateFlagNames {
	return stateFlagNames{prefix + "db", prefix + "rh", prefix + "wb", prefix + "dp"}
}

var (
	plainState = newStateFlagNames("")
	enterState = newStateFlagNames("enter-")
	leaveState = newStateFlagNames("leave-")
)

// airSpec reads a dry bulb and exactly one humidity flag.
func airSpec(p *params, f stateFlagNames) (measure.AirSpec, error) {
	db, err := p.float(f.db)
	if err != nil {
		return measure.AirSpec{}, err
	}
	which, err := p.oneOf(f.rh, f.wb, f.dp)
	if err != nil {
		return measure.AirSpec{}, err
	}
	var kind measure.HumidityKind
	switch which {
	case f.rh:
		kind = measure.RelHum
	case f.wb:
		kind = measure.WetBulb
	case f.dp:
		kind = measure.DewPoint
	default:
		return measure.AirSpec{}, &flagError{flag: "--" + f.rh,
			msg: "give one of --" + f.rh + ", --" + f.wb + " or --" + f.dp}
	}
	h, err := p.float(which)
	if err != nil {
		return measure.AirSpec{}, err
	}
	return measure.AirSpec{DryBulb: db, Kind: kind, Humidity: h}, nil
}

// stateFlags names the flags behind a state's inputs, for error messages.
func stateFlags(prefix string) inputFlags {
	return inputFlags{
		"dry_bulb": prefix + "db", "rel_hum": prefix + "rh", "wet_bulb": prefix + "wb",
		"dew_point": prefix + "dp", "pressure": "pressure", "elevation": "elevation",
	}
}

// airWarnings cautions against the commonest slip with altitude: an actual-cfm
// reading taken as standard air overstates the air's mass by the density ratio.
func airWarnings(u measure.UnitSystem, basis measure.FlowBasis, pres float64) []string {
	seaLevel, _ := measure.StandardPressure(u, 0)
	ratio := pres / seaLevel
	if basis != measure.FlowStandard || ratio > 0.98 && ratio < 1.02 {
		return []string{}
	}
	unit := "psia"
	if u == measure.SI {
		unit = "kPa"
	}
	return []string{fmt.Sprintf("airflow taken at standard density; at %.4g %s an actual-flow reading "+
		"carries about %.0f %% %s air than standard: if the reading is actual flow (a traverse or an "+
		"uncorrected hood), use --flow-at enter", pres, unit, math.Abs(1-ratio)*100, map[bool]string{true: "less", false: "more"}[ratio < 1])}
}

// coilFlags names the flags behind CoilCapacity's and CoilUncertainty's inputs,
// whose state inputs carry an enter_ or leave_ prefix.
var coilFlags = func() inputFlags {
	names := inputFlags{"flow": "flow", "flow_basis": "flow-at", "flow_accuracy": "flow-acc-pct",
		"temp_accuracy": "temp-acc", "rh_accuracy": "rh-acc", "elevation": "elevation"}
	for _, side := range []string{"enter", "leave"} {
		for input, flag := range stateFlags(side + "-") {
			names[side+"_"+input] = flag
		}
		names[side+"_pressure"] = "pressure"
		names[side+"_units"] = "units"
	}
	return names
}()

func stateObj(s measure.AirState) *obj {
	o := newObj(11)
	o.str("units", s.Units.String()).
		num("dry_bulb", s.DryBulb).
		num("wet_bulb", s.WetBulb).
		num("dew_point", s.DewPoint).
		num("rel_hum", s.RelHum).
		num("hum_ratio", s.HumRatio).
		num("enthalpy", s.Enthalpy).
		num("spec_volume", s.SpecVolume).
		num("density", s.Density).
		num("pressure", s.Pressure).
		num("vap_pres", s.VapPres)
	return o
}

func psychroCommand() *calcCommand {
	return &calcCommand{
		name:    "psychro",
		summary: "moist-air state from dry bulb and one of RH, wet bulb or dew point (ASHRAE Fundamentals 2017 ch. 1)",
		flags: append([]flagSpec{
			{name: "db", usage: "dry bulb, °F or °C", qty: qtyTemp},
			{name: "rh", usage: "relative humidity, % (0–100)"},
			{name: "wb", usage: "wet bulb, °F or °C", qty: qtyTemp},
			{name: "dp", usage: "dew point, °F or °C", qty: qtyTemp},
		}, pressureFlags...),
		run: func(p *params) (*obj, error) {
			pres, err := sitePressure(p)
			if err != nil {
				return nil, err
			}
			spec, err := airSpec(p, plainState)
			if err != nil {
				return nil, err
			}
			st, err := spec.State(p.units, pres)
			if err != nil {
				return nil, flagErr(err, stateFlags(""))
			}
			return stateObj(st), nil
		},
	}
}

func airCommand() *calcCommand {
	return &calcCommand{
		name:    "air",
		summary: "coil capacity from airflow and entering/leaving air: dry-air mass flow × enthalpy change",
		flags: append([]flagSpec{
			{name: "flow", usage: "airflow, cfm or L/s", qty: qtyAirFlow},
			{name: "flow-at", usage: "density the airflow refers to: standard, enter or leave", def: "standard"},
			{name: "enter-db", usage: "entering dry bulb, °F or °C", qty: qtyTemp},
			{name: "enter-rh", usage: "entering RH, %"},
			{name: "enter-wb", usage: "entering wet bulb, °F or °C", qty: qtyTemp},
			{name: "enter-dp", usage: "entering dew point, °F or °C", qty: qtyTemp},
			{name: "leave-db", usage: "leaving dry bulb, °F or °C", qty: qtyTemp},
			{name: "leave-rh", usage: "leaving RH, %"},
			{name: "leave-wb", usage: "leaving wet bulb, °F or °C", qty: qtyTemp},
			{name: "leave-dp", usage: "leaving dew point, °F or °C", qty: qtyTemp},
			{name: "flow-acc-pct", usage: "airflow instrument accuracy, ± % of reading"},
			{name: "temp-acc", usage: "thermometer accuracy, ± °F or °C"},
			{name: "rh-acc", usage: "RH sensor accuracy, ± % RH"},
		}, pressureFlags...),
		run: runAir,
	}
}

func runAir(p *params) (*obj, error) {
	u := p.units
	pres, err := sitePressure(p)
	if err != nil {
		return nil, err
	}
	flowV, err := p.float("flow")
	if err != nil {
		return nil, err
	}
	basis, err := measure.ParseFlowBasis(p.str("flow-at", "standard"))
	if err != nil {
		return nil, &flagError{flag: "--flow-at", msg: "accepted values are standard, enter and leave"}
	}
	enterSpec, err := airSpec(p, enterState)
	if err != nil {
		return nil, err
	}
	leaveSpec, err := airSpec(p, leaveState)
	if err != nil {
		return nil, err
	}
	enter, err := enterSpec.State(u, pres)
	if err != nil {
		return nil, flagErr(err, stateFlags("enter-"))
	}
	leave, err := leaveSpec.State(u, pres)
	if err != nil {
		return nil, flagErr(err, stateFlags("leave-"))
	}
	flow := measure.AirFlowIn(u, flowV)
	res, err := measure.CoilCapacity(flow, basis, enter, leave)
	if err != nil {
		return nil, flagErr(err, coilFlags)
	}
	o := newObj(12)
	o.str("units", u.String()).
		str("process", res.Process).
		str("flow_basis", basis.String()).
		num("total", res.Total.In(u)).
		num("sensible", res.Sensible.In(u)).
		num("latent", res.Latent.In(u)).
		num("shr", res.SHR).
		num("mass_flow", res.MassFlow.In(u)).
		sub("enter", stateObj(enter)).
		sub("leave", stateObj(leave))

	o.strs("warnings", append(airWarnings(u, basis, pres), res.Warnings...))

	if p.has("rh-acc") && enterSpec.Kind != measure.RelHum && leaveSpec.Kind != measure.RelHum {
		return nil, &flagError{flag: "--rh-acc", msg: "applies to RH readings (--enter-rh, --leave-rh); wet bulb and dew point take --temp-acc"}
	}
	if p.has("flow-acc-pct") || p.has("temp-acc") || p.has("rh-acc") {
		var acc measure.AirAccuracy
		if acc.FlowPct, err = p.floatOr("flow-acc-pct", 0); err != nil {
			return nil, err
		}
		t, err := p.floatOr("temp-acc", 0)
		if err != nil {
			return nil, err
		}
		acc.Temp = measure.TempDiffIn(u, t)
		if acc.RHPoints, err = p.floatOr("rh-acc", 0); err != nil {
			return nil, err
		}
		unc, err := measure.CoilUncertainty(u, pres, flow, basis, enterSpec, leaveSpec, acc)
		if err != nil {
			return nil, flagErr(err, coilFlags)
		}
		uo := newObj(12)
		uo.num("total", unc.Total.In(u)).num("sensible", unc.Sensible.In(u))
		o.sub("uncertainty", uo)
	}
	return o, nil
}
