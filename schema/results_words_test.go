package schema

import (
	"regexp"
	"strings"
	"testing"
)

// internalName matches a field or quantity code in a message: a lower-case
// word with an underscore (as_found, flow_basis, static_external) or the
// bare code "dp:".
var internalName = regexp.MustCompile(`\b[a-z]+_[a-z_]+\b|\bdp:`)

// Result messages are read by people on site and in the report: they say
// what went wrong in words, never in the store's field or quantity codes.
func TestResultMessagesUseWords(t *testing.T) {
	b := newResBuilder("ip")
	sys := b.system("AHU-1", SystemDesign{Airflow: 1000})
	b.instrument("Hood 9", "flow_hood", "2026-13-45", 3, 7, "cfm")        // a due date that is no date
	old := b.instrument("Hood 8", "flow_hood", "2020-01-01", 3, 7, "cfm") // long overdue
	s := b.instrument("Hood 1", "flow_hood", "2027-01-01", 3, 7, "cfm")
	o := b.outlet(sys.ID, "S-1", 1000, "hood", 1, 0)
	b.read(SubjectOutlet, o, "flow", 0, 1000, UnitCFM, StageFinal, s)
	b.read(SubjectOutlet, o, "flow", 0, 900, UnitCFM, StageAsFound, old)
	b.read(SubjectSystem, sys.ID, "fan_rpm", 0, 900, UnitRPM, StageFinal, "")
	b.read(SubjectSystem, sys.ID, "static_external", 0, -0.2, UnitInWG, StageFinal, "")
	// Outlet-sum airflow with no basis; a bad flow source on another test.
	b.s.CapacityTests = append(b.s.CapacityTests,
		CapacityTest{ID: b.id(), JobID: b.s.Job.ID, SystemID: sys.ID, Tag: "CT-1", Mode: "cooling", FlowSource: "outlets"},
		CapacityTest{ID: b.id(), JobID: b.s.Job.ID, SystemID: sys.ID, Tag: "CT-2", Mode: "cooling", FlowSource: "pitot", FlowBasis: "actual"},
		CapacityTest{ID: b.id(), JobID: b.s.Job.ID, SystemID: sys.ID, Tag: "CT-3", Mode: "cooling", FlowSource: "traverse", TraverseID: "gone"})
	b.s.WaterTests = append(b.s.WaterTests,
		WaterTest{ID: b.id(), JobID: b.s.Job.ID, SystemID: sys.ID, Tag: "CHW-1", Mode: "cooling", FlowSource: "valve", ValveCv: 10,
			Fluid: "water", DesignFlow: 20},
		WaterTest{ID: b.id(), JobID: b.s.Job.ID, SystemID: sys.ID, Tag: "CHW-2", Mode: "cooling", FlowSource: "guess",
			Fluid: "water", DesignFlow: 20})
	b.read(SubjectWaterTest, b.s.WaterTests[0].ID, "dp", 0, -3, UnitPsi, StageFinal, "")
	r := b.compute(t)

	var msgs []string
	for _, in := range r.Instruments {
		msgs = append(msgs, in.Errors...)
	}
	for _, s := range r.Systems {
		msgs = append(append(msgs, s.Errors...), s.Notes...)
	}
	for _, o := range r.Outlets {
		for _, f := range o.Flags {
			msgs = append(msgs, f.Text)
		}
	}
	for _, c := range r.CapacityTests {
		msgs = append(append(msgs, c.Errors...), c.Warnings...)
	}
	for _, w := range r.WaterTests {
		msgs = append(msgs, w.Errors...)
	}
	// Each case above must have said something, else the check is empty.
	all := strings.Join(msgs, "\n")
	for _, want := range []string{"calibration due date", "external static pressure is negative", "no flow basis given",
		"airflow source \"pitot\"", "A reading (outlet airflow read with a flow hood, as found) was taken with Hood 8", "flow basis", "airflow from a traverse", "valve pressure drop", "water flow source \"guess\""} {
		if !strings.Contains(all, want) {
			t.Errorf("no message says %q; messages:\n%s", want, all)
		}
	}
	for _, m := range msgs {
		if n := internalName.FindString(m); n != "" {
			t.Errorf("message names %q: %s", n, m)
		}
	}
}
