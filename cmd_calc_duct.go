package main

import (
	"fmt"
	"os"

	"fieldtab/measure"
)

func traverseCommand() *calcCommand {
	return &calcCommand{
		name:    "traverse",
		summary: "pitot traverse: point positions, and with readings the mean velocity and airflow",
		flags: append([]flagSpec{
			{name: "shape", usage: "rect or round"},
			{name: "width", usage: "rectangular duct inside width, in or mm", qty: qtyDuctSize},
			{name: "height", usage: "rectangular duct inside height, in or mm", qty: qtyDuctSize},
			{name: "diameter", usage: "round duct inside diameter, in or mm", qty: qtyDuctSize},
			{name: "method", usage: "log-tchebycheff, log-linear (round only) or equal-area", def: "log-tchebycheff"},
			{name: "points-w", usage: "rectangular: points along the width"},
			{name: "points-h", usage: "rectangular: points along the height (lines)"},
			{name: "points", usage: "round: points per diameter"},
			{name: "diameters", usage: "round: traverse diameters", def: "2"},
			{name: "vp", usage: "velocity pressures, in. w.g. or Pa, comma-separated in point order", qty: qtyDuctPressure},
			{name: "velocity", usage: "point velocities, fpm or m/s, comma-separated in point order", qty: qtyVelocity},
			{name: "db", usage: "air dry bulb in the duct, °F or °C (for the actual density)", qty: qtyTemp},
			{name: "rh", usage: "air RH in the duct, %"},
			{name: "wb", usage: "air wet bulb in the duct, °F or °C", qty: qtyTemp},
			{name: "dp", usage: "air dew point in the duct, °F or °C", qty: qtyTemp},
		}, pressureFlags...),
		run: runTraverse,
	}
}

func traverseLayout(p *params) (measure.TraverseLayout, error) {
	u := p.units
	var l measure.TraverseLayout
	shape, err := measure.ParseDuctShape(p.str("shape", ""))
	if err != nil {
		return l, &flagError{flag: "--shape", msg: "accepted values are rect and round"}
	}
	method, err := measure.ParseTraverseMethod(p.str("method", "log-tchebycheff"))
	if err != nil {
		return l, &flagError{flag: "--method", msg: "accepted values are log-tchebycheff, log-linear and equal-area"}
	}
	l.Shape, l.Method = shape, method
	if shape == measure.Rectangular {
		w, err := p.float("width")
		if err != nil {
			return l, err
		}
		h, err := p.float("height")
		if err != nil {
			return l, err
		}
		l.Width, l.Height = measure.DuctSizeIn(u, w), measure.DuctSizeIn(u, h)
		if l.PointsW, err = p.intOr("points-w", measure.RecommendedRectPoints(l.Width)); err != nil {
			return l, err
		}
		if l.PointsH, err = p.intOr("points-h", measure.RecommendedRectPoints(l.Height)); err != nil {
			return l, err
		}
		return l, nil
	}
	d, err := p.float("diameter")
	if err != nil {
		return l, err
	}
	l.Diameter = measure.DuctSizeIn(u, d)
	if l.PointsPerDiameter, err = p.intOr("points", 8); err != nil {
		return l, err
	}
	if l.Diameters, err = p.intOr("diameters", 2); err != nil {
		return l, err
	}
	return l, nil
}

var traverseInputFlags = inputFlags{
	"width": "width", "height": "height", "diameter": "diameter",
	"points_w": "points-w", "points_h": "points-h", "points_per_diameter": "points",
	"diameters": "diameters", "method": "method", "shape": "shape",
	"readings": "vp", "velocity_pressure": "vp", "velocity": "velocity", "density": "db",
}

// ductDensity is the moist-air density from --db and a humidity flag at the
// site pressure, or standard air when no dry bulb is given.
func ductDensity(p *params) (measure.Density, string, error) {
	u := p.units
	if !p.has("db") {
		for _, f := range []string{"rh", "wb", "dp", "elevation", "pressure"} {
			if p.has(f) {
				return 0, "", &flagError{flag: "--" + f, msg: "needs --db: the actual density needs the air's dry bulb"}
			}
		}
		if u == measure.SI {
			return measure.KgPerM3(1.2), "standard", nil
		}
		return measure.LbPerFt3(0.075), "standard", nil
	}
	pres, err := sitePressure(p)
	if err != nil {
		return 0, "", err
	}
	spec, err := airSpec(p, plainState)
	if err != nil {
		return 0, "", err
	}
	st, err := spec.State(u, pres)
	if err != nil {
		return 0, "", flagErr(err, stateFlags(""))
	}
	return measure.DensityIn(u, st.Density), "actual", nil
}

func runTraverse(p *params) (*obj, error) {
	u := p.units
	layout, err := traverseLayout(p)
	if err != nil {
		return nil, err
	}
	pts, err := layout.Points()
	if err != nil {
		return nil, flagErr(err, traverseInputFlags)
	}
	area, err := layout.Area()
	if err != nil {
		return nil, flagErr(err, traverseInputFlags)
	}
	rho, basis, err := ductDensity(p)
	if err != nil {
		return nil, err
	}
	which, err := p.oneOf("vp", "velocity")
	if err != nil {
		return nil, err
	}
	var res *measure.TraverseResult
	if which != "" {
		vals, err := p.floats(which)
		if err != nil {
			return nil, err
		}
		var r measure.TraverseResult
		if which == "vp" {
			vps := make([]measure.Pressure, len(vals))
			for i, v := range vals {
				vps[i] = measure.DuctPressureIn(u, v)
			}
			r, err = layout.FromVelocityPressures(vps, rho)
		} else {
			vs := make([]measure.Velocity, len(vals))
			for i, v := range vals {
				vs[i] = measure.VelocityIn(u, v)
			}
			r, err = layout.FromVelocities(vs)
		}
		if err != nil {
			names := inputFlags{}
			for k, v := range traverseInputFlags {
				names[k] = v
			}
			names["readings"] = which
			return nil, flagErr(err, names)
		}
		res = &r
	}
	o := newObj(12)
	o.str("units", u.String()).
		num("area", area.In(u)).
		num("density", rho.In(u)).
		str("density_basis", basis)
	points := make([]*obj, len(pts))
	for i, pt := range pts {
		po := newObj(12)
		if layout.Shape == measure.Rectangular {
			po.num("x", pt.X.DuctSizeIn(u)).num("y", pt.Y.DuctSizeIn(u))
		} else {
			po.integer("diameter", pt.Diameter).num("depth", pt.Depth.DuctSizeIn(u))
		}
		if res != nil {
			po.num("velocity", res.Velocities[i].In(u))
		}
		points[i] = po
	}
	o.list("points", points)
	warnings := append([]string{}, layout.Warnings()...)
	if res != nil {
		o.num("mean_velocity", res.MeanVelocity.In(u)).num("flow", res.Flow.AirIn(u))
		warnings = append(warnings[:0], res.Warnings...) // the result repeats the layout's warnings
	}
	o.strs("warnings", warnings)
	return o, nil
}

func outletCommand() *calcCommand {
	return &calcCommand{
		name:    "outlet",
		summary: "outlet airflow from a hood reading or velocity × Ak, its % of design and tolerance status",
		flags: []flagSpec{
			{name: "reading", usage: "flow hood reading, cfm or L/s", qty: qtyAirFlow},
			{name: "factor", usage: "hood correction factor", def: "1"},
			{name: "velocity", usage: "mean face velocity, fpm or m/s (with --ak)", qty: qtyVelocity},
			{name: "ak", usage: "outlet effective area Ak, ft² or m²", qty: qtyArea},
			{name: "design", usage: "design airflow, cfm or L/s", qty: qtyAirFlow},
			{name: "tol-low", usage: "allowed deviation below design, % of design", def: "10"},
			{name: "tol-high", usage: "allowed deviation above design, % of design", def: "10"},
			{name: "acc-pct", usage: "instrument accuracy, ± % of reading", def: "0"},
			{name: "acc-abs", usage: "instrument accuracy, ± cfm or L/s", def: "0", qty: qtyAirFlow},
		},
		run: runOutlet,
	}
}

func runOutlet(p *params) (*obj, error) {
	u := p.units
	which, err := p.oneOf("reading", "velocity")
	if err != nil {
		return nil, err
	}
	var flow measure.VolumeFlow
	switch which {
	case "reading":
		r, err := p.float("reading")
		if err != nil {
			return nil, err
		}
		if p.has("ak") {
			return nil, &flagError{flag: "--ak", msg: "goes with --velocity, not --reading"}
		}
		factor, err := p.floatOr("factor", 1)
		if err != nil {
			return nil, err
		}
		flow, err = measure.OutletFlowHood(measure.AirFlowIn(u, r), factor)
		if err != nil {
			return nil, flagErr(err, inputFlags{"reading": "reading", "factor": "factor"})
		}
	case "velocity":
		v, err := p.float("velocity")
		if err != nil {
			return nil, err
		}
		ak, err := p.float("ak")
		if err != nil {
			return nil, err
		}
		if p.has("factor") {
			return nil, &flagError{flag: "--factor", msg: "goes with --reading; with --velocity use --ak"}
		}
		flow, err = measure.OutletFlowAk(measure.VelocityIn(u, v), measure.AreaIn(u, ak))
		if err != nil {
			return nil, flagErr(err, inputFlags{"velocity": "velocity", "ak": "ak"})
		}
	default:
		return nil, &flagError{flag: "--reading", msg: "give --reading (hood) or --velocity with --ak"}
	}
	design, err := p.float("design")
	if err != nil {
		return nil, err
	}
	var band measure.Band
	if band.LowPct, err = p.floatOr("tol-low", 10); err != nil {
		return nil, err
	}
	if band.HighPct, err = p.floatOr("tol-high", 10); err != nil {
		return nil, err
	}
	var acc measure.Accuracy
	if acc.Pct, err = p.floatOr("acc-pct", 0); err != nil {
		return nil, err
	}
	if acc.Abs, err = p.floatOr("acc-abs", 0); err != nil {
		return nil, err
	}
	res, err := measure.CheckTolerance(flow.AirIn(u), design, band, acc)
	if err != nil {
		return nil, flagErr(err, inputFlags{"measured": which, "design": "design", "band_low_pct": "tol-low",
			"band_high_pct": "tol-high", "accuracy_pct": "acc-pct", "accuracy_abs": "acc-abs"})
	}
	o := newObj(12)
	bo := newObj(12)
	bo.num("low", res.Low).num("high", res.High)
	o.str("units", u.String()).
		num("flow", flow.AirIn(u)).
		num("percent_of_design", res.PercentOfDesign).
		str("status", string(res.Status)).
		sub("band", bo).
		num("uncertainty", res.Uncertainty)
	return o, nil
}

func fanCommand() *calcCommand {
	return &calcCommand{
		name:    "fan",
		summary: "fan laws: the rpm, static pressure and power to reach a target airflow, and the motor sheave for it",
		flags: []flagSpec{
			{name: "flow", usage: "measured airflow, cfm or L/s", qty: qtyAirFlow},
			{name: "rpm", usage: "measured fan speed, rpm"},
			{name: "sp", usage: "measured static pressure, in. w.g. or Pa", qty: qtyDuctPressure},
			{name: "bhp", usage: "fan power, hp (IP) or W (SI)", qty: qtyFanPower},
			{name: "target-flow", usage: "airflow wanted (usually design), cfm or L/s", qty: qtyAirFlow},
			{name: "motor-rpm", usage: "motor nameplate speed, rpm (adds the present fan sheave and the fan sheave for the target with the motor sheave kept)"},
			{name: "motor-sheave", usage: "present motor sheave pitch diameter, in or mm", qty: qtyDuctSize},
		},
		run: runFan,
	}
}

func runFan(p *params) (*obj, error) {
	u := p.units
	var now measure.FanPoint
	flow, err := p.float("flow")
	if err != nil {
		return nil, err
	}
	now.Flow = measure.AirFlowIn(u, flow)
	if now.RPM, err = p.float("rpm"); err != nil {
		return nil, err
	}
	sp, err := p.floatOr("sp", 0)
	if err != nil {
		return nil, err
	}
	now.StaticPressure = measure.DuctPressureIn(u, sp)
	bhp, err := p.floatOr("bhp", 0)
	if err != nil {
		return nil, err
	}
	if u == measure.SI {
		now.Power = measure.Watts(bhp)
	} else {
		now.Power = measure.Horsepower(bhp)
	}
	target, err := p.float("target-flow")
	if err != nil {
		return nil, err
	}
	names := inputFlags{"flow": "flow", "rpm": "rpm", "fan_rpm": "rpm", "target_rpm": "target-flow", "static_pressure": "sp", "power": "bhp",
		"target_flow": "target-flow", "motor_sheave": "motor-sheave", "motor_rpm": "motor-rpm"}
	next, err := measure.FanLawsToFlow(now, measure.AirFlowIn(u, target))
	if err != nil {
		return nil, flagErr(err, names)
	}
	o := newObj(12)
	o.str("units", u.String()).num("rpm", next.RPM)
	if p.has("sp") {
		o.num("sp", next.StaticPressure.DuctIn(u))
	}
	if p.has("bhp") {
		if u == measure.SI {
			o.num("bhp", next.Power.W())
		} else {
			o.num("bhp", next.Power.HP())
		}
	}
	if p.has("motor-sheave") {
		d, err := p.float("motor-sheave")
		if err != nil {
			return nil, err
		}
		sheave, err := measure.MotorSheaveFor(measure.DuctSizeIn(u, d), now.RPM, next.RPM)
		if err != nil {
			return nil, flagErr(err, names)
		}
		o.num("motor_sheave", sheave.DuctSizeIn(u))
		if p.has("motor-rpm") {
			mrpm, err := p.float("motor-rpm")
			if err != nil {
				return nil, err
			}
			// Two ways to the target speed: the motor sheave above (fan sheave kept),
			// or a new fan sheave with the motor sheave kept. The present fan sheave
			// lets the technician check the drive against what is installed.
			motorSheave := measure.DuctSizeIn(u, d)
			present, err := measure.FanSheaveFromDrive(mrpm, motorSheave, now.RPM)
			if err != nil {
				return nil, flagErr(err, names)
			}
			needed, err := measure.FanSheaveFromDrive(mrpm, motorSheave, next.RPM)
			if err != nil {
				return nil, flagErr(err, names)
			}
			o.num("present_fan_sheave", present.DuctSizeIn(u)).num("fan_sheave", needed.DuctSizeIn(u))
		}
	} else if p.has("motor-rpm") {
		return nil, &flagError{flag: "--motor-rpm", msg: "needs --motor-sheave"}
	}
	return o, nil
}

func expectedCommand() *calcCommand {
	return &calcCommand{
		name:    "expected",
		summary: "expected capacity from a manufacturer's performance table (CSV), interpolated, never extrapolated",
		flags: []flagSpec{
			{name: "table", usage: "performance table CSV (columns ewb_f|ewb_c, odb_f|odb_c, flow_cfm|flow_lps, total_*, sensible_*)"},
			{name: "ewb", usage: "entering wet bulb, °F or °C", qty: qtyTemp},
			{name: "odb", usage: "outdoor dry bulb, °F or °C", qty: qtyTemp},
			{name: "flow", usage: "airflow, cfm or L/s", qty: qtyAirFlow},
		},
		run: runExpected,
	}
}

func runExpected(p *params) (*obj, error) {
	u := p.units
	path := p.str("table", "")
	if path == "" {
		return nil, &flagError{flag: "--table", msg: "is required"}
	}
	// Reading the file is the command's job: measure does no I/O.
	f, err := os.Open(path)
	if err != nil {
		return nil, &flagError{flag: "--table", msg: err.Error()}
	}
	defer f.Close()
	table, err := measure.ParsePerfTableCSV(f)
	if err != nil {
		return nil, &flagError{flag: "--table", msg: fmt.Sprintf("%s: %v", path, err)}
	}
	ewb, err := p.float("ewb")
	if err != nil {
		return nil, err
	}
	odb, err := p.float("odb")
	if err != nil {
		return nil, err
	}
	flow, err := p.float("flow")
	if err != nil {
		return nil, err
	}
	total, sensible, err := table.Expected(measure.TemperatureIn(u, ewb), measure.TemperatureIn(u, odb), measure.AirFlowIn(u, flow))
	if err != nil {
		return nil, flagErr(err, inputFlags{"ewb": "ewb", "odb": "odb", "flow": "flow"})
	}
	o := newObj(12)
	o.str("units", u.String()).num("total", total.In(u)).num("sensible", sensible.In(u))
	return o, nil
}
