package server

import (
	"strings"
	"testing"

	"fieldtab/schema"
)

func TestJobs(t *testing.T) {
	ts := MustOpenServer(t)
	var job schema.Job
	t.Run("OKCreate", func(t *testing.T) {
		r := ts.do(t, "POST", "/jobs", ts.lead, map[string]any{"name": "Harbour Library", "units": "ip", "elevation": 450})
		want(t, r, 201, "")
		r.decode(t, &job)
		if job.ID == "" || job.Seq != 1 || job.Status != "open" || job.Tolerances != schema.DefaultTolerances() {
			t.Fatalf("created %s", r.body)
		}
		if loc := r.header.Get("Location"); loc != "/api/v1/jobs/"+job.ID {
			t.Errorf("Location %q", loc)
		}
	})
	path := "/jobs/" + job.ID
	t.Run("OKList", func(t *testing.T) {
		var out struct{ Jobs []schema.Job }
		r := ts.do(t, "GET", "/jobs", ts.tech, nil)
		want(t, r, 200, "")
		r.decode(t, &out)
		if len(out.Jobs) != 1 || out.Jobs[0].ID != job.ID {
			t.Fatalf("jobs %s", r.body)
		}
	})
	t.Run("OKGet", func(t *testing.T) {
		var out struct {
			Job      schema.Job
			Snapshot schema.Snapshot
			Results  schema.Results
		}
		r := ts.do(t, "GET", path, ts.tech, nil)
		want(t, r, 200, "")
		r.decode(t, &out)
		if out.Job.ID != job.ID || out.Snapshot.Job.ID != job.ID || out.Results.JobID != job.ID {
			t.Fatalf("get %s", r.body)
		}
		if out.Results.Today != "2025-03-14" {
			t.Errorf("results today %q, want the server's clock", out.Results.Today)
		}
	})
	t.Run("OKUpdate", func(t *testing.T) {
		upd := job
		upd.Name, upd.Client = "Harbour Library (east wing)", "City of Harbour"
		var out schema.Job
		r := ts.do(t, "PUT", path, ts.lead, upd)
		want(t, r, 200, "")
		r.decode(t, &out)
		if out.Name != upd.Name || out.Client != upd.Client || out.Seq != 2 {
			t.Fatalf("updated %s", r.body)
		}
		// The path names the job; a body without id is fine.
		upd.ID, upd.Contractor = "", "Bayside Mechanical"
		want(t, ts.do(t, "PUT", path, ts.lead, upd), 200, "")
	})
	t.Run("OKAudit", func(t *testing.T) {
		var out struct{ Audit []schema.AuditEntry }
		r := ts.do(t, "GET", path+"/audit", ts.lead, nil)
		want(t, r, 200, "")
		r.decode(t, &out)
		if len(out.Audit) != 3 || out.Audit[0].Action != "create" || out.Audit[0].Actor != "Lead laptop" {
			t.Fatalf("audit %s", r.body)
		}
		want(t, ts.do(t, "GET", "/jobs/"+schema.NewID()+"/audit", ts.lead, nil), 404, "")
	})

	errs := []struct {
		name, method, path, body string
		status                   int
		field                    string
	}{
		{"ErrNameRequired", "POST", "/jobs", `{"units":"ip"}`, 400, "name"},
		{"ErrUnits", "POST", "/jobs", `{"name":"X","units":"metric"}`, 400, "units"},
		{"ErrUnknownField", "POST", "/jobs", `{"name":"X","units":"ip","colour":"red"}`, 400, "colour"},
		{"ErrWrongType", "POST", "/jobs", `{"name":"X","units":"ip","elevation":"high"}`, 400, "elevation"},
		{"ErrWrongNestedType", "POST", "/jobs", `{"name":"X","units":"ip","tolerances":{"outlet_low_pct":true}}`, 400, "tolerances.outlet_low_pct"},
		{"ErrMalformed", "POST", "/jobs", `{"name":`, 400, ""},
		{"ErrEmptyBody", "POST", "/jobs", ``, 400, ""},
		{"ErrTwoValues", "POST", "/jobs", `{"name":"X","units":"ip"} {}`, 400, ""},
		{"ErrNotAnObject", "POST", "/jobs", `[1,2]`, 400, ""},
		{"ErrDuplicateID", "POST", "/jobs", `{"id":"` + job.ID + `","name":"X","units":"ip"}`, 409, "id"},
		{"ErrUpdateIDMismatch", "PUT", path, `{"id":"` + schema.NewID() + `","name":"X","units":"ip"}`, 400, "id"},
		{"ErrUpdateInvalid", "PUT", path, `{"name":"","units":"ip"}`, 400, "name"},
		{"ErrGetUnknown", "GET", "/jobs/" + schema.NewID(), ``, 404, ""},
		{"ErrGetNotUUID", "GET", "/jobs/nope", ``, 404, ""},
		{"ErrUpdateUnknown", "PUT", "/jobs/" + schema.NewID(), `{"name":"X","units":"ip"}`, 404, ""},
		{"ErrTooLarge", "POST", "/jobs", `{"name":"` + strings.Repeat("x", maxBody) + `","units":"ip"}`, 413, ""},
	}
	for _, tc := range errs {
		t.Run(tc.name, func(t *testing.T) {
			var body any
			if tc.body != "" {
				body = tc.body
			}
			want(t, ts.do(t, tc.method, tc.path, ts.lead, body), tc.status, tc.field)
		})
	}
	t.Run("OKNothingStoredByErrors", func(t *testing.T) {
		var out struct{ Jobs []schema.Job }
		ts.do(t, "GET", "/jobs", ts.lead, nil).decode(t, &out)
		if len(out.Jobs) != 1 {
			t.Fatalf("%d jobs after the failed requests", len(out.Jobs))
		}
	})
}

func TestJobChanges(t *testing.T) {
	ts := MustOpenServer(t)
	f := ts.mustFixture(t)
	path := "/jobs/" + f.job + "/changes"
	type changes struct {
		schema.Snapshot
		Seq int64
	}
	var all changes
	t.Run("OKSinceZero", func(t *testing.T) {
		r := ts.do(t, "GET", path+"?since=0", ts.tech, nil)
		want(t, r, 200, "")
		r.decode(t, &all)
		if len(all.Systems) != 1 || len(all.Outlets) != 1 || len(all.Instruments) != 1 || len(all.Traverses) != 1 || all.Seq != all.Job.Seq || all.Seq < 5 {
			t.Fatalf("changes %s", r.body)
		}
	})
	t.Run("OKSinceLatest", func(t *testing.T) {
		var out changes
		r := ts.do(t, "GET", path+"?since="+itoa(all.Seq), ts.tech, nil)
		want(t, r, 200, "")
		r.decode(t, &out)
		if len(out.Systems)+len(out.Outlets)+len(out.Readings) != 0 || out.Seq != all.Seq {
			t.Fatalf("changes since latest %s", r.body)
		}
	})
	t.Run("OKNewReadingAndDeletion", func(t *testing.T) {
		r := ts.do(t, "POST", "/jobs/"+f.job+"/readings", ts.tech, map[string]any{"readings": []schema.Reading{flowReading(f.outlet, 380)}})
		want(t, r, 200, "")
		want(t, ts.do(t, "DELETE", "/jobs/"+f.job+"/traverses/"+f.traverse, ts.lead, nil), 204, "")
		var out changes
		r = ts.do(t, "GET", path+"?since="+itoa(all.Seq), ts.tech, nil)
		want(t, r, 200, "")
		r.decode(t, &out)
		if len(out.Readings) != 1 || len(out.Traverses) != 1 || !out.Traverses[0].Deleted || out.Seq != all.Seq+2 {
			t.Fatalf("changes %s", r.body)
		}
	})
	for _, tc := range []struct{ name, query string }{
		{"ErrSinceMissing", ""}, {"ErrSinceEmpty", "?since="}, {"ErrSinceNegative", "?since=-1"},
		{"ErrSinceNotInteger", "?since=1.5"}, {"ErrSinceText", "?since=abc"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			want(t, ts.do(t, "GET", path+tc.query, ts.tech, nil), 400, "since")
		})
	}
	t.Run("ErrUnknownJob", func(t *testing.T) {
		want(t, ts.do(t, "GET", "/jobs/"+schema.NewID()+"/changes?since=0", ts.tech, nil), 404, "")
	})
	t.Run("EpochOfThisHistory", func(t *testing.T) {
		var v struct{ Epoch string }
		ts.do(t, "GET", "/jobs/"+f.job, ts.tech, nil).decode(t, &v)
		if v.Epoch != ts.db.Epoch() || v.Epoch == "" {
			t.Fatalf("job's epoch %q, store's %q", v.Epoch, ts.db.Epoch())
		}
		want(t, ts.do(t, "GET", path+"?since=0&epoch="+v.Epoch, ts.tech, nil), 200, "")
	})
	t.Run("ErrEpochOfLostHistory", func(t *testing.T) {
		r := ts.do(t, "GET", path+"?since=0&epoch=0123456789abcdef", ts.tech, nil)
		want(t, r, 410, "epoch")
		if !strings.Contains(r.errText(), "fetch the whole job") {
			t.Errorf("410 says %q: want it to say to reload", r.errText())
		}
	})
}
