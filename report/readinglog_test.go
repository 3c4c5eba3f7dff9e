package report

import (
	"strings"
	"testing"

	"fieldtab/schema"
)

// The reading log keeps corrected and voided readings on record, each with
// what became of it: the correction that superseded it, the void and its
// reason, or the later reading that counts instead; a confirmed reading and
// a reading's remark are shown beside it.
func TestRenderReadingLog(t *testing.T) {
	needTool(t, "pdftotext", "poppler-utils")
	p := newPlan(schema.Job{Name: "Log test", Units: "ip"})
	sys := p.system(schema.System{Tag: "AHU-7", Kind: "air_handler", Design: schema.SystemDesign{Airflow: 1000}})
	out := p.outlet(sys.ID, "S-701", "Room 7", "supply", "12x12", 300)
	at := fixtureNow.Add(-2 * 3600e9)
	p.read(schema.SubjectOutlet, out, "flow", 0, 301, schema.UnitCFM, schema.StageAsFound, "", at)
	p.read(schema.SubjectOutlet, out, "flow", 0, 312, schema.UnitCFM, schema.StageAsFound, "", at.Add(60e9))
	p.readings[1].Supersedes = p.readings[0].ID
	p.read(schema.SubjectOutlet, out, "flow", 0, 257, schema.UnitCFM, schema.StageFinal, "", at.Add(120e9))
	p.readings = append(p.readings, schema.Reading{ID: schema.NewID(), JobID: p.job.ID, SubjectKind: schema.SubjectOutlet,
		SubjectID: out, Quantity: "flow", Unit: schema.UnitCFM, Stage: schema.StageFinal, Technician: "Fixture tech",
		TakenAt: at.Add(180e9), Void: true, Supersedes: p.readings[2].ID, Note: "hood slipped off the diffuser"})
	// A confirmed far-off final reading with a remark, and an earlier one
	// stored after it, which does not count.
	p.read(schema.SubjectOutlet, out, "flow", 0, 1250, schema.UnitCFM, schema.StageFinal, "", at.Add(240e9))
	p.readings[4].Confirmed, p.readings[4].Note = true, "damper wide open"
	p.read(schema.SubjectOutlet, out, "flow", 0, 280, schema.UnitCFM, schema.StageFinal, "", at.Add(200e9))
	in := inputFor(t, p.memory(), fixtureNow)
	path, _ := render(t, in)
	raw := norm(pdfText(t, path, "raw"))
	if !strings.Contains(raw, "All 6 readings as entered") {
		t.Errorf("no reading count in the log")
	}
	when := func(k int) string {
		return p.readings[k].TakenAt.In(in.Generated.Location()).Format("2006-01-02 15:04")
	}
	for _, want := range []string{
		"S-701 hood reading as found 301 cfm — Fixture tech superseded by the correction of " + when(1) + " (312 cfm)",
		"312 cfm — Fixture tech counts; corrects the reading of " + when(0) + " (301 cfm)",
		"257 cfm — Fixture tech voided on " + when(3) + ": hood slipped off the diffuser",
		"final — — Fixture tech void: withdraws the reading of " + when(2) + " (257 cfm); reason: hood slipped off the diffuser",
		"1,250 cfm — Fixture tech counts (latest of 2); confirmed far from design or its neighbours; remark: damper wide open",
		"280 cfm — Fixture tech does not count: the reading of " + when(4) + " (1,250 cfm) is later",
	} {
		if !strings.Contains(raw, want) {
			t.Errorf("the log lacks %q", want)
		}
	}
	// The results agree on which reading counts: the confirmed 1,250 cfm.
	for _, o := range in.Results.Outlets {
		if o.Final == nil || o.Final.Reading != 1250 {
			t.Errorf("results count another final reading: %+v", o.Final)
		}
	}
	if t.Failed() {
		t.Logf("log text: %s", raw[strings.Index(raw, "All 6 readings"):])
	}
}
