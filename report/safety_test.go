package report

import (
	"strings"
	"testing"
)

// TestRenderSafetyCautions: the report's safety list names the closed
// discharge valve (a pump dead-headed), who may open electrical covers, and
// defers to the specification; checked on the text pdftotext reads back.
func TestRenderSafetyCautions(t *testing.T) {
	needTool(t, "pdftotext", "poppler-utils")
	path, _ := render(t, demoInput(t))
	raw := norm(pdfText(t, path, "raw"))
	for _, w := range []string{"Closed discharge valves: a pump must not run against a closed discharge valve (dead-head)",
		"shut-off head only as the pump maker and the project specification allow", "NFPA 70E", "arc-rated PPE",
		"Follow the site's safety rules and the project specification"} {
		if !strings.Contains(raw, w) {
			t.Errorf("the report's safety list lacks %q", w)
		}
	}
}
