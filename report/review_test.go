package report

import (
	"strings"
	"testing"
	"time"

	"golang.org/x/image/font/gofont/goregular"
	"golang.org/x/image/font/sfnt"

	"fieldtab/schema"
)

// TestRenderReviewFixes renders a small job built to show what a
// practitioner's review of the report found wrong, and reads it back with
// pdftotext: the basis of each airflow, partial outlet sums, totals, the
// overdue mark, trade words in the reading log, line-to-line volts, tons on
// cooling only, motor output against input, and glyphs the font has. Figures
// are invented; what is checked is how the report states them.
func TestRenderReviewFixes(t *testing.T) {
	needTool(t, "pdftotext", "poppler-utils")
	now := fixtureNow
	p := newPlan(schema.Job{Name: "Fixture: review", Units: "ip"})
	p.instrumentsFor(now)
	at := now.Add(-6 * time.Hour)
	ahu := p.system(schema.System{Tag: "AHU-R", Kind: "air_handler", Name: "Review", Design: schema.SystemDesign{
		Airflow: 2000, RatedTotal: 78_000, MotorHP: 5, Volts: 460, Phase: 3, FLA: 7, FanRPM: 1000, OutdoorAir: 300,
		MotorSheaveSize: "2-groove B, adjustable, bored for a taper-lock bushing", MotorSheavePitch: 5.9}})
	s1 := p.outlet(ahu.ID, "S-R1", "Hall", "supply", "24x24", 1000)
	s2 := p.outlet(ahu.ID, "S-R2", "Hall", "supply", "24x24", 500)
	p.outlets[len(p.outlets)-1].Factor = 1.04
	p.outlet(ahu.ID, "S-R3", "Store", "supply", "12x12", 500)
	p.outlet(ahu.ID, "OA-R1", "Plant room", "outdoor_air", "24x12", 300)
	// S-R1's as-found reading used the overdue Hood 2, its final the current Hood 1.
	p.read(schema.SubjectOutlet, s1, "flow", 0, 900, schema.UnitCFM, schema.StageAsFound, "Hood 2", at)
	p.read(schema.SubjectOutlet, s1, "flow", 0, 1010, schema.UnitCFM, schema.StageFinal, "Hood 1", at.Add(time.Hour))
	p.read(schema.SubjectOutlet, s2, "flow", 0, 500, schema.UnitCFM, schema.StageFinal, "Hood 1", at.Add(time.Hour))
	tr := schema.Traverse{ID: schema.NewID(), JobID: p.job.ID, SystemID: ahu.ID, Tag: "T-R", Shape: "rect",
		Method: "log-tchebycheff", Width: 24, Height: 16, PointsW: 5, PointsH: 5}
	p.traverses = append(p.traverses, tr)
	p.traverseReadings(t, &tr, 1950, 0.072, at)
	p.fanReadings(ahu.ID, 980, 1750, [3]float64{460, 467, 450}, [3]float64{6, 6.2, 6.1}, 1.1, 0.7, -0.4, 0, at)

	ef := p.system(schema.System{Tag: "EF-R", Kind: "fan", Name: "Exhaust", Design: schema.SystemDesign{Airflow: 600, FanRPM: 900}})
	e1 := p.outlet(ef.ID, "E-R1", "Toilet", "exhaust", "10x10", 300)
	p.outlet(ef.ID, "E-R2", "Toilet", "exhaust", "10x10", 300)
	p.read(schema.SubjectOutlet, e1, "flow", 0, 310, schema.UnitCFM, schema.StageAsFound, "Hood 1", at)
	p.read(schema.SubjectSystem, ef.ID, "fan_rpm", 0, 880, schema.UnitRPM, schema.StageFinal, "Tach 1", at)

	p.caps = []schema.CapacityTest{{ID: schema.NewID(), JobID: p.job.ID, SystemID: ahu.ID, Tag: "CT-R", Mode: "cooling",
		FlowSource: "traverse", TraverseID: tr.ID}}
	for k, q := range []string{"enter_db", "enter_wb", "leave_db", "leave_wb"} {
		p.read(schema.SubjectCapacityTest, p.caps[0].ID, q, 0, []float64{80, 67, 55, 54}[k], schema.UnitDegF, schema.StageFinal,
			"Psychrometer 1", at)
	}
	p.waters = []schema.WaterTest{{ID: schema.NewID(), JobID: p.job.ID, SystemID: ahu.ID, Tag: "HW-R", Mode: "heating",
		FlowSource: "valve", ValveCv: 6.3, Fluid: "water", DesignFlow: 18}}
	w := p.waters[0]
	p.read(schema.SubjectWaterTest, w.ID, "dp", 0, 8, schema.UnitPsi, schema.StageFinal, "Hydronic 1", at)
	p.read(schema.SubjectWaterTest, w.ID, "enter_temp", 0, 180, schema.UnitDegF, schema.StageFinal, "Hydronic 1", at)
	p.read(schema.SubjectWaterTest, w.ID, "leave_temp", 0, 160, schema.UnitDegF, schema.StageFinal, "Hydronic 1", at)

	in := inputFor(t, p.memory(), now)
	r := in.Results
	var efr, ahr *schema.SystemResult
	for i := range r.Systems {
		switch r.Systems[i].Tag {
		case "EF-R":
			efr = &r.Systems[i]
		case "AHU-R":
			ahr = &r.Systems[i]
		}
	}
	if efr == nil || efr.Airflow == nil || efr.AirflowTolerance != nil || efr.FanLaw != nil || ahr.FanLaw == nil {
		t.Fatalf("fixture results: EF-R %+v, AHU-R fan law %+v", efr, ahr.FanLaw)
	}
	wr := r.WaterTests[0]
	if wr.Capacity == nil || wr.Capacity.Process != "heating" {
		t.Fatalf("fixture water test: %+v", wr.Capacity)
	}
	// About 76,400 ± 5,100 Btu/h against 95 % of 78,000 (74,100): above the
	// line, but within the test's ± of it.
	ct := r.CapacityTests[0]
	if ct.Status != "undetermined" || ct.PercentOfExpected == nil || ct.PercentOfExpectedUncertainty == nil {
		t.Fatalf("fixture capacity test: %s, %v %% of expected", ct.Status, ct.PercentOfExpected)
	}
	trr := r.Traverses[0]
	path, _ := render(t, in)
	raw := norm(pdfText(t, path, "raw"))
	layout := pdfText(t, path, "layout")
	u := newUnits(r.Units)

	for _, want := range []string{
		// Airflow basis: the traverse at its plane's density, design as scheduled.
		"System airflow, from traverse T-R, at the plane's density (" + norm(u.density(trr.Density)) + ")",
		"Design airflows are as scheduled",
		"at the plane's density (" + norm(u.density(trr.Density)) + "): " + norm(u.pct(trr.Tolerance.PercentOfDesign)) +
			" of the system's design airflow (as scheduled)",
		// A partial exhaust sum is not judged, and the summary says so.
		"not judged: 1 of 2 outlets read",
		"Systems' airflow against the fan tolerance",
		"1 not judged",
		// One basis for the supply sum, named on the system page.
		"Sum of supply outlets, final else as found (2 of 3 read; design of those read) " + norm(u.airU(1500)),
		// Totals: final, else as found.
		"exhaust total: final, else as found (1 as found)",
		// The hood factor beside the flow it makes; the log's reading as entered.
		"S-R2 Hall supply 24x24 1.04 500",
		// Volts line to line, amps per line.
		"L1–L2 460 / L2–L3 467 / L3–L1 450 V", "L1 6.0 / L2 6.2 / L3 6.1 A",
		// Motor output is not input power.
		"5.0 hp (3.7 kW) rated output",
		"Outdoor-air intake OA-R1",
		// Fan laws in symbols the font has.
		"Q₂/Q₁ = N₂/N₁, P₂/P₁ = (N₂/N₁)², W₂/W₁ = (N₂/N₁)³",
		// The nameplate's long sheave entry wraps whole.
		"bored for a taper-lock bushing, 5.90 in pitch diameter",
		// An air handler's coil figure is the schedule's.
		"scheduled capacity, at the schedule's design rating conditions",
		// A heating coil in MBH, no tons.
		"(" + norm(u.capAlt(wr.Capacity.Capacity, false)) + ") heating",
		// Trade words in the reading log.
		"VP, point 1", "volts, L1–L2", "amps, L3", "entering dry bulb", "valve ΔP", "fan speed", "hood reading",
		"entering water",
		// An undetermined capacity: where it lies, and why it is undetermined.
		pm(u.pct(*ct.PercentOfExpected), u.pct(*ct.PercentOfExpectedUncertainty)) +
			" of expected: above the 95 % line, but within the test's uncertainty of it",
	} {
		if !strings.Contains(raw, norm(want)) {
			t.Errorf("the report lacks %q", want)
		}
	}
	for _, bad := range []string{"∝", "enter db", "fan rpm", "vp 1 ", "volts 1", "Outdoor-air outlet", "hp motor",
		"The project specification governs.", "undetermined: meets"} {
		if strings.Contains(raw, bad) {
			t.Errorf("the report still has %q", bad)
		}
	}
	if strings.Contains(raw, norm(u.capAlt(wr.Capacity.Capacity, true))) {
		t.Error("the heating coil's capacity is given in tons")
	}
	if n := strings.Count(raw, "Fan laws: what reaching design would take"); n != 1 {
		t.Errorf("%d fan-law tables, want 1 (none on a partial outlet sum)", n)
	}
	// The overdue mark sits on the reading the status rests on: S-R1's final
	// was taken with a current hood, so no *, though its as-found reading
	// still makes a finding.
	if rows := rowsWith(layout, "S-R1"); len(rows) == 0 || strings.Contains(rows[0], "*") {
		t.Errorf("S-R1 row %q: want it, with no overdue mark", rows)
	}
	found := false
	for _, f := range r.Findings {
		found = found || (f.Kind == schema.FindingInstrumentOverdue && f.Subject.Tag == "S-R1")
	}
	if !found {
		t.Error("fixture: no overdue-instrument finding for S-R1")
	}
	// The exhaust total's final column: each read outlet's final, else as found.
	if rows := rowsWith(layout, "Total"); !hasRow(rows, "exhaust, 1 of 2 read", "600 310 310") {
		t.Errorf("exhaust total rows %q, want design 600, as found 310, final-else-as-found 310", rows)
	}
	// The reading log's instrument fits its column: one line per reading.
	if rows := rowsWith(layout, "entering dry bulb"); len(rows) == 0 || !strings.Contains(rows[0], "Psychrometer 1") {
		t.Errorf("reading-log rows %q: want the instrument on the reading's line", rows)
	}
	// Every character the report prints has a glyph in its font.
	f, err := sfnt.Parse(goregular.TTF)
	if err != nil {
		t.Fatal(err)
	}
	var b sfnt.Buffer
	missing := map[rune]bool{}
	for _, c := range raw {
		if c <= ' ' || missing[c] {
			continue
		}
		if i, err := f.GlyphIndex(&b, c); err != nil || i == 0 {
			missing[c] = true
			t.Errorf("the font has no glyph for %q", c)
		}
	}
}

func hasRow(rows []string, parts ...string) bool {
	for _, r := range rows {
		ok := true
		for _, p := range parts {
			ok = ok && strings.Contains(r, p)
		}
		if ok {
			return true
		}
	}
	return false
}
