package main

import (
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

// airSpec reads a dry bulb and one humidity flag: prefix "" gives --db, --rh,
// --wb, --dp; prefix "enter-" gives --enter-db, --enter-rh and so on.
func airSpec(p *params, prefix string) (measure.AirSpec, error) {
	db, err := p.float(prefix + "db")
	if err != nil {
		return measure.AirSpec{}, err
	}
	which, err := p.oneOf(prefix+"rh", prefix+"wb", prefix+"dp")
	if err != nil {
		return measure.AirSpec{}, err
	}
	if which == "" {
		return measure.AirSpec{}, &flagError{flag: "--" + prefix + "rh",
			msg: "give one of --" + prefix + "rh, --" + prefix + "wb or --" + prefix + "dp"}
	}
	h, err := p.float(which)
	if err != nil {
		return measure.AirSpec{}, err
	}
	kind := map[string]measure.HumidityKind{
		prefix + "rh": measure.RelHum, prefix + "wb": measure.WetBulb, prefix + "dp": measure.DewPoint,
	}[which]
	return measure.AirSpec{DryBulb: db, Kind: kind, Humidity: h}, nil
}

// stateFlags names the flags behind a state's inputs, for error messages.
func stateFlags(prefix string) inputFlags {
	return inputFlags{
		"dry_bulb": prefix + "db", "rel_hum": prefix + "rh", "wet_bulb": prefix + "wb",
		"dew_point": prefix + "dp", "pressure": "pressure", "elevation": "elevation",
	}
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
	o.set("units", s.Units.String()).
		set("dry_bulb", num(s.DryBulb)).
		set("wet_bulb", num(s.WetBulb)).
		set("dew_point", num(s.DewPoint)).
		set("rel_hum", num(s.RelHum)).
		set("hum_ratio", num(s.HumRatio)).
		set("enthalpy", num(s.Enthalpy)).
		set("spec_volume", num(s.SpecVolume)).
		set("density", num(s.Density)).
		set("pressure", num(s.Pressure)).
		set("vap_pres", num(s.VapPres))
	return o
}

func psychroCommand() *calcCommand {
	return &calcCommand{
		name:    "psychro",
		summary: "moist-air state from dry bulb and one of RH, wet bulb or dew point (ASHRAE Fundamentals 2017 ch. 1)",
		flags: append([]flagSpec{
			{name: "db", usage: "dry bulb, °F or °C"},
			{name: "rh", usage: "relative humidity, % (0–100)"},
			{name: "wb", usage: "wet bulb, °F or °C"},
			{name: "dp", usage: "dew point, °F or °C"},
		}, pressureFlags...),
		run: func(p *params) (*obj, error) {
			pres, err := sitePressure(p)
			if err != nil {
				return nil, err
			}
			spec, err := airSpec(p, "")
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
			{name: "flow", usage: "airflow, cfm or L/s"},
			{name: "flow-at", usage: "density the airflow refers to: standard, enter or leave", def: "standard"},
			{name: "enter-db", usage: "entering dry bulb, °F or °C"},
			{name: "enter-rh", usage: "entering RH, %"},
			{name: "enter-wb", usage: "entering wet bulb, °F or °C"},
			{name: "enter-dp", usage: "entering dew point, °F or °C"},
			{name: "leave-db", usage: "leaving dry bulb, °F or °C"},
			{name: "leave-rh", usage: "leaving RH, %"},
			{name: "leave-wb", usage: "leaving wet bulb, °F or °C"},
			{name: "leave-dp", usage: "leaving dew point, °F or °C"},
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
	enterSpec, err := airSpec(p, "enter-")
	if err != nil {
		return nil, err
	}
	leaveSpec, err := airSpec(p, "leave-")
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
	o := &obj{}
	o.set("units", u.String()).
		set("process", res.Process).
		set("total", num(res.Total.In(u))).
		set("sensible", num(res.Sensible.In(u))).
		set("latent", num(res.Latent.In(u))).
		set("shr", num(res.SHR)).
		set("mass_flow", num(res.MassFlow.In(u))).
		set("enter", stateObj(enter)).
		set("leave", stateObj(leave))

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
		uo := &obj{}
		uo.set("total", num(unc.Total.In(u))).set("sensible", num(unc.Sensible.In(u)))
		o.set("uncertainty", uo)
	}
	return o, nil
}
