package schema

import (
	"bytes"
	"context"
	"encoding/csv"
	"encoding/json"
	"io"
	"os"
	"reflect"
	"slices"
	"strings"
	"testing"
	"time"

	"fieldtab/measure"
)

// The schedules under ../testdata (schedule_*_example.csv, schedule_outlets_errors.csv)
// are invented for these tests: no real building, firm or person.

// scheduleJobWithEquipment creates an empty IP job and imports the example
// equipment schedule into it.
func scheduleJobWithEquipment(t *testing.T) (*DB, *Job) {
	t.Helper()
	db := MustOpenDB(t)
	j := &Job{Name: "Schedule test", Units: "ip"}
	if err := db.CreateJob(context.Background(), lead, j); err != nil {
		t.Fatal(err)
	}
	rep := mustImport(t, db.ImportEquipmentSchedule, j.ID, "../testdata/schedule_equipment_example.csv", false)
	if rep.Created != 5 {
		t.Fatalf("equipment: created %d, want 5 (%+v)", rep.Created, rep)
	}
	return db, j
}

// mustImport imports a schedule file with f (ImportOutletSchedule or
// ImportEquipmentSchedule) and fails on any error or problem.
func mustImport(t *testing.T, f func(context.Context, Actor, string, io.Reader, bool) (ImportReport, error), jobID, path string, dryRun bool) ImportReport {
	t.Helper()
	b, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	rep, err := f(context.Background(), lead, jobID, bytes.NewReader(b), dryRun)
	if err != nil {
		t.Fatalf("import %s: %v", path, err)
	}
	if len(rep.Problems) > 0 {
		t.Fatalf("import %s: problems %+v", path, rep.Problems)
	}
	return rep
}

func systemsByTag(t *testing.T, db *DB, jobID string) map[string]System {
	t.Helper()
	s, err := db.Snapshot(context.Background(), jobID)
	if err != nil {
		t.Fatal(err)
	}
	m := map[string]System{}
	for _, sy := range s.Systems {
		m[sy.Tag] = sy
	}
	return m
}

func TestScheduleEquipment(t *testing.T) {
	db, j := scheduleJobWithEquipment(t)
	sys := systemsByTag(t, db, j.ID)
	rtu := sys["RTU-1"]
	want := SystemDesign{Airflow: 4000, OutdoorAir: 800, ExternalStatic: 0.8, RatedTotal: 120_000, RatedSensible: 86_400,
		MotorHP: 3, FLA: 4.8, Volts: 460, Phase: 3, FanRPM: 1150, MotorRPM: 1760}
	if rtu.Kind != "rooftop_unit" || rtu.Name != "Ground floor library" || rtu.Location != "Roof" || rtu.Design != want {
		t.Errorf("RTU-1 = %+v, want kind rooftop_unit and design %+v", rtu, want)
	}
	for tag, kind := range map[string]string{"RTU-2": "rooftop_unit", "AHU-1": "air_handler", "EF-1": "fan", "P-1": "pump"} {
		if sys[tag].Kind != kind {
			t.Errorf("%s kind %q, want %q", tag, sys[tag].Kind, kind)
		}
	}
	if sys["AHU-1"].Design.Airflow != 6000 || sys["P-1"].Design.WaterFlow != 120 {
		t.Errorf("AHU-1 airflow %v (\"6,000\"), P-1 water flow %v", sys["AHU-1"].Design.Airflow, sys["P-1"].Design.WaterFlow)
	}

	t.Run("OKUpdateKeepsOmittedColumnsAndPerfTable", func(t *testing.T) {
		ctx := context.Background()
		ahu := sys["AHU-1"]
		ahu.Design.PerfTableCSV = testPerfCSV
		if err := Update(ctx, db, lead, &ahu); err != nil {
			t.Fatal(err)
		}
		csvText := "tag,kind,airflow\nAHU-1,AHU,6200\nRTU-1,RTU,4000\nF-9,fan,900\n"
		rep, err := db.ImportEquipmentSchedule(ctx, lead, j.ID, strings.NewReader(csvText), false)
		if err != nil || len(rep.Problems) > 0 {
			t.Fatalf("import: %v %+v", err, rep.Problems)
		}
		if rep.Created != 1 || rep.Updated != 1 || rep.Unchanged != 1 {
			t.Errorf("report %+v, want 1 created, 1 updated, 1 unchanged", rep)
		}
		got := systemsByTag(t, db, j.ID)["AHU-1"]
		if got.Design.Airflow != 6200 || got.Design.RatedTotal != 216_000 || got.Name != "Upper floor" || got.Design.PerfTableCSV != testPerfCSV {
			t.Errorf("AHU-1 after update = %+v", got)
		}
	})
}

func TestScheduleOutlets(t *testing.T) {
	ctx := context.Background()
	db, j := scheduleJobWithEquipment(t)

	seqBefore := jobSeq(t, db, j.ID)
	dry := mustImport(t, db.ImportOutletSchedule, j.ID, "../testdata/schedule_outlets_example.csv", true)
	if !dry.DryRun || dry.Created != 10 || dry.Updated != 0 {
		t.Errorf("dry run %+v, want 10 to create", dry)
	}
	if n := rdgCount(t, db, "SELECT COUNT(*) FROM outlets"); n != 0 || jobSeq(t, db, j.ID) != seqBefore {
		t.Fatalf("dry run stored %d outlets or moved the job's seq", n)
	}

	rep := mustImport(t, db.ImportOutletSchedule, j.ID, "../testdata/schedule_outlets_example.csv", false)
	if rep.Created != 10 {
		t.Fatalf("import %+v, want 10 created", rep)
	}
	s, err := db.Snapshot(ctx, j.ID)
	if err != nil {
		t.Fatal(err)
	}
	sys := systemsByTag(t, db, j.ID)
	out := map[string]Outlet{}
	for _, o := range s.Outlets {
		out[o.Tag] = o
	}
	checks := []struct {
		tag                string
		kind, size, method string
		system             string
		design, factor, ak float64
		room               string
	}{
		{"S-101", "supply", "24x24", "hood", "RTU-1", 350, 1, 0, "101 Entrance hall"},
		{"S-104", "supply", "24x12", "hood", "RTU-1", 225, 1, 0, "102 Reading room"},
		{"R-101", "return", "24x24", "hood", "RTU-1", 600, 1.03, 0, "101 Entrance hall"},
		{"E-201", "exhaust", "12x12", "hood", "EF-1", 75, 1, 0, "203 Toilet"},
		{"S-301", "supply", `10" round`, "ak", "AHU-1", 220, 1, 0.55, "301 Community hall"},
		{"OA-301", "outdoor_air", "36x24", "hood", "AHU-1", 1500, 1, 0, "Level 3 mechanical room"},
	}
	for _, c := range checks {
		o := out[c.tag]
		if o.Kind != c.kind || o.Size != c.size || o.Method != c.method || o.SystemID != sys[c.system].ID ||
			o.DesignFlow != c.design || o.Factor != c.factor || o.Ak != c.ak || o.Room != c.room {
			t.Errorf("%s = %+v, want %+v", c.tag, o, c)
		}
	}

	t.Run("OKReimportUnchanged", func(t *testing.T) {
		seq := jobSeq(t, db, j.ID)
		rep := mustImport(t, db.ImportOutletSchedule, j.ID, "../testdata/schedule_outlets_example.csv", false)
		if rep.Created != 0 || rep.Updated != 0 || rep.Unchanged != 10 || jobSeq(t, db, j.ID) != seq {
			t.Errorf("re-import %+v changed something (seq %d → %d)", rep, seq, jobSeq(t, db, j.ID))
		}
	})
	t.Run("OKExistingTagUpdates", func(t *testing.T) {
		csvText := "tag,kind,design_flow,system\nS-101,S,375,RTU-1\nS-999,S,100,RTU-2\n"
		rep, err := db.ImportOutletSchedule(ctx, lead, j.ID, strings.NewReader(csvText), false)
		if err != nil || len(rep.Problems) > 0 || rep.Created != 1 || rep.Updated != 1 {
			t.Fatalf("import: %v %+v", err, rep)
		}
		got, err := Get[*Outlet](ctx, db, j.ID, out["S-101"].ID)
		if err != nil {
			t.Fatal(err)
		}
		if got.DesignFlow != 375 || got.Room != "101 Entrance hall" || got.Size != "24x24" {
			t.Errorf("S-101 after update = %+v: design 375, room and size kept", got)
		}
	})
}

func TestScheduleOutletProblems(t *testing.T) {
	ctx := context.Background()
	db, j := scheduleJobWithEquipment(t)
	b, err := os.ReadFile("../testdata/schedule_outlets_errors.csv")
	if err != nil {
		t.Fatal(err)
	}
	seq := jobSeq(t, db, j.ID)
	for _, dry := range []bool{true, false} {
		rep, err := db.ImportOutletSchedule(ctx, lead, j.ID, bytes.NewReader(b), dry)
		if err != nil {
			t.Fatal(err)
		}
		want := []struct {
			line   int
			column string
			text   string
		}{
			{4, "kind", `"diffuser" is not an outlet kind`},
			{6, "system", `no system tagged "RTU-9"`},
			{7, "design_flow", "is required"},
			{8, "tag", `"S-102" is also on line 3`},
		}
		if len(rep.Problems) != len(want) {
			t.Fatalf("dry run %v: problems %+v, want %d", dry, rep.Problems, len(want))
		}
		for i, w := range want {
			p := rep.Problems[i]
			if p.Line != w.line || p.Column != w.column || !strings.Contains(p.Message, w.text) {
				t.Errorf("problem %d = %+v, want line %d column %s containing %q", i, p, w.line, w.column, w.text)
			}
		}
		if rep.Created != 0 || rep.Updated != 0 {
			t.Errorf("report counts %+v with problems", rep)
		}
	}
	if n := rdgCount(t, db, "SELECT COUNT(*) FROM outlets"); n != 0 || jobSeq(t, db, j.ID) != seq {
		t.Fatalf("%d outlets stored (job seq %d → %d); nothing may be imported when a line is invalid", n, seq, jobSeq(t, db, j.ID))
	}

	snap := &Snapshot{Job: Job{ID: j.ID, Units: "ip"}, Systems: []System{{ID: NewID(), JobID: j.ID, Tag: "RTU-1", Kind: "rooftop_unit"}}}
	si := &Snapshot{Job: Job{ID: j.ID, Units: "si"}, Systems: snap.Systems}
	tests := []struct {
		name, csv    string
		snap         *Snapshot
		line         int
		column, text string
	}{
		{"ErrUnknownColumn", "tag,kind,design_flow,system,desing\nS-1,S,100,RTU-1,x\n", snap, 1, "desing", "not a column"},
		{"ErrMissingColumn", "tag,kind,system\nS-1,S,RTU-1\n", snap, 1, "design_flow", "no design_flow column"},
		{"ErrDuplicateColumn", "tag,kind,Kind,design_flow,system\nS-1,S,S,100,RTU-1\n", snap, 1, "kind", "twice"},
		{"ErrUnitOfOtherSystem", "tag,kind,design_flow (L/s),system\nS-1,S,100,RTU-1\n", snap, 1, "design_flow", `unit "L/s" is not accepted`},
		{"ErrUnitOnText", "tag (in),kind,design_flow,system\nS-1,S,100,RTU-1\n", snap, 1, "tag", "takes no unit"},
		{"ErrEmpty", "", snap, 0, "", "empty"},
		{"ErrNoRows", "tag,kind,design_flow,system\n\n", snap, 0, "", "no rows"},
		{"ErrNotANumber", "tag,kind,design_flow,system\nS-1,S,lots,RTU-1\n", snap, 2, "design_flow", `"lots" is not a number`},
		{"ErrValidateRange", "tag,kind,design_flow,system\nS-1,S,60000,RTU-1\n", snap, 2, "design_flow", "50,000 cfm"},
		{"ErrValidateFactor", "tag,kind,design_flow,system,factor\nS-1,S,100,RTU-1,9\n", snap, 2, "factor", "0.2 to 5"},
		{"ErrAkMissing", "tag,kind,design_flow,system,method\nS-1,S,100,RTU-1,ak\n", snap, 2, "ak", "is required"},
		{"ErrMethod", "tag,kind,design_flow,system,method\nS-1,S,100,RTU-1,vane\n", snap, 2, "method", `"hood", "ak"`},
		{"ErrTooManyFields", "tag,kind,design_flow,system\nS-1,S,100,RTU-1,extra\n", snap, 2, "", "5 fields"},
		{"ErrNoTag", "tag,kind,design_flow,system\n ,S,100,RTU-1\n", snap, 2, "tag", "is required"},
		{"ErrUnterminatedQuote", "tag,kind,design_flow,system\n\"S-1,S,100,RTU-1\n", snap, 2, "kind", "is required"},
		{"ErrNoSystems", "tag,kind,design_flow,system\nS-1,S,100,AHU-1\n", &Snapshot{Job: snap.Job}, 2, "system", "import the equipment schedule first"},
		{"OKSIUnits", "tag,kind,design_flow (m3/h),system\nS-1,S,360,RTU-1\n", si, -1, "", ""},
		{"OKBOMAndTrailingBlankColumns", "\ufeffTAG,Kind,Design-Flow,System,,\nS-1,s,100,RTU-1,,\n", snap, -1, "", ""},
		{"OKThousands", "tag,kind,design_flow,system\nS-1,OA,\"1,250\",RTU-1\n", snap, -1, "", ""},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			outs, problems := ParseOutletSchedule(strings.NewReader(tt.csv), tt.snap)
			if tt.line < 0 {
				if len(problems) > 0 || len(outs) != 1 {
					t.Fatalf("problems %+v, outlets %+v", problems, outs)
				}
				if tt.name == "OKSIUnits" && outs[0].DesignFlow != 100 {
					t.Errorf("360 m³/h read as %v L/s, want 100", outs[0].DesignFlow)
				}
				if tt.name == "OKThousands" && (outs[0].DesignFlow != 1250 || outs[0].Kind != "outdoor_air") {
					t.Errorf("outlet %+v", outs[0])
				}
				return
			}
			if len(problems) == 0 {
				t.Fatalf("no problem, want line %d column %q", tt.line, tt.column)
			}
			p := problems[0]
			if p.Line != tt.line || p.Column != tt.column || !strings.Contains(p.Message, tt.text) {
				t.Errorf("problem %+v, want line %d column %q containing %q", p, tt.line, tt.column, tt.text)
			}
		})
	}

	t.Run("ErrEquipment", func(t *testing.T) {
		csvText := "tag,kind,airflow,outdoor_air,phase,rated_total (kW)\n" +
			"AHU-9,AHU,1000,2000,3,\n" + // outdoor air above airflow
			"AHU-8,chiller,1000,100,3,\n" + // not a kind
			"AHU-7,AHU,1000,100,2,\n" + // phase
			"AHU-6,AHU,1000,100,3,\n"
		_, problems := ParseEquipmentSchedule(strings.NewReader(csvText), snap)
		if len(problems) != 1 || problems[0].Column != "rated_total" {
			t.Fatalf("problems %+v, want the kW header refused in an IP job", problems)
		}
		csvText = strings.Replace(csvText, " (kW)", " (tons)", 1)
		_, problems = ParseEquipmentSchedule(strings.NewReader(csvText), snap)
		want := []ImportProblem{{Line: 2, Column: "outdoor_air"}, {Line: 3, Column: "kind"}, {Line: 4, Column: "phase"}}
		if len(problems) != len(want) {
			t.Fatalf("problems %+v, want %+v", problems, want)
		}
		for i, w := range want {
			if problems[i].Line != w.Line || problems[i].Column != w.Column {
				t.Errorf("problem %d %+v, want %+v", i, problems[i], w)
			}
		}
	})
	t.Run("OKProblemCap", func(t *testing.T) {
		var b strings.Builder
		b.WriteString("tag,kind,design_flow,system\n")
		for i := 0; i < maxImportProblems+50; i++ {
			b.WriteString("S-1,X,100,RTU-1\n")
		}
		_, problems := ParseOutletSchedule(strings.NewReader(b.String()), snap)
		if len(problems) != maxImportProblems+1 || !strings.Contains(problems[maxImportProblems].Message, "more problems") {
			t.Fatalf("%d problems, want %d and a last one counting the rest", len(problems), maxImportProblems+1)
		}
	})
}

func TestScheduleNotFound(t *testing.T) {
	db := MustOpenDB(t)
	_, err := db.ImportOutletSchedule(context.Background(), lead, NewID(), strings.NewReader("tag\n"), false)
	assertErr(t, err, NotFound, "job_id")
	_, err = db.ImportEquipmentSchedule(context.Background(), lead, "nope", strings.NewReader("tag\n"), true)
	assertErr(t, err, NotFound, "job_id")
}

// ---- results CSV ----

func TestResultsCSV(t *testing.T) {
	ctx := context.Background()
	f := newFixture(t)
	f.out.Room = "=HYPERLINK(\"http://example.invalid\")"
	if err := Update(ctx, f.db, lead, f.out); err != nil {
		t.Fatal(err)
	}
	v := func(x float64) *float64 { return &x }
	rs := []Reading{
		{ID: NewID(), SubjectKind: SubjectOutlet, SubjectID: f.out.ID, Quantity: "flow", Value: v(280), Unit: UnitCFM,
			Stage: StageAsFound, InstrumentID: f.inst.ID, Technician: "Ari", TakenAt: testNow.Add(-time.Hour)},
		{ID: NewID(), SubjectKind: SubjectOutlet, SubjectID: f.out.ID, Quantity: "flow", Value: v(352), Unit: UnitCFM,
			Stage: StageFinal, InstrumentID: f.inst.ID, Technician: "Ari", Note: "@risk: damper at 60 %", TakenAt: testNow.Add(-30 * time.Minute)},
		{ID: NewID(), SubjectKind: SubjectWaterTest, SubjectID: f.wat.ID, Quantity: "dp", Value: v(9), Unit: UnitPsi,
			Stage: StageFinal, Technician: "Ari", TakenAt: testNow.Add(-20 * time.Minute)},
		{ID: NewID(), SubjectKind: SubjectSystem, SubjectID: f.sys.ID, Quantity: "static_external", Value: v(-0.2), Unit: UnitInWG,
			Stage: StageFinal, Technician: "Ari", TakenAt: testNow.Add(-10 * time.Minute)},
	}
	res, err := f.db.AddReadings(ctx, lead, f.job.ID, rs)
	if err != nil {
		t.Fatal(err)
	}
	for _, r := range res {
		if r.Status != ReadingStored {
			t.Fatalf("reading %+v", r)
		}
	}
	s, err := f.db.Snapshot(ctx, f.job.ID)
	if err != nil {
		t.Fatal(err)
	}
	r, err := ComputeResults(s, testNow)
	if err != nil {
		t.Fatal(err)
	}
	var buf bytes.Buffer
	if err := WriteResultsCSV(&buf, s, r); err != nil {
		t.Fatal(err)
	}
	cr := csv.NewReader(&buf) // FieldsPerRecord 0: every row must have the header's field count (RFC 4180)
	rows, err := cr.ReadAll()
	if err != nil {
		t.Fatalf("read back: %v\n%s", err, buf.String())
	}
	head := map[string]int{}
	for i, h := range rows[0] {
		head[h] = i
	}
	for _, h := range []string{"section", "design airflow (cfm)", "as found (cfm)", "final (cfm)", "% of design",
		"water flow (gpm)", "water dp (psi)", "total capacity (Btu/h)", "status", "notes"} {
		if _, ok := head[h]; !ok {
			t.Fatalf("header %v lacks %q", rows[0], h)
		}
	}
	sections := map[string][]string{}
	for _, row := range rows[1:] {
		sections[row[0]] = row
	}
	for _, sec := range []string{"outlet", "system", "traverse", "capacity_test", "water_test", "instrument"} {
		if sections[sec] == nil {
			t.Errorf("no %s row", sec)
		}
	}
	o := sections["outlet"]
	if o[head["tag"]] != "S-101" || o[head["design airflow (cfm)"]] != "350" || o[head["as found (cfm)"]] != "280" ||
		o[head["final (cfm)"]] != "352" || o[head["% of design"]] != "100.6" || o[head["status"]] != "within" {
		t.Errorf("outlet row %v", o)
	}
	if got := o[head["room or location"]]; got != `'=HYPERLINK("http://example.invalid")` {
		t.Errorf("formula room written as %q, want it prefixed with a quote", got)
	}
	if w := sections["water_test"]; w[head["water dp (psi)"]] != "9.00" || w[head["water flow (gpm)"]] == "" {
		t.Errorf("water row %v", w)
	}
	if in := sections["instrument"]; in[head["status"]] != CalibrationCurrent {
		t.Errorf("instrument row %v", in)
	}

	// The readings export: every reading, formula-like notes quoted, negative numbers not.
	buf.Reset()
	if err := WriteReadingsCSV(&buf, s); err != nil {
		t.Fatal(err)
	}
	rrows, err := csv.NewReader(&buf).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	if len(rrows) != 1+len(rs) {
		t.Fatalf("%d reading rows, want %d", len(rrows)-1, len(rs))
	}
	if got := rrows[2][13]; got != "'@risk: damper at 60 %" {
		t.Errorf("note %q not made safe", got)
	}
	if got := rrows[4][7]; got != "-0.2" {
		t.Errorf("negative value written as %q", got)
	}
	if err := WriteResultsCSV(&buf, nil, r); ErrorCode(err) != Invalid {
		t.Errorf("nil snapshot: %v", err)
	}
}

func TestSafeCell(t *testing.T) {
	for in, want := range map[string]string{
		"": "", "S-101": "S-101", "=1+2": "'=1+2", "+SUM(A1)": "'+SUM(A1)", "-2+3": "'-2+3", "@cmd": "'@cmd",
		"  =x": "'  =x", "\tx": "'\tx", "-3.5": "-3.5", "12": "12", "-": "'-",
	} {
		if got := safeCell(in); got != want {
			t.Errorf("safeCell(%q) = %q, want %q", in, got, want)
		}
	}
}

// ---- job JSON ----

// jobJSONFixture is a job on server A with every kind of record, a device, and
// readings: as found and final, a correction, a void, and readings taken with
// an instrument deleted since.
func jobJSONFixture(t *testing.T) (*fixture, *Instrument, Device) {
	t.Helper()
	ctx := context.Background()
	f := newFixture(t)
	dev, _, err := f.db.CreateDevice(ctx, lead, "Phone A1", RoleTechnician)
	if err != nil {
		t.Fatal(err)
	}
	old := mustCreate(t, f.db, &Instrument{JobID: f.job.ID, Tag: "Old hood", Kind: "flow_hood"})
	v := func(x float64) *float64 { return &x }
	first := NewID()
	rs := []Reading{
		{ID: first, SubjectKind: SubjectOutlet, SubjectID: f.out.ID, Quantity: "flow", Value: v(3100), Unit: UnitCFM,
			Stage: StageAsFound, InstrumentID: old.ID, Technician: "Ari", TakenAt: testNow.Add(-3 * time.Hour)},
		{ID: NewID(), SubjectKind: SubjectOutlet, SubjectID: f.out.ID, Quantity: "flow", Value: v(310), Unit: UnitCFM,
			Stage: StageAsFound, InstrumentID: old.ID, Technician: "Ari", Supersedes: first, Note: "typo",
			TakenAt: testNow.Add(-170 * time.Minute)},
		{ID: NewID(), SubjectKind: SubjectTraverse, SubjectID: f.trav.ID, Quantity: "vp", Point: 3, Value: v(0.11), Unit: UnitInWG,
			Stage: StageFinal, InstrumentID: f.inst.ID, Technician: "Bo", TakenAt: testNow.Add(-2 * time.Hour)},
		{ID: NewID(), SubjectKind: SubjectSystem, SubjectID: f.sys.ID, Quantity: "amps", Point: 2, Value: v(4.1), Unit: UnitAmp,
			Stage: StageFinal, Technician: "Bo", TakenAt: testNow.Add(-100 * time.Minute)},
	}
	if _, err := f.db.AddReadings(ctx, Actor{DeviceID: dev.ID, Name: "Phone A1", Role: RoleTechnician}, f.job.ID, rs); err != nil {
		t.Fatal(err)
	}
	voided := NewID()
	rs2 := []Reading{
		{ID: voided, SubjectKind: SubjectWaterTest, SubjectID: f.wat.ID, Quantity: "dp", Value: v(8), Unit: UnitPsi,
			Stage: StageFinal, Technician: "Bo", TakenAt: testNow.Add(-90 * time.Minute)},
		{ID: NewID(), SubjectKind: SubjectWaterTest, SubjectID: f.wat.ID, Quantity: "dp", Void: true, Unit: UnitPsi,
			Stage: StageFinal, Technician: "Bo", Supersedes: voided, Note: "wrong valve", TakenAt: testNow.Add(-80 * time.Minute)},
	}
	if _, err := f.db.AddReadings(ctx, lead, f.job.ID, rs2); err != nil {
		t.Fatal(err)
	}
	// Delete refuses an instrument that took readings; a document from another
	// server may still carry one deleted, so make one here directly.
	if _, err := f.db.write.ExecContext(ctx, "UPDATE instruments SET deleted = 1, seq = seq + 1 WHERE id = ?", old.ID); err != nil {
		t.Fatal(err)
	}
	return f, old, dev
}

func exportDoc(t *testing.T, db *DB, jobID string) (JobDocument, []byte) {
	t.Helper()
	var buf bytes.Buffer
	if err := db.ExportJobJSON(context.Background(), jobID, &buf); err != nil {
		t.Fatal(err)
	}
	var doc JobDocument
	if err := json.Unmarshal(buf.Bytes(), &doc); err != nil {
		t.Fatal(err)
	}
	return doc, buf.Bytes()
}

func importDoc(t *testing.T, db *DB, b []byte) MergeReport {
	t.Helper()
	rep, err := db.ImportJobJSON(context.Background(), lead, bytes.NewReader(b))
	if err != nil {
		t.Fatalf("import: %v", err)
	}
	return rep
}

// withoutServerFields clears what each server sets for itself: the change
// numbers (job.seq, every record's seq, every reading's seq) and the readings'
// received_at. Everything else must survive a round trip.
func withoutServerFields(d JobDocument) JobDocument {
	d.Instruments, d.Systems, d.Outlets = slices.Clone(d.Instruments), slices.Clone(d.Systems), slices.Clone(d.Outlets)
	d.Traverses, d.CapacityTests, d.WaterTests = slices.Clone(d.Traverses), slices.Clone(d.CapacityTests), slices.Clone(d.WaterTests)
	d.Readings = slices.Clone(d.Readings)
	d.Job.Seq = 0
	for i := range d.Instruments {
		d.Instruments[i].Seq = 0
	}
	for i := range d.Systems {
		d.Systems[i].Seq = 0
	}
	for i := range d.Outlets {
		d.Outlets[i].Seq = 0
	}
	for i := range d.Traverses {
		d.Traverses[i].Seq = 0
	}
	for i := range d.CapacityTests {
		d.CapacityTests[i].Seq = 0
	}
	for i := range d.WaterTests {
		d.WaterTests[i].Seq = 0
	}
	for i := range d.Readings {
		d.Readings[i].Seq, d.Readings[i].ReceivedAt = 0, time.Time{}
	}
	return d
}

func TestJobJSONRoundTrip(t *testing.T) {
	ctx := context.Background()
	f, old, dev := jobJSONFixture(t)
	docA, rawA := exportDoc(t, f.db, f.job.ID)
	if docA.Format != JobDocumentFormat || docA.Version != 1 || len(docA.Readings) != 6 || len(docA.Instruments) != 2 {
		t.Fatalf("document: format %q v%d, %d readings, %d instruments", docA.Format, docA.Version, len(docA.Readings), len(docA.Instruments))
	}
	if !strings.Contains(string(rawA), `"deleted":true`) {
		t.Errorf("the deleted instrument is not in the document")
	}

	dbB := MustOpenDB(t)
	dbB.Now = func() time.Time { return testNow.Add(48 * time.Hour) }
	rep := importDoc(t, dbB, rawA)
	want := MergeReport{JobID: f.job.ID, JobCreated: true, Created: 7, Stored: 6, DevicesAdded: 1}
	if rep != want {
		t.Errorf("report %+v, want %+v", rep, want)
	}
	docB, _ := exportDoc(t, dbB, f.job.ID)
	if !reflect.DeepEqual(withoutServerFields(docA), withoutServerFields(docB)) {
		a, _ := json.MarshalIndent(withoutServerFields(docA), "", " ")
		b, _ := json.MarshalIndent(withoutServerFields(docB), "", " ")
		t.Fatalf("round trip differs beyond seq and received_at:\nA: %s\nB: %s", a, b)
	}
	for i, r := range docB.Readings {
		if !r.ReceivedAt.Equal(testNow.Add(48 * time.Hour)) {
			t.Errorf("reading %d: received_at %v, want B's clock", i, r.ReceivedAt)
		}
		if i > 0 && r.Seq <= docB.Readings[i-1].Seq {
			t.Errorf("reading %d: seq %d after %d", i, r.Seq, docB.Readings[i-1].Seq)
		}
	}
	if docB.Readings[0].DeviceID != dev.ID || docB.Readings[0].InstrumentID != old.ID || docB.Readings[1].Supersedes != docA.Readings[0].ID {
		t.Errorf("provenance lost: %+v", docB.Readings[0])
	}
	devs, err := dbB.Devices(ctx)
	if err != nil {
		t.Fatal(err)
	}
	if len(devs) != 1 || devs[0].ID != dev.ID || devs[0].RevokedAt == nil {
		t.Errorf("B's devices %+v: want A's device as a revoked placeholder", devs)
	}
	sB, err := dbB.Snapshot(ctx, f.job.ID)
	if err != nil {
		t.Fatal(err)
	}
	rA, _ := f.db.Snapshot(ctx, f.job.ID)
	resA, _ := ComputeResults(rA, testNow)
	resB, _ := ComputeResults(sB, testNow)
	if !reflect.DeepEqual(resA.Outlets, resB.Outlets) || !reflect.DeepEqual(resA.WaterTests, resB.WaterTests) {
		t.Errorf("results differ after the round trip")
	}

	t.Run("OKReimportIsNoOp", func(t *testing.T) {
		seq := jobSeq(t, dbB, f.job.ID)
		audit := rdgCount(t, dbB, "SELECT COUNT(*) FROM audit")
		rep := importDoc(t, dbB, rawA)
		want := MergeReport{JobID: f.job.ID, Skipped: 7, Duplicate: 6}
		if rep != want || jobSeq(t, dbB, f.job.ID) != seq || rdgCount(t, dbB, "SELECT COUNT(*) FROM audit") != audit {
			t.Errorf("re-import %+v (want %+v) or it wrote", rep, want)
		}
	})
}

func TestJobJSONTwoCrews(t *testing.T) {
	ctx := context.Background()
	f, _, _ := jobJSONFixture(t)
	_, raw := exportDoc(t, f.db, f.job.ID)
	dbB := MustOpenDB(t)
	importDoc(t, dbB, raw)
	base := len(f.mustSnapshot(t).Readings)

	v := func(x float64) *float64 { return &x }
	// Crew A, on its laptop: a final reading and a traverse edit an hour later.
	f.db.Now = func() time.Time { return testNow.Add(time.Hour) }
	rA := []Reading{
		{ID: NewID(), SubjectKind: SubjectOutlet, SubjectID: f.out.ID, Quantity: "flow", Value: v(349), Unit: UnitCFM,
			Stage: StageFinal, Technician: "Ari", TakenAt: testNow.Add(50 * time.Minute)},
		{ID: NewID(), SubjectKind: SubjectSystem, SubjectID: f.sys.ID, Quantity: "fan_rpm", Value: v(1100), Unit: UnitRPM,
			Stage: StageFinal, Technician: "Ari", TakenAt: testNow.Add(55 * time.Minute)},
	}
	if _, err := f.db.AddReadings(ctx, lead, f.job.ID, rA); err != nil {
		t.Fatal(err)
	}
	trav := *f.trav
	trav.Location = "Main supply, after the elbow"
	if err := Update(ctx, f.db, lead, &trav); err != nil {
		t.Fatal(err)
	}
	// Crew B, on another laptop two hours later: readings, a correction of one
	// of A's readings, and an outlet edit.
	dbB.Now = func() time.Time { return testNow.Add(2 * time.Hour) }
	sB, err := dbB.Snapshot(ctx, f.job.ID)
	if err != nil {
		t.Fatal(err)
	}
	ampsID := ""
	for _, r := range sB.Readings {
		if r.Quantity == "amps" {
			ampsID = r.ID
		}
	}
	rB := []Reading{
		{ID: NewID(), SubjectKind: SubjectCapacityTest, SubjectID: f.cap.ID, Quantity: "enter_db", Value: v(78), Unit: UnitDegF,
			Stage: StageFinal, Technician: "Cy", TakenAt: testNow.Add(100 * time.Minute)},
		{ID: NewID(), SubjectKind: SubjectSystem, SubjectID: f.sys.ID, Quantity: "amps", Point: 2, Value: v(4.3), Unit: UnitAmp,
			Stage: StageFinal, Technician: "Cy", Supersedes: ampsID, TakenAt: testNow.Add(110 * time.Minute)},
		{ID: NewID(), SubjectKind: SubjectWaterTest, SubjectID: f.wat.ID, Quantity: "enter_temp", Value: v(44), Unit: UnitDegF,
			Stage: StageFinal, Technician: "Cy", TakenAt: testNow.Add(115 * time.Minute)},
	}
	if _, err := dbB.AddReadings(ctx, lead, f.job.ID, rB); err != nil {
		t.Fatal(err)
	}
	outB, err := Get[*Outlet](ctx, dbB, f.job.ID, f.out.ID)
	if err != nil {
		t.Fatal(err)
	}
	outB.Room = "101 Waiting (north)"
	if err := Update(ctx, dbB, lead, outB); err != nil {
		t.Fatal(err)
	}
	travB, err := Get[*Traverse](ctx, dbB, f.job.ID, f.trav.ID)
	if err != nil || travB.Location == trav.Location {
		t.Fatalf("B's traverse %v %+v", err, travB)
	}

	_, rawB := exportDoc(t, dbB, f.job.ID)
	f.db.Now = func() time.Time { return testNow.Add(3 * time.Hour) }
	rep := importDoc(t, f.db, rawB)
	want := MergeReport{JobID: f.job.ID, Updated: 1, Skipped: 6, Stored: 3, Duplicate: base}
	if rep != want {
		t.Errorf("merge %+v, want %+v", rep, want)
	}
	s := f.mustSnapshot(t)
	count := map[string]int{}
	for _, r := range s.Readings {
		count[r.ID]++
	}
	all := append(append([]Reading{}, rA...), rB...)
	if len(s.Readings) != base+len(all) {
		t.Errorf("A holds %d readings, want %d", len(s.Readings), base+len(all))
	}
	for _, r := range all {
		if count[r.ID] != 1 {
			t.Errorf("reading %s held %d times", r.ID, count[r.ID])
		}
	}
	got, err := Get[*Outlet](ctx, f.db, f.job.ID, f.out.ID)
	if err != nil || got.Room != "101 Waiting (north)" {
		t.Errorf("outlet after merge %+v %v: B's newer edit should win", got, err)
	}
	gotT, err := Get[*Traverse](ctx, f.db, f.job.ID, f.trav.ID)
	if err != nil || gotT.Location != trav.Location {
		t.Errorf("traverse after merge %+v %v: A's newer edit should stay", gotT, err)
	}
	r, _ := ComputeResults(s, testNow.Add(3*time.Hour))
	for _, sy := range r.Systems {
		if len(sy.Amps) != 1 || sy.Amps[0].Value != 4.3 {
			t.Errorf("amps %+v: B's correction of A's reading should count", sy.Amps)
		}
	}

	t.Run("OKReimportIsNoOp", func(t *testing.T) {
		seq := jobSeq(t, f.db, f.job.ID)
		rep := importDoc(t, f.db, rawB)
		if rep.Created+rep.Updated+rep.Stored != 0 || rep.Duplicate != base+len(rB) || jobSeq(t, f.db, f.job.ID) != seq {
			t.Errorf("re-merge %+v changed something", rep)
		}
	})
	t.Run("OKMergeBackIntoB", func(t *testing.T) {
		_, rawA := exportDoc(t, f.db, f.job.ID)
		rep := importDoc(t, dbB, rawA)
		if rep.Stored != len(rA) || rep.Updated != 1 {
			t.Errorf("merge into B %+v, want %d stored and the traverse updated", rep, len(rA))
		}
		a, _ := exportDoc(t, f.db, f.job.ID)
		b, _ := exportDoc(t, dbB, f.job.ID)
		// Both now hold the same job; the order of readings is each server's own.
		if len(a.Readings) != len(b.Readings) || !reflect.DeepEqual(withoutServerFields(a).Outlets, withoutServerFields(b).Outlets) ||
			!reflect.DeepEqual(withoutServerFields(a).Traverses, withoutServerFields(b).Traverses) {
			t.Errorf("A and B differ after merging both ways")
		}
	})
}

func (f *fixture) mustSnapshot(t *testing.T) *Snapshot {
	t.Helper()
	s, err := f.db.Snapshot(context.Background(), f.job.ID)
	if err != nil {
		t.Fatal(err)
	}
	return s
}

func TestJobJSONErrors(t *testing.T) {
	ctx := context.Background()
	f, _, _ := jobJSONFixture(t)
	doc, raw := exportDoc(t, f.db, f.job.ID)
	enc := func(d JobDocument) []byte {
		b, err := json.Marshal(d)
		if err != nil {
			t.Fatal(err)
		}
		return b
	}
	edit := func(fn func(d *JobDocument)) []byte {
		var d JobDocument
		if err := json.Unmarshal(raw, &d); err != nil {
			t.Fatal(err)
		}
		fn(&d)
		return enc(d)
	}
	otherJob := NewID()
	tests := []struct {
		name  string
		body  []byte
		db    *DB
		code  Code
		field string
	}{
		{"ErrNotJSON", []byte("{not json"), f.db, Invalid, "document"},
		{"ErrUnknownField", []byte(`{"format":"fieldtab-job","version":1,"extra":1}`), f.db, Invalid, "document"},
		{"ErrTrailingData", append(append([]byte{}, raw...), []byte(`{}`)...), f.db, Invalid, "document"},
		{"ErrFormat", edit(func(d *JobDocument) { d.Format = "other" }), f.db, Invalid, "format"},
		{"ErrNewerVersion", edit(func(d *JobDocument) { d.Version = 2 }), f.db, Invalid, "version"},
		{"ErrNoJobID", edit(func(d *JobDocument) { d.Job.ID = "" }), f.db, Invalid, "job.id"},
		{"ErrRecordJob", edit(func(d *JobDocument) { d.Outlets[0].JobID = otherJob }), f.db, Invalid, "outlets[0].job_id"},
		{"ErrRecordInvalid", edit(func(d *JobDocument) { d.Outlets[0].DesignFlow = -1 }), f.db, Invalid, "outlets[0].design_flow"},
		{"ErrReadingInvalid", edit(func(d *JobDocument) { d.Readings[2].Unit = "furlongs" }), f.db, Invalid, "readings[2].unit"},
		{"ErrDuplicateReading", edit(func(d *JobDocument) { d.Readings[3].ID = d.Readings[2].ID }), f.db, Invalid, "readings[3].id"},
		{"ErrSubjectMissing", edit(func(d *JobDocument) { d.Readings[3].SubjectID = NewID() }), MustOpenDB(t), Invalid, "readings[3].subject_id"},
		{"ErrInstrumentMissing", edit(func(d *JobDocument) {
			var keep []Instrument
			for _, in := range d.Instruments {
				if !in.Deleted {
					keep = append(keep, in)
				}
			}
			d.Instruments = keep
		}), MustOpenDB(t), Invalid, "readings[0].instrument_id"},
		{"ErrSupersedesLoop", edit(func(d *JobDocument) { d.Readings[0].Supersedes = d.Readings[1].ID }), MustOpenDB(t), Invalid, "readings[0].supersedes"},
		{"ErrIDOfOtherJob", edit(func(d *JobDocument) {
			d.Job.ID = otherJob
			setJob := func(id *string) { *id = otherJob }
			for i := range d.Instruments {
				setJob(&d.Instruments[i].JobID)
			}
			for i := range d.Systems {
				setJob(&d.Systems[i].JobID)
			}
			for i := range d.Outlets {
				setJob(&d.Outlets[i].JobID)
			}
			for i := range d.Traverses {
				setJob(&d.Traverses[i].JobID)
			}
			for i := range d.CapacityTests {
				setJob(&d.CapacityTests[i].JobID)
			}
			for i := range d.WaterTests {
				setJob(&d.WaterTests[i].JobID)
			}
			for i := range d.Readings {
				setJob(&d.Readings[i].JobID)
			}
		}), f.db, Conflict, "outlets[0].id"}, // the first record looked at: deletions go dependents first
		{"ErrUnits", enc(JobDocument{Format: JobDocumentFormat, Version: 1, Snapshot: Snapshot{Job: Job{ID: doc.Job.ID, Name: "x", Units: "si",
			UpdatedAt: testNow.Add(time.Hour)}}}), f.db, Conflict, "job.units"},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			n := rdgCount(t, tt.db, "SELECT COUNT(*) FROM readings")
			_, err := tt.db.ImportJobJSON(ctx, lead, bytes.NewReader(tt.body))
			assertErr(t, err, tt.code, tt.field)
			if rdgCount(t, tt.db, "SELECT COUNT(*) FROM readings") != n || (tt.db != f.db && rdgCount(t, tt.db, "SELECT COUNT(*) FROM jobs") != 0) {
				t.Errorf("a failed import stored something")
			}
		})
	}

	t.Run("ErrTagClash", func(t *testing.T) {
		dbB := MustOpenDB(t)
		importDoc(t, dbB, raw)
		mustCreate(t, f.db, &Outlet{JobID: f.job.ID, SystemID: f.sys.ID, Tag: "S-999", Kind: "supply", DesignFlow: 100, Method: "hood", Factor: 1})
		mustCreate(t, dbB, &Outlet{JobID: f.job.ID, SystemID: f.sys.ID, Tag: "S-999", Kind: "return", DesignFlow: 200, Method: "hood", Factor: 1})
		v := 199.0
		if _, err := dbB.AddReadings(ctx, lead, f.job.ID, []Reading{{ID: NewID(), SubjectKind: SubjectSystem, SubjectID: f.sys.ID,
			Quantity: "fan_rpm", Value: &v, Unit: UnitRPM, Stage: StageFinal, Technician: "Cy", TakenAt: testNow}}); err != nil {
			t.Fatal(err)
		}
		_, rawB := exportDoc(t, dbB, f.job.ID)
		n := rdgCount(t, f.db, "SELECT COUNT(*) FROM readings")
		_, err := f.db.ImportJobJSON(ctx, lead, bytes.NewReader(rawB))
		if ErrorCode(err) != Conflict || !strings.HasSuffix(ErrorField(err), ".tag") || !strings.Contains(ErrorMessage(err), "S-999") {
			t.Fatalf("got %v (field %q), want a tag Conflict", err, ErrorField(err))
		}
		if rdgCount(t, f.db, "SELECT COUNT(*) FROM readings") != n {
			t.Errorf("readings stored despite the conflict")
		}
	})
}

func TestJobJSONDeletions(t *testing.T) {
	ctx := context.Background()
	f, _, _ := jobJSONFixture(t)
	_, raw := exportDoc(t, f.db, f.job.ID)
	dbB := MustOpenDB(t)
	importDoc(t, dbB, raw)

	// Crew B deletes the water test and then the capacity test it belonged to.
	dbB.Now = func() time.Time { return testNow.Add(time.Hour) }
	if err := Delete[*WaterTest](ctx, dbB, lead, f.job.ID, f.wat.ID); err != nil {
		t.Fatal(err)
	}
	if err := Delete[*CapacityTest](ctx, dbB, lead, f.job.ID, f.cap.ID); err != nil {
		t.Fatal(err)
	}
	_, rawB := exportDoc(t, dbB, f.job.ID)

	t.Run("ErrLiveDependentHere", func(t *testing.T) {
		// Meanwhile crew A added a water test on that capacity test.
		c := MustOpenDB(t)
		importDoc(t, c, raw)
		mustCreate(t, c, &WaterTest{JobID: f.job.ID, SystemID: f.sys.ID, Tag: "HW coil", Mode: "heating", FlowSource: "valve", ValveCv: 5,
			Fluid: "water", DesignFlow: 10, CapacityTest: f.cap.ID})
		_, err := c.ImportJobJSON(ctx, lead, bytes.NewReader(rawB))
		assertErr(t, err, Conflict, "capacity_tests[0].deleted")
		if _, err := Get[*WaterTest](ctx, c, f.job.ID, f.wat.ID); err != nil {
			t.Errorf("the water test was deleted although the merge failed: %v", err)
		}
	})
	t.Run("OKDependentsFirst", func(t *testing.T) {
		rep := importDoc(t, f.db, rawB)
		if rep.Updated != 2 || rep.Created != 0 {
			t.Errorf("merge %+v, want the two deletions", rep)
		}
		s := f.mustSnapshot(t)
		if len(s.WaterTests) != 0 || len(s.CapacityTests) != 0 {
			t.Errorf("after the merge: %d water tests, %d capacity tests; want none", len(s.WaterTests), len(s.CapacityTests))
		}
		if rep := importDoc(t, f.db, rawB); rep.Updated+rep.Created+rep.Stored != 0 {
			t.Errorf("re-merge %+v", rep)
		}
	})
}

func TestJobJSONSI(t *testing.T) {
	// An SI job exports and imports with its values as stored (no conversion).
	ctx := context.Background()
	db := MustOpenDB(t)
	j := &Job{Name: "SI job", Units: "si", Elevation: ptr(350.0)}
	if err := db.CreateJob(ctx, lead, j); err != nil {
		t.Fatal(err)
	}
	sys := mustCreate(t, db, &System{JobID: j.ID, Tag: "AHU-1", Kind: "air_handler", Design: SystemDesign{Airflow: 2000}})
	mustCreate(t, db, &Outlet{JobID: j.ID, SystemID: sys.ID, Tag: "S-1", Kind: "supply", DesignFlow: 150, Method: "ak", Factor: 1, Ak: 0.05})
	docA, raw := exportDoc(t, db, j.ID)
	dbB := MustOpenDB(t)
	importDoc(t, dbB, raw)
	docB, _ := exportDoc(t, dbB, j.ID)
	if !reflect.DeepEqual(withoutServerFields(docA), withoutServerFields(docB)) || docB.Outlets[0].Ak != 0.05 {
		t.Errorf("SI round trip differs")
	}
	u, _ := docB.Job.UnitSystem()
	if u != measure.SI {
		t.Errorf("units %v", u)
	}
}
