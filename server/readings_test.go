package server

import (
	"bytes"
	"encoding/json"
	"net/http"
	"net/http/httptest"
	"strings"
	"testing"

	"fieldtab/schema"
)

type batchResponse struct {
	Results    []schema.ReadingResult
	Seq        int64
	BootID     string `json:"boot_id"`
	DurableSeq int64  `json:"durable_seq"`
}

func (t *testServer) postBatch(tb testing.TB, job, token string, rs []schema.Reading) batchResponse {
	tb.Helper()
	r := t.do(tb, "POST", "/jobs/"+job+"/readings", token, map[string]any{"readings": rs})
	want(tb, r, 200, "")
	var out batchResponse
	r.decode(tb, &out)
	if len(out.Results) != len(rs) {
		tb.Fatalf("%d results for %d readings: %s", len(out.Results), len(rs), r.body)
	}
	return out
}

func (t *testServer) readings(tb testing.TB, job string) []schema.Reading {
	tb.Helper()
	var out struct{ Readings []schema.Reading }
	r := t.do(tb, "GET", "/jobs/"+job+"/readings", t.tech, nil)
	want(tb, r, 200, "")
	r.decode(tb, &out)
	return out.Readings
}

func TestReadings(t *testing.T) {
	ts := MustOpenServer(t)
	f := ts.mustFixture(t)
	path := "/jobs/" + f.job + "/readings"
	batch := make([]schema.Reading, 20)
	for i := range batch {
		batch[i] = flowReading(f.outlet, 350+float64(i))
		batch[i].InstrumentID = f.instrument
	}
	var first batchResponse
	t.Run("OKBatch", func(t *testing.T) {
		first = ts.postBatch(t, f.job, ts.tech, batch)
		var prev int64
		for i, res := range first.Results {
			if res.ID != batch[i].ID || res.Status != schema.ReadingStored || res.Seq <= prev {
				t.Fatalf("result %d: %+v", i, res)
			}
			prev = res.Seq
		}
		if first.Seq != prev {
			t.Errorf("seq %d, want the batch's highest %d", first.Seq, prev)
		}
		got := ts.readings(t, f.job)
		if len(got) != 20 || got[0].DeviceID != ts.techDev.ID || got[0].Technician != "Sam" || got[0].JobID != f.job {
			t.Fatalf("stored %d readings, first %+v", len(got), got[0])
		}
	})
	t.Run("OKDurability", func(t *testing.T) {
		// A device learns when its readings are on disk: durable_seq under the
		// boot id it saw, never ahead of what is stored.
		if first.BootID != ts.db.BootID() || first.DurableSeq > first.Seq {
			t.Fatalf("boot_id %q durable_seq %d; want %q and at most %d", first.BootID, first.DurableSeq, ts.db.BootID(), first.Seq)
		}
		if err := ts.db.Sync(t.Context()); err != nil {
			t.Fatal(err)
		}
		var ch batchResponse
		ts.do(t, "GET", "/jobs/"+f.job+"/changes?since=0", ts.tech, nil).decode(t, &ch)
		if ch.BootID != first.BootID || ch.DurableSeq < first.Seq {
			t.Errorf("changes: boot_id %q durable_seq %d after a sync; want %q and at least %d", ch.BootID, ch.DurableSeq, first.BootID, first.Seq)
		}
		var health struct {
			BootID string `json:"boot_id"`
		}
		ts.do(t, "GET", "/health", "", nil).decode(t, &health)
		if health.BootID != first.BootID {
			t.Errorf("health boot_id %q; want %q", health.BootID, first.BootID)
		}
	})
	t.Run("OKIdempotentRepost", func(t *testing.T) {
		again := ts.postBatch(t, f.job, ts.tech, batch)
		for i, res := range again.Results {
			if res.Status != schema.ReadingDuplicate || res.Seq != first.Results[i].Seq {
				t.Fatalf("result %d: %+v, want duplicate with seq %d", i, res, first.Results[i].Seq)
			}
		}
		if n := len(ts.readings(t, f.job)); n != 20 {
			t.Fatalf("%d readings after the re-post, want 20", n)
		}
	})
	t.Run("OKOneBadItem", func(t *testing.T) {
		rs := []schema.Reading{flowReading(f.outlet, 410), flowReading(f.outlet, -40), flowReading(f.outlet, 420)}
		bad := rs[1]
		out := ts.postBatch(t, f.job, ts.tech, rs)
		if out.Results[0].Status != schema.ReadingStored || out.Results[2].Status != schema.ReadingStored {
			t.Fatalf("good items: %+v", out.Results)
		}
		if res := out.Results[1]; res.Status != schema.ReadingRejected || res.Field != "value" || res.Reason == "" || res.ID != bad.ID || res.Seq != 0 {
			t.Fatalf("bad item: %+v", res)
		}
		if n := len(ts.readings(t, f.job)); n != 22 {
			t.Fatalf("%d readings, want 22", n)
		}
	})
	t.Run("OKRejectedReasons", func(t *testing.T) {
		noSubject := flowReading(schema.NewID(), 400)
		badStage := flowReading(f.outlet, 400)
		badStage.Stage = "sometime"
		otherJob := flowReading(f.outlet, 400)
		otherJob.JobID = schema.NewID()
		badID := flowReading(f.outlet, 400)
		badID.ID = "not-a-uuid"
		out := ts.postBatch(t, f.job, ts.tech, []schema.Reading{noSubject, badStage, otherJob, badID})
		for i, field := range []string{"subject_id", "stage", "job_id", "id"} {
			if res := out.Results[i]; res.Status != schema.ReadingRejected || res.Field != field || res.Reason == "" {
				t.Errorf("item %d: %+v, want rejected on %s", i, res, field)
			}
		}
	})
	t.Run("OKEmptyBatch", func(t *testing.T) {
		r := ts.do(t, "POST", path, ts.tech, `{"readings":[]}`)
		want(t, r, 200, "")
	})
	t.Run("OKLeadMayPost", func(t *testing.T) {
		ts.postBatch(t, f.job, ts.lead, []schema.Reading{flowReading(f.outlet, 399)})
	})
	tooMany := make([]schema.Reading, schema.MaxReadingsBatch+1)
	for i := range tooMany {
		tooMany[i] = flowReading(f.outlet, 400)
	}
	errs := []struct {
		name   string
		body   any
		status int
		field  string
	}{
		{"ErrOver500", map[string]any{"readings": tooMany}, 400, "readings"},
		{"ErrNoReadings", `{}`, 400, "readings"},
		{"ErrNullReadings", `{"readings":null}`, 400, "readings"},
		{"ErrNotAList", `{"readings":{"id":"x"}}`, 400, "readings"},
		{"ErrUnknownField", `{"readings":[],"extra":1}`, 400, "extra"},
		{"ErrMalformed", `{"readings":[`, 400, ""},
		{"ErrTooLarge", `{"readings":[{"note":"` + strings.Repeat("x", maxBody) + `"}]}`, 413, ""},
	}
	for _, tc := range errs {
		t.Run(tc.name, func(t *testing.T) {
			want(t, ts.do(t, "POST", path, ts.tech, tc.body), tc.status, tc.field)
		})
	}
	// Items that are not readings are rejected one by one, with the field at
	// fault; the good item beside them is stored.
	t.Run("OKUndecodableItemsRejectedAlone", func(t *testing.T) {
		good := flowReading(f.outlet, 401)
		goodJSON, _ := json.Marshal(good)
		body := `{"readings":[{"id":"bad-1","value":"lots"},{"id":"bad-2","colour":"red"},{"taken_at":"yesterday"},` + string(goodJSON) + `]}`
		var resp struct{ Results []schema.ReadingResult }
		r := ts.do(t, "POST", path, ts.tech, body)
		want(t, r, 200, "")
		r.decode(t, &resp)
		wantFields := []string{"value", "colour", "(item)", ""} // a bad time names no field: encoding/json does not say which
		for i, res := range resp.Results {
			if i < 3 && (res.Status != schema.ReadingRejected || res.Field != wantFields[i] || res.Reason == "") {
				t.Errorf("item %d: %+v; want rejected on %q with a reason", i, res, wantFields[i])
			}
		}
		if len(resp.Results) != 4 || resp.Results[0].ID != "bad-1" || resp.Results[3].Status != schema.ReadingStored {
			t.Errorf("results %+v; want four, the first answered by its id and the last stored", resp.Results)
		}
	})
	t.Run("ErrUnknownJob", func(t *testing.T) {
		other := schema.NewID()
		want(t, ts.do(t, "POST", "/jobs/"+other+"/readings", ts.tech, map[string]any{"readings": batch[:1]}), 404, "job_id")
		want(t, ts.do(t, "GET", "/jobs/"+other+"/readings", ts.tech, nil), 404, "job_id")
	})
	t.Run("OKNothingStoredByErrors", func(t *testing.T) {
		if n := len(ts.readings(t, f.job)); n != 24 {
			t.Fatalf("%d readings, want 24 (23 and the good item beside bad ones)", n)
		}
	})
}

// TestJobGetReadings checks that GET /jobs/{job} shows current readings only
// and results computed from them.
func TestJobGetReadings(t *testing.T) {
	ts := MustOpenServer(t)
	f := ts.mustFixture(t)
	first := flowReading(f.outlet, 300)
	fix := flowReading(f.outlet, 390)
	fix.Supersedes = first.ID
	ts.postBatch(t, f.job, ts.tech, []schema.Reading{first})
	ts.postBatch(t, f.job, ts.tech, []schema.Reading{fix})
	var out struct {
		Snapshot schema.Snapshot
		Results  schema.Results
	}
	r := ts.do(t, "GET", "/jobs/"+f.job, ts.tech, nil)
	want(t, r, 200, "")
	r.decode(t, &out)
	if len(out.Snapshot.Readings) != 1 || out.Snapshot.Readings[0].ID != fix.ID {
		t.Fatalf("snapshot readings %+v, want the correction only", out.Snapshot.Readings)
	}
	if n := len(ts.readings(t, f.job)); n != 2 {
		t.Fatalf("%d readings stored, want both", n)
	}
	if len(out.Results.Outlets) != 1 {
		t.Fatalf("outlet results: %s", r.body)
	}
	o := out.Results.Outlets[0]
	if o.AsFound == nil || o.AsFound.ReadingID != fix.ID || o.AsFound.Flow == nil || *o.AsFound.Flow != 390 {
		t.Fatalf("outlet result %+v, want the corrected reading's 390 cfm", o.AsFound)
	}
}

// FuzzReadingsBatch posts arbitrary bytes as a readings batch through the
// whole handler stack: the answer is never a 5xx or a panic, and every 4xx
// has an error text.
func FuzzReadingsBatch(f *testing.F) {
	ts := MustOpenServer(f)
	fx := ts.mustFixture(f)
	good, _ := json.Marshal(map[string]any{"readings": []schema.Reading{flowReading(fx.outlet, 400)}})
	for _, seed := range []string{
		string(good), `{}`, `{"readings":[]}`, `{"readings":null}`, `[]`, `null`, ``, `{"readings":[{}]}`,
		`{"readings":[{"id":"x","value":"1"}]}`, `{"readings":[{"value":1e400}]}`, `{"readings":[{"taken_at":"2025-13-01T00:00:00Z"}]}`,
		`{"readings":[{"subject_kind":"traverse","quantity":"vp","point":-1}]}`, `{"readings":[{"note":"\u0000"}]}`,
		`{"readings":[{"id":"` + schema.NewID() + `","supersedes":"` + schema.NewID() + `","void":true}]}`,
	} {
		f.Add([]byte(seed))
	}
	h := ts.Handler()
	path := "/api/v1/jobs/" + fx.job + "/readings"
	f.Fuzz(func(t *testing.T, body []byte) {
		req := httptest.NewRequest(http.MethodPost, path, bytes.NewReader(body))
		req.Header.Set("Authorization", "Bearer "+ts.tech)
		rec := httptest.NewRecorder()
		h.ServeHTTP(rec, req)
		if rec.Code >= 500 {
			t.Fatalf("status %d for %q: %s", rec.Code, body, rec.Body)
		}
		if rec.Code >= 400 {
			var e struct{ Error string }
			if err := json.Unmarshal(rec.Body.Bytes(), &e); err != nil || e.Error == "" {
				t.Fatalf("status %d without an error text for %q: %s", rec.Code, body, rec.Body)
			}
			return
		}
		var out batchResponse
		if err := json.Unmarshal(rec.Body.Bytes(), &out); err != nil {
			t.Fatalf("status %d with an undecodable body: %s", rec.Code, rec.Body)
		}
		for _, res := range out.Results {
			if res.Status == schema.ReadingRejected && (res.Reason == "" || res.Field == "") {
				t.Fatalf("rejected without reason or field: %+v", res)
			}
		}
	})
}
