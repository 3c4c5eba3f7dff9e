package server

import (
	"errors"
	"math"
	"net/http"
	"strconv"

	"github.com/gorilla/mux"

	"fieldtab/measure"
	"fieldtab/schema"
)

// Reference data the app needs to build its screens: what can be read in
// which units, and the psychrometric chart at the site. Both come from the
// server so the app does no engineering of its own.
func (s *Server) registerReferenceRoutes(r *mux.Router) {
	r.HandleFunc("/quantities", s.handleQuantities).Methods(http.MethodGet)
	r.HandleFunc("/jobs/{job}/chart", s.handleChart).Methods(http.MethodGet)
}

type quantityView struct {
	SubjectKind string            `json:"subject_kind"`
	Quantity    string            `json:"quantity"`
	Description string            `json:"description"`
	Dimension   string            `json:"dimension"`
	Units       []string          `json:"units"`
	DefaultUnit map[string]string `json:"default_unit"` // by unit system: ip, si
	Points      string            `json:"points"`       // none, traverse or leg
	Min         float64           `json:"min"`
	Max         float64           `json:"max"`
	RangeUnit   string            `json:"range_unit"`
}

func (s *Server) handleQuantities(w http.ResponseWriter, r *http.Request) {
	var out []quantityView
	for _, q := range schema.Quantities() {
		points := map[schema.PointRule]string{schema.PointNone: "none", schema.PointTraverse: "traverse", schema.PointLeg: "leg"}[q.Points]
		out = append(out, quantityView{SubjectKind: q.SubjectKind, Quantity: q.Quantity, Description: q.Description,
			Dimension: string(q.Dimension), Units: q.Units,
			DefaultUnit: map[string]string{"ip": q.DefaultUnit(measure.IP), "si": q.DefaultUnit(measure.SI)},
			Points:      points, Min: q.Min, Max: q.Max, RangeUnit: q.RangeUnit})
	}
	writeJSON(w, http.StatusOK, map[string]any{"quantities": out, "unit_labels": schema.UnitLabels()})
}

type chartCurve struct {
	RelHum float64      `json:"rel_hum"`
	Points [][2]float64 `json:"points"` // [dry bulb, humidity ratio]
}

// chartWetBulb is a line of constant wet bulb, from saturation down and
// to the right.
type chartWetBulb struct {
	WetBulb float64      `json:"wet_bulb"`
	Points  [][2]float64 `json:"points"` // [dry bulb, humidity ratio]
}

type chartView struct {
	Units           string       `json:"units"`
	Pressure        float64      `json:"pressure"`
	PressureSource  string       `json:"pressure_source"`
	TemperatureUnit string       `json:"temperature_unit"`
	HumRatioUnit    string       `json:"hum_ratio_unit"`
	Low             float64      `json:"low"`
	High            float64      `json:"high"`
	WMax            float64      `json:"w_max"` // top of the chart: saturation at High, at most 0.03
	Curves          []chartCurve `json:"curves"`
	// WetBulbLines every 5 °F or 2 °C; added after Curves, so older apps
	// that do not know it draw as before.
	WetBulbLines []chartWetBulb `json:"wet_bulb_lines"`
}

// handleChart answers the psychrometric chart's curves at the job's site
// pressure between the dry bulbs low and high (job units; by default 30–110
// °F or 0–45 °C).
func (s *Server) handleChart(w http.ResponseWriter, r *http.Request) {
	job, err := s.DB.Job(r.Context(), jobID(r))
	if err != nil {
		s.writeError(w, r, err)
		return
	}
	u, err := job.UnitSystem()
	if err != nil {
		s.writeError(w, r, err)
		return
	}
	low, high := 30.0, 110.0
	if u == measure.SI {
		low, high = 0, 45
	}
	for _, p := range []struct {
		name string
		v    *float64
	}{{"low", &low}, {"high", &high}} {
		if raw := r.URL.Query().Get(p.name); raw != "" {
			v, err := strconv.ParseFloat(raw, 64)
			if err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
				s.writeError(w, r, schema.Errorf(schema.Invalid, p.name, "%q is not a number: give a dry bulb in the job's units", raw))
				return
			}
			*p.v = v
		}
	}
	pres, src, _ := schema.SitePressure(job)
	curves, err := measure.PsychroChart(u, pres, low, high)
	if err != nil {
		var ie *measure.InputError
		if errors.As(err, &ie) {
			err = schema.Errorf(schema.Invalid, ie.Input, "%s", ie.Error())
		}
		s.writeError(w, r, err)
		return
	}
	units := schema.UnitsFor(u)
	view := chartView{Units: units.System, Pressure: pres, PressureSource: src, TemperatureUnit: units.Temperature,
		HumRatioUnit: units.HumRatio, Low: low, High: high}
	for _, c := range curves {
		cv := chartCurve{RelHum: c.RelHum, Points: make([][2]float64, len(c.DryBulb))}
		for i := range c.DryBulb {
			cv.Points[i] = [2]float64{c.DryBulb[i], c.HumRatio[i]}
		}
		view.Curves = append(view.Curves, cv)
	}
	lines, err := measure.PsychroWetBulbLines(u, pres, low, high)
	if err != nil {
		s.writeError(w, r, err)
		return
	}
	view.WetBulbLines = make([]chartWetBulb, 0, len(lines))
	for _, l := range lines {
		wl := chartWetBulb{WetBulb: l.WetBulb, Points: make([][2]float64, len(l.DryBulb))}
		for i := range l.DryBulb {
			wl.Points[i] = [2]float64{l.DryBulb[i], l.HumRatio[i]}
		}
		view.WetBulbLines = append(view.WetBulbLines, wl)
	}
	sat := curves[len(curves)-1].HumRatio
	view.WMax = math.Min(sat[len(sat)-1], 0.03)
	writeJSON(w, http.StatusOK, view)
}
