package report

import (
	"math"

	"github.com/jung-kurt/gofpdf"

	"fieldtab/measure"
	"fieldtab/schema"
)

// The psychrometric chart of a coil process, drawn as PDF paths: lines of
// constant relative humidity from measure.PsychroChart at the site pressure,
// dry bulb across and humidity ratio up the right side, with the test's
// entering and leaving states from its results.

// Chart size and inner margins, mm.
const (
	chartH      = 100.0
	chartLeft   = 4.0
	chartRight  = 16.0
	chartTop    = 5.0
	chartBottom = 10.0
)

// chartSpan picks a dry-bulb span around the states in whole steps (°F or °C),
// at least three steps wide, as the field app's chart does.
func chartSpan(dbs []float64, si bool) (low, high, step float64) {
	step, pad := 10.0, 10.0
	if si {
		step, pad = 5, 5
	}
	lo, hi := math.Inf(1), math.Inf(-1)
	for _, t := range dbs {
		lo, hi = math.Min(lo, t), math.Max(hi, t)
	}
	low = math.Floor((lo-pad)/step) * step
	high = math.Ceil((hi+pad)/step) * step
	if high-low < 3*step {
		high = low + 3*step
	}
	return low, high, step
}

// niceStep rounds a raw tick spacing up to 1, 2 or 5 × 10ⁿ.
func niceStep(raw float64) float64 {
	p := math.Pow(10, math.Floor(math.Log10(raw)))
	switch m := raw / p; {
	case m <= 1:
		return p
	case m <= 2:
		return 2 * p
	case m <= 5:
		return 5 * p
	}
	return 10 * p
}

func (d *doc) psychroChart(ct *schema.CapacityTestResult) {
	u := d.u
	var states []*schema.AirStateResult
	var dbs []float64
	for _, s := range []*schema.AirStateResult{ct.Enter, ct.Leave} {
		if s != nil {
			states = append(states, s)
			dbs = append(dbs, s.DryBulb)
		}
	}
	if len(states) == 0 {
		return
	}
	low, high, step := chartSpan(dbs, u.si)
	curves, err := measure.PsychroChart(d.unitSystem(), d.r.SitePressure, low, high)
	if err != nil || len(curves) == 0 {
		msg := "no curves"
		if err != nil {
			msg = err.Error()
		}
		d.para("Chart not drawn: "+msg, "I", sizeSmall)
		return
	}
	sat := curves[len(curves)-1].HumRatio
	wTop := math.Min(sat[len(sat)-1], 0.03)
	for _, s := range states {
		if s.HumRatio > wTop*0.95 {
			wTop = s.HumRatio * 1.08
		}
	}

	pdf := d.pdf
	capH := d.lineH(sizeSmall) * 3
	d.ensure(chartH + capH + 4)
	d.setY(d.y() + 2)
	x0, y0 := d.left()+chartLeft, d.y()+chartTop
	pw, ph := d.contentW()-chartLeft-chartRight, chartH-chartTop-chartBottom
	px := func(t float64) float64 { return x0 + (t-low)/(high-low)*pw }
	py := func(w float64) float64 { return y0 + ph - w/wTop*ph }

	// Grid and axes.
	pdf.SetLineWidth(0.1)
	pdf.SetDrawColor(215, 215, 215)
	d.font(famSans, "", sizeTiny)
	for t := low; t <= high+1e-9; t += step {
		pdf.Line(px(t), y0, px(t), y0+ph)
		s := u.n(t, 0)
		pdf.Text(px(t)-d.width(s)/2, y0+ph+3, s)
	}
	wStep := niceStep(wTop / 7)
	wDec := int(math.Max(0, -math.Floor(math.Log10(wStep))))
	for w := wStep; w < wTop; w += wStep {
		pdf.Line(x0, py(w), x0+pw, py(w))
		pdf.Text(x0+pw+1.2, py(w)+0.9, u.n(w, wDec))
	}
	pdf.SetDrawColor(90, 90, 90)
	pdf.SetLineWidth(0.25)
	pdf.Rect(x0, y0, pw, ph, "D")
	d.font(famSans, "", sizeSmall)
	xl := "Dry bulb (" + u.Temperature + ")"
	pdf.Text(x0+pw/2-d.width(xl)/2, y0+ph+7, xl)
	yl := "Humidity ratio (" + u.HumRatio + ")"
	pdf.Text(x0+pw+chartRight-d.width(yl)-0.5, y0-1.5, yl)

	// Obstacles for the labels: the axis title above the scale, and the
	// states with their letters, placed first so that no curve label covers them.
	lb := &labels{minX: x0 - 1, maxX: x0 + pw + chartRight, minY: y0 - chartTop, maxY: y0 + ph}
	d.font(famSans, "", sizeSmall)
	lb.add(x0+pw+chartRight-d.width(yl)-0.5, y0-1.5-d.lineH(sizeSmall)*0.75, d.width(yl), d.lineH(sizeSmall)*0.75)
	type mark struct {
		s      *schema.AirStateResult
		name   string
		x, y   float64
		lx, ly float64
	}
	var marks []mark
	d.font(famSans, "B", sizeSmall)
	for _, s := range states {
		m := mark{s: s, name: "L", x: px(s.DryBulb), y: py(s.HumRatio)}
		if s == ct.Enter {
			m.name = "E"
		}
		// The letter goes on the side away from the other state, off the line.
		m.lx, m.ly = m.x+1.6, m.y-1.4
		for _, o := range states {
			if o != s && o.DryBulb > s.DryBulb {
				m.lx = m.x - 1.6 - d.width(m.name)
			}
		}
		lb.add(m.x-1.3, m.y-1.3, 2.6, 2.6)
		lb.add(m.lx, m.ly-d.lineH(sizeSmall)*0.75, d.width(m.name), d.lineH(sizeSmall)*0.75)
		marks = append(marks, m)
	}

	// Curves, clipped to the plot: wet-bulb lines dashed under the relative
	// humidity curves.
	wbLines, wbErr := measure.PsychroWetBulbLines(d.unitSystem(), d.r.SitePressure, low, high)
	pdf.ClipRect(x0, y0, pw, ph, false)
	if wbErr == nil {
		pdf.SetDrawColor(120, 150, 190)
		pdf.SetLineWidth(0.12)
		pdf.SetDashPattern([]float64{1.2, 0.8}, 0)
		for _, l := range wbLines {
			pdf.MoveTo(px(l.DryBulb[0]), py(l.HumRatio[0]))
			for i := 1; i < len(l.DryBulb); i++ {
				pdf.LineTo(px(l.DryBulb[i]), py(l.HumRatio[i]))
			}
			pdf.DrawPath("D")
		}
		pdf.SetDashPattern([]float64{}, 0)
	}
	for _, c := range curves {
		if len(c.DryBulb) < 2 {
			continue
		}
		if c.RelHum >= 100 {
			pdf.SetDrawColor(40, 40, 40)
			pdf.SetLineWidth(0.4)
		} else {
			pdf.SetDrawColor(150, 150, 150)
			pdf.SetLineWidth(0.15)
		}
		pdf.MoveTo(px(c.DryBulb[0]), py(c.HumRatio[0]))
		for i := 1; i < len(c.DryBulb); i++ {
			pdf.LineTo(px(c.DryBulb[i]), py(c.HumRatio[i]))
		}
		pdf.DrawPath("D")
	}
	pdf.ClipEnd()

	// Curve labels: a relative humidity where its curve leaves the plot
	// (above the frame for the top edge, inside for the right-hand one), a
	// wet bulb just above saturation where its line starts. A label that
	// would touch another, a state or the axis title is left out.
	d.font(famSans, "", sizeTiny)
	th := d.lineH(sizeTiny) * 0.75
	// Each label on a white ground, so that no line runs through it.
	text := func(x, y float64, s string) {
		pdf.SetFillColor(255, 255, 255)
		pdf.Rect(x-0.3, y-th, d.width(s)+0.6, th+0.5, "F")
		pdf.Text(x, y, s)
	}
	pdf.SetTextColor(110, 110, 110)
	for i := len(curves) - 1; i >= 0; i-- {
		c := curves[i]
		if len(c.DryBulb) < 2 {
			continue
		}
		lbl := u.n(c.RelHum, 0) + " %"
		w := d.width(lbl)
		k := len(c.HumRatio) - 1
		if c.HumRatio[k] > wTop {
			// Leaves through the top: where it crosses wTop.
			j := 0
			for j < k && c.HumRatio[j+1] <= wTop {
				j++
			}
			t := c.DryBulb[j]
			if j < k {
				f := (wTop - c.HumRatio[j]) / (c.HumRatio[j+1] - c.HumRatio[j])
				t += f * (c.DryBulb[j+1] - c.DryBulb[j])
			}
			// Above the frame; else inside, just right of the curve.
			lx, ly := px(t)-w/2, y0-0.8
			if lb.place(lx, ly-th, w, th) {
				text(lx, ly, lbl)
			} else if lx, ly = px(t)+0.8, y0+th+0.8; lb.place(lx, ly-th, w, th) {
				text(lx, ly, lbl)
			}
			continue
		}
		if c.HumRatio[k] < wTop*0.04 {
			continue
		}
		lx, ly := x0+pw-w-0.8, py(c.HumRatio[k])+2
		if lb.place(lx, ly-th, w, th) {
			text(lx, ly, lbl)
		}
	}
	if wbErr == nil {
		pdf.SetTextColor(70, 100, 150)
		for _, l := range wbLines {
			if l.HumRatio[0] > wTop*0.97 {
				continue
			}
			lbl := u.n(l.WetBulb, 0)
			w := d.width(lbl)
			lx, ly := px(l.DryBulb[0])-w-0.6, py(l.HumRatio[0])-0.6
			if lx >= x0 && lb.place(lx, ly-th, w, th) {
				text(lx, ly, lbl)
			}
		}
	}
	pdf.SetTextColor(0, 0, 0)

	// The process: entering to leaving, with an arrowhead at the leaving state.
	pdf.ClipRect(x0, y0, pw, ph, false)
	if ct.Enter != nil && ct.Leave != nil {
		ex, ey := px(ct.Enter.DryBulb), py(ct.Enter.HumRatio)
		lx, ly := px(ct.Leave.DryBulb), py(ct.Leave.HumRatio)
		pdf.SetDrawColor(0, 0, 0)
		pdf.SetFillColor(0, 0, 0)
		pdf.SetLineWidth(0.5)
		pdf.Line(ex, ey, lx, ly)
		if l := math.Hypot(lx-ex, ly-ey); l > 3 {
			ux, uy := (lx-ex)/l, (ly-ey)/l
			bx, by := lx-ux*2.8, ly-uy*2.8
			pdf.Polygon([]gofpdf.PointType{{X: lx - ux*1.3, Y: ly - uy*1.3}, {X: bx - uy*1.2, Y: by + ux*1.2},
				{X: bx + uy*1.2, Y: by - ux*1.2}}, "F")
		}
	}
	pdf.SetLineWidth(0.3)
	for _, m := range marks {
		if m.s == ct.Enter {
			pdf.SetFillColor(0, 0, 0)
		} else {
			pdf.SetFillColor(255, 255, 255)
		}
		pdf.SetDrawColor(0, 0, 0)
		pdf.Circle(m.x, m.y, 1.1, "FD")
		d.font(famSans, "B", sizeSmall)
		pdf.Text(m.lx, m.ly, m.name)
	}
	pdf.ClipEnd()
	pdf.SetFillColor(255, 255, 255)

	d.setY(y0 + ph + chartBottom)
	var legend []string
	if s := ct.Enter; s != nil {
		legend = append(legend, "E, entering: "+u.tempU(s.DryBulb)+" dry bulb, "+u.tempU(s.WetBulb)+" wet bulb, "+
			u.humRatioU(s.HumRatio))
	}
	if s := ct.Leave; s != nil {
		legend = append(legend, "L, leaving: "+u.tempU(s.DryBulb)+" dry bulb, "+u.tempU(s.WetBulb)+" wet bulb, "+
			u.humRatioU(s.HumRatio))
	}
	cap := "Psychrometric chart of " + ct.Tag + " at " + d.u.barometricU(d.r.SitePressure) +
		" (the site pressure); curves of constant relative humidity 10 % apart, saturation in bold"
	if wbErr == nil {
		every := "5 °F"
		if u.si {
			every = "2 °C"
		}
		cap += "; dashed lines of constant wet bulb every " + every + ", each labelled where it meets saturation"
	}
	cap += ". "
	for _, l := range legend {
		cap += l + ". "
	}
	d.para(cap, "I", sizeSmall)
}

// labels keeps the boxes of what is already drawn on a chart, so that a
// label that would overlap one, or leave the chart, is not drawn.
type labels struct {
	minX, maxX, minY, maxY float64
	boxes                  [][4]float64 // x, y, w, h in mm
}

func (l *labels) add(x, y, w, h float64) { l.boxes = append(l.boxes, [4]float64{x, y, w, h}) }

// place adds the box and says true if it fits inside the chart and clears
// every box placed before by a small gap.
func (l *labels) place(x, y, w, h float64) bool {
	const gap = 0.5
	if x < l.minX || x+w > l.maxX || y < l.minY || y+h > l.maxY {
		return false
	}
	for _, b := range l.boxes {
		if x < b[0]+b[2]+gap && b[0] < x+w+gap && y < b[1]+b[3]+gap && b[1] < y+h+gap {
			return false
		}
	}
	l.add(x, y, w, h)
	return true
}
