package main

import (
	"errors"
	"fmt"
	"strings"

	"fieldtab/measure"
)

func waterCommand() *calcCommand {
	return &calcCommand{
		name:    "water",
		summary: "water-side capacity: flow × density × specific heat × ΔT at the mean temperature",
		flags: []flagSpec{
			{name: "flow", usage: "water flow, gpm or L/s", qty: qtyWaterFlow},
			{name: "enter", usage: "entering water temperature, °F or °C", qty: qtyTemp},
			{name: "leave", usage: "leaving water temperature, °F or °C", qty: qtyTemp},
			{name: "fluid", usage: "water, pg (propylene glycol) or eg (ethylene glycol)", def: "water"},
			{name: "concentration", usage: "glycol concentration, % by volume (10–60)"},
		},
		run: runWater,
	}
}

func runWater(p *params) (*obj, error) {
	u := p.units
	flowV, err := p.float("flow")
	if err != nil {
		return nil, err
	}
	enterV, err := p.float("enter")
	if err != nil {
		return nil, err
	}
	leaveV, err := p.float("leave")
	if err != nil {
		return nil, err
	}
	kind, err := measure.ParseFluidKind(p.str("fluid", "water"))
	if err != nil {
		return nil, &flagError{flag: "--fluid", msg: "accepted values are water, pg and eg"}
	}
	fluid := measure.Fluid{Kind: kind}
	if kind != measure.Water {
		if fluid.VolPct, err = p.float("concentration"); err != nil {
			return nil, err
		}
	} else if p.has("concentration") {
		return nil, &flagError{flag: "--concentration", msg: "applies only to --fluid pg or eg"}
	}
	res, err := measure.WaterCapacity(measure.WaterFlowIn(u, flowV),
		measure.TemperatureIn(u, enterV), measure.TemperatureIn(u, leaveV), fluid)
	if err != nil {
		return nil, flagErr(err, waterFlags)
	}
	o := newObj(12)
	o.str("units", u.String()).
		str("process", res.Process).
		num("capacity", res.Capacity.In(u)).
		num("mass_flow", res.MassFlow.In(u)).
		num("density", res.Density.In(u)).
		num("specific_heat", res.SpecificHeat.In(u)).
		num("mean_temp", res.MeanTemp.In(u))
	return o, nil
}

var waterFlags = inputFlags{"flow": "flow", "concentration": "concentration", "fluid": "fluid",
	"entering_temp": "enter", "leaving_temp": "leave"}

func valveCommand() *calcCommand {
	return &calcCommand{
		name:    "valve",
		summary: "flow through a balancing valve from its Cv or Kv and the measured ΔP",
		flags: []flagSpec{
			{name: "cv", usage: "valve Cv at the set position (gpm at 1 psi)"},
			{name: "kv", usage: "valve Kv at the set position (m³/h at 1 bar)"},
			{name: "dp", usage: "measured pressure drop"},
			{name: "dp-unit", usage: "psi, kpa, bar, or ft or m of water; default psi (IP) or kpa (SI)"},
			{name: "sg", usage: "specific gravity of the fluid", def: "1"},
		},
		run: runValve,
	}
}

func runValve(p *params) (*obj, error) {
	u := p.units
	which, err := p.oneOf("cv", "kv")
	if err != nil {
		return nil, err
	}
	if which == "" {
		return nil, &flagError{flag: "--cv", msg: "give --cv or --kv"}
	}
	coef, err := p.float(which)
	if err != nil {
		return nil, err
	}
	dpV, err := p.float("dp")
	if err != nil {
		return nil, err
	}
	defUnit := "psi"
	if u == measure.SI {
		defUnit = "kpa"
	}
	var dp measure.Pressure
	switch strings.ToLower(p.str("dp-unit", defUnit)) {
	case "psi":
		dp = measure.Psi(dpV)
	case "ft":
		dp = measure.FtWater(dpV)
	case "kpa":
		dp = measure.Kilopascals(dpV)
	case "m":
		dp = measure.MWater(dpV)
	case "bar":
		dp = measure.Kilopascals(100 * dpV)
	default:
		return nil, &flagError{flag: "--dp-unit", msg: "accepted values are psi, ft, kpa, m and bar"}
	}
	sg, err := p.floatOr("sg", 1)
	if err != nil {
		return nil, err
	}
	var q measure.VolumeFlow
	if which == "cv" {
		q, err = measure.ValveFlowCv(coef, dp, sg)
	} else {
		q, err = measure.ValveFlowKv(coef, dp, sg)
	}
	var ie *measure.InputError
	if errors.As(err, &ie) && ie.Input == "dp" {
		// measure states ΔP in psi or bar; restate it in the unit the user gave.
		msg := ie.Reason
		if msg == "" {
			msg = "outside the accepted range"
		}
		return nil, &flagError{flag: "--dp", msg: fmt.Sprintf("%g %s: %s", dpV, p.str("dp-unit", defUnit), msg)}
	}
	if err != nil {
		return nil, flagErr(err, inputFlags{"cv": "cv", "kv": "kv", "dp": "dp", "sg": "sg"})
	}
	o := newObj(12)
	o.str("units", u.String()).num("flow", q.WaterIn(u))
	return o, nil
}
