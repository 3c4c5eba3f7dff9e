package report

import (
	"strings"
	"testing"
	"time"

	"fieldtab/schema"
)

// TestRenderIssue9Results renders a small job with an as-found traverse
// beside its final one, a traverse with conflicting readings, a heating
// coil's water warming, an unbalanced motor and a nameplate comparison, and
// reads the PDF back with pdftotext. Figures are invented; what is checked is
// that the report prints what results give.
func TestRenderIssue9Results(t *testing.T) {
	needTool(t, "pdftotext", "poppler-utils")
	now := fixtureNow
	p := newPlan(schema.Job{Name: "Fixture: issue 9 results", Units: "ip"})
	p.instrumentsFor(now)
	sys := p.system(schema.System{Tag: "AHU-9", Kind: "air_handler", Name: "Results check",
		Design: schema.SystemDesign{Airflow: 4000, RatedTotal: 150_000, FLA: 10, Volts: 460, Phase: 3, FanRPM: 1000}})
	t1 := schema.Traverse{ID: schema.NewID(), JobID: p.job.ID, SystemID: sys.ID, Tag: "T-9", Shape: "rect",
		Method: "log-tchebycheff", Width: 24, Height: 12, PointsW: 5, PointsH: 5}
	t2 := schema.Traverse{ID: schema.NewID(), JobID: p.job.ID, SystemID: sys.ID, Tag: "T-10", Shape: "rect",
		Method: "log-tchebycheff", Width: 24, Height: 12, PointsW: 5, PointsH: 5}
	p.traverses = append(p.traverses, t1, t2)
	at := now.Add(-5 * time.Hour)
	for i := 1; i <= 25; i++ {
		p.read(schema.SubjectTraverse, t1.ID, "vp", i, 0.16, schema.UnitInWG, schema.StageAsFound, "Manometer 1", at)
		p.read(schema.SubjectTraverse, t1.ID, "vp", i, 0.25, schema.UnitInWG, schema.StageFinal, "Manometer 1", at.Add(time.Hour))
		p.read(schema.SubjectTraverse, t2.ID, "vp", i, 0.25, schema.UnitInWG, schema.StageFinal, "Manometer 1", at.Add(time.Hour))
	}
	p.read(schema.SubjectTraverse, t2.ID, "vp", 4, 0.41, schema.UnitInWG, schema.StageFinal, "Manometer 1", at.Add(2*time.Hour))
	for leg, v := range []float64{460, 467, 450} {
		p.read(schema.SubjectSystem, sys.ID, "volts", leg+1, v, schema.UnitVolt, schema.StageFinal, "Clamp 1", at)
	}
	for leg, v := range []float64{9, 9.2, 9.1} {
		p.read(schema.SubjectSystem, sys.ID, "amps", leg+1, v, schema.UnitAmp, schema.StageFinal, "Clamp 1", at)
	}
	p.waters = []schema.WaterTest{{ID: schema.NewID(), JobID: p.job.ID, SystemID: sys.ID, Tag: "HW coil AHU-9", Mode: "heating",
		FlowSource: "valve", ValveCv: 6.3, Fluid: "water", DesignFlow: 18}}
	w := p.waters[0]
	p.read(schema.SubjectWaterTest, w.ID, "dp", 0, 8, schema.UnitPsi, schema.StageFinal, "Hydronic 1", at)
	p.read(schema.SubjectWaterTest, w.ID, "enter_temp", 0, 120, schema.UnitDegF, schema.StageFinal, "Hydronic 1", at)
	p.read(schema.SubjectWaterTest, w.ID, "leave_temp", 0, 131, schema.UnitDegF, schema.StageFinal, "Hydronic 1", at)
	p.caps = []schema.CapacityTest{{ID: schema.NewID(), JobID: p.job.ID, SystemID: sys.ID, Tag: "CT-9", Mode: "cooling",
		FlowSource: "traverse", TraverseID: t1.ID}}
	for k, q := range []string{"enter_db", "enter_wb", "leave_db", "leave_wb"} {
		p.read(schema.SubjectCapacityTest, p.caps[0].ID, q, 0, []float64{80, 67, 55, 54}[k], schema.UnitDegF, schema.StageFinal,
			"Psychrometer 1", at)
	}

	in := inputFor(t, p.memory(), now)
	r := in.Results
	tr := r.Traverses[0]
	if tr.AsFound == nil || tr.AsFound.Flow == nil || tr.Flow == nil || r.Traverses[1].Status != schema.ResultConflict {
		t.Fatalf("fixture results: T-9 %+v as found %+v; T-10 %s", tr, tr.AsFound, r.Traverses[1].Status)
	}
	path, _ := render(t, in)
	raw := norm(pdfText(t, path, "raw"))
	u := newUnits(r.Units)
	for _, want := range []string{
		// As found beside final, with its own ± and status.
		"Flow, final " + norm(traverseFlowText(u, *tr.Flow, tr.FlowUncertainty, tr.Tolerance, tr.Density)),
		"Flow, as found " + norm(traverseFlowText(u, *tr.AsFound.Flow, tr.AsFound.FlowUncertainty, tr.AsFound.Tolerance, tr.Density)),
		"the method's own ±5 %",
		// The conflict, its table and its finding.
		"Conflicting readings: for the lead to resolve",
		"line 1 point 4 (final) has 2 readings that each count",
		"line 1 point 4 17.1 0.9 conflict",
		// The heating coil's warming water, and the hot-water caution.
		"HW coil AHU-9 (heating; the water shows cooling)",
		"the water warms from 120.0 °F to 131.0 °F, which is cooling, but the test is stated as heating",
		"Caution, hot water (HW coil AHU-9)",
		"±5 % (default, common practice)",
		// The motor's voltage imbalance.
		"AHU-9, motor: voltage imbalance 2.0 % is above 1 %: NEMA MG 1 calls for derating",
		"Motor check",
		// An air handler's capacity against its scheduled figure, labelled as such.
		schema.ExpectedBasisScheduled,
	} {
		if !strings.Contains(raw, norm(want)) {
			t.Errorf("the report lacks %q", want)
		}
	}
	for _, f := range r.Findings {
		if !strings.Contains(raw, norm(f.Text)) {
			t.Errorf("the report lacks the finding %q", f.Text)
		}
	}
}
