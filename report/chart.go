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

	// Curves, clipped to the plot.
	pdf.ClipRect(x0, y0, pw, ph, false)
	d.font(famSans, "", sizeTiny)
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
		// Label each curve where it leaves the plot: at the top, or at the
		// right-hand edge.
		k := len(c.HumRatio) - 1
		for k > 0 && c.HumRatio[k] > wTop*0.96 {
			k--
		}
		if k > 0 && c.HumRatio[k] > wTop*0.04 {
			lbl := u.n(c.RelHum, 0) + " %"
			lx, ly := px(c.DryBulb[k])-d.width(lbl)-0.8, py(c.HumRatio[k])+2
			pdf.SetTextColor(110, 110, 110)
			pdf.Text(lx, ly, lbl)
			pdf.SetTextColor(0, 0, 0)
		}
	}

	// The process: entering to leaving, with an arrowhead at the leaving state.
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
	for _, s := range states {
		x, y := px(s.DryBulb), py(s.HumRatio)
		name := "L"
		if s == ct.Enter {
			name = "E"
			pdf.SetFillColor(0, 0, 0)
		} else {
			pdf.SetFillColor(255, 255, 255)
		}
		pdf.SetDrawColor(0, 0, 0)
		pdf.Circle(x, y, 1.1, "FD")
		d.font(famSans, "B", sizeSmall)
		// The label goes on the side away from the other state, off the line.
		lx := x + 1.6
		for _, o := range states {
			if o != s && o.DryBulb > s.DryBulb {
				lx = x - 1.6 - d.width(name)
			}
		}
		pdf.Text(lx, y-1.4, name)
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
		" (the site pressure); curves of constant relative humidity 10 % apart, saturation in bold. "
	for _, l := range legend {
		cap += l + ". "
	}
	d.para(cap, "I", sizeSmall)
}
