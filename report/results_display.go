package report

import (
	"strings"

	"fieldtab/schema"
)

// tolStatus is a tolerance status in words; an undetermined one says on which
// side the reading lies ("undetermined: high, within the instrument's
// accuracy of the limit"), short for a table column.
func tolStatus(tl *schema.ToleranceCheck, short bool) string {
	if tl == nil {
		return dash
	}
	s := status(tl.Status)
	if tl.Status != "undetermined" || tl.Side == "" {
		return s
	}
	if short {
		side := tl.Side
		if side == "within" {
			side = "inside"
		}
		return s + ", " + side
	}
	return s + ": " + tl.SideText
}

// withPM is a figure with its ±, or without one when the instrument's
// accuracy is not on record (never ± 0).
func withPM(fig string, tl *schema.ToleranceCheck, unc func(float64) string) string {
	switch {
	case tl == nil:
		return fig
	case tl.UncertaintyUnknown && tl.Uncertainty == 0:
		return fig + " (no ±: no instrument accuracy on record)"
	case tl.UncertaintyUnknown:
		return pm(fig, unc(tl.Uncertainty)) + " (part: some readings have no instrument accuracy)"
	}
	return pm(fig, unc(tl.Uncertainty))
}

// traverseFlowText is a traverse stage's flow with its ±, % of design, band
// and status.
func traverseFlowText(u units, flow float64, unc *float64, tl *schema.ToleranceCheck, rho float64) string {
	s := u.airU(flow)
	if unc != nil {
		s = pm(u.air(flow), u.airU(*unc))
		if tl != nil && tl.UncertaintyUnknown {
			s += " (method only for points with no instrument accuracy)"
		}
	}
	// Actual flow at the plane, set against a design figure given as scheduled.
	s += " at the plane's density (" + u.density(rho) + ")"
	if tl != nil {
		s += ": " + u.pct(tl.PercentOfDesign) + " of the system's design airflow (as scheduled), band " + u.air(tl.Low) + "–" + u.airU(tl.High) +
			", " + tolStatus(tl, false)
	}
	return s
}

// traverseStageRows are the key-value rows of the as-found stage beside the
// final one.
func traverseStageRows(u units, tr *schema.TraverseResult) [][2]string {
	a := tr.AsFound
	if a == nil || tr.Stage == a.Stage {
		if tr.Stage == schema.StageAsFound {
			return [][2]string{{"Flow, final", "not read yet: the figures above are as found"}}
		}
		return nil
	}
	read := itoa(a.PointsRead) + " of " + itoa(a.PointsTotal) + " points"
	if a.Flow == nil {
		return [][2]string{{"Flow, as found", status(a.Status) + " (" + read + ")"}}
	}
	rows := [][2]string{{"Flow, as found", traverseFlowText(u, *a.Flow, a.FlowUncertainty, a.Tolerance, tr.Density)}}
	if a.MeanVelocity != nil {
		rows = append(rows, [2]string{"Mean velocity, as found", u.velocityU(*a.MeanVelocity) + " (" + read + ")"})
	}
	return rows
}

// traverseConflicts lists points with two readings that each count.
func (d *doc) traverseConflicts(tr *schema.TraverseResult) {
	if len(tr.Conflicts) == 0 {
		return
	}
	u := d.u
	d.heading(1, "Conflicting readings: for the lead to resolve")
	d.para("These points have two or more readings of one stage, none correcting another (two devices, or an entry "+
		"sent twice). No flow is computed for that stage until the lead corrects or voids all but one.", "", sizeBody)
	t := d.newTable(column{head: "Point", w: 1.6}, column{head: "Stage", w: 0.8}, column{head: "Reading", w: 1.2, align: "R"},
		column{head: "Taken by", w: 1.6}, column{head: "Taken at", w: 1.3}, column{head: "Reading id", w: 1.2, mono: true})
	for _, cf := range tr.Conflicts {
		for _, r := range cf.Readings {
			v := dash
			if r.Value != nil {
				if r.Quantity == "vp" {
					v = nu(u.vp(*r.Value), r.Unit)
				} else {
					v = u.velocityU(*r.Value)
				}
			}
			who := orDash(r.Technician)
			if r.DeviceID != "" {
				who += ", device " + shortID(r.DeviceID)
			}
			t.row(cf.Label, label(cf.Stage), v, who, d.dateTime(r.TakenAt), shortID(r.ReadingID))
		}
	}
	t.end()
}

func shortID(id string) string {
	if len(id) > 8 {
		return id[:8]
	}
	return id
}

// motorRemark is the fan and motor table's remark on a figure as a
// percentage of design.
func pctOfDesign(u units, p *float64) string {
	if p == nil {
		return ""
	}
	return u.pct(*p) + " of design"
}

// heatingWaterTests names the water tests stated as heating, for the
// hot-water caution.
func (d *doc) heatingWaterTests() []string {
	var tags []string
	for _, w := range d.r.WaterTests {
		if w.Mode == "heating" {
			tags = append(tags, w.Tag)
		}
	}
	return tags
}

// waterProcessText is what the water shows beside what the test says.
func waterProcessText(w *schema.WaterTestResult) string {
	mode := w.Mode
	if mode == "" {
		mode = schema.WaterModeNotGiven
	}
	if w.Process == "" {
		return mode
	}
	if w.Process == w.Mode {
		return mode
	}
	return mode + "; the water shows " + w.Process
}

func joinTags(tags []string) string { return strings.Join(tags, ", ") }
