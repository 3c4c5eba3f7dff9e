package report

import (
	"strings"
	"testing"

	"fieldtab/schema"
)

// The reading log keeps corrected and voided readings on record, each with
// what became of it, and counts every reading.
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
		TakenAt: at.Add(180e9), Void: true, Supersedes: p.readings[2].ID})
	path, _ := render(t, inputFor(t, p.memory(), fixtureNow))
	layout := pdfText(t, path, "layout")
	if !strings.Contains(norm(layout), "All 4 readings as entered") {
		t.Errorf("no reading count in the log")
	}
	for _, want := range []struct{ value, status string }{
		{"301 cfm", "corrected"}, {"312 cfm", "counts"}, {"257 cfm", "voided"}, {"final —", "void"},
	} {
		found := false
		for _, row := range rowsWith(layout, "S-701") {
			if strings.Contains(row, want.value) && strings.HasSuffix(row, want.status) {
				found = true
			}
		}
		if !found {
			t.Errorf("no log row of S-701 with %q ending %q; rows:\n%s", want.value, want.status, strings.Join(rowsWith(layout, "S-701"), "\n"))
		}
	}
}
