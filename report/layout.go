package report

import (
	"strconv"
	"strings"
	"unicode/utf8"
)

// Page furniture and text placement. Every string that reaches the PDF goes
// through clean, and every one that goes into a cell through fit or wrap, so
// nothing runs past its cell and nothing the font cannot carry breaks the file.

// Font families registered in each document.
const (
	famSans = "go"
	famMono = "gomono"
)

// Type sizes, pt.
const (
	sizeTitle   = 20
	sizeH1      = 14
	sizeH2      = 11
	sizeBody    = 9
	sizeTable   = 8
	sizeSmall   = 7
	sizeTiny    = 5.5
	ptToMM      = 25.4 / 72
	lineSpacing = 1.3 // line height ÷ type size
)

// Page geometry, mm.
const (
	marginSide   = 15
	marginTop    = 20 // below the running header
	marginBottom = 16 // above the footer
	headerY      = 9
	footerY      = 8 // from the bottom edge
)

// clean makes text safe for the embedded font: control characters become
// spaces, and runes outside the Basic Multilingual Plane (emoji, rare CJK)
// become U+FFFD, because gofpdf's UTF-8 font tables stop at U+FFFF and index
// past them. A rune inside the plane that the Go fonts lack (CJK, for one)
// is kept: it prints as the font's empty box, and the text layer still holds
// the real character, so search and copy find it.
func clean(s string) string {
	ok := true
	for _, r := range s {
		if r < 0x20 || (r >= 0x7f && r < 0xa0) || r > 0xffff || r == utf8.RuneError {
			ok = false
			break
		}
	}
	if ok {
		return s
	}
	return strings.Map(func(r rune) rune {
		switch {
		case r < 0x20 || (r >= 0x7f && r < 0xa0):
			return ' '
		case r > 0xffff:
			return '\ufffd'
		}
		return r
	}, s)
}

// font selects a family, style ("", "B", "I") and size in pt.
func (d *doc) font(fam, style string, size float64) {
	d.pdf.SetFont(fam, style, size)
}

func (d *doc) lineH(size float64) float64 { return size * ptToMM * lineSpacing }

// width is the printed width of s in the current font, mm.
func (d *doc) width(s string) float64 { return d.pdf.GetStringWidth(s) }

// fit shortens s with an ellipsis until it fits w mm in the current font.
func (d *doc) fit(s string, w float64) string {
	s = clean(s)
	if d.width(s) <= w {
		return s
	}
	rs := []rune(s)
	// The longest prefix that fits with the ellipsis, by bisection.
	lo, hi := 0, len(rs)
	for lo < hi {
		mid := (lo + hi + 1) / 2
		if d.width(string(rs[:mid])+"…") <= w {
			lo = mid
		} else {
			hi = mid - 1
		}
	}
	if lo == 0 {
		if d.width("…") <= w {
			return "…"
		}
		return ""
	}
	return strings.TrimRight(string(rs[:lo]), " ") + "…"
}

// wrap breaks s into lines of at most w mm at spaces, splitting a word only
// when it is longer than a line on its own.
func (d *doc) wrap(s string, w float64) []string {
	s = clean(s)
	if d.width(s) <= w {
		return []string{s}
	}
	var lines []string
	line := ""
	// Split at plain spaces only: a no-break space keeps a unit with its number.
	for _, word := range strings.Split(s, " ") {
		if word == "" {
			continue
		}
		try := word
		if line != "" {
			try = line + " " + word
		}
		if d.width(try) <= w {
			line = try
			continue
		}
		if line != "" {
			lines = append(lines, line)
			line = ""
		}
		for d.width(word) > w {
			rs := []rune(word)
			n := 1
			for n < len(rs) && d.width(string(rs[:n+1])) <= w {
				n++
			}
			lines = append(lines, string(rs[:n]))
			word = string(rs[n:])
		}
		line = word
	}
	if line != "" || len(lines) == 0 {
		lines = append(lines, line)
	}
	return lines
}

func (d *doc) y() float64 { return d.pdf.GetY() }

func (d *doc) setY(y float64) { d.pdf.SetXY(d.left(), y) }

func (d *doc) left() float64 { return marginSide }

func (d *doc) contentW() float64 { return d.pageW - 2*marginSide }

func (d *doc) bottom() float64 { return d.pageH - marginBottom }

// room says whether h mm fit above the bottom margin.
func (d *doc) room(h float64) bool { return d.y()+h <= d.bottom() }

// ensure starts a new page unless h mm fit on this one.
func (d *doc) ensure(h float64) {
	if !d.room(h) {
		d.newPage()
	}
}

func (d *doc) newPage() {
	d.pdf.AddPage()
	d.setY(marginTop)
}

// header is the running head of every page but the cover.
func (d *doc) header() {
	d.stamp()
	if d.pdf.PageNo() == 1 {
		return
	}
	d.pdf.SetTextColor(90, 90, 90)
	d.font(famSans, "", sizeSmall)
	half := d.contentW()/2 - 2
	d.pdf.SetXY(d.left(), headerY)
	d.pdf.CellFormat(half, 4, d.fit(d.jobLine(), half), "", 0, "L", false, 0, "")
	d.pdf.SetXY(d.left()+half+4, headerY)
	d.pdf.CellFormat(half, 4, d.fit(d.section, half), "", 0, "R", false, 0, "")
	d.pdf.SetDrawColor(160, 160, 160)
	d.pdf.SetLineWidth(0.2)
	d.pdf.Line(d.left(), headerY+5, d.pageW-marginSide, headerY+5)
	d.pdf.SetTextColor(0, 0, 0)
}

// footer carries the revision and "Page n of N". N is gofpdf's page-count
// alias, replaced at output; the last page prints its own number as digits,
// so that every digit of N is in the embedded font subset (gofpdf subsets
// the font by the runes drawn, and the alias's digits are never drawn).
func (d *doc) footer(last bool) {
	y := d.pageH - footerY - 3
	d.pdf.SetTextColor(90, 90, 90)
	d.font(famSans, "", sizeSmall)
	d.pdf.SetDrawColor(160, 160, 160)
	d.pdf.SetLineWidth(0.2)
	d.pdf.Line(d.left(), y-1, d.pageW-marginSide, y-1)
	left := d.revisionLabel() + " · generated " + d.dateTime(d.in.Generated)
	if d.preliminary() {
		left += " · not signed"
	}
	pageW := 30.0
	d.pdf.SetXY(d.left(), y)
	d.pdf.CellFormat(d.contentW()-pageW, 4, d.fit(left, d.contentW()-pageW-2), "", 0, "L", false, 0, "")
	n := itoa(d.pdf.PageNo())
	total := nbAlias
	if last {
		total = n
	}
	// Left-aligned in a fixed box: the alias is wider than the number it
	// stands for, and right alignment would leave a gap after replacement.
	d.pdf.SetXY(d.pageW-marginSide-pageW+6, y)
	d.pdf.CellFormat(pageW-6, 4, "Page "+n+" of "+total, "", 0, "L", false, 0, "")
	d.pdf.SetTextColor(0, 0, 0)
}

// nbAlias is the placeholder gofpdf replaces with the page count.
const nbAlias = "{nb}"

// heading starts a titled part. Level 0 starts a new page and names the
// running header; the title goes into the PDF outline either way.
func (d *doc) heading(level int, title string) {
	title = clean(title)
	switch level {
	case 0:
		d.section = title
		if d.pdf.PageNo() != 1 || d.y() > marginTop+1 {
			d.newPage()
		}
		d.font(famSans, "B", sizeH1)
		d.pdf.Bookmark(title, 0, -1)
		d.tocAdd(title)
		d.textLines(d.wrap(title, d.contentW()), sizeH1, "L")
		d.setY(d.y() + 2)
	default:
		// Keep a heading with the first lines under it.
		d.ensure(d.lineH(sizeH2) + 18)
		d.setY(d.y() + 2)
		d.font(famSans, "B", sizeH2)
		d.pdf.Bookmark(title, 1, -1)
		d.textLines(d.wrap(title, d.contentW()), sizeH2, "L")
		d.setY(d.y() + 1)
	}
	d.font(famSans, "", sizeBody)
}

// textLines prints lines already fitted to the content width at the left
// margin, breaking the page between lines when needed.
func (d *doc) textLines(lines []string, size float64, align string) {
	h := d.lineH(size)
	for _, l := range lines {
		d.ensure(h)
		d.pdf.SetX(d.left())
		d.pdf.CellFormat(d.contentW(), h, l, "", 1, align, false, 0, "")
	}
}

// keepLines is the longest paragraph para keeps on one page.
const keepLines = 4

// para prints wrapped body text in style ("", "B" or "I") and size.
func (d *doc) para(text string, style string, size float64) {
	d.font(famSans, style, size)
	lines := d.wrap(text, d.contentW()-1)
	// A short paragraph (a note, a caption) stays on one page: a sentence
	// broken across a page break reads as two.
	if len(lines) <= keepLines {
		d.ensure(float64(len(lines)) * d.lineH(size))
	}
	d.textLines(lines, size, "L")
	d.setY(d.y() + 1)
	d.font(famSans, "", sizeBody)
}

// bullets prints a list, each item wrapped under its own indent.
func (d *doc) bullets(items []string, size float64) {
	d.font(famSans, "", size)
	h := d.lineH(size)
	indent := 4.0
	for _, it := range items {
		lines := d.wrap(it, d.contentW()-indent-1)
		for i, l := range lines {
			d.ensure(h)
			if i == 0 {
				d.pdf.SetX(d.left())
				d.pdf.CellFormat(indent, h, "•", "", 0, "L", false, 0, "")
			}
			d.pdf.SetX(d.left() + indent)
			d.pdf.CellFormat(d.contentW()-indent, h, l, "", 1, "L", false, 0, "")
		}
	}
	d.setY(d.y() + 1)
	d.font(famSans, "", sizeBody)
}

// notes prints an item's notes, warnings and errors, each list under its
// own label, in small type.
func (d *doc) notes(groups ...noteGroup) {
	for _, g := range groups {
		if len(g.items) == 0 {
			continue
		}
		items := make([]string, len(g.items))
		for i, it := range g.items {
			items[i] = g.label + ": " + it
		}
		d.bullets(items, sizeSmall)
	}
}

type noteGroup struct {
	label string
	items []string
}

// column is one column of a table: its heading, its share of the width
// (weights are scaled to the content width), alignment ("L", "R", "C"), and
// whether long text is cut with an ellipsis (else it wraps onto more lines).
type column struct {
	head  string
	w     float64
	align string
	cut   bool
	mono  bool
}

// table lays out rows under a heading row that repeats on every page the
// table reaches.
type table struct {
	d      *doc
	cols   []column
	ws     []float64 // mm
	size   float64
	lineH  float64
	head   [][]string
	headH  float64
	pad    float64
	strong func(col int, text string) bool // bold cells, e.g. a deficient status
	rows   int
}

// newTable sizes the columns to the content width and draws the heading row.
func (d *doc) newTable(cols ...column) *table {
	t := &table{d: d, cols: cols, size: sizeTable, lineH: d.lineH(sizeTable), pad: 1}
	total := 0.0
	for _, c := range cols {
		total += c.w
	}
	d.font(famSans, "B", t.size)
	maxLines := 1
	for _, c := range cols {
		w := c.w / total * d.contentW()
		t.ws = append(t.ws, w)
		lines := d.wrap(c.head, w-2*t.pad)
		if len(lines) > 3 {
			lines = lines[:3]
		}
		t.head = append(t.head, lines)
		maxLines = max(maxLines, len(lines))
	}
	t.headH = float64(maxLines)*t.lineH + 1
	// The heading never ends a page alone.
	d.ensure(t.headH + 2*t.lineH)
	t.drawHead()
	return t
}

func (t *table) drawHead() {
	d := t.d
	pdf := d.pdf
	y := d.y()
	pdf.SetFillColor(232, 232, 232)
	pdf.Rect(d.left(), y, d.contentW(), t.headH, "F")
	d.font(famSans, "B", t.size)
	x := d.left()
	for i, lines := range t.head {
		for j, l := range lines {
			pdf.SetXY(x+t.pad, y+0.5+float64(j)*t.lineH)
			pdf.CellFormat(t.ws[i]-2*t.pad, t.lineH, l, "", 0, align(t.cols[i].align), false, 0, "")
		}
		x += t.ws[i]
	}
	pdf.SetDrawColor(120, 120, 120)
	pdf.SetLineWidth(0.3)
	pdf.Line(d.left(), y+t.headH, d.left()+d.contentW(), y+t.headH)
	d.setY(y + t.headH)
}

func align(a string) string {
	if a == "" {
		return "L"
	}
	return a
}

// row adds a row, starting a new page (and repeating the heading) when it
// does not fit. Missing cells print empty; a row taller than a page is cut.
func (t *table) row(cells ...string) {
	d := t.d
	pdf := d.pdf
	lines := make([][]string, len(t.cols))
	n := 1
	for i, c := range t.cols {
		text := ""
		if i < len(cells) {
			text = cells[i]
		}
		t.setFont(i, text)
		w := t.ws[i] - 2*t.pad
		if c.cut {
			lines[i] = []string{d.fit(text, w)}
		} else {
			lines[i] = d.wrap(text, w)
		}
		n = max(n, len(lines[i]))
	}
	maxLines := int((d.bottom() - marginTop - t.headH) / t.lineH)
	if n > maxLines {
		n = maxLines
	}
	h := float64(n)*t.lineH + 0.6
	if !d.room(h) {
		d.newPage()
		t.drawHead()
	}
	y := d.y()
	x := d.left()
	for i, ls := range lines {
		text := ""
		if i < len(cells) {
			text = cells[i]
		}
		t.setFont(i, text)
		if len(ls) > n {
			ls = ls[:n]
			ls[n-1] = d.fit(ls[n-1]+"…", t.ws[i]-2*t.pad)
		}
		for j, l := range ls {
			pdf.SetXY(x+t.pad, y+0.3+float64(j)*t.lineH)
			pdf.CellFormat(t.ws[i]-2*t.pad, t.lineH, l, "", 0, align(t.cols[i].align), false, 0, "")
		}
		x += t.ws[i]
	}
	pdf.SetDrawColor(200, 200, 200)
	pdf.SetLineWidth(0.15)
	pdf.Line(d.left(), y+h, d.left()+d.contentW(), y+h)
	d.setY(y + h)
	t.rows++
}

func (t *table) setFont(col int, text string) {
	fam, style := famSans, ""
	if t.cols[col].mono {
		fam = famMono
	}
	if t.strong != nil && t.strong(col, text) {
		style = "B"
	}
	t.d.font(fam, style, t.size)
}

// end leaves a little space under a table.
func (t *table) end() {
	t.d.setY(t.d.y() + 2)
	t.d.font(famSans, "", sizeBody)
}

// pairs prints label–value rows in two columns, values wrapped.
func (d *doc) pairs(labelW float64, kv ...[2]string) {
	d.font(famSans, "", sizeBody)
	h := d.lineH(sizeBody)
	for _, p := range kv {
		d.font(famSans, "", sizeBody)
		lines := d.wrap(p[1], d.contentW()-labelW-2)
		d.ensure(h * float64(min(len(lines), 3)))
		d.font(famSans, "B", sizeBody)
		d.pdf.SetX(d.left())
		d.pdf.CellFormat(labelW, h, d.fit(p[0], labelW-1), "", 0, "L", false, 0, "")
		d.font(famSans, "", sizeBody)
		for i, l := range lines {
			if i > 0 {
				d.ensure(h)
			}
			d.pdf.SetX(d.left() + labelW)
			d.pdf.CellFormat(d.contentW()-labelW, h, l, "", 1, "L", false, 0, "")
		}
	}
	d.setY(d.y() + 1)
}

func itoa(n int) string { return strconv.Itoa(n) }
