package main

import (
	"bytes"
	"context"
	"encoding/csv"
	"math"
	"path/filepath"
	"slices"
	"testing"
	"time"

	"fieldtab/measure"
	"fieldtab/schema"
)

// mustOpenStore opens a fresh store in a temporary directory, closed when the
// test ends. The clock is the real one: the demo's dates are relative to it.
func mustOpenStore(tb testing.TB) *schema.DB {
	tb.Helper()
	db, err := schema.Open(context.Background(), filepath.Join(tb.TempDir(), "fieldtab.db"))
	if err != nil {
		tb.Fatalf("open store: %v", err)
	}
	tb.Cleanup(func() {
		if err := db.Close(); err != nil {
			tb.Errorf("close store: %v", err)
		}
	})
	return db
}

func TestDemo(t *testing.T) {
	ctx := context.Background()
	db := mustOpenStore(t)
	start := time.Now()
	id, created, err := ensureDemo(ctx, db)
	if err != nil {
		t.Fatal(err)
	}
	// A loose bound (DESIGN §7 keeps speed targets in benchmarks): the demo
	// must feel instant on `fieldtab demo`.
	if d := time.Since(start); d > 2*time.Second {
		t.Errorf("the demo took %v to load; it must load in under 2 s", d)
	}
	if !created {
		t.Fatal("first ensureDemo did not create the demo")
	}
	again, created, err := ensureDemo(ctx, db)
	if err != nil || created || again != id {
		t.Fatalf("second ensureDemo: id %s created %v err %v; want the same job, not created", again, created, err)
	}
	jobs, err := db.Jobs(ctx)
	if err != nil || len(jobs) != 1 || jobs[0].Name != demoJobName {
		t.Fatalf("jobs %+v %v: want exactly the demo", jobs, err)
	}

	s, err := db.Snapshot(ctx, id)
	if err != nil {
		t.Fatal(err)
	}
	if u, _ := s.Job.UnitSystem(); u != measure.IP || s.Job.Elevation == nil || *s.Job.Elevation != 1120 {
		t.Errorf("job units %q elevation %v: want IP at 1,120 ft", s.Job.Units, s.Job.Elevation)
	}
	if n := len(s.Outlets); n < 55 || n > 70 {
		t.Errorf("%d outlets, want about 60", n)
	}
	// Every system carries a nameplate and its drive, and each drive's pitch
	// diameters agree with its speeds to 2 % (fan rpm = motor rpm × motor
	// pitch ÷ fan pitch, the belt-drive ratio; common practice).
	remarks := 0
	for _, sys := range s.Systems {
		d := sys.Design
		if d.Make == "" || d.Model == "" || d.Serial == "" || d.MotorFrame == "" || d.Belts == "" || d.FanSheavePitch == 0 || d.MotorSheavePitch == 0 {
			t.Errorf("system %s has no full nameplate and drive: %+v", sys.Tag, d)
			continue
		}
		if got := d.MotorRPM * d.MotorSheavePitch / d.FanSheavePitch; math.Abs(got/d.FanRPM-1) > 0.02 {
			t.Errorf("system %s: its sheaves drive the fan at %.0f rpm, its design says %.0f", sys.Tag, got, d.FanRPM)
		}
		if sys.Remarks != "" {
			remarks++
		}
	}
	for _, o := range s.Outlets {
		if o.Remarks != "" {
			remarks++
		}
	}
	if remarks < 3 {
		t.Errorf("%d systems and outlets carry a remark; want a few to show remarks in the app and report", remarks)
	}
	current := schema.CurrentReadings(s.Readings)
	voids, supersedes := 0, 0
	for _, r := range s.Readings {
		if r.Void {
			voids++
		} else if r.Supersedes != "" {
			supersedes++
		}
	}
	if voids != 1 || supersedes != 1 || len(current) != len(s.Readings)-3 {
		t.Errorf("%d voids, %d corrections, %d of %d readings current: want one of each", voids, supersedes, len(current), len(s.Readings))
	}

	r, err := schema.ComputeResults(s, time.Now())
	if err != nil {
		t.Fatal(err)
	}
	if len(r.Errors) > 0 {
		t.Errorf("job errors: %v", r.Errors)
	}
	status := map[string]int{}
	stages := map[string]int{}
	for _, o := range r.Outlets {
		status[o.Status]++
		if o.AsFound != nil {
			stages["as_found"]++
		}
		if o.Final != nil {
			stages["final"]++
		}
		if len(o.Errors) > 0 {
			t.Errorf("outlet %s: %v", o.Tag, o.Errors)
		}
	}
	want := map[string]int{"within": 52, "low": 2, "high": 2, "undetermined": 3, schema.ResultNotRead: 3}
	for k, n := range want {
		if status[k] != n {
			t.Errorf("%d outlets %s, want %d (all: %v)", status[k], k, n, status)
		}
	}
	if stages["as_found"] != 59 || stages["final"] != 56 {
		t.Errorf("outlets read as found %d, final %d; want 59 and 56", stages["as_found"], stages["final"])
	}

	overdue := 0
	for _, in := range r.Instruments {
		if in.CalibrationStatus == schema.CalibrationOverdue {
			overdue++
			if in.Tag != "Hood 2" {
				t.Errorf("overdue instrument %s, want Hood 2", in.Tag)
			}
		}
	}
	if overdue != 1 {
		t.Errorf("%d overdue instruments, want 1", overdue)
	}
	flagged := 0
	for _, o := range r.Outlets {
		for _, f := range o.Flags {
			if f.Kind == schema.FlagInstrumentOverdue {
				flagged++
			}
		}
	}
	findings := map[string]int{}
	for _, f := range r.Findings {
		findings[f.Kind]++
	}
	if flagged != 3 || findings[schema.FindingInstrumentOverdue] != 3 {
		t.Errorf("%d outlets flagged, %d overdue findings: want 3 read with Hood 2", flagged, findings[schema.FindingInstrumentOverdue])
	}
	if findings[schema.FindingTraverseWarning] != 0 || findings[schema.FindingCapacityShort] != 1 {
		t.Errorf("findings %v: want no traverse warnings and RTU-2's capacity short", findings)
	}

	if len(r.Traverses) != 2 {
		t.Fatalf("%d traverses, want 2", len(r.Traverses))
	}
	// Both traverses read 98–99 % of design: within, judged with the
	// manometer's accuracy (the band itself allows for the method's ±5 %).
	for _, tr := range r.Traverses {
		if tr.Status != schema.ResultComputed || tr.Flow == nil || tr.PointsRead != tr.PointsTotal || len(tr.Errors) > 0 ||
			tr.Tolerance == nil || tr.Tolerance.Status != string(measure.StatusWithin) || tr.DensitySource != "measured" {
			t.Errorf("traverse %s: status %s, %d of %d points, flow %v, errors %v, tolerance %+v, density %s",
				tr.Tag, tr.Status, tr.PointsRead, tr.PointsTotal, tr.Flow, tr.Errors, tr.Tolerance, tr.DensitySource)
		}
	}

	wantCap := map[string]struct{ status, source string }{
		"CT-RTU-1": {schema.ResultMeets, "perf_table"},
		"CT-RTU-2": {schema.ResultShort, "perf_table"},
		"CT-AHU-1": {schema.ResultMeets, "nameplate"},
	}
	if len(r.CapacityTests) != len(wantCap) {
		t.Errorf("%d capacity tests, want %d", len(r.CapacityTests), len(wantCap))
	}
	for _, ct := range r.CapacityTests {
		w := wantCap[ct.Tag]
		if ct.Status != w.status || ct.Capacity == nil || ct.Expected == nil || ct.Expected.Source != w.source ||
			len(ct.Errors) > 0 || len(ct.Missing) > 0 || ct.Capacity.Process != "cooling" || ct.Uncertainty == nil {
			t.Errorf("capacity test %s: status %s (want %s), capacity %+v, expected %+v (want %s), errors %v, missing %v",
				ct.Tag, ct.Status, w.status, ct.Capacity, ct.Expected, w.source, ct.Errors, ct.Missing)
		}
	}

	if len(r.WaterTests) != 2 {
		t.Fatalf("%d water tests, want 2", len(r.WaterTests))
	}
	for _, wt := range r.WaterTests {
		if wt.Status != string(measure.StatusWithin) || wt.Flow == nil || wt.Capacity == nil || len(wt.Errors) > 0 || len(wt.Missing) > 0 {
			t.Errorf("water test %s: status %s, flow %v, capacity %+v, errors %v, missing %v",
				wt.Tag, wt.Status, wt.Flow, wt.Capacity, wt.Errors, wt.Missing)
		}
	}
	if chw := r.WaterTests[0]; chw.Capacity == nil || chw.Capacity.Process != "cooling" || chw.AirSide == nil || chw.AirSide.Note != "" {
		t.Errorf("CHW coil: %+v; want cooling, compared with CT-AHU-1 and agreeing", chw)
	}
	if hw := r.WaterTests[1]; hw.Capacity == nil || hw.Capacity.Process != "heating" {
		t.Errorf("HW coil: %+v; want heating", hw)
	}

	for _, sy := range r.Systems {
		if len(sy.Errors) > 0 || sy.FanRPM == nil || len(sy.Volts) != 3 || len(sy.Amps) != 3 || sy.PercentFLA == nil ||
			sy.MotorSheave == nil {
			t.Errorf("system %s: errors %v, fan rpm %v, %d volts, %d amps, %%FLA %v", sy.Tag, sy.Errors, sy.FanRPM,
				len(sy.Volts), len(sy.Amps), sy.PercentFLA)
		}
		if sy.Kind != "fan" && (sy.Airflow == nil || sy.FanLaw == nil) {
			t.Errorf("system %s: airflow %v, fan law %+v", sy.Tag, sy.Airflow, sy.FanLaw)
		}
	}
}

func TestDemoExportImport(t *testing.T) {
	ctx := context.Background()
	a := mustOpenStore(t)
	id, _, err := ensureDemo(ctx, a)
	if err != nil {
		t.Fatal(err)
	}
	s, err := a.Snapshot(ctx, id)
	if err != nil {
		t.Fatal(err)
	}
	r, err := schema.ComputeResults(s, time.Now())
	if err != nil {
		t.Fatal(err)
	}
	var buf bytes.Buffer
	if err := schema.WriteResultsCSV(&buf, s, r); err != nil {
		t.Fatal(err)
	}
	rows, err := csv.NewReader(&buf).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	items := len(r.Outlets) + len(r.Systems) + len(r.Traverses) + len(r.CapacityTests) + len(r.WaterTests) + len(r.Instruments)
	if len(rows) != 1+items {
		t.Errorf("results CSV has %d rows, want a header and %d items", len(rows), items)
	}

	buf.Reset()
	if err := a.ExportJobJSON(ctx, id, &buf); err != nil {
		t.Fatal(err)
	}
	exported := buf.String()
	b := mustOpenStore(t)
	rep, err := b.ImportJobJSON(ctx, demoActor, &buf)
	if err != nil {
		t.Fatal(err)
	}
	if !rep.JobCreated || rep.Stored != len(s.Readings) || rep.Created != len(s.Instruments)+len(s.Systems)+len(s.Outlets)+
		len(s.Traverses)+len(s.CapacityTests)+len(s.WaterTests) {
		t.Errorf("import into a fresh store: %+v", rep)
	}
	if _, created, err := ensureDemo(ctx, b); err != nil || created {
		t.Errorf("the imported demo should count as the demo: created %v, err %v", created, err)
	}
	rep, err = a.ImportJobJSON(ctx, demoActor, bytes.NewBufferString(exported))
	if err != nil || rep.Stored+rep.Created+rep.Updated != 0 {
		t.Errorf("re-import into the same store: %+v %v; want nothing new", rep, err)
	}
}

// demoValues lists the demo's readings as values, without IDs and times.
func demoValues(t *testing.T, db *schema.DB) []float64 {
	t.Helper()
	ctx := context.Background()
	id, _, err := ensureDemo(ctx, db)
	if err != nil {
		t.Fatal(err)
	}
	rs, err := db.Readings(ctx, id)
	if err != nil {
		t.Fatal(err)
	}
	var vs []float64
	for _, r := range rs {
		if r.Value != nil {
			vs = append(vs, *r.Value)
		}
	}
	return vs
}

func TestDemoDeterministic(t *testing.T) {
	a, b := demoValues(t, mustOpenStore(t)), demoValues(t, mustOpenStore(t))
	if len(a) == 0 || !slices.Equal(a, b) {
		t.Errorf("two demo loads differ (%d and %d values)", len(a), len(b))
	}
}

func TestDemoIgnoresUnfinishedLoad(t *testing.T) {
	ctx := context.Background()
	db := mustOpenStore(t)
	// A load cut short leaves its job under the loading name.
	if err := db.CreateJob(ctx, demoActor, &schema.Job{Name: demoLoadingName, Units: "ip"}); err != nil {
		t.Fatal(err)
	}
	if _, created, err := ensureDemo(ctx, db); err != nil || !created {
		t.Fatalf("created %v err %v: an unfinished load must not count as the demo", created, err)
	}
}

func BenchmarkEnsureDemo(b *testing.B) {
	ctx := context.Background()
	for b.Loop() {
		b.StopTimer()
		db := mustOpenStore(b)
		b.StartTimer()
		if _, _, err := ensureDemo(ctx, db); err != nil {
			b.Fatal(err)
		}
	}
}
