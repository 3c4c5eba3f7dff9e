package server

// The app's safety cautions where the work can hurt someone: a roof caution
// for a fan whose location is a roof (not only a rooftop unit), a pump's
// closed-valve caution, the electrical caution's wording, and the fan
// screen's line-to-line volts. The harness is in browser_test.go.

import (
	"context"
	"strings"
	"testing"
	"time"

	"fieldtab/schema"
)

func TestBrowserFanCautions(t *testing.T) {
	app := startApp(t)
	ctx := context.Background()
	lead := schema.Actor{Name: "Lead", Role: schema.RoleLead}
	must := func(err error) {
		t.Helper()
		if err != nil {
			t.Fatalf("fixture: %v", err)
		}
	}
	j := &schema.Job{Name: "Alder Street Offices", Units: "ip"}
	must(app.db.CreateJob(ctx, lead, j))
	ef := &schema.System{JobID: j.ID, Tag: "EF-1", Kind: "fan", Name: "Toilet exhaust", Location: "Roof, north",
		Design: schema.SystemDesign{Airflow: 1200, Volts: 460, Phase: 3, FLA: 2.1, FanRPM: 1100}}
	must(schema.Create(ctx, app.db, lead, ef))
	pump := &schema.System{JobID: j.ID, Tag: "P-1", Kind: "pump", Name: "Chilled water", Location: "Plant room",
		Design: schema.SystemDesign{WaterFlow: 40}}
	must(schema.Create(ctx, app.db, lead, pump))
	wt := &schema.WaterTest{JobID: j.ID, SystemID: pump.ID, Tag: "CHW main", Mode: "cooling", FlowSource: "meter", Fluid: "water", DesignFlow: 40}
	must(schema.Create(ctx, app.db, lead, wt))
	ct := &schema.CapacityTest{JobID: j.ID, SystemID: ef.ID, Tag: "CT-EF", Mode: "cooling", FlowSource: "direct", FlowBasis: "leave"}
	must(schema.Create(ctx, app.db, lead, ct))
	hw := &schema.WaterTest{JobID: j.ID, SystemID: pump.ID, Tag: "HW main", Mode: "heating", FlowSource: "meter", Fluid: "water", DesignFlow: 40}
	must(schema.Create(ctx, app.db, lead, hw))
	// A coil on the roof fan read with a direct airflow at leaving air; 40 gpm
	// through 10 °F (chilled, warming) and 20 °F (heating, cooling): the
	// first a cooling capacity, the second a heating one.
	at := time.Now().Add(-10 * time.Minute)
	var rs []schema.Reading
	for _, x := range []struct {
		id, q string
		v     float64
		u     string
	}{{wt.ID, "flow", 40, schema.UnitGPM}, {wt.ID, "enter_temp", 44, schema.UnitDegF}, {wt.ID, "leave_temp", 54, schema.UnitDegF},
		{ct.ID, "enter_db", 80, schema.UnitDegF}, {ct.ID, "enter_wb", 67, schema.UnitDegF}, {ct.ID, "leave_db", 55, schema.UnitDegF},
		{ct.ID, "leave_wb", 54, schema.UnitDegF}, {ct.ID, "flow", 1200, schema.UnitCFM},
		{hw.ID, "flow", 40, schema.UnitGPM}, {hw.ID, "enter_temp", 180, schema.UnitDegF}, {hw.ID, "leave_temp", 160, schema.UnitDegF}} {
		at = at.Add(time.Second)
		v := x.v
		kind := schema.SubjectWaterTest
		if x.id == ct.ID {
			kind = schema.SubjectCapacityTest
		}
		rs = append(rs, schema.Reading{ID: schema.NewID(), SubjectKind: kind, SubjectID: x.id, Quantity: x.q,
			Value: &v, Unit: x.u, Stage: schema.StageFinal, TakenAt: at})
	}
	res, err := app.db.AddReadings(ctx, schema.Actor{Name: "Ivy"}, j.ID, rs)
	must(err)
	for i, r := range res {
		if r.Status != "stored" {
			t.Fatalf("fixture reading %d: %+v", i, r)
		}
	}

	p := newPage(t, app)
	p.join("Phone Cautions")
	p.waitSel(tagSel("system", "EF-1"))
	if got := p.attr(tagSel("system", "EF-1")+" [data-test=caution]", "data-kind"); got != "roof" {
		t.Errorf("EF-1 (a fan, location Roof) shows caution %q on the job home, want roof", got)
	}
	if got := p.attr(tagSel("system", "P-1")+" [data-test=caution]", "data-kind"); got != "pump" {
		t.Errorf("P-1 (a pump) shows caution %q on the job home, want pump", got)
	}

	p.goHash("#/job/" + j.ID + "/fan/" + ef.ID)
	p.waitSel("[data-test=step-electrical]")
	if got := p.attr("[data-test=fan-screen] [data-test=caution]", "data-kind"); got != "roof" {
		t.Errorf("the fan screen's first caution is %q for a fan on the roof, want roof", got)
	}
	if got := p.text("[data-test=step-electrical] [data-test=caution]"); !strings.Contains(got, "NFPA 70E") || !strings.Contains(got, "arc-rated PPE") {
		t.Errorf("the electrical caution reads %q; want covers opened under NFPA 70E or the local equivalent, with arc-rated PPE", got)
	}
	// Volts are read line to line, amps on each line.
	label := func(test string) string {
		return eval[string](p, "(() => { const i = "+q("[data-test="+test+"]")+"; const l = i && document.querySelector('label[for=\"' + i.id + '\"]'); return l ? l.textContent : ''; })()")
	}
	for test, want := range map[string]string{"q-volts-1": "L1–L2", "q-volts-2": "L2–L3", "q-volts-3": "L3–L1", "q-amps-1": "L1", "q-amps-3": "L3",
		"q-static_supply": "Fan discharge static", "q-static_return": "Fan inlet (suction) static", "q-motor_sheave": "Motor sheave pitch diameter"} {
		if got := label(test); got != want {
			t.Errorf("field %s is labelled %q, want %q", test, got, want)
		}
	}
	p.screenshots("fan-cautions", "[data-test=step-electrical]")

	// A capacity test of the roof fan: the roof caution, and the airflow's
	// basis in words.
	p.goHash("#/job/" + j.ID + "/capacity/" + ct.ID)
	p.wait("the airflow and its basis", textHas("[data-test=capacity-airflow]", "cfm"))
	if got := p.text("[data-test=capacity-airflow]"); !strings.Contains(got, "(leaving air)") {
		t.Errorf("the capacity test's airflow reads %q, want it marked (leaving air)", got)
	}
	if got := p.attr("[data-test=capacity-screen] [data-test=caution]", "data-kind"); got != "roof" {
		t.Errorf("the roof fan's capacity test shows caution %q, want roof", got)
	}

	p.goHash("#/job/" + j.ID + "/water/" + wt.ID)
	p.waitSel("[data-test=water-screen] [data-test=caution]")
	if n := p.count("[data-test=water-screen] [data-test=caution][data-kind=pump]"); n != 1 {
		t.Errorf("the pump's water test shows %d closed-valve cautions, want 1", n)
	}
	if got := p.text("[data-test=caution][data-kind=pump]"); !strings.Contains(got, "closed discharge valve") || !strings.Contains(got, "shut-off head") {
		t.Errorf("the pump caution reads %q; want the closed discharge valve and shut-off head in words", got)
	}

	// Tons are for cooling only (a ton is 12,000 Btu/h of cooling); a heating
	// capacity is in Btu/h and MBH.
	p.wait("the chilled-water capacity", textHas("[data-test=water-capacity]", "MBH"))
	if got := p.text("[data-test=water-capacity]"); !strings.Contains(got, "tons") {
		t.Errorf("the chilled-water capacity reads %q, want tons beside the MBH", got)
	}
	p.goHash("#/job/" + j.ID + "/water/" + hw.ID)
	p.wait("the heating-water test", q("[data-test=water-screen][data-tag="+js("HW main")+"]"))
	p.wait("the heating capacity", textHas("[data-test=water-capacity]", "MBH"))
	if got := p.text("[data-test=water-capacity]"); strings.Contains(got, "ton") || !strings.Contains(got, "heating") {
		t.Errorf("the heating capacity reads %q, want Btu/h and MBH, no tons", got)
	}
	if got := p.attr("[data-test=water-screen] [data-test=caution]", "data-kind"); got != "hot_water" {
		t.Errorf("the heating-water test's first caution is %q, want hot_water", got)
	}
	if n := p.count("[data-test=water-screen] [data-test=caution][data-kind=pump]"); n != 1 {
		t.Errorf("the heating-water test on a pump shows %d closed-valve cautions, want 1", n)
	}
	p.checkConsole(true)
}
