package schema

import (
	"context"
	"fmt"
	"math"
	"path/filepath"
	"sort"
	"strings"
	"sync"
	"testing"
	"time"
)

// rdgFixture is a job with one live record of every subject kind, a deleted
// outlet, an instrument and a paired device.
type rdgFixture struct {
	db                                                 *DB
	job, other                                         string // other: a second job
	system, outlet, deleted, traverse, capTest, waterT string
	instrument, otherInstrument, device                string
}

var rdgLead = Actor{Name: "Lead", Role: RoleLead}

func mustReadingsFixture(tb testing.TB, db *DB) *rdgFixture {
	tb.Helper()
	ctx := context.Background()
	f := &rdgFixture{db: db}
	must := func(err error) {
		tb.Helper()
		if err != nil {
			tb.Fatalf("fixture: %v", err)
		}
	}
	job := &Job{Name: "Harbour Library", Units: "ip"}
	must(db.CreateJob(ctx, rdgLead, job))
	other := &Job{Name: "Other job", Units: "si"}
	must(db.CreateJob(ctx, rdgLead, other))
	f.job, f.other = job.ID, other.ID
	sys := &System{JobID: f.job, Tag: "AHU-1", Kind: "air_handler"}
	must(Create(ctx, db, rdgLead, sys))
	f.system = sys.ID
	out := &Outlet{JobID: f.job, SystemID: f.system, Tag: "S-101", Kind: "supply", DesignFlow: 400, Method: "hood", Factor: 1}
	must(Create(ctx, db, rdgLead, out))
	f.outlet = out.ID
	gone := &Outlet{JobID: f.job, SystemID: f.system, Tag: "S-102", Kind: "supply", DesignFlow: 300, Method: "hood", Factor: 1}
	must(Create(ctx, db, rdgLead, gone))
	must(Delete[*Outlet](ctx, db, rdgLead, f.job, gone.ID))
	f.deleted = gone.ID
	tr := &Traverse{JobID: f.job, SystemID: f.system, Tag: "T-1", Shape: "rect", Method: "log-tchebycheff",
		Width: 36, Height: 24, PointsW: 5, PointsH: 5}
	must(Create(ctx, db, rdgLead, tr))
	f.traverse = tr.ID
	ct := &CapacityTest{JobID: f.job, SystemID: f.system, Tag: "CT-1", Mode: "cooling", FlowSource: "direct", FlowBasis: "standard"}
	must(Create(ctx, db, rdgLead, ct))
	f.capTest = ct.ID
	wt := &WaterTest{JobID: f.job, SystemID: f.system, Tag: "CHW coil", Mode: "cooling", FlowSource: "valve", ValveCv: 10, Fluid: "water", DesignFlow: 40}
	must(Create(ctx, db, rdgLead, wt))
	f.waterT = wt.ID
	inst := &Instrument{JobID: f.job, Tag: "Hood 1", Kind: "flow_hood"}
	must(Create(ctx, db, rdgLead, inst))
	f.instrument = inst.ID
	osys := &System{JobID: f.other, Tag: "RTU-9", Kind: "rooftop_unit"}
	must(Create(ctx, db, rdgLead, osys))
	oinst := &Instrument{JobID: f.other, Tag: "Hood 9", Kind: "flow_hood"}
	must(Create(ctx, db, rdgLead, oinst))
	f.otherInstrument = oinst.ID
	dev, _, err := db.CreateDevice(ctx, rdgLead, "Phone 1", RoleTechnician)
	must(err)
	f.device = dev.ID
	return f
}

// reading returns a valid reading on one of the fixture's subjects.
func (f *rdgFixture) reading(kind, quantity, unit string, v float64) Reading {
	r := testReading(kind, quantity, unit, v)
	r.ID, r.JobID = NewID(), ""
	switch kind {
	case SubjectOutlet:
		r.SubjectID = f.outlet
	case SubjectTraverse:
		r.SubjectID = f.traverse
	case SubjectCapacityTest:
		r.SubjectID = f.capTest
	case SubjectWaterTest:
		r.SubjectID = f.waterT
	case SubjectSystem:
		r.SubjectID = f.system
	}
	return r
}

func (f *rdgFixture) batch() []Reading {
	rs := []Reading{
		f.reading(SubjectOutlet, "flow", UnitCFM, 385),
		f.reading(SubjectTraverse, "vp", UnitInWG, 0.12),
		f.reading(SubjectTraverse, "air_db", UnitDegF, 56),
		f.reading(SubjectCapacityTest, "enter_wb", UnitDegF, 64),
		f.reading(SubjectWaterTest, "dp", UnitFtWater, 8.5),
		f.reading(SubjectSystem, "amps", UnitAmp, 11.2),
	}
	rs[1].Point = 25
	rs[5].Point = 2
	rs[0].InstrumentID = f.instrument
	return rs
}

// count returns the number of rows of a table, read through the writer.
func rdgCount(tb testing.TB, db *DB, query string, args ...any) int {
	tb.Helper()
	var n int
	if err := db.write.QueryRow(query, args...).Scan(&n); err != nil {
		tb.Fatalf("%s: %v", query, err)
	}
	return n
}

func jobSeq(tb testing.TB, db *DB, jobID string) int64 {
	tb.Helper()
	var seq int64
	if err := db.write.QueryRow("SELECT seq FROM jobs WHERE id = ?", jobID).Scan(&seq); err != nil {
		tb.Fatal(err)
	}
	return seq
}

func TestReadingsAdd(t *testing.T) {
	ctx := context.Background()
	db := MustOpenDB(t)
	f := mustReadingsFixture(t, db)
	tech := Actor{DeviceID: f.device, Name: "Sam", Role: RoleTechnician}

	rs := f.batch()
	rs[2].Technician = "" // takes the actor's name
	rs[3].DeviceID = NewID()
	seq0 := jobSeq(t, db, f.job)
	res, err := db.AddReadings(ctx, tech, f.job, rs)
	if err != nil {
		t.Fatal(err)
	}
	t.Run("OKStored", func(t *testing.T) {
		for i, r := range res {
			if r.Status != ReadingStored || r.ID != rs[i].ID || r.Seq != seq0+int64(i)+1 || r.Field != "" {
				t.Errorf("result %d = %+v; want stored with seq %d", i, r, seq0+int64(i)+1)
			}
		}
		if got := jobSeq(t, db, f.job); got != seq0+int64(len(rs)) {
			t.Errorf("job seq %d; want %d", got, seq0+int64(len(rs)))
		}
	})
	t.Run("OKReadBack", func(t *testing.T) {
		got, err := db.Readings(ctx, f.job)
		if err != nil {
			t.Fatal(err)
		}
		if len(got) != len(rs) {
			t.Fatalf("%d readings; want %d", len(got), len(rs))
		}
		for i, g := range got {
			want := rs[i]
			want.JobID, want.DeviceID, want.ReceivedAt, want.Seq = f.job, f.device, testNow, res[i].Seq
			if i == 2 {
				want.Technician = "Sam"
			}
			want.TakenAt = want.TakenAt.UTC()
			if fmt.Sprintf("%+v", deref(g)) != fmt.Sprintf("%+v", deref(want)) {
				t.Errorf("reading %d:\n got %+v\nwant %+v", i, deref(g), deref(want))
			}
		}
	})
	t.Run("OKRepostIsDuplicate", func(t *testing.T) {
		before := rdgCount(t, db, "SELECT COUNT(*) FROM readings")
		again, err := db.AddReadings(ctx, tech, f.job, rs)
		if err != nil {
			t.Fatal(err)
		}
		for i, r := range again {
			if r.Status != ReadingDuplicate || r.Seq != res[i].Seq {
				t.Errorf("result %d = %+v; want duplicate with seq %d", i, r, res[i].Seq)
			}
		}
		if after := rdgCount(t, db, "SELECT COUNT(*) FROM readings"); after != before {
			t.Errorf("%d rows after re-post; want %d", after, before)
		}
		if got := jobSeq(t, db, f.job); got != seq0+int64(len(rs)) {
			t.Errorf("job seq moved to %d on a re-post", got)
		}
	})
	t.Run("OKSameIDTwiceInBatch", func(t *testing.T) {
		r := f.reading(SubjectOutlet, "flow", UnitCFM, 390)
		res, err := db.AddReadings(ctx, tech, f.job, []Reading{r, r})
		if err != nil {
			t.Fatal(err)
		}
		if res[0].Status != ReadingStored || res[1].Status != ReadingDuplicate || res[1].Seq != res[0].Seq {
			t.Errorf("got %+v", res)
		}
	})
	t.Run("OKCommandLineKeepsDevice", func(t *testing.T) {
		r := f.reading(SubjectOutlet, "flow", UnitCFM, 391)
		r.DeviceID, r.Technician = f.device, ""
		res, err := db.AddReadings(ctx, Actor{Name: "import"}, f.job, []Reading{r})
		if err != nil || res[0].Status != ReadingStored {
			t.Fatalf("%+v, %v", res, err)
		}
		got, _ := db.Readings(ctx, f.job)
		last := got[len(got)-1]
		if last.DeviceID != f.device || last.Technician != "import" {
			t.Errorf("device %q technician %q", last.DeviceID, last.Technician)
		}
	})
	t.Run("OKEmptyBatch", func(t *testing.T) {
		res, err := db.AddReadings(ctx, tech, f.job, nil)
		if err != nil || len(res) != 0 {
			t.Errorf("%+v, %v", res, err)
		}
	})
}

// deref makes a reading printable with its value rather than a pointer.
func deref(r Reading) any {
	type flat struct {
		Reading
		Value string
	}
	v := "nil"
	if r.Value != nil {
		v = fmt.Sprint(*r.Value)
	}
	r.Value = nil
	return flat{r, v}
}

func TestReadingsAddErrors(t *testing.T) {
	ctx := context.Background()
	db := MustOpenDB(t)
	f := mustReadingsFixture(t, db)
	tech := Actor{DeviceID: f.device, Name: "Sam", Role: RoleTechnician}

	t.Run("ErrJobNotFound", func(t *testing.T) {
		_, err := db.AddReadings(ctx, tech, NewID(), f.batch())
		if ErrorCode(err) != NotFound || ErrorField(err) != "job_id" {
			t.Errorf("got %v", err)
		}
		_, err = db.AddReadings(ctx, tech, "not-a-uuid", f.batch())
		if ErrorCode(err) != NotFound {
			t.Errorf("got %v", err)
		}
	})
	t.Run("ErrBatchTooBig", func(t *testing.T) {
		rs := make([]Reading, MaxReadingsBatch+1)
		for i := range rs {
			rs[i] = f.reading(SubjectOutlet, "flow", UnitCFM, 100)
		}
		_, err := db.AddReadings(ctx, tech, f.job, rs)
		if ErrorCode(err) != Invalid || ErrorField(err) != "readings" {
			t.Errorf("got %v", err)
		}
		if _, err := db.AddReadings(ctx, tech, f.job, rs[:MaxReadingsBatch]); err != nil {
			t.Errorf("a batch of %d: %v", MaxReadingsBatch, err)
		}
	})

	// A reading stored in the other job, for the cross-job cases.
	otherSys := rdgCount(t, db, "SELECT COUNT(*) FROM systems WHERE job_id = ?", f.other)
	if otherSys != 1 {
		t.Fatal("fixture: other job has no system")
	}
	var otherSystem string
	db.write.QueryRow("SELECT id FROM systems WHERE job_id = ?", f.other).Scan(&otherSystem)
	foreign := testReading(SubjectSystem, "fan_rpm", UnitRPM, 900)
	foreign.ID, foreign.JobID, foreign.SubjectID = NewID(), "", otherSystem
	if res, err := db.AddReadings(ctx, tech, f.other, []Reading{foreign}); err != nil || res[0].Status != ReadingStored {
		t.Fatalf("store in other job: %+v, %v", res, err)
	}
	base := f.reading(SubjectOutlet, "flow", UnitCFM, 400)
	if res, err := db.AddReadings(ctx, tech, f.job, []Reading{base}); err != nil || res[0].Status != ReadingStored {
		t.Fatalf("store base: %+v, %v", res, err)
	}

	cases := []struct {
		name   string
		edit   func(r *Reading)
		field  string
		reason string // a part of the reason
	}{
		{"ErrUnit", func(r *Reading) { r.Unit = UnitGPM }, "unit", "accepted units are cfm, L/s, m3/h"},
		{"ErrValueRange", func(r *Reading) { r.Value = ptr(90000.0) }, "value", "outside the accepted range"},
		{"ErrValueMissing", func(r *Reading) { r.Value = nil }, "value", "required"},
		{"ErrBadID", func(r *Reading) { r.ID = "S-101 reading" }, "id", "UUID"},
		{"ErrIDOfOtherJob", func(r *Reading) { r.ID = foreign.ID }, "id", "another job"},
		{"ErrJobIDMismatch", func(r *Reading) { r.JobID = f.other }, "job_id", "sent to job"},
		{"ErrSubjectUnknown", func(r *Reading) { r.SubjectID = NewID() }, "subject_id", "no outlet"},
		{"ErrSubjectOfOtherKind", func(r *Reading) { r.SubjectID = f.traverse }, "subject_id", "no outlet"},
		{"ErrSubjectInOtherJob", func(r *Reading) {
			r.SubjectKind, r.Quantity, r.Unit, r.SubjectID = SubjectSystem, "fan_rpm", UnitRPM, otherSystem
		}, "subject_id", "no system"},
		{"ErrTraversePointPastLayout", func(r *Reading) {
			r.SubjectKind, r.SubjectID, r.Quantity, r.Unit, r.Point = SubjectTraverse, f.traverse, "vp", UnitInWG, 26
			r.Value = ptr(0.1)
		}, "point", "points 1 to 25"},
		{"ErrTraversePointZero", func(r *Reading) {
			r.SubjectKind, r.SubjectID, r.Quantity, r.Unit, r.Point = SubjectTraverse, f.traverse, "velocity", UnitFPM, 0
		}, "point", "traverse point"},
		{"ErrPointOnFlow", func(r *Reading) { r.Point = 1 }, "point", "must be 0"},
		{"ErrLegFour", func(r *Reading) {
			r.SubjectKind, r.SubjectID, r.Quantity, r.Unit, r.Point = SubjectSystem, f.system, "volts", UnitVolt, 4
		}, "point", "leg 1 to 3"},
		{"ErrInstrumentUnknown", func(r *Reading) { r.InstrumentID = NewID() }, "instrument_id", "no instrument"},
		{"ErrInstrumentOfOtherJob", func(r *Reading) { r.InstrumentID = f.otherInstrument }, "instrument_id", "no instrument"},
		{"ErrSupersedesUnknown", func(r *Reading) { r.Supersedes = NewID() }, "supersedes", "no reading"},
		{"ErrSupersedesOtherJob", func(r *Reading) { r.Supersedes = foreign.ID }, "supersedes", "no reading"},
		{"ErrSupersedesOtherSubject", func(r *Reading) {
			r.SubjectKind, r.SubjectID, r.Quantity, r.Unit = SubjectSystem, f.system, "fan_rpm", UnitRPM
			r.Supersedes = base.ID
		}, "supersedes", "another record"},
		{"ErrSupersedesItself", func(r *Reading) { r.Supersedes = r.ID }, "supersedes", "itself"},
		{"ErrVoidWithoutTarget", func(r *Reading) { r.Void, r.Value = true, nil }, "supersedes", "void must name"},
		{"ErrVoidWithValue", func(r *Reading) { r.Void, r.Supersedes = true, base.ID }, "value", "no value"},
		{"ErrStage", func(r *Reading) { r.Stage = "as found" }, "stage", `"as_found", "final"`},
		{"ErrTechnicianLong", func(r *Reading) { r.Technician = strings.Repeat("é", 81) }, "technician", "at most 80"},
		{"ErrNoteLong", func(r *Reading) { r.Note = strings.Repeat("x", 501) }, "note", "at most 500"},
		{"ErrNoteControl", func(r *Reading) { r.Note = "a\x00b" }, "note", "control"},
		{"ErrTakenAtZero", func(r *Reading) { r.TakenAt = time.Time{} }, "taken_at", "required"},
		{"ErrTakenAtFuture", func(r *Reading) { r.TakenAt = testNow.Add(11 * time.Minute) }, "taken_at", "10 minutes"},
		{"ErrTakenAt1970", func(r *Reading) { r.TakenAt = time.Unix(0, 0) }, "taken_at", "before 2000"},
		{"ErrQuantity", func(r *Reading) { r.Quantity = "cfm" }, "quantity", "accepted quantities are flow, velocity"},
		{"ErrSubjectKind", func(r *Reading) { r.SubjectKind = "diffuser" }, "subject_kind", "accepted values"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			bad := f.reading(SubjectOutlet, "flow", UnitCFM, 410)
			c.edit(&bad)
			good1 := f.reading(SubjectOutlet, "flow", UnitCFM, 405)
			good2 := f.reading(SubjectSystem, "fan_rpm", UnitRPM, 1100)
			before := rdgCount(t, db, "SELECT COUNT(*) FROM readings")
			res, err := db.AddReadings(ctx, tech, f.job, []Reading{good1, bad, good2})
			if err != nil {
				t.Fatal(err)
			}
			if res[0].Status != ReadingStored || res[2].Status != ReadingStored {
				t.Errorf("good readings: %+v, %+v", res[0], res[2])
			}
			if r := res[1]; r.Status != ReadingRejected || r.Field != c.field || !strings.Contains(r.Reason, c.reason) || r.Seq != 0 ||
				r.ID != bad.ID {
				t.Errorf("bad reading: %+v; want rejected, field %q, reason containing %q", r, c.field, c.reason)
			}
			if after := rdgCount(t, db, "SELECT COUNT(*) FROM readings"); after != before+2 {
				t.Errorf("%d rows stored; want 2", after-before)
			}
		})
	}
	t.Run("OKTakenAtNineMinutesAhead", func(t *testing.T) {
		r := f.reading(SubjectOutlet, "flow", UnitCFM, 400)
		r.TakenAt = testNow.Add(9 * time.Minute)
		if res, err := db.AddReadings(ctx, tech, f.job, []Reading{r}); err != nil || res[0].Status != ReadingStored {
			t.Errorf("%+v, %v", res, err)
		}
	})
	t.Run("ErrUnknownDeviceFromCommandLine", func(t *testing.T) {
		r := f.reading(SubjectOutlet, "flow", UnitCFM, 400)
		r.DeviceID = NewID()
		res, err := db.AddReadings(ctx, Actor{Name: "import"}, f.job, []Reading{r})
		if err != nil || res[0].Status != ReadingRejected || res[0].Field != "device_id" {
			t.Errorf("%+v, %v", res, err)
		}
	})
	t.Run("ErrNoTechnicianAnywhere", func(t *testing.T) {
		r := f.reading(SubjectOutlet, "flow", UnitCFM, 400)
		r.Technician = " "
		res, err := db.AddReadings(ctx, Actor{}, f.job, []Reading{r})
		if err != nil || res[0].Status != ReadingRejected || res[0].Field != "technician" {
			t.Errorf("%+v, %v", res, err)
		}
	})
}

func ptr[T any](v T) *T { return &v }

func TestReadingsSupersede(t *testing.T) {
	ctx := context.Background()
	db := MustOpenDB(t)
	f := mustReadingsFixture(t, db)
	tech := Actor{DeviceID: f.device, Name: "Sam", Role: RoleTechnician}
	add := func(rs ...Reading) {
		t.Helper()
		res, err := db.AddReadings(ctx, tech, f.job, rs)
		if err != nil {
			t.Fatal(err)
		}
		for _, r := range res {
			if r.Status != ReadingStored {
				t.Fatalf("%+v", r)
			}
		}
	}
	ids := func() []string {
		t.Helper()
		all, err := db.Readings(ctx, f.job)
		if err != nil {
			t.Fatal(err)
		}
		var out []string
		for _, r := range CurrentReadings(all) {
			out = append(out, r.ID)
		}
		return out
	}

	a := f.reading(SubjectOutlet, "flow", UnitCFM, 4000) // slipped a digit
	other := f.reading(SubjectSystem, "fan_rpm", UnitRPM, 1100)
	add(a, other)
	b := f.reading(SubjectOutlet, "flow", UnitCFM, 400)
	b.Supersedes = a.ID
	add(b)
	if got := ids(); fmt.Sprint(got) != fmt.Sprint([]string{other.ID, b.ID}) {
		t.Errorf("after correction: %v", got)
	}
	// A void names the reading it removes, in the same batch as a later re-read.
	v := f.reading(SubjectOutlet, "flow", UnitCFM, 0)
	v.Void, v.Value, v.Supersedes = true, nil, b.ID
	add(v)
	if got := ids(); fmt.Sprint(got) != fmt.Sprint([]string{other.ID}) {
		t.Errorf("after void: %v", got)
	}
	// Superseding the void brings a value back; a void of the other reading in
	// the same batch as the reading it removes.
	c := f.reading(SubjectOutlet, "flow", UnitCFM, 410)
	c.Supersedes = v.ID
	d := f.reading(SubjectSystem, "fan_rpm", UnitRPM, 1150)
	v2 := f.reading(SubjectSystem, "fan_rpm", UnitRPM, 0)
	v2.Void, v2.Value, v2.Supersedes = true, nil, d.ID
	add(c, d, v2)
	if got := ids(); fmt.Sprint(got) != fmt.Sprint([]string{other.ID, c.ID}) {
		t.Errorf("after correcting the void: %v", got)
	}
	all, _ := db.Readings(ctx, f.job)
	if len(all) != 7 {
		t.Errorf("%d readings stored; want all 7 kept", len(all))
	}
	for i := 1; i < len(all); i++ {
		if all[i].Seq <= all[i-1].Seq {
			t.Errorf("readings not in seq order: %d after %d", all[i].Seq, all[i-1].Seq)
		}
	}
	if all[3].Value != nil || !all[3].Void {
		t.Errorf("void read back as %+v", deref(all[3]))
	}
}

func TestReadingsCurrent(t *testing.T) {
	r := func(id, sup string, void bool) Reading { return Reading{ID: id, Supersedes: sup, Void: void} }
	cases := []struct {
		name string
		in   []Reading
		want string
	}{
		{"OKEmpty", nil, ""},
		{"OKPlain", []Reading{r("a", "", false), r("b", "", false)}, "a b"},
		{"OKCorrection", []Reading{r("a", "", false), r("b", "a", false)}, "b"},
		{"OKChain", []Reading{r("a", "", false), r("b", "a", false), r("c", "b", false)}, "c"},
		{"OKVoid", []Reading{r("a", "", false), r("v", "a", true)}, ""},
		{"OKVoidOfCorrection", []Reading{r("a", "", false), r("b", "a", false), r("v", "b", true)}, ""},
		{"OKCorrectedVoid", []Reading{r("a", "", false), r("v", "a", true), r("c", "v", false)}, "c"},
		{"OKOrderKept", []Reading{r("x", "", false), r("a", "", false), r("b", "a", false), r("y", "", false)}, "x b y"},
		{"OKTargetMissing", []Reading{r("b", "gone", false)}, "b"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			var ids []string
			for _, x := range CurrentReadings(c.in) {
				ids = append(ids, x.ID)
			}
			if got := strings.Join(ids, " "); got != c.want {
				t.Errorf("got %q; want %q", got, c.want)
			}
		})
	}
}

// A reading of a record deleted while the device was offline is kept, with a
// note, and no result counts it.
func TestReadingsOnDeletedSubjectKept(t *testing.T) {
	ctx := context.Background()
	db := MustOpenDB(t)
	f := mustReadingsFixture(t, db)
	r := f.reading(SubjectOutlet, "flow", UnitCFM, 300)
	r.SubjectID = f.deleted
	res, err := db.AddReadings(ctx, rdgLead, f.job, []Reading{r})
	if err != nil || res[0].Status != ReadingStored || !strings.Contains(res[0].Reason, "was deleted") {
		t.Fatalf("reading of a deleted outlet: %+v, %v; want stored with a note", res, err)
	}
	snap, err := db.Snapshot(ctx, f.job)
	if err != nil {
		t.Fatal(err)
	}
	out, err := ComputeResults(snap, testNow)
	if err != nil {
		t.Fatal(err)
	}
	for _, o := range out.Outlets {
		if o.ID == f.deleted {
			t.Errorf("the deleted outlet appears in the results: %+v", o)
		}
	}
}

// An upper-case UUID (as iOS makes them) is stored in lower case, answered as
// sent, and a retry in either case is a duplicate.
func TestReadingsUpperCaseID(t *testing.T) {
	ctx := context.Background()
	db := MustOpenDB(t)
	f := mustReadingsFixture(t, db)
	r := f.reading(SubjectOutlet, "flow", UnitCFM, 400)
	r.ID = strings.ToUpper(r.ID)
	res, err := db.AddReadings(ctx, rdgLead, f.job, []Reading{r})
	if err != nil || res[0].Status != ReadingStored || res[0].ID != r.ID {
		t.Fatalf("upper-case id: %+v, %v; want stored, answered as sent", res, err)
	}
	r2 := r
	r2.ID = strings.ToLower(r.ID)
	if res, _ := db.AddReadings(ctx, rdgLead, f.job, []Reading{r2}); res[0].Status != ReadingDuplicate {
		t.Errorf("lower-case retry: %+v; want duplicate", res[0])
	}
	got, _ := db.Readings(ctx, f.job)
	if len(got) != 1 || got[0].ID != strings.ToLower(r.ID) {
		t.Errorf("stored ids %+v; want one, in lower case", got)
	}
}

// A retry must say what was stored: an id reused for another value is
// rejected, never answered "duplicate" while the new value is dropped.
func TestReadingsIDReusedForOtherValue(t *testing.T) {
	ctx := context.Background()
	db := MustOpenDB(t)
	f := mustReadingsFixture(t, db)
	r := f.reading(SubjectOutlet, "flow", UnitCFM, 400)
	if _, err := db.AddReadings(ctx, rdgLead, f.job, []Reading{r}); err != nil {
		t.Fatal(err)
	}
	other := r
	v := 9999.0
	other.Value = &v
	res, err := db.AddReadings(ctx, rdgLead, f.job, []Reading{other})
	if err != nil || res[0].Status != ReadingRejected || res[0].Field != "id" {
		t.Errorf("reused id with another value: %+v, %v; want rejected on id", res, err)
	}
}

// A correction must be of the same measurement: a correction of a traverse
// point's VP by an air temperature would silently drop that point.
func TestReadingsSupersedeSameMeasurement(t *testing.T) {
	ctx := context.Background()
	db := MustOpenDB(t)
	f := mustReadingsFixture(t, db)
	orig := f.reading(SubjectOutlet, "flow", UnitCFM, 400)
	if _, err := db.AddReadings(ctx, rdgLead, f.job, []Reading{orig}); err != nil {
		t.Fatal(err)
	}
	for _, tc := range []struct {
		name string
		edit func(r *Reading)
		ok   bool
	}{
		{"OKSameMeasurement", func(r *Reading) {}, true},
		{"ErrOtherQuantity", func(r *Reading) { r.Quantity, r.Unit = "velocity", UnitFPM }, false},
		{"ErrOtherStage", func(r *Reading) {
			r.Stage = map[string]string{StageFinal: StageAsFound, StageAsFound: StageFinal}[orig.Stage]
		}, false},
	} {
		t.Run(tc.name, func(t *testing.T) {
			c := f.reading(SubjectOutlet, "flow", UnitCFM, 410)
			c.Supersedes = orig.ID
			tc.edit(&c)
			res, err := db.AddReadings(ctx, rdgLead, f.job, []Reading{c})
			if err != nil {
				t.Fatal(err)
			}
			if got := res[0].Status == ReadingStored; got != tc.ok || !tc.ok && res[0].Field != "supersedes" {
				t.Errorf("%+v; want stored = %v (else rejected on supersedes)", res[0], tc.ok)
			}
		})
	}
}

func TestReadingsAppendOnly(t *testing.T) {
	ctx := context.Background()
	db := MustOpenDB(t)
	f := mustReadingsFixture(t, db)
	r := f.reading(SubjectOutlet, "flow", UnitCFM, 400)
	if _, err := db.AddReadings(ctx, rdgLead, f.job, []Reading{r}); err != nil {
		t.Fatal(err)
	}
	for _, q := range []string{
		"UPDATE readings SET value = 500 WHERE id = ?",
		"UPDATE readings SET note = 'edited' WHERE id = ?",
		"DELETE FROM readings WHERE id = ?",
		// REPLACE deletes without firing delete triggers, so it has a trigger of its own.
		`INSERT OR REPLACE INTO readings (id, job_id, subject_kind, subject_id, quantity, value, unit, stage,
			technician, taken_at, received_at, seq) SELECT id, job_id, subject_kind, subject_id, quantity, 1, unit,
			stage, technician, taken_at, received_at, seq FROM readings WHERE id = ?`,
	} {
		t.Run("Err/"+strings.Join(strings.Fields(q)[:3], "_"), func(t *testing.T) {
			_, err := db.write.ExecContext(ctx, q, r.ID)
			if err == nil || !strings.Contains(err.Error(), "append-only") {
				t.Errorf("%s: got %v; want the append-only trigger to refuse", q, err)
			}
		})
	}
	got, err := db.Readings(ctx, f.job)
	if err != nil || len(got) != 1 || *got[0].Value != 400 || got[0].Note != "" {
		t.Errorf("reading changed: %+v, %v", got, err)
	}
}

func TestReadingsList(t *testing.T) {
	ctx := context.Background()
	db := MustOpenDB(t)
	f := mustReadingsFixture(t, db)
	t.Run("OKNone", func(t *testing.T) {
		got, err := db.Readings(ctx, f.job)
		if err != nil || got == nil || len(got) != 0 {
			t.Errorf("%v, %v; want an empty list", got, err)
		}
	})
	t.Run("ErrNotFound", func(t *testing.T) {
		for _, id := range []string{NewID(), "x"} {
			if _, err := db.Readings(ctx, id); ErrorCode(err) != NotFound || ErrorField(err) != "job_id" {
				t.Errorf("%q: got %v", id, err)
			}
		}
	})
}

// TestReadingsConfirmed: a value the technician confirmed keeps that fact in
// the store, beside its note.
func TestReadingsConfirmed(t *testing.T) {
	ctx := context.Background()
	db := MustOpenDB(t)
	f := mustReadingsFixture(t, db)
	far := f.reading(SubjectOutlet, "flow", UnitCFM, 10000)
	far.Confirmed, far.Note = true, "damper found wide open"
	plain := f.reading(SubjectOutlet, "flow", UnitCFM, 385)
	if _, err := db.AddReadings(ctx, rdgLead, f.job, []Reading{far, plain}); err != nil {
		t.Fatal(err)
	}
	got, err := db.Readings(ctx, f.job)
	if err != nil {
		t.Fatal(err)
	}
	byID := map[string]Reading{}
	for _, r := range got {
		byID[r.ID] = r
	}
	if r := byID[far.ID]; !r.Confirmed || r.Note != "damper found wide open" {
		t.Errorf("confirmed reading read back as %+v", r)
	}
	if byID[plain.ID].Confirmed {
		t.Errorf("unconfirmed reading read back as confirmed")
	}
}

// TestReadingsConcurrent posts from 10 goroutines at once: each its own
// batches, and all of them one shared batch. Every reading is stored exactly
// once, and the change numbers are unique and without gaps.
func TestReadingsConcurrent(t *testing.T) {
	ctx := context.Background()
	db := MustOpenDB(t)
	f := mustReadingsFixture(t, db)
	seq0 := jobSeq(t, db, f.job)
	shared := make([]Reading, 20)
	for i := range shared {
		shared[i] = f.reading(SubjectOutlet, "flow", UnitCFM, float64(300+i))
	}
	const workers, batches = 10, 3
	var (
		wg      sync.WaitGroup
		mu      sync.Mutex
		stored  = map[string]int{}
		seqs    []int64
		errs    []error
		postAll = func(rs []Reading) {
			res, err := db.AddReadings(ctx, Actor{DeviceID: f.device, Name: "Sam"}, f.job, rs)
			mu.Lock()
			defer mu.Unlock()
			if err != nil {
				errs = append(errs, err)
				return
			}
			for _, r := range res {
				switch r.Status {
				case ReadingStored:
					stored[r.ID]++
					seqs = append(seqs, r.Seq)
				case ReadingDuplicate:
				default:
					errs = append(errs, fmt.Errorf("%+v", r))
				}
			}
		}
	)
	for w := 0; w < workers; w++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for b := 0; b < batches; b++ {
				rs := make([]Reading, 20)
				for i := range rs {
					rs[i] = f.reading(SubjectTraverse, "vp", UnitPa, float64(10+i))
					rs[i].Point = i + 1
				}
				postAll(rs)
				if b == 1 {
					postAll(shared)
				}
			}
		}()
	}
	wg.Wait()
	if len(errs) > 0 {
		t.Fatalf("%d errors, first: %v", len(errs), errs[0])
	}
	want := workers*batches*20 + len(shared)
	if len(stored) != want {
		t.Errorf("%d readings stored; want %d", len(stored), want)
	}
	for id, n := range stored {
		if n != 1 {
			t.Errorf("%s stored %d times", id, n)
		}
	}
	if n := rdgCount(t, db, "SELECT COUNT(*) FROM readings WHERE job_id = ?", f.job); n != want {
		t.Errorf("%d rows; want %d", n, want)
	}
	sort.Slice(seqs, func(i, j int) bool { return seqs[i] < seqs[j] })
	for i, s := range seqs {
		if s != seq0+int64(i)+1 {
			t.Fatalf("seq %d at position %d; want %d (gap or repeat)", s, i, seq0+int64(i)+1)
		}
	}
}

// FuzzReadingValidate feeds arbitrary text and numbers to Validate: it never
// panics, and every error is an *Error with Code Invalid and a field.
func FuzzReadingValidate(f *testing.F) {
	f.Add(NewID(), "outlet", NewID(), "flow", 0, 400.0, false, "cfm", "final", "", "Dana", "", "", "", int64(0))
	f.Add(NewID(), "traverse", NewID(), "vp", 25, -0.02, false, "in_wg", "as_found", NewID(), "Lee", "tape", NewID(), NewID(), int64(-3600))
	f.Add("x", "system", "y", "volts", 4, math.NaN(), true, "V", "", "bad", "", "\x00", "z", "", int64(1e12))
	f.Add(NewID(), "water_test", NewID(), "dp", 0, math.Inf(1), false, "bar", "final", "", "é", "", "", "", int64(601))
	f.Add(NewID(), "system", NewID(), "power_factor", 0, 0.9, true, "", "final", "", "Sam", "", "", NewID(), int64(0))
	f.Fuzz(func(t *testing.T, id, kind, subject, quantity string, point int, value float64, void bool,
		unit, stage, instrument, technician, note, device, supersedes string, offset int64) {
		r := Reading{ID: id, JobID: "1c2d3e4f-5a6b-4c7d-8e9f-0a1b2c3d4e5f", SubjectKind: kind, SubjectID: subject,
			Quantity: quantity, Point: point, Unit: unit, Stage: stage, InstrumentID: instrument,
			Technician: technician, DeviceID: device, Supersedes: supersedes, Void: void, Note: note,
			TakenAt: testNow.Add(time.Duration(offset) * time.Second)}
		if !void || point%2 == 0 {
			r.Value = &value
		}
		err := r.Validate(testNow)
		if err == nil {
			if r.Value != nil {
				for _, read := range []func() (float64, error){
					func() (float64, error) { v, err := r.Flow(); return float64(v), err },
					func() (float64, error) { v, err := r.Pressure(); return float64(v), err },
					func() (float64, error) { v, err := r.Temperature(); return float64(v), err },
					r.Number,
				} {
					if v, err := read(); err == nil && (math.IsNaN(v) || math.IsInf(v, 0)) {
						t.Fatalf("accessor gave %v for a valid reading", v)
					}
				}
			}
			return
		}
		e, ok := err.(*Error)
		if !ok || e.Code != Invalid || e.Field == "" || e.Message == "" {
			t.Fatalf("error %#v is not an Invalid *Error with a field", err)
		}
	})
}

// BenchmarkAddReadings20 stores batches of 20 readings in a store on disk
// (WAL, synchronous=NORMAL), one batch at a time.
func BenchmarkAddReadings20(b *testing.B) {
	ctx := context.Background()
	db, err := Open(ctx, filepath.Join(b.TempDir(), "bench.db"))
	if err != nil {
		b.Fatal(err)
	}
	defer db.Close()
	db.Now = func() time.Time { return testNow }
	f := mustReadingsFixture(b, db)
	a := Actor{DeviceID: f.device, Name: "Sam"}
	batches := make([][]Reading, b.N)
	for n := range batches {
		rs := make([]Reading, 20)
		for i := range rs {
			if i%2 == 0 {
				rs[i] = f.reading(SubjectOutlet, "flow", UnitCFM, float64(300+i))
			} else {
				rs[i] = f.reading(SubjectTraverse, "vp", UnitInWG, 0.1)
				rs[i].Point = i
			}
		}
		batches[n] = rs
	}
	b.ResetTimer()
	start := time.Now()
	for n := 0; n < b.N; n++ {
		res, err := db.AddReadings(ctx, a, f.job, batches[n])
		if err != nil {
			b.Fatal(err)
		}
		if res[19].Status != ReadingStored {
			b.Fatalf("%+v", res[19])
		}
	}
	b.ReportMetric(float64(20*b.N)/time.Since(start).Seconds(), "readings/s")
}

// Records that readings depend on keep their meaning: an instrument that took
// readings cannot be deleted, and a traverse with point readings cannot have
// its points moved (its other fields, such as location, still change).
func TestReadingsProtectTheirRecords(t *testing.T) {
	ctx := context.Background()
	db := MustOpenDB(t)
	f := mustReadingsFixture(t, db)
	r := f.reading(SubjectOutlet, "flow", UnitCFM, 400)
	r.InstrumentID = f.instrument
	vp := f.reading(SubjectTraverse, "vp", UnitInWG, 0.12)
	vp.Point = 1
	if res, err := db.AddReadings(ctx, rdgLead, f.job, []Reading{r, vp}); err != nil || res[0].Status != ReadingStored || res[1].Status != ReadingStored {
		t.Fatalf("fixture readings: %+v, %v", res, err)
	}
	err := Delete[*Instrument](ctx, db, rdgLead, f.job, f.instrument)
	if ErrorCode(err) != Conflict {
		t.Errorf("deleting an instrument that took a reading: %v; want Conflict", err)
	}
	tr, err := Get[*Traverse](ctx, db, f.job, f.traverse)
	if err != nil {
		t.Fatal(err)
	}
	tr.PointsW = 6
	if err := Update(ctx, db, rdgLead, tr); ErrorCode(err) != Conflict || ErrorField(err) != "points_w" {
		t.Errorf("moving a read traverse's points: %v; want Conflict on points_w", err)
	}
	tr.PointsW, tr.Location = 5, "Roof, 3 ft downstream of the elbow"
	if err := Update(ctx, db, rdgLead, tr); err != nil {
		t.Errorf("changing a read traverse's location: %v; want it accepted", err)
	}
}
