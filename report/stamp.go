package report

// The preliminary stamp: every page of a report that is not the signed,
// stored revision says so at its top, where a photocopy or a single page
// torn from the file still shows it.

// stampText is the stamp's wording; tests look for it.
const stampText = "PRELIMINARY — not signed"

// preliminary is true unless this rendering is the revision being issued.
func (d *doc) preliminary() bool { return !d.in.Issued }

// stamp draws the boxed stamp centred in the top margin.
func (d *doc) stamp() {
	if !d.preliminary() {
		return
	}
	pdf := d.pdf
	d.font(famSans, "B", sizeBody)
	w := d.width(stampText) + 6
	x, y, h := (d.pageW-w)/2, 2.5, 5.5
	pdf.SetDrawColor(190, 30, 30)
	pdf.SetLineWidth(0.5)
	pdf.SetFillColor(255, 255, 255)
	pdf.Rect(x, y, w, h, "FD")
	pdf.SetTextColor(190, 30, 30)
	pdf.SetXY(x, y)
	pdf.CellFormat(w, h, stampText, "", 0, "C", false, 0, "")
	pdf.SetTextColor(0, 0, 0)
}

// jobLine is the job's name with its project number, for the running head.
func (d *doc) jobLine() string {
	j := d.s.Job
	if j.ProjectNumber == "" {
		return j.Name
	}
	return j.Name + " · project " + j.ProjectNumber
}
