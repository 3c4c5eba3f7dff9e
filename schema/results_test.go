package schema

import (
	"context"
	"encoding/json"
	"fmt"
	"math"
	"os"
	"strings"
	"testing"
	"time"

	"fieldtab/measure"
)

// resToday is the date the result tests judge calibrations on.
var resToday = time.Date(2025, 3, 14, 12, 0, 0, 0, time.UTC)

// resBuilder makes an in-memory snapshot; ComputeResults is pure, so these
// tests need no database (TestResultsFromStore covers the store path).
type resBuilder struct {
	s   *Snapshot
	n   int
	seq int64
	at  time.Time
}

func newResBuilder(units string) *resBuilder {
	b := &resBuilder{at: time.Date(2025, 3, 10, 8, 0, 0, 0, time.UTC)}
	b.s = &Snapshot{Job: Job{ID: b.id(), Name: "Results test", Units: units, Tolerances: DefaultTolerances()}}
	return b
}

func (b *resBuilder) id() string {
	b.n++
	return fmt.Sprintf("%08x-0000-4000-8000-%012x", b.n, b.n)
}

func (b *resBuilder) system(tag string, d SystemDesign) *System {
	b.s.Systems = append(b.s.Systems, System{ID: b.id(), JobID: b.s.Job.ID, Tag: tag, Kind: "air_handler", Design: d})
	return &b.s.Systems[len(b.s.Systems)-1]
}

func (b *resBuilder) instrument(tag, kind, due string, pct, abs float64, unit string) string {
	in := Instrument{ID: b.id(), JobID: b.s.Job.ID, Tag: tag, Kind: kind, CalibrationDue: due,
		AccuracyPct: pct, AccuracyAbs: abs, AccuracyUnit: unit}
	b.s.Instruments = append(b.s.Instruments, in)
	return in.ID
}

func (b *resBuilder) outlet(sysID, tag string, design float64, method string, factor, ak float64) string {
	o := Outlet{ID: b.id(), JobID: b.s.Job.ID, SystemID: sysID, Tag: tag, Kind: "supply", DesignFlow: design,
		Method: method, Factor: factor, Ak: ak}
	b.s.Outlets = append(b.s.Outlets, o)
	return o.ID
}

// read appends a reading taken a minute after the previous one.
func (b *resBuilder) read(kind, subject, qty string, point int, v float64, unit, stage, inst string) *Reading {
	b.seq++
	b.at = b.at.Add(time.Minute)
	val := v
	b.s.Readings = append(b.s.Readings, Reading{ID: b.id(), JobID: b.s.Job.ID, SubjectKind: kind, SubjectID: subject,
		Quantity: qty, Point: point, Value: &val, Unit: unit, Stage: stage, InstrumentID: inst, Technician: "tester",
		TakenAt: b.at, Seq: b.seq})
	return &b.s.Readings[len(b.s.Readings)-1]
}

func (b *resBuilder) compute(t testing.TB) *Results {
	t.Helper()
	r, err := ComputeResults(b.s, resToday)
	if err != nil {
		t.Fatalf("ComputeResults: %v", err)
	}
	// The results must always encode: encoding/json refuses NaN and Inf.
	if _, err := json.Marshal(r); err != nil {
		t.Fatalf("results do not encode as JSON: %v", err)
	}
	return r
}

func resClose(t *testing.T, name string, got, want, relTol float64) {
	t.Helper()
	if math.Abs(got-want) > relTol*math.Abs(want) {
		t.Errorf("%s = %.6g, want %.6g (±%g %%)", name, got, want, relTol*100)
	}
}

func resFinding(r *Results, kind, id string) *Finding {
	for i := range r.Findings {
		if r.Findings[i].Kind == kind && r.Findings[i].Subject.ID == id {
			return &r.Findings[i]
		}
	}
	return nil
}

func TestResultsOutlets(t *testing.T) {
	b := newResBuilder("ip")
	sys := b.system("AHU-1", SystemDesign{Airflow: 1000})
	hood := b.instrument("Hood 1", "flow_hood", "2026-01-01", 3, 7, "cfm")
	anem := b.instrument("Anemometer 1", "anemometer", "2026-01-01", 0, 0, "")
	low := b.outlet(sys.ID, "S-101", 400, "hood", 0.95, 0)
	ak := b.outlet(sys.ID, "S-102", 250, "ak", 0, 0.5)
	unread := b.outlet(sys.ID, "S-103", 200, "hood", 1, 0)
	b.read(SubjectOutlet, low, "flow", 0, 250, UnitCFM, StageAsFound, hood)
	b.read(SubjectOutlet, low, "flow", 0, 330, UnitCFM, StageFinal, hood)
	b.read(SubjectOutlet, ak, "velocity", 0, 500, UnitFPM, StageFinal, anem)
	r := b.compute(t)

	t.Run("OKHoodLow", func(t *testing.T) {
		o := r.Outlets[0]
		if o.Final == nil || o.Final.Flow == nil || o.AsFound == nil || o.AsFound.Flow == nil {
			t.Fatalf("outlet S-101 has no flows: %+v", o)
		}
		// Hand figures: 330 cfm × 0.95 = 313.5 cfm, 313.5/400 = 78.375 % of
		// design; band ±10 % = 360–440 cfm; ± (3 % × 313.5 + 7 cfm × 0.95) =
		// ±16.055 cfm, so the whole interval is below 360: low.
		resClose(t, "final flow", *o.Final.Flow, 313.5, 1e-9)
		resClose(t, "as-found flow", *o.AsFound.Flow, 237.5, 1e-9)
		resClose(t, "% of design", o.Final.Tolerance.PercentOfDesign, 78.375, 1e-9)
		resClose(t, "band low", o.Final.Tolerance.Low, 360, 1e-9)
		resClose(t, "band high", o.Final.Tolerance.High, 440, 1e-9)
		resClose(t, "uncertainty", o.Final.Tolerance.Uncertainty, 16.055, 1e-6)
		if o.Status != "low" || o.Final.Status != "low" {
			t.Errorf("status = %q (final %q), want low", o.Status, o.Final.Status)
		}
		f := resFinding(r, FindingOutletOutOfTolerance, low)
		if f == nil || !strings.Contains(f.Text, "78 %") || !strings.Contains(f.Text, "below") {
			t.Errorf("finding = %+v, want an out-of-tolerance finding saying 78 %% and below", f)
		}
	})
	t.Run("OKAkWithin", func(t *testing.T) {
		o := r.Outlets[1]
		// 500 fpm × 0.5 ft² = 250 cfm (measure.OutletFlowAk's doc example).
		if o.Final == nil || o.Final.Flow == nil {
			t.Fatalf("outlet S-102 has no final flow: %+v", o)
		}
		resClose(t, "flow", *o.Final.Flow, 250, 1e-9)
		if o.Status != "within" || o.AsFound != nil {
			t.Errorf("status = %q, as found %+v; want within and no as-found reading", o.Status, o.AsFound)
		}
	})
	t.Run("OKNotRead", func(t *testing.T) {
		if o := r.Outlets[2]; o.Status != ResultNotRead {
			t.Errorf("status = %q, want not_read", o.Status)
		}
		if resFinding(r, FindingOutletNotRead, unread) == nil {
			t.Error("no outlet_not_read finding")
		}
	})
	t.Run("OKSystemSummary", func(t *testing.T) {
		s := r.Systems[0].Outlets
		want := OutletSummary{Total: 3, Read: 2, Within: 1, Low: 1, SupplyTotal: 3, SupplyRead: 2,
			SupplyFlow: 563.5, SupplyDesign: 850, SupplyDesignRead: 650}
		got := s
		got.SupplyPercentOfDesign, got.SupplyPercentOfDesignRead = nil, nil
		if got != want {
			t.Errorf("summary = %+v, want %+v", got, want)
		}
		if s.SupplyPercentOfDesign == nil || s.SupplyPercentOfDesignRead == nil {
			t.Fatal("no supply % of design")
		}
		resClose(t, "supply % of design", *s.SupplyPercentOfDesign, 56.35, 1e-9)
		// By hand: 563.5 cfm over the 400 + 250 cfm design of the two read.
		resClose(t, "supply % of the design of those read", *s.SupplyPercentOfDesignRead, 563.5/650*100, 1e-9)
		sr := r.Systems[0]
		if sr.AirflowSource != "outlets" || sr.Airflow == nil {
			t.Fatalf("system airflow = %+v", sr)
		}
		// Two of three supply outlets read: a partial sum is neither judged
		// against the fan band nor fed to the fan laws (the third outlet's
		// flow is missing from it, not zero).
		if sr.AirflowTolerance != nil || sr.FanLaw != nil {
			t.Errorf("partial sum judged: tolerance %+v, fan law %+v; want neither", sr.AirflowTolerance, sr.FanLaw)
		}
		if sr.AirflowOutletsRead != 2 || sr.AirflowOutletsTotal != 3 || sr.AirflowOutletKind != "supply" {
			t.Errorf("airflow outlets = %d of %d %s, want 2 of 3 supply", sr.AirflowOutletsRead, sr.AirflowOutletsTotal, sr.AirflowOutletKind)
		}
		if resFinding(r, FindingAirflowOutOfTolerance, sr.ID) != nil {
			t.Error("a partial outlet sum made an airflow finding")
		}
	})
	t.Run("OKUnits", func(t *testing.T) {
		if r.Units.AirFlow != "cfm" || r.Units.Power != "Btu/h" || r.Units.DuctPressure != "in. w.g." {
			t.Errorf("units = %+v", r.Units)
		}
		// Sea level, standard atmosphere: 14.696 psia (ASHRAE 2017 ch. 1 eq. 3).
		resClose(t, "site pressure", r.SitePressure, 14.696, 1e-4)
	})
}

func TestResultsOutletsSI(t *testing.T) {
	b := newResBuilder("si")
	elev := 1500.0
	b.s.Job.Elevation = &elev
	sys := b.system("AHU-1", SystemDesign{Airflow: 500})
	hood := b.instrument("Hood 1", "flow_hood", "", 3, 3.5, "L/s")
	o := b.outlet(sys.ID, "S-1", 200, "hood", 1.05, 0)
	b.read(SubjectOutlet, o, "flow", 0, 720, UnitM3h, StageFinal, hood)
	r := b.compute(t)
	if r.Units.AirFlow != "L/s" || r.Units.Temperature != "°C" || r.Units.DuctPressure != "Pa" {
		t.Errorf("units = %+v", r.Units)
	}
	want, _ := measure.StandardPressure(measure.SI, 1500)
	if r.SitePressureSource != "elevation" || r.SitePressure != want {
		t.Errorf("site pressure = %v (%s), want %v from elevation", r.SitePressure, r.SitePressureSource, want)
	}
	of := r.Outlets[0].Final
	// 720 m³/h = 200 L/s; × 1.05 = 210 L/s = 105 % of 200; ± (3 % × 210 + 3.5 × 1.05).
	resClose(t, "flow", *of.Flow, 210, 1e-9)
	resClose(t, "uncertainty", of.Tolerance.Uncertainty, 0.03*210+3.5*1.05, 1e-9)
	if of.Status != "within" {
		t.Errorf("status = %q, want within", of.Status)
	}
	if r.Instruments[0].CalibrationStatus != CalibrationUnknown {
		t.Errorf("calibration = %q, want unknown", r.Instruments[0].CalibrationStatus)
	}
}

func TestResultsSupersededAndVoid(t *testing.T) {
	b := newResBuilder("ip")
	sys := b.system("AHU-1", SystemDesign{})
	o := b.outlet(sys.ID, "S-1", 400, "hood", 1, 0)
	first := b.read(SubjectOutlet, o, "flow", 0, 300, UnitCFM, StageFinal, "")
	corr := b.read(SubjectOutlet, o, "flow", 0, 390, UnitCFM, StageFinal, "")
	corr.Supersedes = first.ID
	later := b.read(SubjectOutlet, o, "flow", 0, 520, UnitCFM, StageFinal, "")
	b.seq++
	b.s.Readings = append(b.s.Readings, Reading{ID: b.id(), JobID: b.s.Job.ID, SubjectKind: SubjectOutlet,
		SubjectID: o, Quantity: "flow", Unit: UnitCFM, Stage: StageFinal, Technician: "tester",
		TakenAt: b.at.Add(time.Minute), Seq: b.seq, Supersedes: later.ID, Void: true})
	r := b.compute(t)
	f := r.Outlets[0].Final
	if f == nil || f.Flow == nil {
		t.Fatal("no final flow")
	}
	// The correction (390) replaces 300; the 520 reading is void; so 390 counts.
	if f.ReadingID != corr.ID || *f.Flow != 390 || f.Status != "within" {
		t.Errorf("final = %s %v %s, want the correction %s at 390 within", f.ReadingID, *f.Flow, f.Status, corr.ID)
	}
}

func TestResultsInstruments(t *testing.T) {
	b := newResBuilder("ip")
	sys := b.system("AHU-1", SystemDesign{})
	overdue := b.instrument("Hood 2", "flow_hood", "2025-02-01", 0, 0, "")
	soon := b.instrument("Hood 3", "flow_hood", "2025-04-01", 0, 0, "")
	current := b.instrument("Hood 4", "flow_hood", "2026-03-01", 0, 0, "")
	b.instrument("Thermometer", "thermometer", "", 0, 0, "")
	b.instrument("Bad date", "other", "1st of May", 0, 0, "")
	o1 := b.outlet(sys.ID, "S-1", 400, "hood", 1, 0)
	o2 := b.outlet(sys.ID, "S-2", 400, "hood", 1, 0)
	// Before the due date: not flagged. After it: flagged on its subject.
	b.at = time.Date(2025, 1, 20, 9, 0, 0, 0, time.UTC)
	b.read(SubjectOutlet, o1, "flow", 0, 400, UnitCFM, StageAsFound, overdue)
	b.at = time.Date(2025, 3, 1, 9, 0, 0, 0, time.UTC)
	late := b.read(SubjectOutlet, o2, "flow", 0, 400, UnitCFM, StageAsFound, overdue)
	late2 := b.read(SubjectOutlet, o2, "flow", 0, 410, UnitCFM, StageFinal, overdue)
	b.read(SubjectOutlet, o1, "flow", 0, 405, UnitCFM, StageFinal, soon)
	b.read(SubjectOutlet, o1, "flow", 0, 405, UnitCFM, StageFinal, current)
	r := b.compute(t)

	for i, c := range []struct {
		status string
		days   int
	}{{CalibrationOverdue, -41}, {CalibrationDueSoon, 18}, {CalibrationCurrent, 352}, {CalibrationUnknown, 0}, {CalibrationUnknown, 0}} {
		ir := r.Instruments[i]
		if ir.CalibrationStatus != c.status {
			t.Errorf("%s: status %q, want %q", ir.Tag, ir.CalibrationStatus, c.status)
		}
		if c.days != 0 && (ir.DaysToDue == nil || *ir.DaysToDue != c.days) {
			t.Errorf("%s: days to due %v, want %d", ir.Tag, ir.DaysToDue, c.days)
		}
	}
	if len(r.Instruments[4].Errors) == 0 {
		t.Error("a malformed due date gives no error on the instrument")
	}
	if fl := r.Outlets[0].Flags; len(fl) != 0 {
		t.Errorf("S-1 flags = %+v, want none (read before the due date)", fl)
	}
	fl := r.Outlets[1].Flags
	if len(fl) != 1 || fl[0].Kind != FlagInstrumentOverdue || len(fl[0].ReadingIDs) != 2 ||
		fl[0].ReadingIDs[0] != late.ID || fl[0].ReadingIDs[1] != late2.ID || !strings.Contains(fl[0].Text, "Hood 2") {
		t.Errorf("S-2 flags = %+v, want one overdue flag on both readings naming Hood 2", fl)
	}
	if resFinding(r, FindingInstrumentOverdue, o2) == nil || resFinding(r, FindingInstrumentOverdue, o1) != nil {
		t.Errorf("findings = %+v, want an overdue finding on S-2 only", r.Findings)
	}
}

// resTraverseJob builds a 24 × 12 in 5 × 5 log-Tchebycheff traverse on a
// system of 4000 cfm design.
func resTraverseJob() (*resBuilder, *System, *Traverse) {
	b := newResBuilder("ip")
	sys := b.system("RTU-1", SystemDesign{Airflow: 4000, FanRPM: 900})
	b.s.Traverses = append(b.s.Traverses, Traverse{ID: b.id(), JobID: b.s.Job.ID, SystemID: sys.ID, Tag: "T-1",
		Shape: "rect", Method: "log-tchebycheff", Width: 24, Height: 12, PointsW: 5, PointsH: 5})
	return b, sys, &b.s.Traverses[0]
}

func TestResultsTraverse(t *testing.T) {
	t.Run("OKUniformStandardAir", func(t *testing.T) {
		b, _, tr := resTraverseJob()
		for p := 1; p <= 25; p++ {
			b.read(SubjectTraverse, tr.ID, "vp", p, 0.25, UnitInWG, StageAsFound, "")
		}
		r := b.compute(t)
		tv := r.Traverses[0]
		if tv.Status != ResultComputed || tv.Flow == nil || tv.PointsRead != 25 || tv.DensitySource != "standard" {
			t.Fatalf("traverse = %+v", tv)
		}
		layout, err := tr.Layout(measure.IP)
		if err != nil {
			t.Fatal(err)
		}
		vps := make([]measure.Pressure, 25)
		for i := range vps {
			vps[i] = measure.InWG(0.25)
		}
		want, err := layout.FromVelocityPressures(vps, measure.LbPerFt3(0.075))
		if err != nil {
			t.Fatal(err)
		}
		resClose(t, "flow vs measure", *tv.Flow, want.Flow.CFM(), 1e-12)
		resClose(t, "mean velocity vs measure", *tv.MeanVelocity, want.MeanVelocity.FPM(), 1e-12)
		// Hand check: V = 1097.2·√(VP/ρ) fpm with the 60 °F water column
		// (measure.PitotVelocity's doc) = 1097.2·√(0.25/0.075) = 2003.2 fpm;
		// area 24 × 12 in = 2 ft²; flow 4006.4 cfm.
		resClose(t, "flow by hand", *tv.Flow, 4006.4, 2e-4)
		// Probe positions: the 5-point log-Tchebycheff fractions 0.074, 0.288,
		// 0.500, 0.712, 0.926 of the side (ISO 3966 / ASHRAE Standard 111),
		// across the 24 in width and along the 12 in height.
		p1, p8 := tv.Points[0], tv.Points[7]
		if p8.Label != "line 2 point 3" || p1.PortOffset == nil || p8.PortOffset == nil {
			t.Fatalf("points 1 and 8: %+v %+v", p1, p8)
		}
		resClose(t, "point 1 depth", p1.Depth, 0.074*24, 1e-9)
		resClose(t, "point 1 port", *p1.PortOffset, 0.074*12, 1e-9)
		resClose(t, "point 8 depth", p8.Depth, 0.5*24, 1e-9)
		resClose(t, "point 8 port", *p8.PortOffset, 0.288*12, 1e-9)
		resClose(t, "area", *tv.Area, 2, 1e-12)
		if v := tv.Points[24].Velocity; v == nil || math.Abs(*v-2003.2) > 0.5 {
			t.Errorf("point 25 velocity = %v, want 2003.2 fpm", v)
		}
		// 4006 cfm of 4000 design, fan band −5/+10 %: within.
		if tv.Tolerance == nil || tv.Tolerance.Status != "within" {
			t.Errorf("tolerance = %+v, want within", tv.Tolerance)
		}
		if s := r.Systems[0]; s.AirflowSource != "traverse" || s.AirflowTraverseID != tr.ID || *s.Airflow != *tv.Flow {
			t.Errorf("system airflow = %v from %q %q, want the traverse's", s.Airflow, s.AirflowSource, s.AirflowTraverseID)
		}
	})
	t.Run("OKMeasuredDensity", func(t *testing.T) {
		b, _, tr := resTraverseJob()
		for p := 1; p <= 25; p++ {
			b.read(SubjectTraverse, tr.ID, "vp", p, 0.2+0.01*float64(p%5), UnitInWG, StageFinal, "")
		}
		b.read(SubjectTraverse, tr.ID, "air_db", 0, 95, UnitDegF, StageFinal, "")
		b.read(SubjectTraverse, tr.ID, "air_wb", 0, 70, UnitDegF, StageFinal, "")
		elev := 5000.0
		b.s.Job.Elevation = &elev
		r := b.compute(t)
		tv := r.Traverses[0]
		if tv.Status != ResultComputed || tv.Stage != StageFinal || tv.DensitySource != "measured" {
			t.Fatalf("traverse = %+v", tv)
		}
		p, _ := measure.StandardPressure(measure.IP, 5000)
		st, err := measure.AirSpec{DryBulb: 95, Kind: measure.WetBulb, Humidity: 70}.State(measure.IP, p)
		if err != nil {
			t.Fatal(err)
		}
		resClose(t, "density", tv.Density, st.Density, 1e-12)
		layout, _ := tr.Layout(measure.IP)
		vps := make([]measure.Pressure, 25)
		for i := range vps {
			vps[i] = measure.InWG(0.2 + 0.01*float64((i+1)%5))
		}
		want, err := layout.FromVelocityPressures(vps, measure.LbPerFt3(st.Density))
		if err != nil {
			t.Fatal(err)
		}
		resClose(t, "flow", *tv.Flow, want.Flow.CFM(), 1e-12)
	})
	t.Run("OKIncomplete", func(t *testing.T) {
		b, _, tr := resTraverseJob()
		for p := 1; p <= 24; p++ {
			b.read(SubjectTraverse, tr.ID, "vp", p, 0.25, UnitInWG, StageAsFound, "")
		}
		r := b.compute(t)
		tv := r.Traverses[0]
		if tv.Status != ResultIncomplete || tv.PointsRead != 24 || tv.PointsTotal != 25 || tv.Flow != nil ||
			len(tv.Errors) != 0 || tv.Points[24].Value != nil {
			t.Errorf("traverse = %+v, want incomplete 24 of 25 without errors", tv)
		}
	})
	t.Run("OKWarningsBecomeFindings", func(t *testing.T) {
		b, _, tr := resTraverseJob()
		for p := 1; p <= 25; p++ {
			v := 0.25
			if p <= 5 {
				v = -0.01 // reverse flow along a whole line
			}
			b.read(SubjectTraverse, tr.ID, "vp", p, v, UnitInWG, StageAsFound, "")
		}
		r := b.compute(t)
		if len(r.Traverses[0].Warnings) == 0 || resFinding(r, FindingTraverseWarning, tr.ID) == nil {
			t.Errorf("warnings %v, findings %+v: want the negative readings warned and listed", r.Traverses[0].Warnings, r.Findings)
		}
	})
}

// resCapacityJob is a cooling test read directly: 2000 cfm standard air,
// entering 80 °F db / 67 °F wb, leaving 55 °F db / 54 °F wb, outdoor 95 °F.
func resCapacityJob(rated float64) (*resBuilder, *System, *CapacityTest) {
	b := newResBuilder("ip")
	sys := b.system("RTU-1", SystemDesign{Airflow: 2000, RatedTotal: rated, RatedSensible: 0.7 * rated})
	b.s.CapacityTests = append(b.s.CapacityTests, CapacityTest{ID: b.id(), JobID: b.s.Job.ID, SystemID: sys.ID,
		Tag: "CT-1", Mode: "cooling", FlowSource: "direct", FlowBasis: "standard"})
	ct := &b.s.CapacityTests[0]
	return b, sys, ct
}

func resReadCapacity(b *resBuilder, ct *CapacityTest, flowInst, thermo string, skip string) {
	for _, r := range []struct {
		q    string
		v    float64
		unit string
		inst string
	}{
		{"flow", 2000, UnitCFM, flowInst}, {"enter_db", 80, UnitDegF, thermo}, {"enter_wb", 67, UnitDegF, thermo},
		{"leave_db", 55, UnitDegF, thermo}, {"leave_wb", 54, UnitDegF, thermo}, {"outdoor_db", 95, UnitDegF, thermo},
	} {
		if r.q != skip {
			b.read(SubjectCapacityTest, ct.ID, r.q, 0, r.v, r.unit, StageFinal, r.inst)
		}
	}
}

func TestResultsCapacity(t *testing.T) {
	p := 14.696 // sea level, psia
	enter, _ := measure.AirSpec{DryBulb: 80, Kind: measure.WetBulb, Humidity: 67}.State(measure.IP, p)
	leave, _ := measure.AirSpec{DryBulb: 55, Kind: measure.WetBulb, Humidity: 54}.State(measure.IP, p)
	want, err := measure.CoilCapacity(measure.CFM(2000), measure.FlowStandard, enter, leave)
	if err != nil {
		t.Fatal(err)
	}
	sp, _ := measure.StandardPressure(measure.IP, 0)

	t.Run("OKEqualsMeasure", func(t *testing.T) {
		b, _, ct := resCapacityJob(want.Total.BtuH() / 0.9) // delivers 90 % of rated: short
		resReadCapacity(b, ct, "", "", "")
		r := b.compute(t)
		cr := r.CapacityTests[0]
		if cr.Capacity == nil {
			t.Fatalf("no capacity: %+v", cr)
		}
		enterSP, _ := measure.AirSpec{DryBulb: 80, Kind: measure.WetBulb, Humidity: 67}.State(measure.IP, sp)
		leaveSP, _ := measure.AirSpec{DryBulb: 55, Kind: measure.WetBulb, Humidity: 54}.State(measure.IP, sp)
		exact, _ := measure.CoilCapacity(measure.CFM(2000), measure.FlowStandard, enterSP, leaveSP)
		resClose(t, "total", cr.Capacity.Total, exact.Total.BtuH(), 1e-12)
		resClose(t, "sensible", cr.Capacity.Sensible, exact.Sensible.BtuH(), 1e-12)
		resClose(t, "latent", cr.Capacity.Latent, exact.Latent.BtuH(), 1e-12)
		resClose(t, "shr", cr.Capacity.SHR, exact.SHR, 1e-12)
		// Hand check with the trade's 4.5 × cfm × Δh: about 4.5 × 2000 × 8.9
		// Btu/lb ≈ 80 000 Btu/h (common practice, a check not the method).
		resClose(t, "total by the 4.5 rule", cr.Capacity.Total, 80000, 0.03)
		if cr.Expected == nil || cr.Expected.Source != "nameplate" || cr.PercentOfExpected == nil {
			t.Fatalf("expected = %+v", cr.Expected)
		}
		resClose(t, "% of expected", *cr.PercentOfExpected, 90, 1e-6)
		if cr.Status != ResultShort || cr.Uncertainty != nil {
			t.Errorf("status %q, uncertainty %+v; want short with no uncertainty (no instruments)", cr.Status, cr.Uncertainty)
		}
		if resFinding(r, FindingCapacityShort, ct.ID) == nil {
			t.Error("no capacity_short finding")
		}
	})
	t.Run("OKUncertaintyUndetermined", func(t *testing.T) {
		b, _, ct := resCapacityJob(want.Total.BtuH() / 0.96) // 96 % of rated
		meter := b.instrument("Hood", "flow_hood", "", 5, 0, "")
		thermo := b.instrument("Psychrometer", "psychrometer", "", 0, 0.5, "°F")
		resReadCapacity(b, ct, meter, thermo, "")
		r := b.compute(t)
		cr := r.CapacityTests[0]
		u, err := measure.CoilUncertainty(measure.IP, sp, measure.CFM(2000), measure.FlowStandard,
			measure.AirSpec{DryBulb: 80, Kind: measure.WetBulb, Humidity: 67},
			measure.AirSpec{DryBulb: 55, Kind: measure.WetBulb, Humidity: 54},
			measure.AirAccuracy{FlowPct: 5, Temp: measure.DeltaF(0.5)})
		if err != nil {
			t.Fatal(err)
		}
		if cr.Uncertainty == nil {
			t.Fatalf("no uncertainty: %+v", cr)
		}
		resClose(t, "uncertainty", cr.Uncertainty.Total, u.Total.BtuH(), 1e-9)
		// 96 % of rated with several percent of uncertainty straddles 95 %.
		if cr.Status != string(measure.StatusUndetermined) {
			t.Errorf("status = %q, want undetermined (± %.0f on %.0f)", cr.Status, cr.Uncertainty.Total, cr.Capacity.Total)
		}
		// 96 % is above the 95 % line itself: the meets side.
		if cr.Side != ResultMeets || cr.SideText != "above the 95 % line, but within the test's uncertainty of it" {
			t.Errorf("side %q %q, want meets", cr.Side, cr.SideText)
		}
		// The ± as a % of expected: the same ratio as ± over the total.
		if cr.PercentOfExpectedUncertainty == nil {
			t.Fatal("no ± in % of expected")
		}
		resClose(t, "± % of expected", *cr.PercentOfExpectedUncertainty, cr.Uncertainty.Total/cr.Expected.Total*100, 1e-9)
	})
	t.Run("OKPerfTable", func(t *testing.T) {
		csv, err := os.ReadFile("../testdata/perf_rtu_example.csv")
		if err != nil {
			t.Fatal(err)
		}
		b, sys, ct := resCapacityJob(0)
		sys.Design.PerfTableCSV = string(csv)
		resReadCapacity(b, ct, "", "", "")
		r := b.compute(t)
		cr := r.CapacityTests[0]
		tbl, _ := measure.ParsePerfTableCSV(strings.NewReader(string(csv)))
		tot, sen, err := tbl.Expected(measure.DegF(cr.Enter.WetBulb), measure.DegF(95), measure.CFM(2000))
		if err == nil {
			t.Fatalf("2000 cfm is inside the example table (3200–4800 cfm)? %v %v", tot, sen)
		}
		// 2000 cfm is below the table: no extrapolation, and no nameplate to fall back on.
		if cr.Expected != nil || cr.Status != ResultNoExpected || len(cr.Warnings) == 0 {
			t.Errorf("expected %+v, status %q, warnings %v; want no_expected with a note", cr.Expected, cr.Status, cr.Warnings)
		}

		// Inside the table: 4000 cfm.
		b.s.Readings[0].Value = ptrF(4000)
		r = b.compute(t)
		cr = r.CapacityTests[0]
		tot, sen, err = tbl.Expected(measure.DegF(cr.Enter.WetBulb), measure.DegF(95), measure.CFM(4000))
		if err != nil {
			t.Fatal(err)
		}
		if cr.Expected == nil || cr.Expected.Source != "perf_table" {
			t.Fatalf("expected = %+v, errors %v", cr.Expected, cr.Errors)
		}
		resClose(t, "expected total", cr.Expected.Total, tot.BtuH(), 1e-12)
		resClose(t, "expected sensible", *cr.Expected.Sensible, sen.BtuH(), 1e-12)
		resClose(t, "% of expected", *cr.PercentOfExpected, cr.Capacity.Total/tot.BtuH()*100, 1e-12)
	})
	t.Run("ErrBadPerfTableFallsBack", func(t *testing.T) {
		b, sys, ct := resCapacityJob(80000)
		sys.Design.PerfTableCSV = "ewb_f,odb_f\n1,2\n"
		resReadCapacity(b, ct, "", "", "")
		r := b.compute(t)
		cr := r.CapacityTests[0]
		if len(cr.Errors) == 0 || !strings.Contains(cr.Errors[0], "performance table") {
			t.Errorf("errors = %v, want the performance table's", cr.Errors)
		}
		if cr.Expected == nil || cr.Expected.Source != "nameplate" || cr.Status == ResultError {
			t.Errorf("expected %+v status %q; want the nameplate used", cr.Expected, cr.Status)
		}
	})
	t.Run("OKIncomplete", func(t *testing.T) {
		b, _, ct := resCapacityJob(80000)
		resReadCapacity(b, ct, "", "", "leave_wb")
		r := b.compute(t)
		cr := r.CapacityTests[0]
		if cr.Status != ResultIncomplete || len(cr.Missing) != 1 || cr.Missing[0] != "leave_wb, leave_rh or leave_dp" ||
			len(cr.Errors) != 0 || cr.Capacity != nil {
			t.Errorf("result = %+v, want incomplete missing the leaving humidity", cr)
		}
		if cr.Enter == nil || cr.Airflow == nil {
			t.Error("what is read should still show")
		}
	})
	t.Run("OKNothingRead", func(t *testing.T) {
		b, _, _ := resCapacityJob(80000)
		r := b.compute(t)
		cr := r.CapacityTests[0]
		if cr.Status != ResultIncomplete || len(cr.Missing) != 5 {
			t.Errorf("status %q missing %v; want incomplete with flow and both states missing", cr.Status, cr.Missing)
		}
	})
	t.Run("OKHeatingNoExpected", func(t *testing.T) {
		b, _, ct := resCapacityJob(80000)
		ct.Mode = "heating"
		b.read(SubjectCapacityTest, ct.ID, "flow", 0, 2000, UnitCFM, StageFinal, "")
		b.read(SubjectCapacityTest, ct.ID, "enter_db", 0, 60, UnitDegF, StageFinal, "")
		b.read(SubjectCapacityTest, ct.ID, "enter_rh", 0, 40, UnitPercent, StageFinal, "")
		b.read(SubjectCapacityTest, ct.ID, "leave_db", 0, 95, UnitDegF, StageFinal, "")
		b.read(SubjectCapacityTest, ct.ID, "leave_dp", 0, 35.5, UnitDegF, StageFinal, "")
		r := b.compute(t)
		cr := r.CapacityTests[0]
		// The rating on record is a cooling one: no expected heating capacity.
		if cr.Capacity == nil || cr.Capacity.Process != "heating" || cr.Status != ResultNoExpected || cr.Expected != nil {
			t.Errorf("result = %+v, want heating capacity with no_expected", cr)
		}
	})
	t.Run("OKFromTraverse", func(t *testing.T) {
		b, sys, tr := resTraverseJob()
		sys.Design.RatedTotal = 120000
		for p := 1; p <= 25; p++ {
			b.read(SubjectTraverse, tr.ID, "vp", p, 0.25, UnitInWG, StageAsFound, "")
		}
		b.read(SubjectTraverse, tr.ID, "air_db", 0, 55, UnitDegF, StageAsFound, "")
		b.read(SubjectTraverse, tr.ID, "air_rh", 0, 90, UnitPercent, StageAsFound, "")
		b.s.CapacityTests = append(b.s.CapacityTests, CapacityTest{ID: b.id(), JobID: b.s.Job.ID, SystemID: sys.ID,
			Tag: "CT-1", Mode: "cooling", FlowSource: "traverse", TraverseID: tr.ID})
		ct := &b.s.CapacityTests[0]
		resReadCapacity(b, ct, "", "", "flow")
		r := b.compute(t)
		cr, tv := r.CapacityTests[0], r.Traverses[0]
		if cr.Capacity == nil || tv.Flow == nil {
			t.Fatalf("capacity %+v errors %v missing %v", cr.Capacity, cr.Errors, cr.Missing)
		}
		// The traverse's actual flow carries its dry-air mass: Q·(1/v)/0.075 as
		// standard air.
		st, _ := measure.AirSpec{DryBulb: 55, Kind: measure.RelHum, Humidity: 90}.State(measure.IP, sp)
		std := *tv.Flow / st.SpecVolume / 0.075
		resClose(t, "standard-air flow", *cr.Airflow, std, 1e-12)
		exact, _ := measure.CoilCapacity(measure.CFM(std), measure.FlowStandard, enter, leave)
		resClose(t, "total", cr.Capacity.Total, exact.Total.BtuH(), 1e-9)
	})
}

func ptrF(v float64) *float64 { return &v }

func TestResultsWater(t *testing.T) {
	build := func(source string) (*resBuilder, *WaterTest) {
		b := newResBuilder("ip")
		sys := b.system("AHU-1", SystemDesign{})
		b.s.WaterTests = append(b.s.WaterTests, WaterTest{ID: b.id(), JobID: b.s.Job.ID, SystemID: sys.ID, Tag: "CHW-1", Mode: "cooling",
			FlowSource: source, ValveCv: 10, Fluid: "water", DesignFlow: 20})
		return b, &b.s.WaterTests[0]
	}
	t.Run("OKValveCv", func(t *testing.T) {
		b, wt := build("valve")
		b.read(SubjectWaterTest, wt.ID, "dp", 0, 4, UnitPsi, StageFinal, "")
		b.read(SubjectWaterTest, wt.ID, "enter_temp", 0, 45, UnitDegF, StageFinal, "")
		b.read(SubjectWaterTest, wt.ID, "leave_temp", 0, 55, UnitDegF, StageFinal, "")
		r := b.compute(t)
		w := r.WaterTests[0]
		if w.Flow == nil || w.Capacity == nil {
			t.Fatalf("water test = %+v", w)
		}
		rho, _, _ := measure.Fluid{Kind: measure.Water}.Props(measure.DegF(50))
		sg := measure.SpecificGravity(rho)
		q, _ := measure.ValveFlowCv(10, measure.Psi(4), sg)
		resClose(t, "flow vs measure", *w.Flow, q.GPM(), 1e-12)
		// Hand: Q = Cv·√(ΔP/SG) = 10·√(4/1.0) ≈ 20 gpm (SG of 50 °F water ≈ 1.000).
		resClose(t, "flow by hand", *w.Flow, 20, 1e-3)
		wr, _ := measure.WaterCapacity(q, measure.DegF(45), measure.DegF(55), measure.Fluid{Kind: measure.Water})
		resClose(t, "capacity vs measure", w.Capacity.Capacity, wr.Capacity.BtuH(), 1e-12)
		// Trade check: 500 × gpm × ΔT = 500 × 20 × 10 = 100 000 Btu/h (common practice).
		resClose(t, "capacity by the 500 rule", w.Capacity.Capacity, 100000, 0.01)
		if w.Status != "within" || w.Capacity.Process != "cooling" {
			t.Errorf("status %q process %q; want within, cooling", w.Status, w.Capacity.Process)
		}
	})
	t.Run("OKMeterLowFinding", func(t *testing.T) {
		b, wt := build("meter")
		b.read(SubjectWaterTest, wt.ID, "flow", 0, 15, UnitGPM, StageFinal, "")
		r := b.compute(t)
		w := r.WaterTests[0]
		// 15 of 20 gpm = 75 %, band ±10 %: low; temperatures missing.
		if w.Tolerance == nil || w.Tolerance.Status != "low" || w.Status != ResultIncomplete || len(w.Missing) != 2 {
			t.Errorf("water test = %+v", w)
		}
		if resFinding(r, FindingWaterFlowOutOfTol, wt.ID) == nil {
			t.Error("no water_flow_out_of_tolerance finding")
		}
	})
	t.Run("OKIncomplete", func(t *testing.T) {
		b, _ := build("valve")
		r := b.compute(t)
		w := r.WaterTests[0]
		if w.Status != ResultIncomplete || len(w.Missing) != 3 || len(w.Errors) != 0 {
			t.Errorf("water test = %+v, want incomplete missing enter_temp, leave_temp, dp", w)
		}
	})
	t.Run("OKAirWaterAgreement", func(t *testing.T) {
		b, _, ct := resCapacityJob(80000)
		resReadCapacity(b, ct, "", "", "")
		b.s.WaterTests = append(b.s.WaterTests, WaterTest{ID: b.id(), JobID: b.s.Job.ID, SystemID: ct.SystemID,
			Tag: "CHW-1", Mode: "cooling", FlowSource: "meter", Fluid: "water", DesignFlow: 16, CapacityTest: ct.ID})
		wt := &b.s.WaterTests[0]
		b.read(SubjectWaterTest, wt.ID, "flow", 0, 16, UnitGPM, StageFinal, "")
		b.read(SubjectWaterTest, wt.ID, "enter_temp", 0, 44, UnitDegF, StageFinal, "")
		b.read(SubjectWaterTest, wt.ID, "leave_temp", 0, 56, UnitDegF, StageFinal, "")
		r := b.compute(t)
		w, cr := r.WaterTests[0], r.CapacityTests[0]
		if w.AirSide == nil || cr.Capacity == nil {
			t.Fatalf("no agreement: %+v", w)
		}
		diff := (cr.Capacity.Total - w.Capacity.Capacity) / w.Capacity.Capacity * 100
		resClose(t, "difference", w.AirSide.DifferencePct, diff, 1e-12)
		// About 80 000 air side against 500 × 16 × 12 ≈ 96 000 water side: −17 %.
		if w.AirSide.Note == "" || resFinding(r, FindingAirWaterMismatch, wt.ID) == nil {
			t.Errorf("difference %.1f %%: want a note and a finding beyond %v %%", diff, AirWaterAgreementPct)
		}
	})
}

func TestResultsSystem(t *testing.T) {
	b, sys, tr := resTraverseJob()
	sys.Design.FLA = 12
	sys.Design.Phase = 3
	for p := 1; p <= 25; p++ {
		b.read(SubjectTraverse, tr.ID, "vp", p, 0.2, UnitInWG, StageAsFound, "")
	}
	for i, v := range []float64{460, 467, 450} {
		b.read(SubjectSystem, sys.ID, "volts", i+1, v, UnitVolt, StageFinal, "")
	}
	for i, v := range []float64{10, 10.5, 9.5} {
		b.read(SubjectSystem, sys.ID, "amps", i+1, v, UnitAmp, StageFinal, "")
	}
	b.read(SubjectSystem, sys.ID, "power_factor", 0, 0.85, UnitNone, StageFinal, "")
	b.read(SubjectSystem, sys.ID, "fan_rpm", 0, 850, UnitRPM, StageFinal, "")
	b.read(SubjectSystem, sys.ID, "static_external", 0, 1.2, UnitInWG, StageFinal, "")
	b.read(SubjectSystem, sys.ID, "motor_sheave", 0, 5, UnitInch, StageFinal, "")
	r := b.compute(t)
	s := r.Systems[0]
	if len(s.Errors) != 0 {
		t.Fatalf("errors: %v", s.Errors)
	}
	// 460, 467, 450 V → 1.96 % (measure.VoltageImbalance's doc example).
	resClose(t, "voltage imbalance", *s.VoltageImbalance, 1.96, 0.005)
	// Highest leg 10.5 A of 12 FLA = 87.5 %.
	resClose(t, "% FLA", *s.PercentFLA, 87.5, 1e-12)
	// √3 × 459 V × 10 A × 0.85 = 6.757 kW.
	resClose(t, "input power", *s.InputPowerKW, math.Sqrt(3)*459*10*0.85/1000, 1e-12)
	flow := *r.Traverses[0].Flow
	if s.FanLaw == nil {
		t.Fatal("no fan-law prediction")
	}
	ratio := 4000 / flow
	resClose(t, "fan rpm", s.FanLaw.FanRPM, 850*ratio, 1e-12)
	resClose(t, "static", *s.FanLaw.StaticPressure, 1.2*ratio*ratio, 1e-9)
	resClose(t, "power", *s.FanLaw.InputPowerKW, *s.InputPowerKW*ratio*ratio*ratio, 1e-9)
	resClose(t, "motor sheave", *s.FanLaw.MotorSheave, 5*ratio, 1e-9)
	if s.AirflowTolerance == nil || s.AirflowTolerance.Status != "low" {
		// 0.2 in. w.g. everywhere gives about 3583 cfm, 90 % of 4000: below −5 %.
		t.Errorf("airflow tolerance = %+v, want low", s.AirflowTolerance)
	}
	if resFinding(r, FindingAirflowOutOfTolerance, sys.ID) == nil {
		t.Error("no airflow_out_of_tolerance finding for the system")
	}
}

// TestResultsFanLawReach: a design airflow far from the one read asks for a
// speed the fan laws alone cannot vouch for; no prediction is given, and a
// note says why (FanLawReachPct, common practice).
func TestResultsFanLawReach(t *testing.T) {
	b, sys, tr := resTraverseJob()
	for p := 1; p <= 25; p++ {
		b.read(SubjectTraverse, tr.ID, "vp", p, 0.05, UnitInWG, StageAsFound, "") // about 1,800 cfm against 4,000
	}
	b.read(SubjectSystem, sys.ID, "fan_rpm", 0, 850, UnitRPM, StageFinal, "")
	r := b.compute(t)
	s := r.Systems[0]
	if s.FanLaw != nil {
		t.Errorf("fan-law prediction %+v for a change of %.0f %%; want none", s.FanLaw, (4000 / *r.Traverses[0].Flow - 1)*100)
	}
	found := false
	for _, n := range s.Notes {
		found = found || strings.Contains(n, "no fan-law prediction") && strings.Contains(n, "faster") && strings.Contains(n, "maximum safe speed")
	}
	if !found {
		t.Errorf("notes %q; want why there is no prediction", s.Notes)
	}
}

func TestResultsErrorsStayOnItems(t *testing.T) {
	t.Run("ErrNilSnapshot", func(t *testing.T) {
		_, err := ComputeResults(nil, resToday)
		if ErrorCode(err) != Invalid || ErrorField(err) != "snapshot" {
			t.Errorf("err = %v, want Invalid snapshot", err)
		}
	})
	t.Run("OKBadReadingOnOneOutlet", func(t *testing.T) {
		b := newResBuilder("ip")
		sys := b.system("AHU-1", SystemDesign{})
		bad := b.outlet(sys.ID, "S-1", 400, "hood", 1, 0)
		good := b.outlet(sys.ID, "S-2", 400, "hood", 1, 0)
		noAk := b.outlet(sys.ID, "S-3", 400, "ak", 0, 0)
		b.read(SubjectOutlet, bad, "flow", 0, 400, "furlongs", StageFinal, "")
		b.read(SubjectOutlet, good, "flow", 0, 400, UnitCFM, StageFinal, "")
		b.read(SubjectOutlet, noAk, "velocity", 0, 400, UnitFPM, StageFinal, "")
		r := b.compute(t)
		if o := r.Outlets[0]; o.Status != ResultError || len(o.Errors) != 1 || !strings.Contains(o.Errors[0], "unit") {
			t.Errorf("S-1 = %+v, want an error about the unit", o)
		}
		if o := r.Outlets[1]; o.Status != "within" || len(o.Errors) != 0 {
			t.Errorf("S-2 = %+v, want within", o)
		}
		if o := r.Outlets[2]; o.Status != ResultError || !strings.Contains(o.Errors[0], "Ak") {
			t.Errorf("S-3 = %+v, want an error about the missing Ak", o)
		}
		if s := r.Systems[0].Outlets; s.Errors != 2 || s.Within != 1 || s.Read != 3 {
			t.Errorf("summary = %+v", s)
		}
	})
	t.Run("OKBadUnits", func(t *testing.T) {
		b := newResBuilder("metric")
		b.instrument("Hood", "flow_hood", "2020-01-01", 0, 0, "")
		r := b.compute(t)
		if len(r.Errors) == 0 || len(r.Instruments) != 1 || r.Instruments[0].CalibrationStatus != CalibrationOverdue {
			t.Errorf("results = %+v, want a job error and the instruments still judged", r)
		}
	})
	t.Run("OKOutOfRangeDensity", func(t *testing.T) {
		b, _, tr := resTraverseJob()
		for p := 1; p <= 25; p++ {
			b.read(SubjectTraverse, tr.ID, "vp", p, 0.25, UnitInWG, StageAsFound, "")
		}
		b.read(SubjectTraverse, tr.ID, "air_db", 0, 300, UnitDegF, StageAsFound, "") // above boiling
		r := b.compute(t)
		tv := r.Traverses[0]
		if len(tv.Errors) == 0 || tv.DensitySource != "standard" || tv.Status != ResultComputed {
			t.Errorf("traverse = %+v, want an error on the state and standard air used", tv)
		}
	})
}

// TestResultsFromStore runs a small job through the real store: readings in
// through AddReadings (a correction among them), Snapshot out, results computed.
func TestResultsFromStore(t *testing.T) {
	ctx := context.Background()
	db := MustOpenDB(t)
	a := Actor{Name: "Lead", Role: RoleLead}
	job := &Job{Name: "Store job", Units: "ip", Tolerances: DefaultTolerances()}
	if err := db.CreateJob(ctx, a, job); err != nil {
		t.Fatal(err)
	}
	sys := &System{JobID: job.ID, Tag: "AHU-1", Kind: "air_handler", Design: SystemDesign{Airflow: 800}}
	if err := Create(ctx, db, a, sys); err != nil {
		t.Fatal(err)
	}
	o := &Outlet{JobID: job.ID, SystemID: sys.ID, Tag: "S-1", Kind: "supply", DesignFlow: 400, Method: "hood", Factor: 0.95}
	if err := Create(ctx, db, a, o); err != nil {
		t.Fatal(err)
	}
	v1, v2 := 300.0, 330.0
	first := Reading{ID: NewID(), JobID: job.ID, SubjectKind: SubjectOutlet, SubjectID: o.ID, Quantity: "flow",
		Value: &v1, Unit: UnitCFM, Stage: StageFinal, Technician: "tester", TakenAt: testNow.Add(-time.Hour)}
	corr := first
	corr.ID, corr.Value, corr.Supersedes, corr.TakenAt = NewID(), &v2, first.ID, testNow.Add(-30*time.Minute)
	res, err := db.AddReadings(ctx, a, job.ID, []Reading{first, corr})
	if err != nil {
		t.Fatal(err)
	}
	for _, rr := range res {
		if rr.Status != ReadingStored {
			t.Fatalf("reading %s: %+v", rr.ID, rr)
		}
	}
	snap, err := db.Snapshot(ctx, job.ID)
	if err != nil {
		t.Fatal(err)
	}
	r, err := ComputeResults(snap, resToday)
	if err != nil {
		t.Fatal(err)
	}
	f := r.Outlets[0].Final
	if f == nil || f.Flow == nil || f.ReadingID != corr.ID || f.Status != "low" {
		t.Fatalf("final = %+v, want the correction's 330 × 0.95, low", f)
	}
	resClose(t, "flow", *f.Flow, 313.5, 1e-9)
}

// resBenchSnapshot is a large job: 40 systems, 1500 outlets read as found and
// final, a traverse and a capacity test on four of the systems, and water tests.
func resBenchSnapshot() *Snapshot {
	b := newResBuilder("ip")
	hood := b.instrument("Hood 1", "flow_hood", "2025-02-01", 3, 7, "cfm")
	thermo := b.instrument("Psychrometer", "psychrometer", "2026-01-01", 0, 0.5, "°F")
	csv, _ := os.ReadFile("../testdata/perf_rtu_example.csv")
	for s := 0; s < 40; s++ {
		sys := b.system(fmt.Sprintf("AHU-%d", s+1), SystemDesign{Airflow: 4000, RatedTotal: 120000, FLA: 12, Phase: 3,
			PerfTableCSV: string(csv)})
		sysID := sys.ID
		n := 37
		if s < 20 {
			n = 38
		}
		for i := 0; i < n; i++ {
			o := b.outlet(sysID, fmt.Sprintf("S-%d-%d", s+1, i+1), 100+float64(i%5)*25, "hood", 1, 0)
			b.read(SubjectOutlet, o, "flow", 0, 80+float64(i%7)*10, UnitCFM, StageAsFound, hood)
			b.read(SubjectOutlet, o, "flow", 0, 100+float64(i%5)*25+float64(i%3)*5, UnitCFM, StageFinal, hood)
		}
		for i, v := range []float64{460, 467, 450} {
			b.read(SubjectSystem, sysID, "volts", i+1, v, UnitVolt, StageFinal, "")
			b.read(SubjectSystem, sysID, "amps", i+1, 10+float64(i)/2, UnitAmp, StageFinal, "")
		}
		b.read(SubjectSystem, sysID, "fan_rpm", 0, 900, UnitRPM, StageFinal, "")
		if s%10 != 0 {
			continue
		}
		b.s.Traverses = append(b.s.Traverses, Traverse{ID: b.id(), JobID: b.s.Job.ID, SystemID: sysID,
			Tag: fmt.Sprintf("T-%d", s), Shape: "rect", Method: "log-tchebycheff", Width: 36, Height: 24, PointsW: 6, PointsH: 5})
		tr := b.s.Traverses[len(b.s.Traverses)-1].ID
		for p := 1; p <= 30; p++ {
			b.read(SubjectTraverse, tr, "vp", p, 0.1+0.002*float64(p), UnitInWG, StageFinal, "")
		}
		b.read(SubjectTraverse, tr, "air_db", 0, 58, UnitDegF, StageFinal, thermo)
		b.read(SubjectTraverse, tr, "air_rh", 0, 85, UnitPercent, StageFinal, thermo)
		b.s.CapacityTests = append(b.s.CapacityTests, CapacityTest{ID: b.id(), JobID: b.s.Job.ID, SystemID: sysID,
			Tag: fmt.Sprintf("CT-%d", s), Mode: "cooling", FlowSource: "traverse", TraverseID: tr})
		ct := b.s.CapacityTests[len(b.s.CapacityTests)-1].ID
		for _, r := range [][2]any{{"enter_db", 80.0}, {"enter_wb", 67.0}, {"leave_db", 56.0}, {"leave_wb", 55.0}, {"outdoor_db", 95.0}} {
			b.read(SubjectCapacityTest, ct, r[0].(string), 0, r[1].(float64), UnitDegF, StageFinal, thermo)
		}
		b.s.WaterTests = append(b.s.WaterTests, WaterTest{ID: b.id(), JobID: b.s.Job.ID, SystemID: sysID,
			Tag: fmt.Sprintf("CHW-%d", s), Mode: "cooling", FlowSource: "valve", ValveCv: 12, Fluid: "pg", Concentration: 30, DesignFlow: 24,
			CapacityTest: ct})
		wt := b.s.WaterTests[len(b.s.WaterTests)-1].ID
		b.read(SubjectWaterTest, wt, "dp", 0, 4, UnitPsi, StageFinal, "")
		b.read(SubjectWaterTest, wt, "enter_temp", 0, 44, UnitDegF, StageFinal, thermo)
		b.read(SubjectWaterTest, wt, "leave_temp", 0, 55, UnitDegF, StageFinal, thermo)
	}
	return b.s
}

func TestResultsBenchSnapshot(t *testing.T) {
	s := resBenchSnapshot()
	if len(s.Outlets) != 1500 || len(s.Systems) != 40 {
		t.Fatalf("bench snapshot has %d outlets, %d systems", len(s.Outlets), len(s.Systems))
	}
	r, err := ComputeResults(s, resToday)
	if err != nil {
		t.Fatal(err)
	}
	for _, ct := range r.CapacityTests {
		if ct.Capacity == nil || ct.Expected == nil || len(ct.Errors) != 0 {
			t.Errorf("%s: %+v", ct.Tag, ct)
		}
	}
	for _, w := range r.WaterTests {
		if w.Capacity == nil || w.AirSide == nil || len(w.Errors) != 0 {
			t.Errorf("%s: %+v", w.Tag, w)
		}
	}
	for _, o := range r.Outlets {
		if len(o.Errors) != 0 || len(o.Flags) != 1 {
			t.Fatalf("%s: errors %v flags %v", o.Tag, o.Errors, o.Flags)
		}
	}
}

func BenchmarkComputeResults1500Outlets(b *testing.B) {
	s := resBenchSnapshot()
	b.ReportAllocs()
	for b.Loop() {
		if _, err := ComputeResults(s, resToday); err != nil {
			b.Fatal(err)
		}
	}
}

// An exhaust fan has no supply outlets: its airflow is the sum of its exhaust
// outlets (hood readings × factor 1, by hand: 410 + 395 = 805 cfm of 800).
func TestResultsExhaustFanAirflow(t *testing.T) {
	b := newResBuilder("ip")
	fan := b.system("EF-1", SystemDesign{Airflow: 800})
	for i, v := range []float64{410, 395} {
		id := b.outlet(fan.ID, fmt.Sprintf("E-%d", i+1), 400, "hood", 1, 0)
		b.s.Outlets[len(b.s.Outlets)-1].Kind = "exhaust"
		b.read(SubjectOutlet, id, "flow", 0, v, UnitCFM, StageFinal, "")
	}
	r := b.compute(t)
	s := r.Systems[0]
	if s.Airflow == nil || s.AirflowSource != "outlets" {
		t.Fatalf("exhaust fan airflow %v from %q; want the exhaust outlets' sum", s.Airflow, s.AirflowSource)
	}
	resClose(t, "exhaust fan airflow", *s.Airflow, 805, 1e-9)
}
