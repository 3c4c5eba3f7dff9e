package report

import (
	"regexp"
	"strconv"
	"strings"
	"testing"
)

// On every chart page no two words overlap, by the word boxes poppler's
// pdftotext -bbox reads back from the file, and the chart carries wet-bulb
// lines with their labels.
func TestChartLabelsDoNotOverlap(t *testing.T) {
	needTool(t, "pdftotext", "poppler-utils")
	path, _ := render(t, demoInput(t))
	n := pageCount(t, path)
	word := regexp.MustCompile(`<word xMin="([\d.]+)" yMin="([\d.]+)" xMax="([\d.]+)" yMax="([\d.]+)">([^<]*)</word>`)
	charts := 0
	for pg := 1; pg <= n; pg++ {
		if !strings.Contains(norm(pdfText(t, path, "raw", pg, pg)), "Psychrometric chart of") {
			continue
		}
		charts++
		if text := norm(pdfText(t, path, "raw", pg, pg)); !strings.Contains(text, "dashed lines of constant wet bulb every 5 °F") {
			t.Errorf("page %d: the chart's caption does not mention its wet-bulb lines", pg)
		}
		out := run(t, "pdftotext", "-bbox", "-f", strconv.Itoa(pg), "-l", strconv.Itoa(pg), path, "-")
		type box struct {
			x0, y0, x1, y1 float64
			w              string
		}
		var boxes []box
		for _, m := range word.FindAllStringSubmatch(out, -1) {
			f := func(i int) float64 { v, _ := strconv.ParseFloat(m[i], 64); return v }
			boxes = append(boxes, box{f(1), f(2), f(3), f(4), m[5]})
		}
		wb := 0
		for i, a := range boxes {
			if a.w == "65" || a.w == "70" || a.w == "75" {
				wb++
			}
			for _, b := range boxes[i+1:] {
				// Overlap by more than a hair (poppler's boxes include the
				// font's full ascent and descent, so lines of text touch).
				ox := min(a.x1, b.x1) - max(a.x0, b.x0)
				oy := min(a.y1, b.y1) - max(a.y0, b.y0)
				if ox > 0.3 && oy > 1.2 {
					t.Errorf("page %d: %q and %q overlap (%.1f × %.1f pt)", pg, a.w, b.w, ox, oy)
				}
			}
		}
		if wb == 0 {
			t.Errorf("page %d: no wet-bulb label on the chart", pg)
		}
	}
	if charts != 3 {
		t.Fatalf("%d chart pages; the fixture has 3 capacity tests", charts)
	}
}
