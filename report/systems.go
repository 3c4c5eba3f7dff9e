package report

import (
	"strings"

	"fieldtab/schema"
)

// system lays out one system: airflow, outdoor air, fan and motor, the
// fan-law prediction and its capacity tests with their charts.
func (d *doc) system(sr *schema.SystemResult) {
	u := d.u
	sys := d.systems[sr.ID]
	title := "System " + sr.Tag
	if sr.Name != "" {
		title += ": " + sr.Name
	}
	d.heading(0, title)
	var design schema.SystemDesign
	if sys != nil {
		design = sys.Design
		d.pairs(36, append([][2]string{{"Kind", label(sys.Kind)}, {"Location", orDash(sys.Location)}}, remarkPair(sys.Remarks)...)...)
		d.nameplate(sys)
	}

	d.heading(1, "Airflow")
	t := d.newTable(column{head: "Item", w: 3.2}, column{head: "Design", w: 1.4, align: "R"},
		column{head: "Measured", w: 2, align: "R"}, column{head: "% of design", w: 1.1, align: "R"},
		column{head: "Tolerance band", w: 1.8, align: "R"}, column{head: "Status", w: 1.3})
	t.strong = func(col int, s string) bool { return col == 5 && (deficientLabel(s) || s == "disagree") }
	if sr.Airflow != nil {
		src := "outlets"
		if sr.AirflowSource == "traverse" {
			src = "traverse"
			if tr := d.rTraverses[sr.AirflowTraverseID]; tr != nil {
				src = "traverse " + tr.Tag + ", at the plane's density (" + u.density(tr.Density) + ")"
			}
		} else if sr.Outlets.SupplyRead == 0 {
			src = "exhaust outlets, as read"
		} else {
			src = "supply outlets, as read"
		}
		meas, pctD, band, st := u.airU(*sr.Airflow), dash, dash, dash
		if tl := sr.AirflowTolerance; tl != nil {
			meas = withPM(u.air(*sr.Airflow), tl, u.airU)
			pctD, band, st = u.pct(tl.PercentOfDesign), u.air(tl.Low)+"–"+u.airU(tl.High), tolStatus(tl, true)
		} else if sr.AirflowOutletsRead < sr.AirflowOutletsTotal {
			// A partial sum lacks the unread outlets: it is not judged.
			st = "not judged: " + itoa(sr.AirflowOutletsRead) + " of " + itoa(sr.AirflowOutletsTotal) + " outlets read"
		}
		t.row("System airflow, from "+src, designAir(u, sr.DesignAirflow), meas, pctD, band, st)
	} else {
		t.row("System airflow", designAir(u, sr.DesignAirflow), "not measured", dash, dash, dash)
	}
	o := sr.Outlets
	if o.SupplyTotal > 0 {
		// The same basis as the outlet tables' totals: the flows read (final,
		// else as found) over the design of the outlets read.
		des := dash
		if o.SupplyRead > 0 {
			des = u.airU(o.SupplyDesignRead)
		}
		t.row("Sum of supply outlets, final else as found ("+itoa(o.SupplyRead)+" of "+itoa(o.SupplyTotal)+
			" read; design of those read)", des, u.airU(o.SupplyFlow), u.pctP(o.SupplyPercentOfDesignRead), dash, dash)
	}
	if a := sr.OutletsVsTraverse; a != nil {
		trTag := "the traverse"
		if tr := d.rTraverses[a.TraverseID]; tr != nil {
			trTag = "traverse " + tr.Tag
		}
		band, st := dash, label(a.Status)
		if tl := a.Tolerance; tl != nil {
			band = u.air(tl.Low) + "–" + u.airU(tl.High)
		}
		t.row("Sum of all "+a.Outlets+" outlets against "+trTag+" (fan tolerance, both ±)", u.airU(a.TraverseFlow),
			u.airU(a.OutletSum), u.pct(a.OutletSum/a.TraverseFlow*100), band, st)
	}
	t.end()
	d.para("Design airflows are as scheduled. Measured airflows are actual: a traverse's at the density of the air at its "+
		"plane, outlets as read (not corrected to standard air).", "", sizeSmall)
	if o.Total > 0 {
		line := "Outlets on the system: " + itoa(o.Total) + ", of which " + itoa(o.Read) + " read: " + itoa(o.Within) +
			" within tolerance, " + itoa(o.Low) + " low, " + itoa(o.High) + " high, " + itoa(o.Undetermined) + " undetermined"
		if o.Errors > 0 {
			line += ", " + itoa(o.Errors) + " not computed"
		}
		d.para(line+".", "", sizeBody)
	}

	// Outdoor air: the design figure, and each outdoor-air outlet as read.
	var oa []*schema.OutletResult
	for i := range d.r.Outlets {
		if or := &d.r.Outlets[i]; or.SystemID == sr.ID && or.Kind == "outdoor_air" {
			oa = append(oa, or)
		}
	}
	if design.OutdoorAir > 0 || len(oa) > 0 {
		d.heading(1, "Outdoor air")
		t := d.newTable(column{head: "Item", w: 3.2}, column{head: "Design", w: 1.4, align: "R"},
			column{head: "Measured", w: 2, align: "R"}, column{head: "% of design", w: 1.1, align: "R"},
			column{head: "Tolerance band", w: 1.8, align: "R"}, column{head: "Status", w: 1.3})
		t.strong = func(col int, s string) bool { return col == 5 && deficientLabel(s) }
		if design.OutdoorAir > 0 {
			t.row("System design outdoor air", u.airU(design.OutdoorAir), "", "", "", "")
		}
		for _, or := range oa {
			gov := governing(or)
			meas, pctD, band := "not read", dash, dash
			if gov != nil && gov.Flow != nil {
				meas = u.airU(*gov.Flow)
				if tl := gov.Tolerance; tl != nil {
					meas = withPM(u.air(*gov.Flow), tl, u.airU)
					pctD, band = u.pct(tl.PercentOfDesign), u.air(tl.Low)+"–"+u.airU(tl.High)
				}
			}
			t.row("Outdoor-air intake "+or.Tag+withRoom(or.Room), u.airU(or.DesignFlow), meas, pctD, band, status(or.Status))
		}
		t.end()
	}

	d.fanAndMotor(sr, design)
	d.notes(noteGroup{sr.Tag, sr.Notes})
	d.itemNotes(sr.Tag, nil, nil, sr.Flags, sr.Errors)
	d.remarks(sr.Tag, "", schema.SubjectSystem, sr.ID)

	for i := range d.r.CapacityTests {
		if ct := &d.r.CapacityTests[i]; ct.SystemID == sr.ID {
			d.capacityTest(ct)
		}
	}
}

func withRoom(room string) string {
	if room == "" {
		return ""
	}
	return " (" + room + ")"
}

func designAir(u units, v float64) string {
	if v <= 0 {
		return dash
	}
	return u.airU(v)
}

func designOr(v float64, f func(float64) string) string {
	if v <= 0 {
		return dash
	}
	return f(v)
}

// governing is the outlet reading its status comes from: final, else as found.
func governing(o *schema.OutletResult) *schema.OutletReading {
	if o.Final != nil {
		return o.Final
	}
	return o.AsFound
}

func (d *doc) fanAndMotor(sr *schema.SystemResult, design schema.SystemDesign) {
	u := d.u
	has := sr.FanRPM != nil || sr.MotorRPM != nil || len(sr.Volts) > 0 || len(sr.Amps) > 0 || len(sr.Statics) > 0 ||
		design.FanRPM > 0 || design.MotorHP > 0
	if has {
		d.heading(1, "Fan and motor")
		t := d.newTable(column{head: "Item", w: 2.4}, column{head: "Design or nameplate", w: 2.2, align: "R"},
			column{head: "Measured", w: 3, align: "R"}, column{head: "Remark", w: 2.6})
		t.row("Fan speed", designOr(design.FanRPM, u.rpm), u.rpmP(sr.FanRPM), pctOfDesign(u, sr.FanRPMPercentOfDesign))
		t.row("Motor speed", designOr(design.MotorRPM, u.rpm), u.rpmP(sr.MotorRPM), "")
		volts := designOr(design.Volts, func(v float64) string { return nu(u.n(v, 0), "V") })
		if design.Phase > 0 && volts != dash {
			volts += ", " + itoa(design.Phase) + " phase"
		}
		t.row("Voltage", volts, legs(u, sr.Volts, 0, "V", voltLegs[:]), imbalance(u, sr.VoltageImbalance))
		t.row("Current", designOr(design.FLA, func(v float64) string { return nu(u.n(v, 1), "A") + " FLA" }),
			legs(u, sr.Amps, 1, "A", ampLegs[:]), strings.Join(nonEmpty(pctFLA(u, sr.PercentFLA), imbalance(u, sr.CurrentImbalance)), "; "))
		// The nameplate's power is the motor's rated output (shaft), not the
		// electrical input measured beside it: say so.
		motor := dash
		if design.MotorHP > 0 {
			motor = nu(u.n(design.MotorHP, 1), "hp") + " (" + nu(u.n(design.MotorHP*kWPerHP, 1), "kW") + ") rated output"
			if u.si {
				motor = nu(u.n(design.MotorHP, 1), "kW") + " rated output"
			}
		}
		t.row("Input power", motor, u.kwP(sr.InputPowerKW), pfText(u, sr.PowerFactor))
		for _, q := range staticOrder {
			v, ok := sr.Statics[q.key]
			des, remark := dash, ""
			if q.key == "static_external" {
				des, remark = designOr(design.ExternalStatic, u.ductU), pctOfDesign(u, sr.ExternalStaticPercentOfDesign)
			}
			if !ok && des == dash {
				continue
			}
			meas := dash
			if ok {
				meas = u.ductU(v)
			}
			t.row(q.name, des, meas, remark)
		}
		if sr.MotorSheave != nil || sr.FanSheave != nil {
			t.row("Sheaves, pitch diameter", "", "motor "+ptr(sr.MotorSheave, func(v float64) string { return u.lengthU(v, true) })+
				", fan "+ptr(sr.FanSheave, func(v float64) string { return u.lengthU(v, true) }), "")
		}
		if sr.MotorStatus != "" {
			st := "all pass"
			if sr.MotorStatus == schema.MotorWarning {
				st = itoa(len(sr.MotorWarnings)) + " beyond the limit: see below"
			}
			t.row("Motor checks", dash, st, "voltage and current imbalance, % of FLA")
		}
		t.end()
		d.notes(noteGroup{sr.Tag + ", motor", sr.MotorWarnings})
	}

	if fl := sr.FanLaw; fl != nil {
		d.heading(1, "Fan laws: what reaching design would take")
		t := d.newTable(column{head: "Item", w: 2.6}, column{head: "Now", w: 2, align: "R"}, column{head: "To reach design", w: 2, align: "R"})
		t.row("Airflow", u.airP(sr.Airflow), u.airU(fl.TargetFlow))
		t.row("Fan speed", u.rpmP(sr.FanRPM), u.rpm(fl.FanRPM))
		if fl.StaticPressure != nil {
			now := dash
			if v, ok := sr.Statics["static_external"]; ok {
				now = u.ductU(v)
			}
			t.row("External static pressure", now, u.ductU(*fl.StaticPressure))
		}
		if fl.InputPowerKW != nil {
			t.row("Motor input power", u.kwP(sr.InputPowerKW), u.kw(*fl.InputPowerKW))
		}
		if fl.MotorSheave != nil {
			t.row("Motor sheave pitch diameter", ptr(sr.MotorSheave, func(v float64) string { return u.lengthU(v, true) }),
				u.lengthU(*fl.MotorSheave, true))
		}
		t.end()
		if fl.Note != "" {
			d.para(fl.Note, "I", sizeSmall)
		}
	}
}

// kWPerHP is one mechanical horsepower (550 ft·lbf/s) in kW (NIST SP 811,
// appendix B.8: 745.6999 W).
const kWPerHP = 0.7456999

var staticOrder = []struct{ key, name string }{
	{"static_external", "External static pressure"},
	{"static_supply", "Fan discharge static pressure"},
	{"static_return", "Fan inlet (suction) static pressure"},
	{"static_filter", "Pressure drop, filter"},
	{"static_coil", "Pressure drop, coil"},
}

// legs prints a motor reading per leg, each named as names gives: volts
// line to line ("L1–L2 472 / L2–L3 469 / L3–L1 474 V"), amps per line.
func legs(u units, vs []schema.LegValue, dec int, unit string, names []string) string {
	if len(vs) == 0 {
		return dash
	}
	parts := make([]string, len(vs))
	for i, v := range vs {
		parts[i] = u.n(v.Value, dec)
		if v.Leg > 0 && v.Leg < len(names) {
			parts[i] = names[v.Leg] + " " + parts[i]
		}
	}
	return nu(strings.Join(parts, " / "), unit)
}

func imbalance(u units, v *float64) string {
	if v == nil {
		return ""
	}
	return "imbalance " + u.pct1(*v)
}

func pctFLA(u units, v *float64) string {
	if v == nil {
		return ""
	}
	return u.pct(*v) + " of FLA at the highest leg"
}

func pfText(u units, v *float64) string {
	if v == nil {
		return ""
	}
	return "power factor " + u.n(*v, 2)
}

// capacityTest lays out one test: its air states, delivered against expected
// capacity with its ±, and the chart of the coil process.
func (d *doc) capacityTest(ct *schema.CapacityTestResult) {
	u := d.u
	// The states and the verdict stay together on one page; the chart may
	// follow on the next.
	d.ensure(120)
	d.heading(1, "Capacity test "+ct.Tag+" ("+ct.Mode+")")
	t := d.newTable(column{head: "Air state", w: 2.4}, column{head: "Entering", w: 2, align: "R"}, column{head: "Leaving", w: 2, align: "R"})
	e, l := ct.Enter, ct.Leave
	st := func(f func(*schema.AirStateResult) string, s *schema.AirStateResult) string {
		if s == nil {
			return dash
		}
		return f(s)
	}
	rows := []struct {
		name string
		f    func(*schema.AirStateResult) string
	}{
		{"Dry bulb", func(s *schema.AirStateResult) string { return u.tempU(s.DryBulb) }},
		{"Wet bulb", func(s *schema.AirStateResult) string { return u.tempU(s.WetBulb) }},
		{"Dew point", func(s *schema.AirStateResult) string { return u.tempU(s.DewPoint) }},
		{"Relative humidity", func(s *schema.AirStateResult) string { return u.pct(s.RelHum) }},
		{"Humidity ratio", func(s *schema.AirStateResult) string { return u.humRatioU(s.HumRatio) }},
		{"Enthalpy", func(s *schema.AirStateResult) string { return u.enthalpyU(s.Enthalpy) }},
		{"Density", func(s *schema.AirStateResult) string { return u.density(s.Density) }},
	}
	for _, r := range rows {
		t.row(r.name, st(r.f, e), st(r.f, l))
	}
	t.end()

	src := label(ct.FlowSource)
	if c := d.captests[ct.ID]; c != nil && ct.FlowSource == "traverse" {
		if tr := d.rTraverses[c.TraverseID]; tr != nil {
			src = "traverse " + tr.Tag
		}
	} else if ct.FlowSource == "outlets" {
		src = "sum of the supply outlets"
	} else if ct.FlowSource == "direct" {
		src = "direct reading"
	}
	air := dash
	if ct.Airflow != nil {
		air = u.flowOnBasis(*ct.Airflow, ct.FlowBasis) + ", from " + src
		if ct.FlowSource == "outlets" && ct.FlowBasis == "standard" {
			// Outlet flows are as read, not corrected: say what the mass
			// flow takes them for, beside the figure.
			air = u.airU(*ct.Airflow) + ", the sum of the supply outlets as read (not corrected to standard air), " +
				"taken as standard air (" + standardAir(u.si) + ") for the mass flow"
		}
	}
	cooling := ct.Mode == "cooling"
	kv := [][2]string{{"Airflow", air}, {"Outdoor dry bulb", u.tempP(ct.OutdoorDB)}}
	if c := ct.Capacity; c != nil {
		unc := ct.Uncertainty
		withU := func(v float64, du func(*schema.CapacityUncertainty) float64) string {
			if unc == nil {
				return u.capU(v, cooling)
			}
			return u.capPM(v, du(unc), cooling)
		}
		kv = append(kv,
			[2]string{"Delivered total", withU(c.Total, func(x *schema.CapacityUncertainty) float64 { return x.Total }) + " (" + c.Process + ")"},
			[2]string{"Delivered sensible", withU(c.Sensible, func(x *schema.CapacityUncertainty) float64 { return x.Sensible })},
			[2]string{"Latent", u.capU(c.Latent, cooling)},
			[2]string{"Sensible heat ratio", u.n(c.SHR, 2)})
		if unc != nil && len(unc.Omits) > 0 {
			kv = append(kv, [2]string{"± leaves out", strings.Join(unc.Omits, ", ") + " (no accuracy on record)"})
		}
	}
	if ex := ct.Expected; ex != nil {
		src := map[string]string{"perf_table": "manufacturer's performance table at the test's conditions", "nameplate": "nameplate rating"}[ex.Source]
		if src == "" {
			src = label(ex.Source)
		}
		exp := u.capU(ex.Total, cooling) + " total"
		if ex.Sensible != nil {
			exp += ", " + u.capU(*ex.Sensible, cooling) + " sensible"
		}
		from := "from the " + src
		if ex.Basis != "" {
			from = ex.Basis
			if ex.AtTestConditions {
				from = "from the " + ex.Basis
			}
		}
		kv = append(kv, [2]string{"Expected", exp + ", " + from})
		if ex.Note != "" {
			kv = append(kv, [2]string{"Expected, note", ex.Note})
		}
	}
	verdict := status(ct.Status)
	if ct.SideText != "" {
		// The side text says both where the figure lies and that the
		// test's ± cannot decide: "undetermined" would say it twice.
		verdict = ct.SideText
	}
	if ct.PercentOfExpected != nil {
		pct := u.pct(*ct.PercentOfExpected)
		if pu := ct.PercentOfExpectedUncertainty; pu != nil {
			pct = pm(pct, u.pct(*pu))
		}
		verdict = pct + " of expected: " + verdict
	}
	kv = append(kv, [2]string{"Result", verdict})
	if c := d.captests[ct.ID]; c != nil {
		kv = append(kv, remarkPair(c.Remarks)...)
	}
	d.pairs(40, kv...)
	d.itemNotes(ct.Tag, ct.Missing, ct.Warnings, ct.Flags, ct.Errors)
	d.remarks(ct.Tag, "", schema.SubjectCapacityTest, ct.ID)
	d.psychroChart(ct)
}
