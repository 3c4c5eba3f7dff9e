package report

import (
	"math"

	"fieldtab/schema"
)

// Drawing box of a traverse plane, mm.
const traverseBoxH = 78

// traverse lays out a traverse sheet: the plane, its figures, a drawing of
// the grid with each point's velocity, and the point readings.
func (d *doc) traverse(tr *schema.TraverseResult) {
	u := d.u
	tv := d.traverses[tr.ID]
	d.heading(0, "Traverse "+tr.Tag)
	kv := [][2]string{{"System", orDash(tr.SystemTag)}, {"Location", orDash(tr.Location)}}
	if tv != nil {
		kv = append(kv, [2]string{"Duct", ductText(u, tv)}, [2]string{"Method", methodText(tv)})
	}
	kv = append(kv,
		[2]string{"Points read", itoa(tr.PointsRead) + " of " + itoa(tr.PointsTotal) + ", " + label(tr.Stage) + " readings"},
		[2]string{"Air density", u.density(tr.Density) + ", " + densityText(tr.DensitySource)})
	if tr.Area != nil {
		kv = append(kv, [2]string{"Area", u.areaU(*tr.Area)})
	}
	if tr.MeanVelocity != nil {
		kv = append(kv, [2]string{"Mean velocity", u.velocityU(*tr.MeanVelocity)})
	}
	flowLabel := "Flow, " + label(tr.Stage)
	if tr.Flow != nil {
		kv = append(kv, [2]string{flowLabel, traverseFlowText(u, *tr.Flow, tr.FlowUncertainty, tr.Tolerance, tr.Density)})
	} else {
		kv = append(kv, [2]string{flowLabel, status(tr.Status)})
	}
	kv = append(kv, traverseStageRows(u, tr)...)
	if tv != nil {
		kv = append(kv, remarkPair(tv.Remarks)...)
	}
	d.pairs(32, kv...)
	if tr.UncertaintyNote != "" {
		d.para(tr.UncertaintyNote+".", "I", sizeSmall)
	}
	d.itemNotes(tr.Tag, nil, tr.Warnings, tr.Flags, tr.Errors)
	d.traverseConflicts(tr)
	d.remarks(tr.Tag, "", schema.SubjectTraverse, tr.ID)
	if tv != nil && len(tr.Points) > 0 {
		d.traverseDrawing(tv, tr)
	}
	d.traversePoints(tr)
}

func ductText(u units, t *schema.Traverse) string {
	if t.Shape == "round" {
		return "round, " + u.lengthU(t.Diameter, false) + " diameter"
	}
	return "rectangular, " + u.lengthU(t.Width, false) + " wide × " + u.lengthU(t.Height, false) + " high"
}

func methodText(t *schema.Traverse) string {
	m := label(t.Method)
	switch t.Method {
	case "log-tchebycheff":
		m = "log-Tchebycheff"
	case "equal-area":
		m = "equal area"
	}
	if t.Shape == "round" {
		return m + ", " + itoa(t.Diameters) + " diameters × " + itoa(t.PointsPerDiameter) + " points"
	}
	return m + ", " + itoa(t.PointsH) + " lines × " + itoa(t.PointsW) + " points"
}

func densityText(src string) string {
	switch src {
	case "measured":
		return "from the duct air's dry bulb and humidity at the site pressure"
	case "dry_air":
		return "for dry air at the duct's dry bulb (no humidity read)"
	case "standard":
		return "standard air (no duct temperature read)"
	}
	return label(src)
}

// portDir is the direction (x right, y down on the page) from the centre of
// a round duct to the port of diameter k of n, as the field app draws it:
// diameter 1 from the left-hand side, the next ones turning clockwise.
func portDir(k, n int) (x, y float64) {
	a := math.Pi + float64(k)*math.Pi/float64(n)
	return math.Cos(a), math.Sin(a)
}

// traverseDrawing draws the duct section to scale with each point where the
// probe tip goes and its velocity; ports are on the left-hand wall
// (rectangular) or where each diameter meets the wall (round).
func (d *doc) traverseDrawing(tv *schema.Traverse, tr *schema.TraverseResult) {
	u := d.u
	pdf := d.pdf
	d.ensure(traverseBoxH + 12)
	boxX, boxY := d.left()+14, d.y()+3
	boxW, boxH := d.contentW()-28, float64(traverseBoxH)

	type pt struct {
		x, y float64
		v    *float64
	}
	var pts []pt
	minGap := math.Inf(1)
	pdf.SetDrawColor(40, 40, 40)
	pdf.SetLineWidth(0.4)
	d.font(famSans, "", sizeTiny)
	switch {
	case tv.Shape == "round" && tv.Diameter > 0:
		sc := math.Min(boxW, boxH) / tv.Diameter
		r := tv.Diameter / 2 * sc
		cx, cy := boxX+boxW/2, boxY+boxH/2
		pdf.Circle(cx, cy, r, "D")
		n := max(tv.Diameters, 1)
		ppd := max(tv.PointsPerDiameter, 1)
		pdf.SetLineWidth(0.1)
		pdf.SetDrawColor(170, 170, 170)
		for k := range n {
			ux, uy := portDir(k, n)
			pdf.Line(cx+ux*r, cy+uy*r, cx-ux*r, cy-uy*r)
			// The port, where the probe enters.
			lbl := "port " + itoa(k+1)
			pdf.Text(cx+ux*(r+2.5)-d.width(lbl)*(0.5-0.5*ux), cy+uy*(r+2.5)+1-uy*0.5, lbl)
		}
		for i, p := range tr.Points {
			ux, uy := portDir(min(i/ppd, n-1), n)
			s := r - p.Depth*sc // from the centre towards the port; point 1 is nearest it
			pts = append(pts, pt{cx + ux*s, cy + uy*s, p.Velocity})
		}
	case tv.Width > 0 && tv.Height > 0:
		sc := math.Min(boxW/tv.Width, boxH/tv.Height)
		w, h := tv.Width*sc, tv.Height*sc
		x0, y0 := boxX+(boxW-w)/2, boxY+(boxH-h)/2
		pdf.Rect(x0, y0, w, h, "D")
		seen := map[float64]bool{}
		line := 0
		for _, p := range tr.Points {
			if p.PortOffset == nil {
				continue
			}
			y := y0 + *p.PortOffset*sc
			if !seen[*p.PortOffset] {
				seen[*p.PortOffset] = true
				line++
				pdf.SetFillColor(40, 40, 40)
				pdf.Rect(x0-1.6, y-0.6, 1.6, 1.2, "F")
				lbl := "line " + itoa(line)
				pdf.Text(x0-2.4-d.width(lbl), y+0.8, lbl)
			}
			pts = append(pts, pt{x0 + p.Depth*sc, y, p.Velocity})
		}
	default:
		return
	}
	for i := range pts {
		for j := i + 1; j < len(pts) && j < i+64; j++ {
			minGap = math.Min(minGap, math.Max(math.Abs(pts[i].x-pts[j].x), math.Abs(pts[i].y-pts[j].y)*2))
		}
	}
	// Labels shrink with the spacing of the points, and go when even the
	// smallest type would overlap: the table below has every velocity.
	size := sizeTiny
	d.font(famSans, "", size)
	sample := u.velocity(8888)
	for size > 3.5 && d.width(sample) > minGap*0.92 {
		size -= 0.5
		d.font(famSans, "", size)
	}
	labels := d.width(sample) <= minGap*0.92
	for _, p := range pts {
		if p.v != nil {
			pdf.SetFillColor(0, 0, 0)
			pdf.Circle(p.x, p.y, 0.6, "F")
		} else {
			pdf.SetDrawColor(0, 0, 0)
			pdf.SetLineWidth(0.2)
			pdf.Circle(p.x, p.y, 0.6, "D")
		}
		if labels {
			s := "·"
			if p.v != nil {
				s = u.velocity(*p.v)
			}
			pdf.Text(p.x-d.width(s)/2, p.y+d.lineH(size)+0.2, s)
		}
	}
	pdf.SetFillColor(255, 255, 255)
	d.setY(boxY + boxH + 3)
	cap := "Section through the duct at the traverse plane, to scale. Dots are probe positions; "
	if labels {
		cap += "the figure under each is its velocity in " + u.Velocity + "; "
	} else {
		cap += "the points are too close to label, so the velocities are in the table; "
	}
	cap += "open circles are points not read."
	if tv.Shape != "round" {
		cap += " Ports are on the left-hand wall, line 1 at the top; depths run across the width from it."
	} else {
		cap += " Port 1 is on the left, the others clockwise from it, as the field app shows them; point 1 of each " +
			"diameter is nearest its port."
	}
	d.para(cap, "I", sizeSmall)
}

// traversePoints lists the points in two side-by-side halves.
func (d *doc) traversePoints(tr *schema.TraverseResult) {
	u := d.u
	if len(tr.Points) == 0 {
		return
	}
	rect := false
	for _, p := range tr.Points {
		if p.PortOffset != nil {
			rect = true
			break
		}
	}
	// The reading column carries its unit in the heading when every point
	// was read the same way, else beside each value.
	kinds := map[string]bool{}
	for _, p := range tr.Points {
		if p.Value != nil {
			kinds[p.Quantity] = true
		}
	}
	readHead, mixed := "Reading", len(kinds) > 1
	switch {
	case mixed:
	case kinds["vp"]:
		readHead = "VP (" + u.DuctPressure + ")"
	case kinds["velocity"]:
		readHead = "Velocity read (" + u.Velocity + ")"
	}
	cols := func() []column {
		c := []column{{head: "Point", w: 1.6}, {head: "Depth (" + u.Length + ")", w: 0.9, align: "R"}}
		if rect {
			c = append(c, column{head: "Port at (" + u.Length + ")", w: 0.9, align: "R"})
		}
		return append(c, column{head: readHead, w: 1.1, align: "R"}, column{head: "Velocity (" + u.Velocity + ")", w: 1, align: "R"})
	}
	all := append(cols(), column{head: "", w: 0.2})
	all = append(all, cols()...)
	t := d.newTable(all...)
	cells := func(p schema.TraversePointValue) []string {
		c := []string{p.Label, u.length(p.Depth, false)}
		if rect {
			c = append(c, ptr(p.PortOffset, func(v float64) string { return u.length(v, false) }))
		}
		read := "not read"
		if p.Conflict {
			read = "conflict"
		}
		if p.Value != nil {
			switch {
			case p.Quantity == "vp" && mixed:
				read = "VP " + nu(u.vp(*p.Value), u.DuctPressure)
			case p.Quantity == "vp":
				read = u.vp(*p.Value)
			case mixed:
				read = u.velocityU(*p.Value)
			default:
				read = u.velocity(*p.Value)
			}
		}
		return append(c, read, ptr(p.Velocity, u.velocity))
	}
	half := (len(tr.Points) + 1) / 2
	for i := range half {
		row := cells(tr.Points[i])
		row = append(row, "")
		if j := i + half; j < len(tr.Points) {
			row = append(row, cells(tr.Points[j])...)
		}
		t.row(row...)
	}
	t.end()
}
