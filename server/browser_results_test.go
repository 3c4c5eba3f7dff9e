package server

// The server's new results as the field app shows them: an as-found traverse
// beside the final one, two unmarked readings of one point (two devices) shown
// as a conflict that the lead resolves by voiding one, a heating coil whose
// water warms, and a motor with unbalanced volts. The harness is in
// browser_test.go.

import (
	"context"
	"fmt"
	"math"
	"strings"
	"testing"
	"time"

	"fieldtab/schema"
)

// resultsJob is a job made through the store for TestBrowserResults.
type resultsJob struct {
	job, system, traverse, water, capacity string
	conflict                               [2]string // the two unmarked final readings of point 3
}

func makeResultsJob(t *testing.T, db *schema.DB) resultsJob {
	t.Helper()
	ctx := context.Background()
	lead := schema.Actor{Name: "Lead", Role: schema.RoleLead}
	must := func(err error) {
		t.Helper()
		if err != nil {
			t.Fatalf("fixture: %v", err)
		}
	}
	j := &schema.Job{Name: "Quarry Lane Clinic", Units: "ip"}
	must(db.CreateJob(ctx, lead, j))
	sys := &schema.System{JobID: j.ID, Tag: "AHU-2", Kind: "air_handler", Name: "Exam rooms",
		Design: schema.SystemDesign{Airflow: 4000, RatedTotal: 120_000, RatedSensible: 86_000, MotorHP: 5, Volts: 460, Phase: 3, FLA: 7.6, FanRPM: 900, MotorRPM: 1750}}
	must(schema.Create(ctx, db, lead, sys))
	tr := &schema.Traverse{JobID: j.ID, SystemID: sys.ID, Tag: "T-2", Location: "main supply", Shape: "round", Method: "equal-area",
		Diameter: 24, PointsPerDiameter: 4, Diameters: 2}
	must(schema.Create(ctx, db, lead, tr))
	wt := &schema.WaterTest{JobID: j.ID, SystemID: sys.ID, Tag: "HW coil AHU-2", Mode: "heating", FlowSource: "meter",
		Fluid: "water", DesignFlow: 12}
	must(schema.Create(ctx, db, lead, wt))
	ct := &schema.CapacityTest{JobID: j.ID, SystemID: sys.ID, Tag: "CT-2", Mode: "cooling", FlowSource: "direct", FlowBasis: "standard"}
	must(schema.Create(ctx, db, lead, ct))
	rj := resultsJob{job: j.ID, system: sys.ID, traverse: tr.ID, water: wt.ID, capacity: ct.ID}
	var outlets []string
	for i := range 2 {
		o := &schema.Outlet{JobID: j.ID, SystemID: sys.ID, Tag: fmt.Sprintf("S-20%d", i+1), Room: "Exam", Kind: "supply",
			DesignFlow: 2000, Method: "hood", Factor: 1}
		must(schema.Create(ctx, db, lead, o))
		outlets = append(outlets, o.ID)
	}

	at := time.Now().Add(-30 * time.Minute)
	rd := func(kind, subject, qty string, point int, v float64, unit, stage string) schema.Reading {
		at = at.Add(time.Second)
		return schema.Reading{ID: schema.NewID(), SubjectKind: kind, SubjectID: subject, Quantity: qty, Point: point,
			Value: &v, Unit: unit, Stage: stage, TakenAt: at}
	}
	var rs []schema.Reading
	for p := 1; p <= 8; p++ {
		rs = append(rs, rd(schema.SubjectTraverse, tr.ID, "vp", p, 0.10, schema.UnitInWG, schema.StageAsFound))
	}
	for p := 1; p <= 8; p++ {
		rs = append(rs, rd(schema.SubjectTraverse, tr.ID, "vp", p, 0.12, schema.UnitInWG, schema.StageFinal))
	}
	rj.conflict[0] = rs[len(rs)-6].ID // final point 3
	for leg, v := range []float64{460, 470, 440} {
		rs = append(rs, rd(schema.SubjectSystem, sys.ID, "volts", leg+1, v, schema.UnitVolt, schema.StageFinal))
	}
	for leg, v := range []float64{6.9, 7.0, 7.1} {
		rs = append(rs, rd(schema.SubjectSystem, sys.ID, "amps", leg+1, v, schema.UnitAmp, schema.StageFinal))
	}
	// Outlets 3,000 cfm against the traverse's 4,360: 31 % apart.
	for _, o := range outlets {
		rs = append(rs, rd(schema.SubjectOutlet, o, "flow", 0, 1500, schema.UnitCFM, schema.StageFinal))
	}
	for _, x := range []struct {
		q string
		v float64
		u string
	}{{"enter_db", 80, schema.UnitDegF}, {"enter_wb", 67, schema.UnitDegF}, {"leave_db", 55, schema.UnitDegF},
		{"leave_wb", 54, schema.UnitDegF}, {"outdoor_db", 95, schema.UnitDegF}, {"flow", 4000, schema.UnitCFM}} {
		rs = append(rs, rd(schema.SubjectCapacityTest, ct.ID, x.q, 0, x.v, x.u, schema.StageFinal))
	}
	rs = append(rs, rd(schema.SubjectSystem, sys.ID, "fan_rpm", 0, 1000, schema.UnitRPM, schema.StageFinal),
		rd(schema.SubjectWaterTest, wt.ID, "flow", 0, 12, schema.UnitGPM, schema.StageFinal),
		// A heating coil whose water warms: it takes heat from the air.
		rd(schema.SubjectWaterTest, wt.ID, "enter_temp", 0, 100, schema.UnitDegF, schema.StageFinal),
		rd(schema.SubjectWaterTest, wt.ID, "leave_temp", 0, 110, schema.UnitDegF, schema.StageFinal))
	add := func(a schema.Actor, rs []schema.Reading) {
		t.Helper()
		res, err := db.AddReadings(ctx, a, j.ID, rs)
		must(err)
		for i, r := range res {
			if r.Status != "stored" {
				t.Fatalf("fixture reading %d (%s): %+v", i, rs[i].Quantity, r)
			}
		}
	}
	add(schema.Actor{Name: "Ivy"}, rs)
	// A second device's reading of final point 3, superseding nothing: two
	// current readings of one point and stage.
	other := rd(schema.SubjectTraverse, tr.ID, "vp", 3, 0.20, schema.UnitInWG, schema.StageFinal)
	rj.conflict[1] = other.ID
	add(schema.Actor{Name: "Sam"}, []schema.Reading{other})
	return rj
}

// joinLead pairs the tab as a lead through the join screen.
func (p *page) joinLead(name string) {
	p.t.Helper()
	code, _, err := p.app.srv.NewJoinCode(schema.RoleLead)
	if err != nil {
		p.t.Fatal(err)
	}
	code = strings.ReplaceAll(code, "-", "")
	p.navigate("/#join=" + code)
	p.wait("the join link's code in the code field", joinCodeIs(code))
	p.typeInto("[data-test=device-name]", name)
	p.click("[data-test=join-submit]")
	p.waitSel("[data-test=job-home], [data-test=jobs]")
}

// textHas is a JavaScript test that the element matching sel exists and its
// text holds each of subs.
func textHas(sel string, subs ...string) string {
	e := q(sel)
	s := e
	for _, x := range subs {
		s += " && " + e + ".textContent.includes(" + js(x) + ")"
	}
	return s
}

// TestBrowserResults walks the screens that show the new results on a job
// whose readings came from two devices, as the lead.
func TestBrowserResults(t *testing.T) {
	app := startApp(t)
	rj := makeResultsJob(t, app.db)
	p := newPage(t, app)
	p.joinLead("Lead tablet")

	// Standard-air pitot equation V = 4005·√VP fpm (VP in in. w.g., air at
	// 0.075 lb/ft³; ASHRAE Handbook—Fundamentals, from memory) over a 24 in
	// round duct's 3.1416 ft²: 0.10 in. w.g. everywhere → 3,979 cfm.
	area := math.Pi * 1 * 1
	asFound := 4005 * math.Sqrt(0.10) * area
	final := 4005 * math.Sqrt(0.12) * area

	p.goHash("#/job/" + rj.job + "/traverse/" + rj.traverse)
	p.wait("the conflict listed", textHas("[data-test=traverse-conflicts]", "Diameter 1, point 3", "Ivy", "Sam"))
	if got := p.attr("[data-test=traverse-result]", "data-status"); got != "conflict" {
		t.Errorf("traverse result status %q with two readings of a point, want conflict", got)
	}
	if got := p.attr("[data-test=point-button][data-point=\"3\"]", "class"); !strings.Contains(got, "tp-conflict") {
		t.Errorf("point 3's button is %q, want it marked as a conflict", got)
	}
	if n := p.count("[data-test=grid-point][data-state=conflict]"); n != 1 {
		t.Errorf("%d points drawn as conflicts on the grid, want 1", n)
	}
	if n := p.count("[data-test=conflict-void]"); n != 2 {
		t.Errorf("%d void buttons on the conflict for the lead, want 2", n)
	}
	// The as-found stage has no conflict: its flow is computed beside.
	p.wait("the as-found flow", textHas("[data-test=traverse-as-found-flow]", "±"))
	if v := numbers(p.text("[data-test=traverse-as-found-flow]")); len(v) == 0 || math.Abs(v[0]-asFound)/asFound > 0.01 {
		t.Errorf("as-found flow shows %v, want %.0f cfm within 1 %%", v, asFound)
	}
	p.screenshots("results-traverse-conflict", "[data-test=traverse-conflicts]")
	p.screenshots("results-traverse-conflict-grid", "[data-test=point-buttons]")

	// The lead voids the second device's reading, with a reason.
	p.click("[data-test=conflict-void][data-id=" + js(rj.conflict[1]) + "]")
	p.typeInto("[data-test=fix-note]", "second phone read the wrong port")
	p.click("[data-test=fix-save]")
	p.waitFor("the traverse computed again", q("[data-test=traverse-result][data-status=computed]")+" && !"+q("[data-test=traverse-conflicts]"), syncTimeout)
	if v := numbers(p.text("[data-test=traverse-flow]")); len(v) < 2 || math.Abs(v[0]-final)/final > 0.01 || v[1] <= 0 {
		t.Errorf("final flow shows %v, want %.0f cfm within 1 %% and its ±", v, final)
	}
	var void *schema.Reading
	for _, r := range app.readings(rj.job) {
		if r.Supersedes == rj.conflict[1] {
			void = &r
		}
	}
	var final3 []string
	for _, r := range schema.CurrentReadings(app.readings(rj.job)) {
		if r.SubjectID == rj.traverse && r.Point == 3 && r.Stage == schema.StageFinal {
			final3 = append(final3, r.ID)
		}
	}
	if len(final3) != 1 || final3[0] != rj.conflict[0] {
		t.Errorf("final point 3 has current readings %v, want only the first device's %s", final3, rj.conflict[0])
	}
	if void == nil || !void.Void || void.Note != "second phone read the wrong port" {
		t.Errorf("the store holds %+v superseding the second reading, want a void with the reason", void)
	}
	p.screenshots("results-traverse-as-found", "[data-test=traverse-as-found]")

	// NEMA MG 1 (from memory): voltage unbalance = largest deviation from the
	// average / average: 460, 470, 440 V → 16.7 / 456.7 = 3.65 %, above the
	// 1 % beyond which the motor is derated: a warning.
	p.goHash("#/job/" + rj.job + "/fan/" + rj.system)
	p.wait("the motor warning", q("[data-test=motor-status][data-status=warning]")+" && "+textHas("[data-test=electrical-result] [data-test=result-warnings]", "voltage imbalance"))
	if v := numbers(p.text("[data-test=fan-vimb]")); len(v) == 0 || math.Abs(v[0]-3.65) > 0.06 {
		t.Errorf("voltage imbalance shows %v, want 3.65 %%", v)
	}
	// 1,000 of a design 900 rpm: 111.1 %, beyond the 10 % of common practice.
	if v := numbers(p.text("[data-test=fan-rpm-pct]")); len(v) == 0 || v[0] != 111.1 {
		t.Errorf("fan speed %% of design shows %v, want 111.1", v)
	}
	p.screenshots("results-motor", "[data-test=step-electrical]")

	p.goHash("#/job/" + rj.job + "/water/" + rj.water)
	p.wait("the mode note", textHas("[data-test=water-mode-note]", "warms", "heating"))
	if got := p.text("[data-test=water-mode]"); !containsAll(got, "Stated mode: heating", "the water shows cooling") {
		t.Errorf("water mode line %q, want the stated mode and what the water shows", got)
	}
	if got := p.attr("[data-test=water-screen] [data-test=caution]", "data-kind"); got != "hot_water" {
		t.Errorf("the water screen's first caution is %q on a heating coil, want hot_water", got)
	}
	p.screenshots("results-water", "")

	// A nameplate rating is at the maker's rating conditions, not the test's:
	// the screen says so beside the figure.
	p.goHash("#/job/" + rj.job + "/capacity/" + rj.capacity)
	p.wait("the expected capacity's basis", textHas("[data-test=capacity-basis]", "rating conditions, not the test's"))
	if got := p.text("[data-test=capacity-expected]"); !strings.HasPrefix(got, "Rated total") {
		t.Errorf("expected capacity row %q, want it labelled as the rated total", got)
	}
	p.screenshots("results-capacity", "[data-test=capacity-basis]")

	p.goHash("#/job/" + rj.job)
	p.waitSel("[data-test=job-home]")
	p.wait("the motor and water findings", q("[data-test=finding][data-kind=motor_check]")+" && "+q("[data-test=finding][data-kind=water_mode_mismatch]")+
		" && "+q("[data-test=finding][data-kind=fan_speed_off_design]"))
	if got := p.text("[data-test=finding][data-kind=fan_speed_off_design]"); strings.Contains(got, "_") {
		t.Errorf("a finding shows an internal name: %q", got)
	}
	// (3,000 − 4,360) / 4,360 = −31 %, far beyond the fan band.
	p.wait("outlets against the traverse", textHas("[data-test=system][data-tag=\"AHU-2\"] [data-test=outlets-vs-traverse]", "disagree")+
		" && "+q("[data-test=finding][data-kind=outlets_traverse_disagree]"))
	if v := numbers(p.text("[data-test=outlets-vs-traverse]")); len(v) < 3 || v[0] != 3000 || math.Abs(v[2]-(3000-final)/final*100) > 0.2 {
		t.Errorf("outlets vs traverse shows %v, want 3,000 against %.0f cfm, %.1f %%", v, final, (3000-final)/final*100)
	}
	p.screenshots("results-home", "[data-test=outlets-vs-traverse]")
	p.checkConsole(false)
}
