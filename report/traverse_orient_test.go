package report

import (
	"regexp"
	"strconv"
	"strings"
	"testing"

	"fieldtab/schema"
)

// A round traverse is drawn the way the field app draws it
// (webui/static/js/screens/traverse.js): port 1 on the left, port 2 at the
// top, and point 1 of each diameter nearest its port, so the far end of
// diameter 2 is at the bottom. Positions are read back with pdftotext -bbox.
func TestRoundTraverseOrientation(t *testing.T) {
	needTool(t, "pdftotext", "poppler-utils")
	in := demoInput(t)
	path, _ := render(t, in)
	var t2 int
	for pg := 3; pg <= pageCount(t, path) && t2 == 0; pg++ {
		if strings.Contains(norm(pdfText(t, path, "raw", pg, pg)), "Traverse T-2 System") {
			t2 = pg
		}
	}
	if t2 == 0 {
		t.Fatal("no page for traverse T-2")
	}
	out := run(t, "pdftotext", "-bbox", "-f", strconv.Itoa(t2), "-l", strconv.Itoa(t2), path, "-")
	word := regexp.MustCompile(`<word xMin="([\d.]+)" yMin="([\d.]+)" xMax="([\d.]+)" yMax="([\d.]+)">([^<]*)</word>`)
	type pos struct{ x, y float64 }
	var words []struct {
		p pos
		w string
	}
	for _, m := range word.FindAllStringSubmatch(out, -1) {
		x0, _ := strconv.ParseFloat(m[1], 64)
		y0, _ := strconv.ParseFloat(m[2], 64)
		x1, _ := strconv.ParseFloat(m[3], 64)
		y1, _ := strconv.ParseFloat(m[4], 64)
		words = append(words, struct {
			p pos
			w string
		}{pos{(x0 + x1) / 2, (y0 + y1) / 2}, m[5]})
	}
	// "port" followed by its number.
	ports := map[string]pos{}
	for i := 0; i+1 < len(words); i++ {
		if words[i].w == "port" {
			ports[words[i+1].w] = words[i].p
		}
	}
	p1, ok1 := ports["1"]
	p2, ok2 := ports["2"]
	if !ok1 || !ok2 {
		t.Fatalf("port labels not found: %v", ports)
	}
	if !(p1.x < p2.x-40 && p2.y < p1.y-40) {
		t.Errorf("port 1 at %v, port 2 at %v: want port 1 on the left and port 2 at the top", p1, p2)
	}
	// The last point of diameter 2 is the one furthest from its port: at the bottom.
	var tr schema.TraverseResult
	for _, x := range in.Results.Traverses {
		if x.Tag == "T-2" {
			tr = x
		}
	}
	last := tr.Points[len(tr.Points)-1]
	lbl := newUnits(in.Results.Units).velocity(*last.Velocity)
	found := false
	for _, w := range words {
		if w.w == lbl && w.p.y > p1.y+40 && abs(w.p.x-p2.x) < 10 {
			found = true
		}
	}
	if !found {
		t.Errorf("diameter 2's last point (%s) is not drawn below the centre, under port 2", lbl)
	}
}

func abs(v float64) float64 {
	if v < 0 {
		return -v
	}
	return v
}
