package server

import (
	"bytes"
	"context"
	"encoding/json"
	"io"
	"net/http"
	"net/http/httptest"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
	"time"

	"fieldtab/schema"
)

// testNow is the fixed clock of every test server and its store.
var testNow = time.Date(2025, 3, 14, 9, 30, 0, 0, time.UTC)

// testServer is a real store in a temp dir behind the full handler stack,
// with a lead's and a technician's device token.
type testServer struct {
	*Server
	db      *schema.DB
	ts      *httptest.Server
	lead    string // lead's token
	tech    string // technician's token
	techDev schema.Device
}

// MustOpenServer opens a fresh store with its clock fixed at testNow, builds
// the server over it and serves its handler with httptest. Both close when
// the test ends.
func MustOpenServer(tb testing.TB) *testServer {
	tb.Helper()
	return mustOpenServerAt(tb, filepath.Join(tb.TempDir(), "fieldtab.db"))
}

func mustOpenServerAt(tb testing.TB, path string) *testServer {
	tb.Helper()
	ctx := context.Background()
	db, err := schema.Open(ctx, path)
	if err != nil {
		tb.Fatalf("open test database: %v", err)
	}
	db.Now = func() time.Time { return testNow }
	s := New(db, "127.0.0.1:0", nil)
	s.Now = func() time.Time { return testNow }
	t := &testServer{Server: s, db: db, ts: httptest.NewServer(s.Handler())}
	tb.Cleanup(func() {
		t.ts.Close()
		if err := db.Close(); err != nil {
			tb.Errorf("close test database: %v", err)
		}
	})
	cli := schema.Actor{Name: "test"}
	if _, t.lead, err = db.CreateDevice(ctx, cli, "Lead laptop", schema.RoleLead); err != nil {
		tb.Fatalf("create lead device: %v", err)
	}
	if t.techDev, t.tech, err = db.CreateDevice(ctx, cli, "Phone 1", schema.RoleTechnician); err != nil {
		tb.Fatalf("create technician device: %v", err)
	}
	return t
}

// response is an answer with its body kept raw and, when it is a JSON
// object, decoded.
type response struct {
	status int
	header http.Header
	body   []byte
	obj    map[string]any
}

// field returns the body's "field" ("" when none).
func (r response) field() string { s, _ := r.obj["field"].(string); return s }

// errText returns the body's "error" ("" when none).
func (r response) errText() string { s, _ := r.obj["error"].(string); return s }

// decode decodes the body into v.
func (r response) decode(tb testing.TB, v any) {
	tb.Helper()
	if err := json.Unmarshal(r.body, v); err != nil {
		tb.Fatalf("decode %s: %v", r.body, err)
	}
}

// do sends a request with token (none when "") and body: nil for none, a
// []byte or string as is, anything else as JSON.
func (t *testServer) do(tb testing.TB, method, path, token string, body any) response {
	tb.Helper()
	var rd io.Reader
	switch b := body.(type) {
	case nil:
	case []byte:
		rd = bytes.NewReader(b)
	case string:
		rd = strings.NewReader(b)
	default:
		j, err := json.Marshal(b)
		if err != nil {
			tb.Fatalf("encode body: %v", err)
		}
		rd = bytes.NewReader(j)
	}
	req, err := http.NewRequest(method, t.ts.URL+"/api/v1"+path, rd)
	if err != nil {
		tb.Fatalf("request: %v", err)
	}
	if token != "" {
		req.Header.Set("Authorization", "Bearer "+token)
	}
	if body != nil {
		req.Header.Set("Content-Type", "application/json")
	}
	resp, err := t.ts.Client().Do(req)
	if err != nil {
		tb.Fatalf("%s %s: %v", method, path, err)
	}
	defer resp.Body.Close()
	b, err := io.ReadAll(resp.Body)
	if err != nil {
		tb.Fatalf("%s %s: read body: %v", method, path, err)
	}
	r := response{status: resp.StatusCode, header: resp.Header, body: b}
	_ = json.Unmarshal(b, &r.obj)
	return r
}

// want fails unless r has status and, for a status of 400 or more, an
// "error" and the given field ("" for any).
func want(tb testing.TB, r response, status int, field string) {
	tb.Helper()
	if r.status != status {
		tb.Fatalf("status %d, want %d: %s", r.status, status, r.body)
	}
	if status >= 400 {
		if r.errText() == "" {
			tb.Fatalf("status %d without an error text: %s", r.status, r.body)
		}
		if field != "" && r.field() != field {
			tb.Fatalf("field %q, want %q: %s", r.field(), field, r.body)
		}
	}
}

// fixture is a job with a system, an outlet, an instrument and a traverse,
// made through the store.
type fixture struct {
	job, system, outlet, instrument, traverse string
}

func (t *testServer) mustFixture(tb testing.TB) fixture {
	tb.Helper()
	ctx := context.Background()
	a := schema.Actor{Name: "Lead", Role: schema.RoleLead}
	must := func(err error) {
		tb.Helper()
		if err != nil {
			tb.Fatalf("fixture: %v", err)
		}
	}
	j := &schema.Job{Name: "Harbour Library", Units: "ip"}
	must(t.db.CreateJob(ctx, a, j))
	sys := &schema.System{JobID: j.ID, Tag: "AHU-1", Kind: "air_handler", Design: schema.SystemDesign{Airflow: 4000}}
	must(schema.Create(ctx, t.db, a, sys))
	out := &schema.Outlet{JobID: j.ID, SystemID: sys.ID, Tag: "S-101", Kind: "supply", DesignFlow: 400, Method: "hood", Factor: 1}
	must(schema.Create(ctx, t.db, a, out))
	in := &schema.Instrument{JobID: j.ID, Tag: "Hood 1", Kind: "flow_hood", AccuracyPct: 3, AccuracyAbs: 7, AccuracyUnit: "cfm"}
	must(schema.Create(ctx, t.db, a, in))
	tr := &schema.Traverse{JobID: j.ID, SystemID: sys.ID, Tag: "T-1", Shape: "rect", Method: "log-tchebycheff",
		Width: 36, Height: 24, PointsW: 5, PointsH: 5}
	must(schema.Create(ctx, t.db, a, tr))
	return fixture{job: j.ID, system: sys.ID, outlet: out.ID, instrument: in.ID, traverse: tr.ID}
}

// flowReading is a valid as-found hood reading of outlet.
func flowReading(outlet string, cfm float64) schema.Reading {
	return schema.Reading{ID: schema.NewID(), SubjectKind: schema.SubjectOutlet, SubjectID: outlet,
		Quantity: "flow", Value: &cfm, Unit: schema.UnitCFM, Stage: schema.StageAsFound,
		Technician: "Sam", TakenAt: testNow.Add(-time.Minute)}
}

func TestHealth(t *testing.T) {
	ts := MustOpenServer(t)
	r := ts.do(t, "GET", "/health", "", nil)
	want(t, r, 200, "")
	if r.obj["status"] != "ok" {
		t.Fatalf("health: %s", r.body)
	}
}

func TestRouting(t *testing.T) {
	ts := MustOpenServer(t)
	t.Run("ErrUnknownEndpoint", func(t *testing.T) {
		want(t, ts.do(t, "GET", "/nothing-here", ts.lead, nil), 404, "")
	})
	t.Run("ErrMethodNotAllowed", func(t *testing.T) {
		want(t, ts.do(t, "DELETE", "/jobs", ts.lead, nil), 405, "")
	})
}

func itoa(n int64) string { return strconv.FormatInt(n, 10) }

func TestOpenClose(t *testing.T) {
	ts := MustOpenServer(t)
	f := ts.mustFixture(t)
	s := New(ts.db, "127.0.0.1:0", nil)
	if err := s.Open(); err != nil {
		t.Fatal(err)
	}
	base := "http://127.0.0.1:" + strconv.Itoa(s.Port()) + "/api/v1"
	body, _ := json.Marshal(map[string]any{"readings": []schema.Reading{flowReading(f.outlet, 400)}})
	req, _ := http.NewRequest("POST", base+"/jobs/"+f.job+"/readings", bytes.NewReader(body))
	req.Header.Set("Authorization", "Bearer "+ts.tech)
	resp, err := http.DefaultClient.Do(req)
	if err != nil {
		t.Fatal(err)
	}
	resp.Body.Close()
	if resp.StatusCode != 200 {
		t.Fatalf("status %d", resp.StatusCode)
	}
	ctx, cancel := context.WithTimeout(context.Background(), 5*time.Second)
	defer cancel()
	if err := s.Close(ctx); err != nil {
		t.Fatalf("close: %v", err)
	}
	if _, err := http.Get(base + "/health"); err == nil {
		t.Fatal("still serving after Close")
	}
}

// TestCloseWaitsForWrites checks that Close returns only after a write in
// flight has finished.
func TestCloseWaitsForWrites(t *testing.T) {
	ts := MustOpenServer(t)
	s := New(ts.db, "127.0.0.1:0", nil)
	started, release, finished := make(chan struct{}), make(chan struct{}), make(chan struct{})
	h := s.writing(func(w http.ResponseWriter, r *http.Request) {
		close(started)
		<-release
		close(finished)
	})
	go h(httptest.NewRecorder(), httptest.NewRequest("POST", "/", nil))
	<-started
	closed := make(chan error, 1)
	go func() { closed <- s.Close(context.Background()) }()
	select {
	case <-closed:
		t.Fatal("Close returned while a write was in flight")
	case <-time.After(50 * time.Millisecond):
	}
	close(release)
	if err := <-closed; err != nil {
		t.Fatal(err)
	}
	select {
	case <-finished:
	default:
		t.Fatal("Close returned before the write finished")
	}
}
