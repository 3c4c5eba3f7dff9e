package measure

import (
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"math"
	"sort"
	"strconv"
	"strings"
)

// PerfRow is one point of a manufacturer's cooling performance table: at an
// entering-air wet bulb, an outdoor (condenser entering) dry bulb and an airflow,
// the unit's total and sensible capacity.
type PerfRow struct {
	EnterWB, OutdoorDB Temperature
	Flow               VolumeFlow
	Total, Sensible    Power
}

// PerfRanges is the span of a performance table's three axes: Expected refuses
// any point outside it.
type PerfRanges struct {
	EnterWBMin, EnterWBMax     Temperature
	OutdoorDBMin, OutdoorDBMax Temperature
	FlowMin, FlowMax           VolumeFlow
}

// PerfTable is a manufacturer's performance table on a full rectangular grid of
// entering wet bulb × outdoor dry bulb × airflow, read with trilinear
// interpolation and never extrapolated. It is immutable once built and safe for
// concurrent use.
type PerfTable struct {
	units           UnitSystem
	ewb, odb, flow  []float64 // sorted distinct axis values: K, K, m³/s
	total, sensible []float64 // W, at index (i·len(odb) + j)·len(flow) + k
}

// PerfTableError reports a problem with a performance table: where it is (a CSV
// line and column, or a row of NewPerfTable's slice, 1-based) and what it is. Err
// is often an *InputError, reachable with errors.As.
type PerfTableError struct {
	Line   int    // CSV line, 1-based; 0 when not from CSV
	Row    int    // index+1 into NewPerfTable's rows; 0 when from CSV or not row-specific
	Column string // CSV column header as given, lower case; "" when not column-specific
	Err    error
}

// Error renders the position, then the problem: "line 7, column total_mbh: ...".
func (e *PerfTableError) Error() string {
	var where []string
	switch {
	case e.Line > 0:
		where = append(where, "line "+strconv.Itoa(e.Line))
	case e.Row > 0:
		where = append(where, "row "+strconv.Itoa(e.Row))
	}
	if e.Column != "" {
		where = append(where, "column "+e.Column)
	}
	if len(where) == 0 {
		return "performance table: " + e.Err.Error()
	}
	return strings.Join(where, ", ") + ": " + e.Err.Error()
}

// Unwrap returns the underlying error, often an *InputError.
func (e *PerfTableError) Unwrap() error { return e.Err }

// perfMaxRows bounds a table's size; real tables have tens to hundreds of rows.
const perfMaxRows = 100000

// perfQty is one of the five quantities of a row, with its accepted SI range.
type perfQty struct {
	name     string
	min, max float64 // SI
	positive bool    // min is exclusive
}

// Sanity limits on table values, in SI: wide enough for any packaged unit's
// published table (EWB −10 to 50 °C, ODB −40 to 60 °C).
var (
	perfEWB      = perfQty{name: "ewb", min: 263.15, max: 323.15}
	perfODB      = perfQty{name: "odb", min: 233.15, max: 333.15}
	perfFlow     = perfQty{name: "flow", min: 0, max: 1000, positive: true}
	perfTotal    = perfQty{name: "total", min: 0, max: 1e9, positive: true}
	perfSensible = perfQty{name: "sensible", min: 0, max: 1e9}
)

// perfUnit is a unit a table column can be given in.
type perfUnit struct {
	label  string // as shown in messages
	toSI   func(float64) float64
	fromSI func(float64) float64
}

var (
	perfDegF  = perfUnit{"°F", func(v float64) float64 { return float64(DegF(v)) }, func(v float64) float64 { return Temperature(v).F() }}
	perfDegC  = perfUnit{"°C", func(v float64) float64 { return float64(DegC(v)) }, func(v float64) float64 { return Temperature(v).C() }}
	perfCFM   = perfUnit{"cfm", func(v float64) float64 { return float64(CFM(v)) }, func(v float64) float64 { return VolumeFlow(v).CFM() }}
	perfLps   = perfUnit{"L/s", func(v float64) float64 { return float64(LitersPerSecond(v)) }, func(v float64) float64 { return VolumeFlow(v).Lps() }}
	perfM3h   = perfUnit{"m³/h", func(v float64) float64 { return float64(CubicMetersPerHour(v)) }, func(v float64) float64 { return VolumeFlow(v).M3h() }}
	perfBtuh  = perfUnit{"Btu/h", func(v float64) float64 { return float64(BtuPerHour(v)) }, func(v float64) float64 { return Power(v).BtuH() }}
	perfMBh   = perfUnit{"MBh", func(v float64) float64 { return float64(BtuPerHour(v * 1000)) }, func(v float64) float64 { return Power(v).BtuH() / 1000 }}
	perfKW    = perfUnit{"kW", func(v float64) float64 { return float64(Kilowatts(v)) }, func(v float64) float64 { return Power(v).KW() }}
	perfW     = perfUnit{"W", func(v float64) float64 { return v }, func(v float64) float64 { return v }}
	perfTonsU = perfUnit{"tons", func(v float64) float64 { return float64(Tons(v)) }, func(v float64) float64 { return Power(v).Tons() }}
)

// check validates an SI value, reporting it in unit u.
func (q perfQty) check(si float64, u perfUnit) error {
	v := u.fromSI(si)
	if q.positive {
		if err := checkPositive(q.name, v, u.label); err != nil {
			return err
		}
	}
	return checkRange(q.name, v, u.fromSI(q.min), u.fromSI(q.max), u.label)
}

// perfUnitsFor returns the display units of a table in unit system s: °F, cfm,
// Btu/h in IP; °C, L/s, W in SI.
func perfUnitsFor(s UnitSystem) (temp, flow, power perfUnit) {
	if s == SI {
		return perfDegC, perfLps, perfW
	}
	return perfDegF, perfCFM, perfBtuh
}

// NewPerfTable builds an IP performance table (ranges and messages in °F, cfm and
// Btu/h) from rows that form a full rectangular grid; see NewPerfTableIn.
func NewPerfTable(rows []PerfRow) (*PerfTable, error) {
	return NewPerfTableIn(IP, rows)
}

// NewPerfTableIn builds a performance table whose ranges and messages are in unit
// system u. The rows must hold every combination of their distinct entering wet
// bulbs × outdoor dry bulbs × airflows exactly once, with at least two distinct
// values on each axis. Values that agree to 1 part in 10⁹ count as the same.
// A sensible capacity above total is accepted (manufacturers print sensible =
// total for a dry coil); Expected caps it at total.
//
// Errors: *PerfTableError naming the row and wrapping an *InputError for a value
// outside ewb −10 to 50 °C, odb −40 to 60 °C, flow above 0 to 1000 m³/s, total
// above 0 and sensible 0 to 1e9 W; or naming the duplicate or missing
// combination.
func NewPerfTableIn(u UnitSystem, rows []PerfRow) (*PerfTable, error) {
	if err := u.valid(); err != nil {
		return nil, err
	}
	return newPerfTable(u, rows, nil)
}

// newPerfTable builds the table; lines, when not nil, gives each row's CSV line.
func newPerfTable(u UnitSystem, rows []PerfRow, lines []int) (*PerfTable, error) {
	at := func(i int, err error) error {
		if lines != nil {
			return &PerfTableError{Line: lines[i], Err: err}
		}
		return &PerfTableError{Row: i + 1, Err: err}
	}
	if len(rows) == 0 {
		return nil, &PerfTableError{Err: errors.New("no rows")}
	}
	if len(rows) > perfMaxRows {
		return nil, &PerfTableError{Err: fmt.Errorf("%d rows, more than the %d accepted", len(rows), perfMaxRows)}
	}
	tu, fu, pu := perfUnitsFor(u)
	for i, r := range rows {
		for _, c := range []struct {
			q  perfQty
			v  float64
			un perfUnit
		}{
			{perfEWB, float64(r.EnterWB), tu},
			{perfODB, float64(r.OutdoorDB), tu},
			{perfFlow, float64(r.Flow), fu},
			{perfTotal, float64(r.Total), pu},
			{perfSensible, float64(r.Sensible), pu},
		} {
			if err := c.q.check(c.v, c.un); err != nil {
				return nil, at(i, err)
			}
		}
	}

	t := &PerfTable{units: u}
	t.ewb = perfAxis(rows, func(r PerfRow) float64 { return float64(r.EnterWB) })
	t.odb = perfAxis(rows, func(r PerfRow) float64 { return float64(r.OutdoorDB) })
	t.flow = perfAxis(rows, func(r PerfRow) float64 { return float64(r.Flow) })
	for _, a := range []struct {
		name string
		vals []float64
		un   perfUnit
	}{{"ewb", t.ewb, tu}, {"odb", t.odb, tu}, {"flow", t.flow, fu}} {
		if len(a.vals) < 2 {
			return nil, &PerfTableError{Err: fmt.Errorf("only one %s value (%s %s); interpolation needs at least two",
				a.name, formatNum(a.un.fromSI(a.vals[0])), a.un.label)}
		}
	}

	nj, nk := len(t.odb), len(t.flow)
	cells := len(t.ewb) * nj * nk // each axis ≤ perfMaxRows values, so no overflow
	seen := make(map[int]int, len(rows))
	for n, r := range rows {
		key := (perfIndex(t.ewb, float64(r.EnterWB))*nj+perfIndex(t.odb, float64(r.OutdoorDB)))*nk +
			perfIndex(t.flow, float64(r.Flow))
		if first, dup := seen[key]; dup {
			where := "row " + strconv.Itoa(first+1)
			if lines != nil {
				where = "line " + strconv.Itoa(lines[first])
			}
			return nil, at(n, fmt.Errorf("duplicate of %s: %s", where, t.pointText(r.EnterWB, r.OutdoorDB, r.Flow)))
		}
		seen[key] = n
	}
	if len(seen) != cells {
		// Fewer rows than cells: a missing cell turns up within len(rows)+1 steps.
		for key := 0; key < cells; key++ {
			if _, ok := seen[key]; !ok {
				i, j, k := key/(nj*nk), key/nk%nj, key%nk
				return nil, &PerfTableError{Err: fmt.Errorf("missing the row for %s",
					t.pointText(Temperature(t.ewb[i]), Temperature(t.odb[j]), VolumeFlow(t.flow[k])))}
			}
		}
	}
	t.total = make([]float64, cells)
	t.sensible = make([]float64, cells)
	for key, n := range seen {
		t.total[key] = float64(rows[n].Total)
		t.sensible[key] = float64(rows[n].Sensible)
	}
	return t, nil
}

// pointText renders a grid point in the table's units.
func (t *PerfTable) pointText(ewb, odb Temperature, flow VolumeFlow) string {
	tu, fu, _ := perfUnitsFor(t.units)
	return fmt.Sprintf("ewb %s %s, odb %s %s, flow %s %s",
		formatNum(tu.fromSI(float64(ewb))), tu.label, formatNum(tu.fromSI(float64(odb))), tu.label,
		formatNum(fu.fromSI(float64(flow))), fu.label)
}

// perfSame reports whether two axis values count as one (1 part in 10⁹).
func perfSame(a, b float64) bool {
	if math.IsInf(a, 0) || math.IsInf(b, 0) {
		return false
	}
	return math.Abs(a-b) <= 1e-9*math.Max(math.Abs(a), math.Abs(b))
}

// perfAxis returns the sorted distinct values of one axis.
func perfAxis(rows []PerfRow, get func(PerfRow) float64) []float64 {
	vals := make([]float64, len(rows))
	for i, r := range rows {
		vals[i] = get(r)
	}
	sort.Float64s(vals)
	out := vals[:1]
	for _, v := range vals[1:] {
		if !perfSame(v, out[len(out)-1]) {
			out = append(out, v)
		}
	}
	return append([]float64(nil), out...)
}

// perfIndex returns the index of v's axis value (v is known to be on the axis).
func perfIndex(axis []float64, v float64) int {
	i := sort.SearchFloat64s(axis, v)
	if i == len(axis) || (i > 0 && !perfSame(axis[i], v)) {
		i--
	}
	return i
}

// Units returns the unit system the table reports ranges and errors in (0 for
// an unbuilt table).
func (t *PerfTable) Units() UnitSystem {
	if t == nil {
		return 0
	}
	return t.units
}

// Ranges returns the span of the table's axes (zero for an unbuilt table).
func (t *PerfTable) Ranges() PerfRanges {
	if t == nil || len(t.ewb) == 0 {
		return PerfRanges{}
	}
	return PerfRanges{
		EnterWBMin: Temperature(t.ewb[0]), EnterWBMax: Temperature(t.ewb[len(t.ewb)-1]),
		OutdoorDBMin: Temperature(t.odb[0]), OutdoorDBMax: Temperature(t.odb[len(t.odb)-1]),
		FlowMin: VolumeFlow(t.flow[0]), FlowMax: VolumeFlow(t.flow[len(t.flow)-1]),
	}
}

// Expected returns the capacity the table gives at an entering wet bulb, outdoor
// dry bulb and airflow, by trilinear interpolation between the grid points
// around it; at a grid point it returns that point's values exactly. Sensible is
// capped at total.
//
// Errors: *InputError for "ewb", "odb" or "flow" outside the table's range (the
// table is never extrapolated), with the range in the table's units (°F and cfm
// for IP, °C and L/s for SI).
func (t *PerfTable) Expected(ewb, odb Temperature, flow VolumeFlow) (total, sensible Power, err error) {
	if t == nil || len(t.ewb) < 2 {
		return 0, 0, &PerfTableError{Err: errors.New("empty table; build it with NewPerfTable or ParsePerfTableCSV")}
	}
	tu, fu, _ := perfUnitsFor(t.units)
	i, ti, err := perfLocate("ewb", t.ewb, float64(ewb), tu)
	if err != nil {
		return 0, 0, err
	}
	j, tj, err := perfLocate("odb", t.odb, float64(odb), tu)
	if err != nil {
		return 0, 0, err
	}
	k, tk, err := perfLocate("flow", t.flow, float64(flow), fu)
	if err != nil {
		return 0, 0, err
	}
	tot := t.interp(t.total, i, j, k, ti, tj, tk)
	sen := t.interp(t.sensible, i, j, k, ti, tj, tk)
	return Power(tot), Power(math.Min(sen, tot)), nil
}

// perfLocate finds the cell of axis holding x: x lies between axis[i] and
// axis[i+1] at fraction f. Values within 1 part in 10⁹ of an end count as the end.
func perfLocate(name string, axis []float64, x float64, u perfUnit) (i int, f float64, err error) {
	n := len(axis)
	switch {
	case perfSame(x, axis[0]):
		x = axis[0]
	case perfSame(x, axis[n-1]):
		x = axis[n-1]
	}
	if math.IsNaN(x) || math.IsInf(x, 0) || x < axis[0] || x > axis[n-1] {
		e := &InputError{Input: name, Value: u.fromSI(x), Unit: u.label, Min: u.fromSI(axis[0]), Max: u.fromSI(axis[n-1])}
		e.Reason = "outside the table's range " + e.RangeText() + "; the table is not extrapolated"
		return 0, 0, e
	}
	i = sort.SearchFloat64s(axis, x) // first index with axis[i] ≥ x
	if i == n || axis[i] > x {
		i--
	}
	if i == n-1 {
		i--
	}
	// (1−f)·a + f·b below gives a exactly at f = 0 and b exactly at f = 1.
	f = (x - axis[i]) / (axis[i+1] - axis[i])
	return i, math.Min(math.Max(f, 0), 1), nil
}

func (t *PerfTable) interp(v []float64, i, j, k int, ti, tj, tk float64) float64 {
	nj, nk := len(t.odb), len(t.flow)
	lerp := func(a, b, f float64) float64 { return (1-f)*a + f*b }
	at := func(i, j int) float64 {
		base := (i*nj + j) * nk
		return lerp(v[base+k], v[base+k+1], tk)
	}
	lo := lerp(at(i, j), at(i, j+1), tj)
	hi := lerp(at(i+1, j), at(i+1, j+1), tj)
	return lerp(lo, hi, ti)
}

// perfNQty is the number of quantities in a row.
const perfNQty = 5

// perfColumns maps a CSV header's quantity to its row field and accepted units.
var perfColumns = [perfNQty]struct {
	q     perfQty
	units map[string]perfUnit
	set   func(*PerfRow, float64)
}{
	{perfEWB, map[string]perfUnit{"f": perfDegF, "c": perfDegC}, func(r *PerfRow, v float64) { r.EnterWB = Temperature(v) }},
	{perfODB, map[string]perfUnit{"f": perfDegF, "c": perfDegC}, func(r *PerfRow, v float64) { r.OutdoorDB = Temperature(v) }},
	{perfFlow, map[string]perfUnit{"cfm": perfCFM, "lps": perfLps, "m3h": perfM3h}, func(r *PerfRow, v float64) { r.Flow = VolumeFlow(v) }},
	{perfTotal, perfPowerUnits, func(r *PerfRow, v float64) { r.Total = Power(v) }},
	{perfSensible, perfPowerUnits, func(r *PerfRow, v float64) { r.Sensible = Power(v) }},
}

var perfPowerUnits = map[string]perfUnit{"btuh": perfBtuh, "mbh": perfMBh, "kw": perfKW, "w": perfW, "tons": perfTonsU}

var perfUnitLists = [perfNQty]string{"f, c", "f, c", "cfm, lps, m3h", "btuh, mbh, kw, w, tons", "btuh, mbh, kw, w, tons"}

// ParsePerfTableCSV reads a performance table from CSV. The first record is a
// header naming the columns with their units, in any order and any case:
// ewb_f or ewb_c; odb_f or odb_c; flow_cfm, flow_lps or flow_m3h; total_ and
// sensible_ with btuh, mbh (1000 Btu/h), kw, w or tons. Other columns are
// ignored. Lines starting with '#' and blank lines are skipped. The table is IP
// (°F, cfm, Btu/h in ranges and errors) when the ewb column is in °F, else SI.
// The rows must form a full grid, as NewPerfTableIn requires.
//
// Errors: *PerfTableError with the line and, for a bad cell, the column
// ("line 7, column total_mbh: ..."), wrapping an *InputError for values out of
// range.
func ParsePerfTableCSV(r io.Reader) (*PerfTable, error) {
	cr := csv.NewReader(r)
	cr.Comment = '#'
	cr.FieldsPerRecord = -1
	cr.TrimLeadingSpace = true

	read := func() ([]string, int, error) {
		rec, err := cr.Read()
		if err != nil {
			var pe *csv.ParseError
			if errors.As(err, &pe) {
				return nil, 0, &PerfTableError{Line: pe.Line, Err: pe.Err}
			}
			return nil, 0, err
		}
		line, _ := cr.FieldPos(0)
		return rec, line, nil
	}

	header, hline, err := read()
	if err == io.EOF {
		return nil, &PerfTableError{Err: errors.New("no header row")}
	}
	if err != nil {
		return nil, err
	}
	names := make([]string, len(header))
	col := [perfNQty]int{-1, -1, -1, -1, -1}
	unit := [perfNQty]perfUnit{}
	for c, h := range header {
		if c == 0 {
			h = strings.TrimPrefix(h, "\ufeff") // byte-order mark from spreadsheet exports
		}
		names[c] = strings.ToLower(strings.TrimSpace(h))
		qty, suffix, ok := strings.Cut(names[c], "_")
		if !ok {
			continue
		}
		for q, pc := range perfColumns {
			if pc.q.name != qty {
				continue
			}
			u, ok := pc.units[suffix]
			if !ok {
				return nil, &PerfTableError{Line: hline, Column: names[c],
					Err: fmt.Errorf("unknown unit %q for %s; use one of %s", suffix, qty, perfUnitLists[q])}
			}
			if col[q] >= 0 {
				return nil, &PerfTableError{Line: hline, Column: names[c],
					Err: fmt.Errorf("a second %s column (the first is %s)", qty, names[col[q]])}
			}
			col[q], unit[q] = c, u
		}
	}
	for q, pc := range perfColumns {
		if col[q] < 0 {
			return nil, &PerfTableError{Line: hline,
				Err: fmt.Errorf("no %s column in the header; name it %s_ with one of %s", pc.q.name, pc.q.name, perfUnitLists[q])}
		}
	}
	us := SI
	if unit[0].label == perfDegF.label {
		us = IP
	}

	var rows []PerfRow
	var lines []int
	for {
		rec, line, err := read()
		if err == io.EOF {
			break
		}
		if err != nil {
			return nil, err
		}
		if len(rec) != len(header) {
			return nil, &PerfTableError{Line: line,
				Err: fmt.Errorf("%d fields, but the header has %d", len(rec), len(header))}
		}
		if len(rows) == perfMaxRows {
			return nil, &PerfTableError{Line: line, Err: fmt.Errorf("more than %d rows", perfMaxRows)}
		}
		var row PerfRow
		for q, pc := range perfColumns {
			c := col[q]
			s := strings.TrimSpace(rec[c])
			if s == "" {
				return nil, &PerfTableError{Line: line, Column: names[c], Err: errors.New("empty value")}
			}
			v, err := strconv.ParseFloat(s, 64)
			if errors.Is(err, strconv.ErrRange) {
				return nil, &PerfTableError{Line: line, Column: names[c], Err: fmt.Errorf("number out of range: %q", s)}
			}
			if err != nil {
				return nil, &PerfTableError{Line: line, Column: names[c], Err: fmt.Errorf("not a number: %q", s)}
			}
			si := unit[q].toSI(v)
			if err := pc.q.check(si, unit[q]); err != nil {
				return nil, &PerfTableError{Line: line, Column: names[c], Err: err}
			}
			pc.set(&row, si)
		}
		rows = append(rows, row)
		lines = append(lines, line)
	}
	return newPerfTable(us, rows, lines)
}
