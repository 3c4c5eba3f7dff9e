package main

import (
	"fmt"

	"fieldtab/measure"
)

// motorCaution goes with every motor result: these readings are taken live.
const motorCaution = "live electrical readings: only a qualified person with suitable PPE, " +
	"following the site's electrical safety rules; lock out before touching belts or sheaves"

func motorCommand() *calcCommand {
	return &calcCommand{
		name:    "motor",
		summary: "three-phase motor: input kW, % of nameplate FLA and voltage and current imbalance (NEMA MG 1)",
		flags: []flagSpec{
			{name: "volts", usage: "line-to-line volts: one reading, or three (L1-L2,L2-L3,L3-L1) comma-separated"},
			{name: "amps", usage: "line amps: one reading, or three (L1,L2,L3) comma-separated"},
			{name: "pf", usage: "power factor (0.05–1), for input kW"},
			{name: "fla", usage: "nameplate full-load amps"},
		},
		run: runMotor,
	}
}

func runMotor(p *params) (*obj, error) {
	volts, err := threeReadings(p, "volts")
	if err != nil {
		return nil, err
	}
	amps, err := threeReadings(p, "amps")
	if err != nil {
		return nil, err
	}
	names := inputFlags{"volts": "volts", "amps": "amps", "power_factor": "pf", "fla": "fla",
		"volts_1": "volts", "volts_2": "volts", "volts_3": "volts", "amps_1": "amps", "amps_2": "amps", "amps_3": "amps"}
	vAvg, aAvg := mean3(volts), mean3(amps)
	aMax := max(amps[0], amps[1], amps[2])
	o := newObj(10)
	o.str("units", p.units.String()).num("volts_avg", vAvg).num("amps_avg", aAvg)
	kva, err := measure.ThreePhasePower(vAvg, aAvg, 1)
	if err != nil {
		return nil, flagErr(err, names)
	}
	o.num("input_kva", kva.KW())
	if p.has("pf") {
		pf, err := p.float("pf")
		if err != nil {
			return nil, err
		}
		kw, err := measure.ThreePhasePower(vAvg, aAvg, pf)
		if err != nil {
			return nil, flagErr(err, names)
		}
		o.num("input_kw", kw.KW())
	}
	warnings := []string{}
	if p.has("fla") {
		fla, err := p.float("fla")
		if err != nil {
			return nil, err
		}
		pct, err := measure.PercentFLA(aMax, fla)
		if err != nil {
			return nil, flagErr(err, names)
		}
		o.num("percent_fla", pct)
		if pct > measure.FullLoadPct {
			warnings = append(warnings, fmt.Sprintf("the highest leg draws %.0f %% of nameplate FLA: "+
				"check the service factor, the load and the drive before leaving it running", pct))
		}
	}
	vi, err := measure.VoltageImbalance(volts[0], volts[1], volts[2])
	if err != nil {
		return nil, flagErr(err, names)
	}
	ci, err := measure.CurrentImbalance(amps[0], amps[1], amps[2])
	if err != nil {
		return nil, flagErr(err, names)
	}
	o.num("voltage_imbalance", vi).num("current_imbalance", ci)
	if vi > measure.VoltageUnbalanceDeratePct {
		warnings = append(warnings, fmt.Sprintf("voltage imbalance %.1f %% is above %g %%: NEMA MG 1 calls for derating; "+
			"report it to the electrical contractor", vi, measure.VoltageUnbalanceDeratePct))
	}
	if ci > measure.CurrentUnbalanceNotePct {
		warnings = append(warnings, fmt.Sprintf("current imbalance %.1f %% is above %g %% (common practice): "+
			"check the supply, the connections and the windings", ci, measure.CurrentUnbalanceNotePct))
	}
	o.strs("warnings", warnings).str("caution", motorCaution)
	return o, nil
}

// threeReadings returns three per-leg readings; a single reading stands for all
// three legs (balanced supply assumed, imbalance 0).
func threeReadings(p *params, name string) ([3]float64, error) {
	vals, err := p.floats(name)
	if err != nil {
		return [3]float64{}, err
	}
	switch len(vals) {
	case 0:
		return [3]float64{}, &flagError{flag: "--" + name, msg: "is required"}
	case 1:
		return [3]float64{vals[0], vals[0], vals[0]}, nil
	case 3:
		return [3]float64{vals[0], vals[1], vals[2]}, nil
	}
	return [3]float64{}, &flagError{flag: "--" + name, msg: fmt.Sprintf("takes one reading or three, not %d", len(vals))}
}

func mean3(v [3]float64) float64 { return (v[0] + v[1] + v[2]) / 3 }
