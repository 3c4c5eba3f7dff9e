package server

import (
	"encoding/csv"
	"strings"
	"testing"

	"fieldtab/schema"
)

func TestScheduleImport(t *testing.T) {
	ts := MustOpenServer(t)
	f := ts.mustFixture(t)
	base := "/jobs/" + f.job + "/import/"
	equipment := "tag,kind,name,airflow (cfm)\nRTU-1,RTU,Roof unit 1,2400\nRTU-2,rooftop_unit,Roof unit 2,1800\n"
	outlets := "Tag,Room,Kind,Design Flow (cfm),System\nS-201,Office 201,S,250,RTU-1\nS-202,Office 202,supply,300,RTU-2\nS-101,Lobby,S,420,AHU-1\n"
	bad := "tag,room,kind,design_flow,system\nS-301,Office,S,250,RTU-1\nS-302,Office,sideways,-3,RTU-9\n"
	count := func(t *testing.T, kind string) int {
		t.Helper()
		var out map[string][]map[string]any
		ts.do(t, "GET", "/jobs/"+f.job+"/"+kind, ts.tech, nil).decode(t, &out)
		return len(out[kind])
	}
	t.Run("OKEquipmentDryRun", func(t *testing.T) {
		var rep schema.ImportReport
		r := ts.do(t, "POST", base+"equipment?dry_run=1", ts.lead, equipment)
		want(t, r, 200, "")
		r.decode(t, &rep)
		if !rep.DryRun || rep.Created != 2 || len(rep.Problems) != 0 {
			t.Fatalf("dry run %s", r.body)
		}
		if n := count(t, "systems"); n != 1 {
			t.Fatalf("%d systems after a dry run, want 1", n)
		}
	})
	t.Run("OKEquipment", func(t *testing.T) {
		var rep schema.ImportReport
		r := ts.do(t, "POST", base+"equipment", ts.lead, equipment)
		want(t, r, 200, "")
		r.decode(t, &rep)
		if rep.DryRun || rep.Created != 2 {
			t.Fatalf("import %s", r.body)
		}
		if n := count(t, "systems"); n != 3 {
			t.Fatalf("%d systems, want 3", n)
		}
	})
	t.Run("OKOutlets", func(t *testing.T) {
		var rep schema.ImportReport
		r := ts.do(t, "POST", base+"outlets?dry_run=0", ts.lead, outlets)
		want(t, r, 200, "")
		r.decode(t, &rep)
		if rep.Created != 2 || rep.Updated != 1 {
			t.Fatalf("import %s", r.body)
		}
		if n := count(t, "outlets"); n != 3 {
			t.Fatalf("%d outlets, want 3", n)
		}
	})
	t.Run("OKPreviewProblems", func(t *testing.T) {
		var rep schema.ImportReport
		r := ts.do(t, "POST", base+"outlets?dry_run=true", ts.lead, bad)
		want(t, r, 200, "")
		r.decode(t, &rep)
		cols := map[string]bool{}
		for _, p := range rep.Problems {
			if p.Line != 3 {
				t.Errorf("problem on line %d, want 3: %+v", p.Line, p)
			}
			cols[p.Column] = true
		}
		if len(rep.Problems) == 0 || !cols["kind"] {
			t.Fatalf("preview %s", r.body)
		}
	})
	t.Run("ErrProblemsImportNothing", func(t *testing.T) {
		r := ts.do(t, "POST", base+"outlets", ts.lead, bad)
		want(t, r, 400, "file")
		if _, ok := r.obj["problems"].([]any); !ok {
			t.Fatalf("no problems listed: %s", r.body)
		}
		if n := count(t, "outlets"); n != 3 {
			t.Fatalf("%d outlets after a refused import, want 3", n)
		}
	})
	t.Run("ErrDryRunValue", func(t *testing.T) {
		want(t, ts.do(t, "POST", base+"outlets?dry_run=perhaps", ts.lead, outlets), 400, "dry_run")
	})
	t.Run("ErrTechnician", func(t *testing.T) {
		want(t, ts.do(t, "POST", base+"outlets?dry_run=1", ts.tech, outlets), 403, "")
		want(t, ts.do(t, "POST", base+"equipment", ts.tech, equipment), 403, "")
	})
	t.Run("ErrNoToken", func(t *testing.T) {
		want(t, ts.do(t, "POST", base+"outlets", "", outlets), 401, "")
	})
	t.Run("ErrUnknownJob", func(t *testing.T) {
		want(t, ts.do(t, "POST", "/jobs/"+schema.NewID()+"/import/outlets", ts.lead, outlets), 404, "")
	})
	t.Run("ErrTooLarge", func(t *testing.T) {
		big := "tag,kind,design_flow,system\n" + strings.Repeat("S-1,S,100,RTU-1\n", maxScheduleBody/16+1)
		want(t, ts.do(t, "POST", base+"outlets?dry_run=1", ts.lead, big), 413, "")
	})
}

func TestExport(t *testing.T) {
	ts := MustOpenServer(t)
	f := ts.mustFixture(t)
	ts.postBatch(t, f.job, ts.tech, []schema.Reading{flowReading(f.outlet, 390)})
	job := "/jobs/" + f.job
	t.Run("OKResultsCSV", func(t *testing.T) {
		r := ts.do(t, "GET", job+"/export.csv", ts.tech, nil)
		want(t, r, 200, "")
		if ct := r.header.Get("Content-Type"); !strings.HasPrefix(ct, "text/csv") {
			t.Errorf("Content-Type %q", ct)
		}
		if cd := r.header.Get("Content-Disposition"); cd != `attachment; filename="harbour-library-results.csv"` {
			t.Errorf("Content-Disposition %q", cd)
		}
		rows, err := csv.NewReader(strings.NewReader(string(r.body))).ReadAll()
		if err != nil || len(rows) < 2 || !strings.Contains(string(r.body), "S-101") {
			t.Fatalf("results CSV (%v): %s", err, r.body)
		}
	})
	t.Run("OKReadingsCSV", func(t *testing.T) {
		r := ts.do(t, "GET", job+"/readings.csv", ts.tech, nil)
		want(t, r, 200, "")
		rows, err := csv.NewReader(strings.NewReader(string(r.body))).ReadAll()
		if err != nil || len(rows) != 2 {
			t.Fatalf("readings CSV (%v): %s", err, r.body)
		}
	})
	var doc []byte
	t.Run("OKJobJSON", func(t *testing.T) {
		r := ts.do(t, "GET", job+"/export.json", ts.tech, nil)
		want(t, r, 200, "")
		var d schema.JobDocument
		r.decode(t, &d)
		if d.Format != schema.JobDocumentFormat || d.Job.ID != f.job || len(d.Outlets) != 1 || len(d.Readings) != 1 {
			t.Fatalf("document %s", r.body)
		}
		doc = r.body
	})
	t.Run("ErrUnknownJob", func(t *testing.T) {
		other := "/jobs/" + schema.NewID()
		for _, p := range []string{"/export.csv", "/readings.csv", "/export.json"} {
			want(t, ts.do(t, "GET", other+p, ts.tech, nil), 404, "")
		}
	})
	t.Run("OKImportIntoAnotherServer", func(t *testing.T) {
		other := MustOpenServer(t)
		var rep schema.MergeReport
		r := other.do(t, "POST", "/jobs/import", other.lead, doc)
		want(t, r, 201, "")
		r.decode(t, &rep)
		if !rep.JobCreated || rep.JobID != f.job || rep.Stored != 1 || rep.Created != 4 {
			t.Fatalf("merge %s", r.body)
		}
		if loc := r.header.Get("Location"); loc != "/api/v1/jobs/"+f.job {
			t.Errorf("Location %q", loc)
		}
		if n := len(other.readings(t, f.job)); n != 1 {
			t.Fatalf("%d readings on the other server", n)
		}
		// Importing again changes nothing: a union by ID.
		r = other.do(t, "POST", "/jobs/import", other.lead, doc)
		want(t, r, 200, "")
		r.decode(t, &rep)
		if rep.JobCreated || rep.Stored != 0 || rep.Duplicate != 1 {
			t.Fatalf("second merge %s", r.body)
		}
	})
	t.Run("ErrImport", func(t *testing.T) {
		want(t, ts.do(t, "POST", "/jobs/import", ts.tech, doc), 403, "")
		want(t, ts.do(t, "POST", "/jobs/import", "", doc), 401, "")
		want(t, ts.do(t, "POST", "/jobs/import", ts.lead, `{"format":"something else"}`), 400, "")
		want(t, ts.do(t, "POST", "/jobs/import", ts.lead, `not json`), 400, "")
	})
}
