package measure

import (
	"embed"
	"fmt"
	"math"
	"strconv"
	"strings"
)

// Glycol solution properties from the ASHRAE Handbook—Fundamentals tables for
// secondary coolants (propylene and ethylene glycol in water, by volume %),
// digitised in the SecCool data of the CoolProp project (MIT licence) and kept
// byte for byte in glycol/*.tsv. A cell of -1 means no data (frozen).

//go:embed glycol/*.tsv
var glycolFiles embed.FS

// glycolGrid is one property table: vals[i][j] at temps[i] (°C) and concs[j]
// (volume %), with glycolNoData where the table has no value.
type glycolGrid struct {
	temps, concs []float64
	vals         [][]float64
}

const glycolNoData = -1

// glycolFreeze is a freezing-point curve: tf[i] (°C) at conc[i] (volume %).
type glycolFreeze struct {
	conc, tf []float64
}

type glycolData struct {
	name        string // "propylene glycol"
	density, cp glycolGrid
	freeze      glycolFreeze
}

var (
	glycolPG = mustLoadGlycol("pg", "propylene glycol")
	glycolEG = mustLoadGlycol("eg", "ethylene glycol")
)

// mustLoadGlycol parses the embedded tables. They are compiled in, so a parse
// failure is a build defect and panics at init (the tests load them too).
func mustLoadGlycol(prefix, name string) *glycolData {
	d := &glycolData{name: name}
	var err error
	if d.density, err = loadGlycolGrid(prefix + "_density.tsv"); err != nil {
		panic(err)
	}
	if d.cp, err = loadGlycolGrid(prefix + "_specific_heat.tsv"); err != nil {
		panic(err)
	}
	if d.freeze, err = loadGlycolFreeze(prefix + "_freeze_point.tsv"); err != nil {
		panic(err)
	}
	if !sameFloats(d.density.temps, d.cp.temps) || !sameFloats(d.density.concs, d.cp.concs) {
		panic("glycol: " + prefix + " density and specific heat grids differ")
	}
	return d
}

func readTSV(file string) ([][]float64, []string, error) {
	b, err := glycolFiles.ReadFile("glycol/" + file)
	if err != nil {
		return nil, nil, err
	}
	lines := strings.Split(strings.TrimRight(string(b), "\n"), "\n")
	header := strings.Split(strings.TrimRight(lines[0], "\r"), "\t")
	var rows [][]float64
	for n, line := range lines[1:] {
		fields := strings.Split(strings.TrimRight(line, "\r"), "\t")
		if len(fields) != len(header) {
			return nil, nil, fmt.Errorf("glycol/%s line %d: %d fields, want %d", file, n+2, len(fields), len(header))
		}
		row := make([]float64, len(fields))
		for i, f := range fields {
			if row[i], err = strconv.ParseFloat(f, 64); err != nil {
				return nil, nil, fmt.Errorf("glycol/%s line %d: %w", file, n+2, err)
			}
		}
		rows = append(rows, row)
	}
	return rows, header, nil
}

func loadGlycolGrid(file string) (glycolGrid, error) {
	rows, header, err := readTSV(file)
	if err != nil {
		return glycolGrid{}, err
	}
	var g glycolGrid
	for _, h := range header[1:] {
		c, err := strconv.ParseFloat(h, 64)
		if err != nil {
			return glycolGrid{}, fmt.Errorf("glycol/%s header: %w", file, err)
		}
		g.concs = append(g.concs, c)
	}
	for _, r := range rows {
		g.temps = append(g.temps, r[0])
		g.vals = append(g.vals, r[1:])
	}
	if len(g.temps) < 2 || len(g.concs) < 2 || !ascending(g.temps) || !ascending(g.concs) {
		return glycolGrid{}, fmt.Errorf("glycol/%s: axes must ascend with at least two points", file)
	}
	return g, nil
}

func loadGlycolFreeze(file string) (glycolFreeze, error) {
	rows, _, err := readTSV(file)
	if err != nil {
		return glycolFreeze{}, err
	}
	var f glycolFreeze
	for _, r := range rows {
		f.conc = append(f.conc, r[0])
		f.tf = append(f.tf, r[1])
	}
	if len(f.conc) < 2 || !ascending(f.conc) {
		return glycolFreeze{}, fmt.Errorf("glycol/%s: concentrations must ascend", file)
	}
	return f, nil
}

func ascending(x []float64) bool {
	for i := 1; i < len(x); i++ {
		if !(x[i] > x[i-1]) {
			return false
		}
	}
	return true
}

func sameFloats(a, b []float64) bool {
	if len(a) != len(b) {
		return false
	}
	for i := range a {
		if a[i] != b[i] {
			return false
		}
	}
	return true
}

// bracket returns i and the fraction w of the way from x[i] to x[i+1] for v in
// [x[0], x[last]]. A v on a grid point gets w = 0, so the next point is unused.
func bracket(x []float64, v float64) (int, float64) {
	last := len(x) - 1
	if v >= x[last] {
		return last - 1, 1
	}
	i := 0
	for i < last-1 && v >= x[i+1] {
		i++
	}
	return i, (v - x[i]) / (x[i+1] - x[i])
}

// at interpolates bilinearly at tC (°C) and conc (%), both inside the axes.
// ok is false when a cell the result depends on has no data.
func (g *glycolGrid) at(tC, conc float64) (v float64, ok bool) {
	i, wt := bracket(g.temps, tC)
	j, wc := bracket(g.concs, conc)
	for _, c := range [4]struct {
		di, dj int
		w      float64
	}{
		{0, 0, (1 - wt) * (1 - wc)},
		{0, 1, (1 - wt) * wc},
		{1, 0, wt * (1 - wc)},
		{1, 1, wt * wc},
	} {
		if c.w == 0 {
			continue
		}
		cell := g.vals[i+c.di][j+c.dj]
		if cell == glycolNoData {
			return 0, false
		}
		v += c.w * cell
	}
	return v, true
}

// lowestRow is the lowest table temperature (°C) from which every row up to the
// top can be interpolated at conc; ok is false if even the top row cannot.
func (g *glycolGrid) lowestRow(conc float64) (tC float64, ok bool) {
	for i := len(g.temps) - 1; i >= 0; i-- {
		if _, rowOK := g.at(g.temps[i], conc); !rowOK {
			break
		}
		tC, ok = g.temps[i], true
	}
	return tC, ok
}

// freezePoint interpolates the freezing point (°C) at conc (%); ok is false past
// the ends of the freeze table.
func (f *glycolFreeze) freezePoint(conc float64) (tC float64, ok bool) {
	if conc < f.conc[0] || conc > f.conc[len(f.conc)-1] {
		return 0, false
	}
	i, w := bracket(f.conc, conc)
	return f.tf[i] + w*(f.tf[i+1]-f.tf[i]), true
}

// checkConc returns an *InputError for "concentration" outside the tables.
func (d *glycolData) checkConc(conc float64) error {
	return checkRange("concentration", conc, d.density.concs[0], d.density.concs[len(d.density.concs)-1], "%")
}

// tempRange is the temperature range (°C) the tables cover at conc without
// extrapolating: from the highest of the freezing point and the lowest row
// where the density and specific heat tables have data, to the top row. The
// freeze table stops short of 60 % for ethylene glycol; there the -1 cells of
// the property tables, which mark frozen states, are the only lower bound.
func (d *glycolData) tempRange(conc float64) (lo, hi, freeze float64, freezeKnown bool, err error) {
	if err := d.checkConc(conc); err != nil {
		return 0, 0, 0, false, err
	}
	hi = d.density.temps[len(d.density.temps)-1]
	lo = math.Inf(-1)
	for _, g := range []*glycolGrid{&d.density, &d.cp} {
		r, ok := g.lowestRow(conc)
		if !ok {
			return 0, 0, 0, false, invalid("concentration", conc, "%", "the "+d.name+" tables have no data at this concentration")
		}
		lo = math.Max(lo, r)
	}
	freeze, freezeKnown = d.freeze.freezePoint(conc)
	if freezeKnown {
		lo = math.Max(lo, freeze)
	}
	return lo, hi, freeze, freezeKnown, nil
}

// snapC rounds a °C value to 1e-9 so that DegC(-10).C() lands on the -10 °C row.
func snapC(c float64) float64 { return math.Round(c*1e9) / 1e9 }

// checkTemp returns an *InputError named input when tC (°C) is outside the
// range the tables cover at conc, or below the solution's freezing point.
func (d *glycolData) checkTemp(input string, conc, tC float64) error {
	lo, hi, freeze, freezeKnown, err := d.tempRange(conc)
	if err != nil {
		return err
	}
	if s := snapC(tC); math.IsNaN(s) || math.IsInf(s, 0) || s < lo || s > hi {
		e := &InputError{Input: input, Value: tC, Unit: "°C", Min: lo, Max: hi}
		if freezeKnown && s < freeze {
			e.Reason = fmt.Sprintf("below the freezing point of %s %% %s (%s °C); accepted range %s",
				formatNum(conc), d.name, formatNum(freeze), e.RangeText())
		} else {
			e.Reason = fmt.Sprintf("outside the %s tables at %s %%, which cover %s without extrapolating",
				d.name, formatNum(conc), e.RangeText())
		}
		return e
	}
	return nil
}

// props interpolates density (kg/m³) and specific heat (J/(kg·K)) at conc (%)
// and tC (°C), refusing to extrapolate.
func (d *glycolData) props(conc, tC float64) (Density, SpecificHeat, error) {
	if err := d.checkTemp("temperature", conc, tC); err != nil {
		return 0, 0, err
	}
	tC = snapC(tC)
	rho, ok1 := d.density.at(tC, conc)
	cp, ok2 := d.cp.at(tC, conc)
	if !ok1 || !ok2 { // unreachable: tempRange already excluded missing cells
		return 0, 0, invalid("temperature", tC, "°C", "the "+d.name+" tables have no data here")
	}
	return Density(rho), SpecificHeat(cp), nil
}
