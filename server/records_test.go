package server

import (
	"encoding/json"
	"testing"

	"fieldtab/schema"
)

// TestRecords runs every design-record kind through create, list, get,
// update and delete, and their error paths.
func TestRecords(t *testing.T) {
	ts := MustOpenServer(t)
	f := ts.mustFixture(t)
	job := "/jobs/" + f.job
	kinds := []struct {
		path, key string
		body      map[string]any // a valid new record
		change    string         // a field to change on update
		to        any
		bad       string // a field to make invalid
		badValue  any
	}{
		{"instruments", "instruments", map[string]any{"tag": "Hood 2", "kind": "flow_hood", "calibration_due": "2026-01-31"},
			"serial", "SN-4411", "kind", "ouija_board"},
		{"systems", "systems", map[string]any{"tag": "RTU-2", "kind": "rooftop_unit", "design": map[string]any{"airflow": 2400}},
			"name", "Roof unit over the reading room", "kind", "boiler"},
		{"outlets", "outlets", map[string]any{"system_id": f.system, "tag": "S-102", "kind": "supply", "design_flow": 250, "method": "hood", "factor": 1},
			"room", "Reading room", "design_flow", -5},
		{"traverses", "traverses", map[string]any{"system_id": f.system, "tag": "T-2", "shape": "round", "method": "log-tchebycheff",
			"diameter": 18, "points_per_diameter": 6, "diameters": 2}, "location", "Main supply riser", "shape", "oval"},
		{"capacity-tests", "capacity_tests", map[string]any{"system_id": f.system, "tag": "CT-1", "mode": "cooling", "flow_source": "direct", "flow_basis": "standard"},
			"mode", "heating", "flow_source", "guess"},
		{"water-tests", "water_tests", map[string]any{"system_id": f.system, "tag": "CHW coil", "mode": "cooling", "flow_source": "valve", "valve_cv": 10, "fluid": "water", "design_flow": 40},
			"valve_cv", 12.5, "fluid", "lemonade"},
	}
	for _, k := range kinds {
		t.Run(k.path, func(t *testing.T) {
			base := job + "/" + k.path
			var id string
			t.Run("OKCreate", func(t *testing.T) {
				r := ts.do(t, "POST", base, ts.lead, k.body)
				want(t, r, 201, "")
				id, _ = r.obj["id"].(string)
				if id == "" || r.obj["job_id"] != f.job || r.obj["seq"].(float64) == 0 {
					t.Fatalf("created %s", r.body)
				}
				if loc := r.header.Get("Location"); loc != "/api/v1"+base+"/"+id {
					t.Errorf("Location %q", loc)
				}
			})
			t.Run("OKList", func(t *testing.T) {
				r := ts.do(t, "GET", base, ts.tech, nil)
				want(t, r, 200, "")
				var out map[string][]map[string]any
				r.decode(t, &out)
				found := false
				for _, rec := range out[k.key] {
					found = found || rec["id"] == id
				}
				if !found {
					t.Fatalf("list lacks %s: %s", id, r.body)
				}
			})
			t.Run("OKGet", func(t *testing.T) {
				r := ts.do(t, "GET", base+"/"+id, ts.tech, nil)
				want(t, r, 200, "")
				if r.obj["tag"] != k.body["tag"] {
					t.Fatalf("get %s", r.body)
				}
			})
			t.Run("OKUpdate", func(t *testing.T) {
				body := clone(k.body)
				body[k.change] = k.to
				r := ts.do(t, "PUT", base+"/"+id, ts.lead, body)
				want(t, r, 200, "")
				if got, _ := json.Marshal(r.obj[k.change]); string(got) != mustJSON(t, k.to) {
					t.Fatalf("updated %s", r.body)
				}
				r = ts.do(t, "GET", base+"/"+id, ts.tech, nil)
				if got, _ := json.Marshal(r.obj[k.change]); string(got) != mustJSON(t, k.to) {
					t.Fatalf("after update %s", r.body)
				}
			})
			t.Run("ErrDuplicateTag", func(t *testing.T) {
				want(t, ts.do(t, "POST", base, ts.lead, k.body), 409, "tag")
			})
			t.Run("ErrInvalid", func(t *testing.T) {
				body := clone(k.body)
				body["tag"], body[k.bad] = "Other", k.badValue
				want(t, ts.do(t, "POST", base, ts.lead, body), 400, k.bad)
				want(t, ts.do(t, "PUT", base+"/"+id, ts.lead, body), 400, k.bad)
			})
			t.Run("ErrJobIDMismatch", func(t *testing.T) {
				body := clone(k.body)
				body["tag"], body["job_id"] = "Other", schema.NewID()
				want(t, ts.do(t, "POST", base, ts.lead, body), 400, "job_id")
				want(t, ts.do(t, "PUT", base+"/"+id, ts.lead, body), 400, "job_id")
			})
			t.Run("OKJobIDMatching", func(t *testing.T) {
				body := clone(k.body)
				body["job_id"], body["id"] = f.job, id
				want(t, ts.do(t, "PUT", base+"/"+id, ts.lead, body), 200, "")
			})
			t.Run("ErrIDMismatch", func(t *testing.T) {
				body := clone(k.body)
				body["id"] = schema.NewID()
				want(t, ts.do(t, "PUT", base+"/"+id, ts.lead, body), 400, "id")
			})
			t.Run("ErrUnknownField", func(t *testing.T) {
				body := clone(k.body)
				body["tag"], body["colour"] = "Other", "red"
				want(t, ts.do(t, "POST", base, ts.lead, body), 400, "colour")
			})
			t.Run("ErrWrongType", func(t *testing.T) {
				body := clone(k.body)
				body["tag"] = 7
				want(t, ts.do(t, "POST", base, ts.lead, body), 400, "tag")
			})
			t.Run("ErrUnknownRecord", func(t *testing.T) {
				other := schema.NewID()
				want(t, ts.do(t, "GET", base+"/"+other, ts.tech, nil), 404, "")
				want(t, ts.do(t, "PUT", base+"/"+other, ts.lead, k.body), 404, "")
				want(t, ts.do(t, "DELETE", base+"/"+other, ts.lead, nil), 404, "")
				want(t, ts.do(t, "GET", base+"/not-a-uuid", ts.tech, nil), 404, "")
			})
			t.Run("ErrUnknownJob", func(t *testing.T) {
				other := "/jobs/" + schema.NewID() + "/" + k.path
				want(t, ts.do(t, "GET", other, ts.tech, nil), 404, "")
				want(t, ts.do(t, "POST", other, ts.lead, k.body), 404, "")
				want(t, ts.do(t, "GET", other+"/"+id, ts.tech, nil), 404, "")
			})
			t.Run("OKDelete", func(t *testing.T) {
				want(t, ts.do(t, "DELETE", base+"/"+id, ts.lead, nil), 204, "")
				want(t, ts.do(t, "GET", base+"/"+id, ts.tech, nil), 404, "")
				want(t, ts.do(t, "DELETE", base+"/"+id, ts.lead, nil), 404, "")
				// The tag is free again.
				want(t, ts.do(t, "POST", base, ts.lead, k.body), 201, "")
			})
		})
	}
	t.Run("ErrDeleteSystemInUse", func(t *testing.T) {
		want(t, ts.do(t, "DELETE", job+"/systems/"+f.system, ts.lead, nil), 409, "id")
	})
	t.Run("ErrOutletOfUnknownSystem", func(t *testing.T) {
		body := map[string]any{"system_id": schema.NewID(), "tag": "S-900", "kind": "supply", "design_flow": 250, "method": "hood", "factor": 1}
		want(t, ts.do(t, "POST", job+"/outlets", ts.lead, body), 400, "system_id")
	})
}

func clone(m map[string]any) map[string]any {
	out := make(map[string]any, len(m))
	for k, v := range m {
		out[k] = v
	}
	return out
}

func mustJSON(tb testing.TB, v any) string {
	tb.Helper()
	b, err := json.Marshal(v)
	if err != nil {
		tb.Fatal(err)
	}
	return string(b)
}
