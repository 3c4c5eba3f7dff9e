package report

import (
	"strings"

	"fieldtab/schema"
)

// nameplate prints a system's nameplate and drive data as read off the
// equipment, in two compact columns; fields not given are left out, and a
// system with none prints nothing.
func (d *doc) nameplate(sys *schema.System) {
	u := d.u
	g := sys.Design
	num := func(v float64, dec int, unit string) string {
		if v <= 0 {
			return ""
		}
		return nu(u.n(v, dec), unit)
	}
	sheave := func(size string, pitch float64) string {
		p := ""
		if pitch > 0 {
			p = u.lengthU(pitch, true) + " pitch diameter"
		}
		return strings.Join(nonEmpty(strings.TrimSpace(size), p), ", ")
	}
	motorUnit, motorDec := "hp", 1
	if u.si {
		motorUnit = "kW"
	}
	phase := ""
	if g.Phase > 0 {
		phase = itoa(g.Phase)
	}
	kv := [][2]string{
		{"Make", g.Make}, {"Model", g.Model}, {"Serial", g.Serial},
		{"Motor make", g.MotorMake}, {"Motor power", num(g.MotorHP, motorDec, motorUnit)},
		{"Volts", num(g.Volts, 0, "V")}, {"Phase", phase}, {"Full-load amps", num(g.FLA, 1, "A")},
		{"Motor speed", num(g.MotorRPM, 0, "rpm")}, {"Fan speed", num(g.FanRPM, 0, "rpm")},
		{"Frame", g.MotorFrame}, {"Service factor", num(g.ServiceFactor, 2, "")},
		{"Fan sheave", sheave(g.FanSheaveSize, g.FanSheavePitch)}, {"Motor sheave", sheave(g.MotorSheaveSize, g.MotorSheavePitch)},
		{"Belts", g.Belts}, {"Fan bushing", g.FanBushing}, {"Motor bushing", g.MotorBushing}, {"Filters", g.Filters},
	}
	var given [][2]string
	for _, p := range kv {
		if strings.TrimSpace(p[1]) != "" {
			given = append(given, [2]string{p[0], clean(p[1])})
		}
	}
	if len(given) == 0 {
		return
	}
	d.heading(1, "Nameplate and drive")
	d.grid2(given)
}

// grid2 prints label–value pairs in two columns side by side, row by row; a
// long value wraps within its column rather than being cut.
func (d *doc) grid2(kv [][2]string) {
	colW := d.contentW() / 2
	labelW := 30.0
	h := d.lineH(sizeBody)
	for i := 0; i < len(kv); i += 2 {
		var vals [2][]string
		n := 1
		d.font(famSans, "", sizeBody)
		for c := 0; c < 2 && i+c < len(kv); c++ {
			vals[c] = d.wrap(kv[i+c][1], colW-labelW-3)
			n = max(n, len(vals[c]))
		}
		d.ensure(float64(n) * h)
		y := d.y()
		for c := 0; c < 2 && i+c < len(kv); c++ {
			x := d.left() + float64(c)*colW
			d.font(famSans, "B", sizeBody)
			d.pdf.SetXY(x, y)
			d.pdf.CellFormat(labelW, h, d.fit(kv[i+c][0], labelW-1), "", 0, "L", false, 0, "")
			d.font(famSans, "", sizeBody)
			for j, l := range vals[c] {
				d.pdf.SetXY(x+labelW, y+float64(j)*h)
				d.pdf.CellFormat(colW-labelW-2, h, l, "", 0, "L", false, 0, "")
			}
		}
		d.setY(y + float64(n)*h)
	}
	d.setY(d.y() + 1)
}
