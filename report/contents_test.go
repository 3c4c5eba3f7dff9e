package report

import (
	"regexp"
	"strconv"
	"strings"
	"testing"
)

// The contents page lists every section with the page it starts on: each
// listed page, read back with pdftotext, begins that section (its running
// head names it), and the number of pages is still right.
func TestRenderContents(t *testing.T) {
	needTool(t, "pdftotext", "poppler-utils")
	needTool(t, "qpdf", "qpdf")
	path, _ := render(t, demoInput(t))
	run(t, "qpdf", "--check", path)
	n := pageCount(t, path)
	contents := norm(pdfText(t, path, "raw", 2, 2))
	if !strings.Contains(contents, "Contents") {
		t.Fatalf("page 2 is not the contents: %.200s", contents)
	}
	want := []string{"Basis of the figures, and cautions", "Findings", "System AHU-1: Health centre", "System EF-1: Toilet exhaust",
		"System RTU-1: Library floor", "Outlets", "Traverse T-1", "Traverse T-2", "Water tests", "Instruments", "Reading log",
		"Revision history", "Sign-off"}
	last := 2
	for _, title := range want {
		m := regexp.MustCompile(regexp.QuoteMeta(title) + ` (\d+)\b`).FindStringSubmatch(contents)
		if m == nil {
			t.Errorf("the contents lack %q with a page number", title)
			continue
		}
		pg, _ := strconv.Atoi(m[1])
		if pg <= last || pg > n {
			t.Errorf("%q on page %d: out of order (previous %d) or past the last page %d", title, pg, last, n)
			continue
		}
		last = pg
		page := norm(pdfText(t, path, "raw", pg, pg))
		if !strings.Contains(page, title) {
			t.Errorf("the contents put %q on page %d, which does not have it", title, pg)
		}
	}
	if p := norm(pdfText(t, path, "raw", n, n)); !strings.Contains(p, "Page "+strconv.Itoa(n)+" of "+strconv.Itoa(n)) {
		t.Errorf("the last page lost its number after the contents were filled in")
	}
}
