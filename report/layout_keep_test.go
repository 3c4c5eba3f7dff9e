package report

import (
	"math"
	"strings"
	"testing"
)

// A short paragraph (the fan-law note under its table) is never split by a
// page break: near the foot of a page it starts on the next one whole. A
// long one still flows across pages.
func TestParaKeepsShortTogether(t *testing.T) {
	d := newDoc(demoInput(t))
	d.pdf.AddPage()
	note := strings.Repeat("Fan laws on an unchanged system curve; lock out the drive. ", 3)
	d.font(famSans, "I", sizeSmall)
	n := len(d.wrap(note, d.contentW()-1))
	if n < 2 || n > keepLines {
		t.Fatalf("the note wraps to %d lines; the test needs 2 to %d", n, keepLines)
	}
	// Room for one line only.
	d.setY(d.bottom() - 1.5*d.lineH(sizeSmall))
	d.para(note, "I", sizeSmall)
	if got := d.pdf.PageNo(); got != 2 {
		t.Errorf("the short note ended on page %d, want it whole on page 2", got)
	}
	// All n lines on page 2: it ends n lines (and the paragraph's 1 mm)
	// below the top margin; a split note ends a line higher.
	if want := marginTop + float64(n)*d.lineH(sizeSmall) + 1; math.Abs(d.y()-want) > 0.01 {
		t.Errorf("the note ends at %.1f mm on page 2, want %.1f mm: it was split", d.y(), want)
	}
	// A long paragraph starts where it is and runs on.
	d.setY(d.bottom() - 1.5*d.lineH(sizeBody))
	d.para(strings.Repeat("A long paragraph of the basis of the figures. ", 40), "", sizeBody)
	if got := d.pdf.PageNo(); got != 3 {
		t.Errorf("the long paragraph ended on page %d, want it to start on page 2 and run onto page 3", got)
	}
}
