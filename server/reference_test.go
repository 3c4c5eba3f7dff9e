package server

import (
	"io"
	"math"
	"net/http"
	"strings"
	"testing"

	"fieldtab/measure"
	"fieldtab/schema"
)

func TestQuantitiesEndpoint(t *testing.T) {
	ts := MustOpenServer(t)
	want(t, ts.do(t, "GET", "/quantities", "", nil), 401, "")
	r := ts.do(t, "GET", "/quantities", ts.tech, nil)
	want(t, r, 200, "")
	var out struct {
		Quantities []quantityView
		UnitLabels map[string]string `json:"unit_labels"`
	}
	r.decode(t, &out)
	if len(out.Quantities) != len(schema.Quantities()) {
		t.Fatalf("%d quantities, want %d", len(out.Quantities), len(schema.Quantities()))
	}
	found := false
	for _, q := range out.Quantities {
		if q.SubjectKind == "traverse" && q.Quantity == "vp" {
			found = true
			if q.Points != "traverse" || q.DefaultUnit["ip"] != "in_wg" || q.DefaultUnit["si"] != "Pa" {
				t.Errorf("traverse vp: %+v", q)
			}
		}
	}
	if !found || out.UnitLabels["in_wg"] != "in. w.g." || out.UnitLabels["F"] != "°F" {
		t.Errorf("traverse vp found %v; labels %v", found, out.UnitLabels)
	}
}

func TestChartEndpoint(t *testing.T) {
	ts := MustOpenServer(t)
	f := ts.mustFixture(t)
	path := "/jobs/" + f.job + "/chart"
	want(t, ts.do(t, "GET", path, "", nil), 401, "")
	t.Run("OKDefaultRange", func(t *testing.T) {
		r := ts.do(t, "GET", path, ts.tech, nil)
		want(t, r, 200, "")
		var c struct {
			Units               string
			PressureSource      string `json:"pressure_source"`
			Pressure, Low, High float64
			WMax                float64 `json:"w_max"`
			Curves              []chartCurve
			WetBulbLines        []chartWetBulb `json:"wet_bulb_lines"`
		}
		r.decode(t, &c)
		if c.Units != "ip" || c.PressureSource != "sea_level" || c.Low != 30 || c.High != 110 || len(c.Curves) != 10 || c.Pressure != 14.696 {
			t.Fatalf("chart %+v", c)
		}
		// The same state function as the results: 100 % at 77 °F at sea level
		// is ASHRAE 2017 ch. 1 Table 2's 0.020173 lb/lb (REFERENCES.md).
		sat := c.Curves[9]
		if p := sat.Points[77-30]; p[0] != 77 || math.Abs(p[1]-0.020173)/0.020173 > 5e-3 {
			t.Errorf("saturation at 77 °F: %v", p)
		}
		if c.WMax != 0.03 {
			t.Errorf("w_max %v, want the 0.03 cap (Ws at 110 °F is above it)", c.WMax)
		}
		// Wet-bulb lines every 5 °F from 30 °F, each starting on saturation:
		// PsychroLib 2.5.0 gives 0.0123253936896 lb/lb at 75 °F dry bulb,
		// 67 °F wet bulb; the 65 °F line at 75 °F sits just below that.
		if len(c.WetBulbLines) != 16 || c.WetBulbLines[0].WetBulb != 30 {
			t.Fatalf("%d wet-bulb lines from %v", len(c.WetBulbLines), c.WetBulbLines)
		}
		l65 := c.WetBulbLines[7]
		if l65.WetBulb != 65 || l65.Points[0][0] != 65 || l65.Points[10][0] != 75 {
			t.Fatalf("the 65 °F line: %v", l65.Points[:11])
		}
		if w := l65.Points[10][1]; w >= 0.0123253936896 || w < 0.0105 {
			t.Errorf("65 °F wet bulb at 75 °F: W %v, want a little below 0.01233 (the 67 °F state)", w)
		}
	})
	t.Run("OKSiteElevation", func(t *testing.T) {
		// The chart is at the site's pressure: 5,000 ft is 12.23 psia in the
		// standard atmosphere (ASHRAE 2017 ch. 1 eq. 3).
		ctx := t.Context()
		j, err := ts.db.Job(ctx, f.job)
		if err != nil {
			t.Fatal(err)
		}
		z := 5000.0
		j.Elevation = &z
		if err := ts.db.UpdateJob(ctx, schema.Actor{Name: "Lead", Role: schema.RoleLead}, &j); err != nil {
			t.Fatal(err)
		}
		want12, _ := measure.StandardPressure(measure.IP, 5000)
		var c struct{ Pressure float64 }
		r := ts.do(t, "GET", path+"?low=40&high=90", ts.tech, nil)
		want(t, r, 200, "")
		r.decode(t, &c)
		if c.Pressure != want12 || math.Abs(c.Pressure-12.23) > 0.01 {
			t.Errorf("pressure %v, want %v", c.Pressure, want12)
		}
	})
	for _, c := range []struct{ name, query, field string }{
		{"ErrNotANumber", "?low=cold", "low"},
		{"ErrNarrow", "?low=70&high=72", "high"},
		{"ErrTooLow", "?low=-500", "low"},
	} {
		t.Run(c.name, func(t *testing.T) {
			want(t, ts.do(t, "GET", path+c.query, ts.tech, nil), 400, c.field)
		})
	}
	want(t, ts.do(t, "GET", "/jobs/"+schema.NewID()+"/chart", ts.tech, nil), 404, "")
}

// The app's files come with a strict CSP; /api/ paths never fall through to them.
func TestAppFiles(t *testing.T) {
	ts := MustOpenServer(t)
	get := func(path string) (*http.Response, string) {
		resp, err := ts.ts.Client().Get(ts.ts.URL + path)
		if err != nil {
			t.Fatal(err)
		}
		defer resp.Body.Close()
		b, _ := io.ReadAll(resp.Body)
		return resp, string(b)
	}
	resp, body := get("/")
	if resp.StatusCode != 200 || !strings.Contains(body, `<script type="module" src="js/main.js">`) {
		t.Fatalf("GET /: %d %.200s", resp.StatusCode, body)
	}
	if csp := resp.Header.Get("Content-Security-Policy"); !strings.HasPrefix(csp, "default-src 'self'") || strings.Contains(csp, "unsafe") {
		t.Errorf("CSP %q", csp)
	}
	if resp.Header.Get("X-Content-Type-Options") != "nosniff" {
		t.Error("no nosniff")
	}
	// A phone without the service worker revalidates rather than downloads.
	tag := resp.Header.Get("ETag")
	req, _ := http.NewRequest(http.MethodGet, ts.ts.URL+"/", nil)
	req.Header.Set("If-None-Match", tag)
	if again, err := ts.ts.Client().Do(req); err != nil || tag == "" || again.StatusCode != http.StatusNotModified {
		t.Errorf("revalidating / with ETag %q: %v %v", tag, again, err)
	} else {
		again.Body.Close()
	}
	if resp, _ := get("/js/main.js"); !strings.HasPrefix(resp.Header.Get("Content-Type"), "text/javascript") {
		t.Errorf("main.js served as %q", resp.Header.Get("Content-Type"))
	}
	if resp, _ := get("/no-such-file.js"); resp.StatusCode != 404 {
		t.Errorf("missing file: %d", resp.StatusCode)
	}
	if resp, body := get("/api/v1/nothing"); resp.StatusCode != 404 || !strings.Contains(body, `"error"`) {
		t.Errorf("unknown API path: %d %s", resp.StatusCode, body)
	}
}
