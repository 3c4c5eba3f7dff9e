package report

import "math"

// The contents page. Its entries' page numbers are known only once the
// parts after it are laid out, so Render reserves its pages after the cover
// (their number follows from the count of sections, known beforehand) and
// fills them in at the end: one pass, no page-number placeholders.

// tocEntry is a section: its title, the page it starts on, and the
// internal link the contents line points to.
type tocEntry struct {
	title string
	page  int
	link  int
}

const (
	tocLineH  = 5.2 // mm
	tocTitleH = 16  // mm under the top margin for the heading and its line of text
)

// tocSections counts the level-0 headings the parts will lay out, mirroring
// parts' own conditions, so the reserved pages hold them exactly.
func (d *doc) tocSections() int {
	n := 2 + len(d.r.Systems) + len(d.r.Traverses) + 4 // basis, findings; instruments, log, history, sign-off
	if len(d.r.Outlets) > 0 {
		n++
	}
	if len(d.r.WaterTests) > 0 {
		n++
	}
	return n
}

// tocPerPage is how many contents lines fit on the first and on later pages.
func (d *doc) tocPerPage() (first, later int) {
	avail := d.bottom() - marginTop
	return int((avail - tocTitleH) / tocLineH), int(avail / tocLineH)
}

// contentsReserve adds the contents pages, blank but for their furniture.
func (d *doc) contentsReserve() {
	d.section = "Contents"
	first, later := d.tocPerPage()
	pages := 1
	if n := d.tocSections(); n > first {
		pages += int(math.Ceil(float64(n-first) / float64(later)))
	}
	for range pages {
		d.newPage()
		d.tocPages = append(d.tocPages, d.pdf.PageNo())
	}
	d.pdf.Bookmark("Contents", 0, marginTop)
}

// tocAdd records a section starting here, and the target of its link.
func (d *doc) tocAdd(title string) {
	if d.tocPages == nil {
		return
	}
	link := d.pdf.AddLink()
	d.pdf.SetLink(link, d.y(), d.pdf.PageNo())
	d.toc = append(d.toc, tocEntry{title: title, page: d.pdf.PageNo(), link: link})
}

// contentsFill writes the entries onto the reserved pages, then returns to
// the last page so that the document closes where it ended.
func (d *doc) contentsFill() {
	if len(d.tocPages) == 0 {
		return
	}
	pdf := d.pdf
	last := pdf.PageNo()
	defer pdf.SetPage(last)
	first, later := d.tocPerPage()
	capacity := first + later*(len(d.tocPages)-1)
	lineH := tocLineH
	if len(d.toc) > capacity {
		// More sections than foreseen: close the lines up rather than lose any.
		lineH *= float64(capacity) / float64(len(d.toc))
	}
	// gofpdf skips a font it thinks is current; the reserved page's stream
	// ended in another state, so set it afresh.
	pdf.SetFont(famSans, "", 1)
	pageIdx := 0
	pdf.SetPage(d.tocPages[0])
	pdf.SetTextColor(0, 0, 0)
	d.setY(marginTop)
	d.font(famSans, "B", sizeH1)
	d.textLines([]string{"Contents"}, sizeH1, "L")
	d.font(famSans, "I", sizeSmall)
	pdf.SetX(d.left())
	pdf.CellFormat(d.contentW(), d.lineH(sizeSmall), "Each section with the page it starts on; in a PDF reader each line is a link.",
		"", 1, "L", false, 0, "")
	d.setY(marginTop + tocTitleH)
	numW := 14.0
	textW := d.contentW() - numW - 2
	pdf.SetDrawColor(170, 170, 170)
	pdf.SetLineWidth(0.1)
	for _, e := range d.toc {
		if d.y()+lineH > d.bottom()+0.01 && pageIdx+1 < len(d.tocPages) {
			pageIdx++
			pdf.SetPage(d.tocPages[pageIdx])
			pdf.SetFont(famSans, "", 1)
			pdf.SetTextColor(0, 0, 0)
			pdf.SetDrawColor(170, 170, 170)
			pdf.SetLineWidth(0.1)
			d.setY(marginTop)
		}
		y := d.y()
		d.font(famSans, "", sizeBody)
		title := d.fit(e.title, textW)
		pdf.SetXY(d.left(), y)
		pdf.CellFormat(textW, lineH, title, "", 0, "L", false, 0, "")
		// A dotted leader from the title to the number.
		tx := d.left() + d.width(title) + 2
		nx := d.left() + d.contentW() - numW
		base := y + lineH*0.7
		pdf.SetDashPattern([]float64{0.4, 1.2}, 0)
		if nx-tx > 4 {
			pdf.Line(tx, base, nx, base)
		}
		pdf.SetDashPattern([]float64{}, 0)
		pdf.SetXY(nx, y)
		pdf.CellFormat(numW, lineH, itoa(e.page), "", 0, "R", false, 0, "")
		pdf.Link(d.left(), y, d.contentW(), lineH, e.link)
		d.setY(y + lineH)
	}
}
