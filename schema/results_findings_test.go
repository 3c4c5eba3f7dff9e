package schema

import (
	"context"
	"math"
	"strings"
	"testing"
	"time"

	"fieldtab/measure"
)

// Velocity from velocity pressure by hand: V = 1097.2·√(VP/ρ) fpm with VP in
// in. w.g. and ρ in lb/ft³, for the 60 °F water column fieldtab uses
// (REFERENCES.md, "Pitot traverses"; measure.PitotVelocity's doc).
func handVelocityFPM(vp, rho float64) float64 {
	if vp <= 0 {
		return 0
	}
	return 1097.2 * math.Sqrt(vp/rho)
}

func TestResultsTraverseAsFoundAndUncertainty(t *testing.T) {
	b, _, tr := resTraverseJob()
	// A manometer stated as ±1 % of reading ± 0.005 in. w.g. (figures
	// invented for the test).
	mano := b.instrument("Manometer 1", "manometer", "2026-01-01", 1, 0.005, "in. w.g.")
	for p := 1; p <= 25; p++ {
		b.read(SubjectTraverse, tr.ID, "vp", p, 0.16, UnitInWG, StageAsFound, mano)
	}
	for p := 1; p <= 25; p++ {
		b.read(SubjectTraverse, tr.ID, "vp", p, 0.25, UnitInWG, StageFinal, mano)
	}
	r := b.compute(t)
	tv := r.Traverses[0]
	if tv.Stage != StageFinal || tv.Status != ResultComputed || tv.AsFound == nil || tv.AsFound.Flow == nil {
		t.Fatalf("traverse = %+v, as found %+v", tv, tv.AsFound)
	}
	// By hand: 24 × 12 in = 2 ft²; standard air 0.075 lb/ft³.
	// As found V = 1097.2·√(0.16/0.075) = 1602.6 fpm → 3205 cfm; final 4006 cfm.
	resClose(t, "as-found flow", *tv.AsFound.Flow, 2*handVelocityFPM(0.16, 0.075), 2e-4)
	resClose(t, "final flow", *tv.Flow, 2*handVelocityFPM(0.25, 0.075), 2e-4)
	// 3205 of 4000 cfm = 80 %, below the fan band −5 %/+10 %: low as found.
	if tv.AsFound.Tolerance == nil || tv.AsFound.Tolerance.Status != "low" || tv.AsFound.PointsRead != 25 {
		t.Errorf("as-found tolerance = %+v", tv.AsFound.Tolerance)
	}
	// ± by hand at the final stage: each point reads 0.25 ± (1 % × 0.25 +
	// 0.005) = ± 0.0075 in. w.g.; on velocity half the span V(0.2575) −
	// V(0.2425); the same at every point, so the mean's ± is the same and the
	// flow's is × 2 ft². The method adds ±5 % (common practice; a
	// trade certifying body's pitot-velocity requirement, REFERENCES.md), root-sum-square.
	inst := 2 * (handVelocityFPM(0.2575, 0.075) - handVelocityFPM(0.2425, 0.075)) / 2
	method := 0.05 * *tv.Flow
	if tv.FlowUncertainty == nil {
		t.Fatal("no flow ±")
	}
	resClose(t, "flow ±", *tv.FlowUncertainty, math.Hypot(inst, method), 1e-3)
	// The status is judged with the instrument's part alone, as an outlet's.
	resClose(t, "tolerance ±", tv.Tolerance.Uncertainty, inst, 1e-3)
	if tv.Tolerance.UncertaintyUnknown || !strings.Contains(tv.UncertaintyNote, "common practice") {
		t.Errorf("tolerance %+v, note %q", tv.Tolerance, tv.UncertaintyNote)
	}
}

func TestResultsTraverseConflict(t *testing.T) {
	t.Run("OKFinalConflictNoFlow", func(t *testing.T) {
		b, _, tr := resTraverseJob()
		for p := 1; p <= 25; p++ {
			b.read(SubjectTraverse, tr.ID, "vp", p, 0.25, UnitInWG, StageFinal, "")
		}
		// A second device's reading of point 7, superseding nothing.
		dup := b.read(SubjectTraverse, tr.ID, "vp", 7, 0.31, UnitInWG, StageFinal, "")
		dup.DeviceID, dup.Technician = "bbbbbbbb-2222", "second tech"
		r := b.compute(t)
		tv := r.Traverses[0]
		if tv.Status != ResultConflict || tv.Flow != nil || len(tv.Conflicts) != 1 {
			t.Fatalf("traverse = %+v, want a conflict and no flow", tv)
		}
		cf := tv.Conflicts[0]
		if cf.Point != 7 || cf.Stage != StageFinal || len(cf.Readings) != 2 || cf.Readings[1].ReadingID != dup.ID ||
			cf.Readings[1].Technician != "second tech" || cf.Readings[1].DeviceID != dup.DeviceID {
			t.Fatalf("conflict = %+v", cf)
		}
		if !tv.Points[6].Conflict || tv.Points[6].Value != nil || tv.Points[5].Conflict {
			t.Errorf("point 7 = %+v, want marked as a conflict with no value", tv.Points[6])
		}
		resClose(t, "first value", *cf.Readings[0].Value, 0.25, 1e-12)
		resClose(t, "second value", *cf.Readings[1].Value, 0.31, 1e-12)
		f := resFinding(r, FindingTraverseConflict, tr.ID)
		if f == nil || !strings.Contains(f.Text, "0.310 in. w.g.") || !strings.Contains(f.Text, "second tech") {
			t.Errorf("finding = %+v", f)
		}
		if s := r.Systems[0]; s.AirflowSource == "traverse" {
			t.Error("the system's airflow must not come from a conflicted traverse")
		}
	})
	t.Run("OKSupersededIsNoConflict", func(t *testing.T) {
		b, _, tr := resTraverseJob()
		for p := 1; p <= 25; p++ {
			b.read(SubjectTraverse, tr.ID, "vp", p, 0.25, UnitInWG, StageFinal, "")
		}
		fix := b.read(SubjectTraverse, tr.ID, "vp", 7, 0.26, UnitInWG, StageFinal, "")
		fix.Supersedes = b.s.Readings[6].ID
		r := b.compute(t)
		if tv := r.Traverses[0]; tv.Status != ResultComputed || len(tv.Conflicts) != 0 || *tv.Points[6].Value != 0.26 {
			t.Errorf("traverse = %+v, want computed with the correction", tv)
		}
	})
	t.Run("OKAsFoundConflictFinalComputed", func(t *testing.T) {
		b, _, tr := resTraverseJob()
		for p := 1; p <= 25; p++ {
			b.read(SubjectTraverse, tr.ID, "vp", p, 0.2, UnitInWG, StageAsFound, "")
		}
		b.read(SubjectTraverse, tr.ID, "vp", 3, 0.21, UnitInWG, StageAsFound, "")
		for p := 1; p <= 25; p++ {
			b.read(SubjectTraverse, tr.ID, "vp", p, 0.25, UnitInWG, StageFinal, "")
		}
		r := b.compute(t)
		tv := r.Traverses[0]
		if tv.Status != ResultComputed || tv.AsFound == nil || tv.AsFound.Status != ResultConflict ||
			tv.AsFound.Flow != nil || len(tv.Conflicts) != 1 || tv.Conflicts[0].Stage != StageAsFound {
			t.Errorf("traverse = %+v, as found %+v", tv, tv.AsFound)
		}
	})
}

func TestResultsWaterMode(t *testing.T) {
	build := func(mode string) (*resBuilder, *WaterTest, string) {
		b := newResBuilder("ip")
		sys := b.system("AHU-1", SystemDesign{})
		// Thermometers stated ±0.2 °F each (invented for the test).
		th := b.instrument("Thermo 1", "thermometer", "2026-01-01", 0, 0.2, "°F")
		b.s.WaterTests = append(b.s.WaterTests, WaterTest{ID: b.id(), JobID: b.s.Job.ID, SystemID: sys.ID, Tag: "HW-1",
			Mode: mode, FlowSource: "meter", Fluid: "water", DesignFlow: 20})
		return b, &b.s.WaterTests[0], th
	}
	temps := func(b *resBuilder, wt *WaterTest, th string, enter, leave float64) {
		b.read(SubjectWaterTest, wt.ID, "flow", 0, 20, UnitGPM, StageFinal, "")
		b.read(SubjectWaterTest, wt.ID, "enter_temp", 0, enter, UnitDegF, StageFinal, th)
		b.read(SubjectWaterTest, wt.ID, "leave_temp", 0, leave, UnitDegF, StageFinal, th)
	}
	t.Run("OKHeatingCoilWaterWarmingIsAFinding", func(t *testing.T) {
		b, wt, th := build("heating")
		temps(b, wt, th, 120, 130)
		r := b.compute(t)
		w := r.WaterTests[0]
		if w.Mode != "heating" || w.Process != WaterCooling || w.Capacity == nil || w.Capacity.Process != WaterCooling {
			t.Errorf("mode %q process %q capacity %+v", w.Mode, w.Process, w.Capacity)
		}
		f := resFinding(r, FindingWaterModeMismatch, wt.ID)
		if f == nil || !strings.Contains(f.Text, "warms from 120.0 °F to 130.0 °F") || !strings.Contains(f.Text, "stated as heating") {
			t.Errorf("finding = %+v", f)
		}
	})
	t.Run("OKHeatingCoilWaterCooling", func(t *testing.T) {
		b, wt, th := build("heating")
		temps(b, wt, th, 180, 160)
		r := b.compute(t)
		if w := r.WaterTests[0]; w.Process != WaterHeating || w.ModeNote != "" || resFinding(r, FindingWaterModeMismatch, wt.ID) != nil {
			t.Errorf("water test = %+v", w)
		}
	})
	t.Run("OKZeroDeltaTWithinThermometers", func(t *testing.T) {
		// 0.3 °F apart with two ±0.2 °F thermometers: within their ±0.4 °F.
		b, wt, th := build("cooling")
		temps(b, wt, th, 45, 45.3)
		r := b.compute(t)
		if w := r.WaterTests[0]; w.Process != WaterNoTransfer || resFinding(r, FindingWaterModeMismatch, wt.ID) == nil {
			t.Errorf("water test = %+v, want no heat transfer and a finding", w)
		}
	})
	t.Run("OKModeNotStatedNoTemps", func(t *testing.T) {
		b, wt, _ := build("")
		r := b.compute(t)
		if resFinding(r, FindingWaterModeNotGiven, wt.ID) == nil || r.WaterTests[0].Process != "" {
			t.Errorf("water test = %+v, want the not-stated finding before any reading", r.WaterTests[0])
		}
	})
	t.Run("OKModeNotStated", func(t *testing.T) {
		b, wt, th := build("")
		temps(b, wt, th, 45, 55)
		r := b.compute(t)
		w := r.WaterTests[0]
		if w.Process != WaterCooling || !strings.HasPrefix(w.ModeNote, WaterModeNotGiven) ||
			resFinding(r, FindingWaterModeNotGiven, wt.ID) == nil {
			t.Errorf("water test = %+v", w)
		}
	})
}

func TestResultsValveAccuracy(t *testing.T) {
	build := func(stated float64) *Results {
		b := newResBuilder("ip")
		sys := b.system("AHU-1", SystemDesign{})
		// A hydronic gauge ±2 % of reading (REFERENCES.md, "Instruments":
		// hydronic ΔP ±2 % ±0.5 psi; the percentage only, so the sum is clean).
		g := b.instrument("Gauge 1", "hydronic_meter", "2026-01-01", 2, 0, "")
		b.s.WaterTests = append(b.s.WaterTests, WaterTest{ID: b.id(), JobID: b.s.Job.ID, SystemID: sys.ID, Tag: "CHW-1",
			Mode: "cooling", FlowSource: "valve", ValveCv: 10, ValveAccuracyPct: stated, Fluid: "water", DesignFlow: 20})
		wt := &b.s.WaterTests[0]
		b.read(SubjectWaterTest, wt.ID, "dp", 0, 4, UnitPsi, StageFinal, g)
		return b.compute(t)
	}
	// ± % of flow = √((2 %/2)² + valve²): ΔP's 2 % is 1 % on flow (Q ∝ √ΔP).
	for _, c := range []struct {
		name   string
		stated float64
		pct    float64
		source string
	}{{"OKDefault", 0, DefaultValveAccuracyPct, "default"}, {"OKStated", 10, 10, "stated"}} {
		t.Run(c.name, func(t *testing.T) {
			w := build(c.stated).WaterTests[0]
			if w.Flow == nil || w.Tolerance == nil || w.ValveAccuracyPct == nil || w.ValveAccuracySource != c.source {
				t.Fatalf("water test = %+v", w)
			}
			resClose(t, "valve accuracy", *w.ValveAccuracyPct, c.pct, 1e-12)
			resClose(t, "flow ±", w.Tolerance.Uncertainty, *w.Flow*math.Hypot(1, c.pct)/100, 1e-9)
		})
	}
	t.Run("ErrValidateAbove50", func(t *testing.T) {
		wt := WaterTest{ID: "00000001-0000-4000-8000-000000000001", JobID: "00000002-0000-4000-8000-000000000002",
			SystemID: "00000003-0000-4000-8000-000000000003", Tag: "CHW-1", Mode: "cooling", FlowSource: "valve",
			ValveCv: 10, ValveAccuracyPct: 51, Fluid: "water", DesignFlow: 20}
		if err := wt.Validate(measure.IP); err == nil || !strings.Contains(err.Error(), "50") {
			t.Errorf("err = %v, want the 0 to 50 range", err)
		}
		wt.ValveAccuracyPct = 5
		if err := wt.Validate(measure.IP); err != nil {
			t.Errorf("5 %%: %v", err)
		}
	})
}

func TestResultsSystemChecks(t *testing.T) {
	b, sys, tr := resTraverseJob()
	sys.Design.FLA, sys.Design.Phase, sys.Design.FanRPM, sys.Design.ExternalStatic = 12, 3, 1000, 1.0
	// NEMA MG 1 definition, measure.VoltageImbalance's doc example: 460, 467,
	// 450 V → 1.96 %, above the 1 % derating threshold.
	for i, v := range []float64{460, 467, 450} {
		b.read(SubjectSystem, sys.ID, "volts", i+1, v, UnitVolt, StageFinal, "")
	}
	// 10, 12.5, 8 A: average 10.17, largest deviation 2.33 → 22.95 % current
	// imbalance, above 10 % (common practice); 12.5 of 12 FLA = 104 %.
	for i, v := range []float64{10, 12.5, 8} {
		b.read(SubjectSystem, sys.ID, "amps", i+1, v, UnitAmp, StageFinal, "")
	}
	b.read(SubjectSystem, sys.ID, "fan_rpm", 0, 850, UnitRPM, StageFinal, "")
	b.read(SubjectSystem, sys.ID, "static_external", 0, 1.25, UnitInWG, StageFinal, "")
	for p := 1; p <= 25; p++ {
		b.read(SubjectTraverse, tr.ID, "vp", p, 0.25, UnitInWG, StageFinal, "")
	}
	// Every supply outlet read, summing to 3,000 cfm against the traverse's
	// 4,006: 75 %, far outside −5 %/+10 %.
	hood := b.instrument("Hood 1", "flow_hood", "2026-01-01", 3, 7, "cfm")
	for i, v := range []float64{1500, 1500} {
		o := b.outlet(sys.ID, "S-"+string(rune('1'+i)), 2000, "hood", 1, 0)
		b.read(SubjectOutlet, o, "flow", 0, v, UnitCFM, StageFinal, hood)
	}
	r := b.compute(t)
	s := r.Systems[0]
	if s.MotorStatus != MotorWarning || len(s.MotorWarnings) != 3 {
		t.Fatalf("motor = %q %v", s.MotorStatus, s.MotorWarnings)
	}
	resClose(t, "current imbalance", *s.CurrentImbalance, (12.5-30.5/3)/(30.5/3)*100, 1e-9)
	texts := ""
	for _, f := range r.Findings {
		if f.Subject.ID == sys.ID {
			texts += f.Kind + ": " + f.Text + "\n"
		}
	}
	for _, want := range []string{
		"motor_check: RTU-1: motor: voltage imbalance 2.0 % is above 1 %: NEMA MG 1",
		"current imbalance 23.0 % is above 10 % (common practice)",
		"draws 104 % of nameplate FLA",
		"fan_speed_off_design: RTU-1: fan speed 850 rpm is 85 % of design 1,000 rpm, more than 10 % from it (common practice)",
		"external_static_off_design: RTU-1: external static pressure 1.25 in. w.g. is 125 % of design 1.00 in. w.g.",
		"outlets_traverse_disagree: RTU-1: the supply outlets sum to 3,000 cfm, 75 % of traverse T-1's 4,00",
	} {
		if !strings.Contains(texts, want) {
			t.Errorf("findings lack %q; have:\n%s", want, texts)
		}
	}
	if a := s.OutletsVsTraverse; a == nil || a.Status != "disagree" {
		t.Errorf("outlets vs traverse = %+v", a)
	}
	resClose(t, "fan speed % of design", *s.FanRPMPercentOfDesign, 85, 1e-12)
	// The readings above name no instrument: a flag lists them (not sheaves).
	var fl *Flag
	for i := range s.Flags {
		if s.Flags[i].Kind == FlagNoInstrument {
			fl = &s.Flags[i]
		}
	}
	if fl == nil || len(fl.ReadingIDs) != 8 || !strings.Contains(fl.Text, "(motor voltage, per leg or single; motor current, per leg or single; fan speed; external static pressure)") {
		t.Errorf("no-instrument flag = %+v", fl)
	}
	if resFinding(r, FindingNoInstrument, sys.ID) == nil || resFinding(r, FindingNoInstrument, tr.ID) == nil {
		t.Error("no no_instrument findings for the system and the traverse")
	}
	if tv := r.Traverses[0]; tv.Tolerance == nil || !tv.Tolerance.UncertaintyUnknown {
		t.Errorf("traverse read with no instrument: tolerance %+v, want uncertainty_unknown", tv.Tolerance)
	}
}

func TestResultsToleranceSideAndCapacityBasis(t *testing.T) {
	b := newResBuilder("ip")
	sys := b.system("AHU-1", SystemDesign{Airflow: 1000})
	hood := b.instrument("Hood 1", "flow_hood", "2026-01-01", 5, 0, "cfm")
	o := b.outlet(sys.ID, "S-1", 400, "hood", 1, 0)
	// 450 cfm ± 5 % = 427.5–472.5 against 360–440: straddles 440, the reading
	// itself above it.
	b.read(SubjectOutlet, o, "flow", 0, 450, UnitCFM, StageFinal, hood)
	r := b.compute(t)
	tol := r.Outlets[0].Final.Tolerance
	if tol.Status != "undetermined" || tol.Side != "high" || tol.SideText != "high, within the instrument's accuracy of the limit" {
		t.Errorf("tolerance = %+v", tol)
	}

	// A packaged unit's figure is the maker's rating; an air handler's coil
	// is the schedule's figure at its design conditions.
	b2, sys2, ct := resCapacityJob(90000)
	sys2.Kind = "rooftop_unit"
	resReadCapacity(b2, ct, "", "", "")
	r2 := b2.compute(t)
	ex := r2.CapacityTests[0].Expected
	if ex == nil || ex.AtTestConditions || ex.Basis != ExpectedBasisRated {
		t.Fatalf("expected = %+v", ex)
	}
	f := resFinding(r2, FindingCapacityShort, ct.ID)
	// 90,000 Btu/h = 90.0 MBH = 7.50 tons (12,000 Btu/h a ton).
	if f == nil || !strings.Contains(f.Text, "rated, at the manufacturer's rating conditions, not the test's") ||
		!strings.Contains(f.Text, "90,000 Btu/h (90.0 MBH, 7.50 tons)") ||
		!strings.Contains(f.Text, "the usual acceptance is 95 % (common practice; the project specification governs)") {
		t.Errorf("finding = %+v", f)
	}
	b3, _, ct3 := resCapacityJob(90000)
	resReadCapacity(b3, ct3, "", "", "")
	if ex := b3.compute(t).CapacityTests[0].Expected; ex == nil || ex.Basis != ExpectedBasisScheduled {
		t.Errorf("air handler's expected = %+v, want the scheduled basis", ex)
	}
}

func TestResNum(t *testing.T) {
	for _, c := range []struct {
		v    float64
		d    int
		si   bool
		want string
	}{{1240, 0, false, "1,240"}, {1234567.891, 1, false, "1,234,567.9"}, {-4006.4, 0, false, "−4,006"},
		{9999, 0, true, "9999"}, {12400, 0, true, "12\u00a0400"}, {-0.0001, 2, false, "0.00"}} {
		if got := FormatNumber(c.v, c.d, c.si); got != c.want {
			t.Errorf("FormatNumber(%v, %d, %v) = %q, want %q", c.v, c.d, c.si, got, c.want)
		}
	}
}

func TestResultsFanFindingsSI(t *testing.T) {
	b := newResBuilder("si")
	sys := b.system("AHU-2", SystemDesign{Airflow: 6000, FanRPM: 1200, ExternalStatic: 250})
	b.read(SubjectSystem, sys.ID, "fan_rpm", 0, 1320, UnitRPM, StageFinal, "")
	b.read(SubjectSystem, sys.ID, "static_external", 0, 310, "Pa", StageFinal, "")
	r := b.compute(t)
	// 1320/1200 = 110 %: on the 10 % line, not beyond it; 310/250 = 124 %.
	if f := resFinding(r, FindingFanSpeedOffDesign, sys.ID); f != nil {
		t.Errorf("fan speed at exactly +10 %% is not a finding: %q", f.Text)
	}
	f := resFinding(r, FindingStaticOffDesign, sys.ID)
	if f == nil || !strings.Contains(f.Text, "external static pressure 310 Pa is 124 % of design 250 Pa") {
		t.Errorf("finding = %+v", f)
	}
}

// TestResultsIssue9FromStore takes a traverse conflict and a valve's stated
// accuracy through a real SQLite store.
func TestResultsIssue9FromStore(t *testing.T) {
	ctx := context.Background()
	db := MustOpenDB(t)
	a := Actor{Name: "Lead", Role: RoleLead}
	job := &Job{Name: "Store job", Units: "ip", Tolerances: DefaultTolerances()}
	if err := db.CreateJob(ctx, a, job); err != nil {
		t.Fatal(err)
	}
	sys := &System{JobID: job.ID, Tag: "AHU-1", Kind: "air_handler", Design: SystemDesign{Airflow: 800}}
	if err := Create(ctx, db, a, sys); err != nil {
		t.Fatal(err)
	}
	tr := &Traverse{JobID: job.ID, SystemID: sys.ID, Tag: "T-1", Shape: "round", Method: "equal-area", Diameter: 12,
		PointsPerDiameter: 4, Diameters: 2}
	if err := Create(ctx, db, a, tr); err != nil {
		t.Fatal(err)
	}
	wt := &WaterTest{JobID: job.ID, SystemID: sys.ID, Tag: "CHW-1", Mode: "cooling", FlowSource: "valve", ValveCv: 10,
		ValveAccuracyPct: 8, Fluid: "water", DesignFlow: 20}
	if err := Create(ctx, db, a, wt); err != nil {
		t.Fatal(err)
	}
	var rs []Reading
	add := func(kind, subj, qty string, point int, v float64, unit, device string) {
		val := v
		rs = append(rs, Reading{ID: NewID(), JobID: job.ID, SubjectKind: kind, SubjectID: subj, Quantity: qty, Point: point,
			Value: &val, Unit: unit, Stage: StageFinal, Technician: "tech " + device, DeviceID: device,
			TakenAt: testNow.Add(-time.Duration(len(rs)+1) * time.Minute)})
	}
	for p := 1; p <= 8; p++ {
		add(SubjectTraverse, tr.ID, "vp", p, 0.1, UnitInWG, "")
	}
	add(SubjectTraverse, tr.ID, "vp", 5, 0.12, UnitInWG, "") // the same point from a script: no supersedes
	add(SubjectWaterTest, wt.ID, "dp", 0, 4, UnitPsi, "")
	res, err := db.AddReadings(ctx, a, job.ID, rs)
	if err != nil {
		t.Fatal(err)
	}
	for _, rr := range res {
		if rr.Status != ReadingStored {
			t.Fatalf("reading %s: %+v", rr.ID, rr)
		}
	}
	snap, err := db.Snapshot(ctx, job.ID)
	if err != nil {
		t.Fatal(err)
	}
	r, err := ComputeResults(snap, resToday)
	if err != nil {
		t.Fatal(err)
	}
	if tv := r.Traverses[0]; tv.Status != ResultConflict || tv.Flow != nil || len(tv.Conflicts) != 1 || tv.Conflicts[0].Point != 5 {
		t.Errorf("traverse = %+v, want a conflict at point 5", tv)
	}
	w := r.WaterTests[0]
	if w.ValveAccuracyPct == nil || *w.ValveAccuracyPct != 8 || w.ValveAccuracySource != "stated" || w.Tolerance == nil {
		t.Fatalf("water test = %+v", w)
	}
	// No gauge instrument: only the valve's 8 % remains, and the gauge's
	// part is unknown.
	resClose(t, "flow ±", w.Tolerance.Uncertainty, 0.08**w.Flow, 1e-9)
	if !w.Tolerance.UncertaintyUnknown {
		t.Error("the ΔP reading names no instrument: uncertainty_unknown should be set")
	}
}
