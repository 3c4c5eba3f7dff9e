package schema

import (
	"bytes"
	"context"
	"database/sql"
	"encoding/csv"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"math"
	"regexp"
	"slices"
	"sort"
	"strconv"
	"strings"
	"time"

	"github.com/mattn/go-sqlite3"

	"fieldtab/measure"
)

// Import and export: the design schedules technicians are handed as CSV, the
// results a spreadsheet user wants, and the whole job as one JSON document that
// another fieldtab server imports (and merges) without loss.

// ---- design schedules (CSV) ----

// ImportProblem is one problem found in an imported schedule. Line counts the
// file's lines as a text editor does, the header being line 1 (0: the problem
// is with the whole file); Column is the column's accepted name (such as
// "design_flow"; "" when the problem is with the whole line).
type ImportProblem struct {
	Line    int    `json:"line"`
	Column  string `json:"column,omitempty"`
	Message string `json:"message"`
}

// ImportReport is what a schedule import did, or (DryRun) would do. When
// Problems is not empty nothing was imported and the counts are 0.
type ImportReport struct {
	DryRun    bool            `json:"dry_run"`
	Created   int             `json:"created"`
	Updated   int             `json:"updated"`
	Unchanged int             `json:"unchanged"` // rows naming an existing record with the same values
	Problems  []ImportProblem `json:"problems"`
}

// Limits of a schedule file.
const (
	maxScheduleBytes  = 16 << 20
	maxScheduleRows   = 20_000
	maxImportProblems = 200 // listed; the rest are counted in one last problem
)

// problemList collects problems up to maxImportProblems.
type problemList struct {
	list []ImportProblem
	more int
}

func (p *problemList) add(line int, column, format string, args ...any) {
	if len(p.list) == maxImportProblems {
		p.more++
		return
	}
	p.list = append(p.list, ImportProblem{Line: line, Column: column, Message: fmt.Sprintf(format, args...)})
}

func (p *problemList) count() int { return len(p.list) + p.more }

func (p *problemList) result() []ImportProblem {
	out := append([]ImportProblem{}, p.list...)
	if p.more > 0 {
		out = append(out, ImportProblem{Message: fmt.Sprintf("%d more problems are not listed; fix these and try again", p.more)})
	}
	return out
}

// schedColumn is a column a schedule accepts. units lists the units the
// header may name in brackets ("design_flow (cfm)") for a job in each unit
// system, each with its factor to the job's unit; nil for a column without a
// unit.
type schedColumn struct {
	name     string
	required bool
	units    func(u measure.UnitSystem) map[string]float64
}

func ipSI(ip, si map[string]float64) func(measure.UnitSystem) map[string]float64 {
	return func(u measure.UnitSystem) map[string]float64 {
		if u == measure.SI {
			return si
		}
		return ip
	}
}

// Header units, normalised by normUnit.
var (
	schedAirflow  = ipSI(map[string]float64{"cfm": 1}, map[string]float64{"l/s": 1, "lps": 1, "m3/h": 1 / 3.6})
	schedArea     = ipSI(map[string]float64{"ft2": 1, "sqft": 1}, map[string]float64{"m2": 1})
	schedStatic   = ipSI(map[string]float64{"inwg": 1, "inwc": 1, "in": 1}, map[string]float64{"pa": 1})
	schedCapacity = ipSI(map[string]float64{"btuh": 1, "btu/h": 1, "mbh": 1000, "tons": 12000, "ton": 12000},
		map[string]float64{"w": 1, "kw": 1000})
	schedMotor = ipSI(map[string]float64{"hp": 1}, map[string]float64{"kw": 1})
	schedWater = ipSI(map[string]float64{"gpm": 1}, map[string]float64{"l/s": 1, "lps": 1, "m3/h": 1 / 3.6})
	schedAmps  = ipSI(map[string]float64{"a": 1, "amps": 1}, map[string]float64{"a": 1, "amps": 1})
	schedVolts = ipSI(map[string]float64{"v": 1, "volts": 1}, map[string]float64{"v": 1, "volts": 1})
	schedRPM   = ipSI(map[string]float64{"rpm": 1}, map[string]float64{"rpm": 1})
)

var outletColumns = []schedColumn{
	{name: "tag", required: true},
	{name: "room"},
	{name: "kind", required: true},
	{name: "size"},
	{name: "design_flow", required: true, units: schedAirflow},
	{name: "system", required: true},
	{name: "method"},
	{name: "factor"},
	{name: "ak", units: schedArea},
}

var equipmentColumns = []schedColumn{
	{name: "tag", required: true},
	{name: "kind", required: true},
	{name: "name"},
	{name: "location"},
	{name: "airflow", units: schedAirflow},
	{name: "outdoor_air", units: schedAirflow},
	{name: "external_static", units: schedStatic},
	{name: "rated_total", units: schedCapacity},
	{name: "rated_sensible", units: schedCapacity},
	{name: "motor_hp", units: schedMotor},
	{name: "fla", units: schedAmps},
	{name: "volts", units: schedVolts},
	{name: "phase"},
	{name: "fan_rpm", units: schedRPM},
	{name: "motor_rpm", units: schedRPM},
	{name: "water_flow", units: schedWater},
}

// schedTable is a schedule read into rows, with its header resolved.
type schedTable struct {
	col   map[string]int     // accepted name → field index
	scale map[string]float64 // accepted name → factor of the header's unit
	rows  []schedRow
}

type schedRow struct {
	line  int
	cells []string
}

var unitInHeader = regexp.MustCompile(`^(.*?)\s*[(\[]\s*([^)\]]*)\s*[)\]]\s*$`)

// normName turns a header or keyword into its accepted form: lower case,
// spaces and hyphens as underscores ("Design Flow" → "design_flow").
func normName(s string) string {
	s = strings.ToLower(strings.TrimSpace(s))
	s = strings.Join(strings.FieldsFunc(s, func(r rune) bool { return r == ' ' || r == '-' || r == '_' || r == '\t' }), "_")
	return s
}

var unitCleaner = strings.NewReplacer(" ", "", ".", "", "²", "2", "³", "3", "_", "")

func normUnit(s string) string { return unitCleaner.Replace(strings.ToLower(strings.TrimSpace(s))) }

// readSchedule reads a CSV schedule with the given columns for a job in unit
// system u. It returns nil when the file cannot be used at all (the problems
// say why).
func readSchedule(r io.Reader, specs []schedColumn, u measure.UnitSystem, what string, p *problemList) *schedTable {
	cr := csv.NewReader(r)
	cr.FieldsPerRecord = -1
	cr.LazyQuotes = true // sizes are written 10" round
	cr.TrimLeadingSpace = true

	header, err := cr.Read()
	if err == io.EOF {
		p.add(0, "", "the file is empty: it needs a header row naming the columns (%s)", columnList(specs, false))
		return nil
	}
	if err != nil {
		csvProblem(p, err)
		return nil
	}
	hline, _ := cr.FieldPos(0)
	t := &schedTable{col: map[string]int{}, scale: map[string]float64{}}
	byName := map[string]*schedColumn{}
	for i := range specs {
		byName[specs[i].name] = &specs[i]
	}
	for i, h := range header {
		if i == 0 {
			h = strings.TrimPrefix(h, "\ufeff") // byte-order mark of spreadsheet exports
		}
		name, unit, hasUnit := h, "", false
		if m := unitInHeader.FindStringSubmatch(h); m != nil {
			name, unit, hasUnit = m[1], m[2], true
		}
		name = normName(name)
		if name == "" {
			// Spreadsheets export trailing empty columns; an unnamed one in
			// the middle would hide its data.
			if !blankRecord(header[i:]) {
				p.add(hline, "", "column %d has no name; name it or delete it (accepted columns: %s)", i+1, columnList(specs, false))
			}
			continue
		}
		spec, ok := byName[name]
		if !ok {
			p.add(hline, name, "%q is not a column of %s; accepted columns are %s", strings.TrimSpace(h), what, columnList(specs, false))
			continue
		}
		if _, dup := t.col[name]; dup {
			p.add(hline, name, "the header names %s twice", name)
			continue
		}
		t.col[name], t.scale[name] = i, 1
		if !hasUnit {
			continue
		}
		if spec.units == nil {
			p.add(hline, name, "%s takes no unit; remove %q from the header", name, "("+unit+")")
			continue
		}
		f, ok := spec.units(u)[normUnit(unit)]
		if !ok {
			p.add(hline, name, "unit %q is not accepted for %s in a %s job; accepted units are %s",
				unit, name, unitSystemName(u), unitKeys(spec.units(u)))
			continue
		}
		t.scale[name] = f
	}
	for _, s := range specs {
		if _, ok := t.col[s.name]; s.required && !ok {
			p.add(hline, s.name, "the header has no %s column; required columns are %s", s.name, columnList(specs, true))
		}
	}
	if p.count() > 0 {
		return nil
	}
	for {
		rec, err := cr.Read()
		if err == io.EOF {
			break
		}
		if err != nil {
			csvProblem(p, err)
			return nil
		}
		line, _ := cr.FieldPos(0)
		if blankRecord(rec) {
			continue
		}
		if len(t.rows) == maxScheduleRows {
			p.add(line, "", "the file has more than %d rows; split it", maxScheduleRows)
			return nil
		}
		if len(rec) > len(header) && !blankRecord(rec[len(header):]) {
			p.add(line, "", "the line has %d fields but the header names %d columns", len(rec), len(header))
			continue
		}
		t.rows = append(t.rows, schedRow{line: line, cells: rec})
	}
	if len(t.rows) == 0 && p.count() == 0 {
		p.add(0, "", "the file has a header but no rows")
	}
	return t
}

func blankRecord(rec []string) bool {
	for _, c := range rec {
		if strings.TrimSpace(c) != "" {
			return false
		}
	}
	return true
}

func csvProblem(p *problemList, err error) {
	var pe *csv.ParseError
	if errors.As(err, &pe) {
		p.add(pe.Line, "", "the file is not valid CSV here: %v", pe.Err)
		return
	}
	p.add(0, "", "the file could not be read: %v", err)
}

func columnList(specs []schedColumn, requiredOnly bool) string {
	var names []string
	for _, s := range specs {
		if !requiredOnly || s.required {
			names = append(names, s.name)
		}
	}
	return strings.Join(names, ", ")
}

func unitKeys(m map[string]float64) string {
	keys := make([]string, 0, len(m))
	for k := range m {
		keys = append(keys, k)
	}
	sort.Strings(keys)
	return strings.Join(keys, ", ")
}

func unitSystemName(u measure.UnitSystem) string {
	if u == measure.SI {
		return "SI"
	}
	return "IP"
}

// cell returns a row's trimmed text in column name, and whether the header
// has that column.
func (t *schedTable) cell(r schedRow, name string) (string, bool) {
	i, ok := t.col[name]
	if !ok {
		return "", false
	}
	if i >= len(r.cells) {
		return "", true
	}
	return strings.TrimSpace(r.cells[i]), true
}

var thousands = regexp.MustCompile(`^[-+]?\d{1,3}(,\d{3})+(\.\d*)?$`)

// number reads a numeric cell scaled by its header's unit. present is false
// when the column is absent; an empty cell gives 0 with empty set. A bad
// number is a problem and returns ok false.
func (t *schedTable) number(r schedRow, name string, p *problemList) (v float64, present, empty, ok bool) {
	s, present := t.cell(r, name)
	if !present {
		return 0, false, true, true
	}
	if s == "" {
		return 0, true, true, true
	}
	if thousands.MatchString(s) {
		s = strings.ReplaceAll(s, ",", "")
	}
	v, err := strconv.ParseFloat(s, 64)
	if err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
		p.add(r.line, name, "%q is not a number", s)
		return 0, true, false, false
	}
	if f := t.scale[name]; f != 1 {
		// 86.4 MBH is 86,400 Btu/h, not 86,400.00000000001.
		return math.Round(v*f*1e6) / 1e6, true, false, true
	}
	return v, true, false, true
}

// columnOf maps a Validate error field to the schedule column it comes from.
func columnOf(field string, specs []schedColumn) string {
	field = strings.TrimPrefix(field, "design.")
	if field == "system_id" {
		field = "system"
	}
	for _, s := range specs {
		if s.name == field {
			return field
		}
	}
	return ""
}

var outletKindWords = map[string]string{
	"s": "supply", "sa": "supply", "supply": "supply",
	"r": "return", "ra": "return", "return": "return",
	"e": "exhaust", "ea": "exhaust", "exhaust": "exhaust",
	"oa": "outdoor_air", "outdoor_air": "outdoor_air", "outside_air": "outdoor_air", "outdoor": "outdoor_air",
}

var systemKindWords = map[string]string{
	"ahu": "air_handler", "air_handler": "air_handler", "air_handling_unit": "air_handler",
	"rtu": "rooftop_unit", "rooftop_unit": "rooftop_unit", "rooftop": "rooftop_unit",
	"ef": "fan", "sf": "fan", "rf": "fan", "f": "fan", "fan": "fan", "exhaust_fan": "fan", "supply_fan": "fan", "return_fan": "fan",
	"p": "pump", "pump": "pump",
	"wl": "water_loop", "loop": "water_loop", "water_loop": "water_loop",
}

// ParseOutletSchedule reads an outlet schedule for the job in snap (its unit
// system, live systems and outlets). The header row names the columns in any
// order and case, spaces or underscores alike: tag, kind, design_flow and
// system are required; room, size, method, factor and ak are optional. A
// header may give a unit in brackets, which must be the job's ("design_flow
// (cfm)", "design_flow (L/s)" or "(m3/h)" in an SI job; "ak (ft²)").
//   - kind: supply, return, exhaust or outdoor_air, or S, R, E, OA;
//   - design_flow in the job's air-flow unit; system: the tag of a system of
//     the job; method: hood (when empty) or ak; factor: 1 when empty; ak in ft²
//     or m².
//
// A tag that a live outlet of the job already has updates that outlet: the
// row's columns replace its values (an empty cell sets the default), columns
// the header leaves out keep them. A tag twice in the file is a problem.
// Every row is checked with Outlet.Validate. It returns the outlets of the
// rows without problems, in file order (an update carries the stored ID), and
// the problems of the whole file; the outlets are for a preview and must not be
// imported when there are problems.
func ParseOutletSchedule(r io.Reader, snap *Snapshot) ([]Outlet, []ImportProblem) {
	p := &problemList{}
	u, ok := scheduleJob(snap, p)
	if !ok {
		return nil, p.result()
	}
	t := readSchedule(r, outletColumns, u, "an outlet schedule", p)
	if t == nil {
		return nil, p.result()
	}
	systems := make(map[string]*System, len(snap.Systems))
	var sysTags []string
	for i := range snap.Systems {
		if s := &snap.Systems[i]; !s.Deleted {
			systems[s.Tag] = s
			sysTags = append(sysTags, s.Tag)
		}
	}
	existing := make(map[string]*Outlet, len(snap.Outlets))
	for i := range snap.Outlets {
		if o := &snap.Outlets[i]; !o.Deleted {
			existing[o.Tag] = o
		}
	}
	seen := map[string]int{}
	out := []Outlet{}
	for _, row := range t.rows {
		before := p.count()
		tag, _ := t.cell(row, "tag")
		o := Outlet{JobID: snap.Job.ID, Method: "hood", Factor: 1}
		if ex, ok := existing[tag]; ok && tag != "" {
			o = *ex
		}
		o.Tag = tag
		scheduleTag(row, tag, seen, p)
		if s, ok := t.cell(row, "room"); ok {
			o.Room = s
		}
		if s, ok := t.cell(row, "size"); ok {
			o.Size = s
		}
		s, _ := t.cell(row, "kind")
		switch k, ok := outletKindWords[normName(s)]; {
		case s == "":
			p.add(row.line, "kind", "is required: supply, return, exhaust or outdoor_air (or S, R, E, OA)")
		case !ok:
			p.add(row.line, "kind", "%q is not an outlet kind; accepted are supply, return, exhaust, outdoor_air (or S, R, E, OA)", s)
		default:
			o.Kind = k
		}
		if v, _, empty, ok := t.number(row, "design_flow", p); ok && empty {
			p.add(row.line, "design_flow", "is required: the design airflow in %s", UnitsFor(u).AirFlow)
		} else if ok {
			o.DesignFlow = v
		}
		s, _ = t.cell(row, "system")
		switch sys, ok := systems[s]; {
		case s == "":
			p.add(row.line, "system", "is required: the tag of the outlet's system")
		case !ok:
			p.add(row.line, "system", "no system tagged %q in this job; %s", s, knownTags("its systems are", sysTags))
		default:
			o.SystemID = sys.ID
		}
		if s, ok := t.cell(row, "method"); ok {
			o.Method = strings.ToLower(s)
			if s == "" {
				o.Method = "hood"
			}
		}
		if v, present, empty, ok := t.number(row, "factor", p); ok && present {
			o.Factor = v
			if empty {
				o.Factor = 1
			}
		}
		if v, present, _, ok := t.number(row, "ak", p); ok && present {
			o.Ak = v
		}
		if p.count() == before {
			if err := o.Validate(u); err != nil {
				p.add(row.line, columnOf(ErrorField(err), outletColumns), "%s", ErrorMessage(err))
			}
		}
		if p.count() == before {
			out = append(out, o)
		}
	}
	return out, p.result()
}

// ParseEquipmentSchedule reads an equipment schedule for the job in snap, as
// ParseOutletSchedule reads outlets. Columns: tag and kind (required); name,
// location, airflow, outdoor_air, external_static, rated_total,
// rated_sensible, motor_hp, fla, volts, phase, fan_rpm, motor_rpm and
// water_flow (optional; empty or 0 for not given), in the job's units. A header
// unit in brackets must be the job's, except that capacities may be given in
// MBH or tons (IP) or kW (SI) and are converted to Btu/h or W.
//   - kind: air_handler, rooftop_unit, fan, pump or water_loop, or AHU, RTU,
//     EF (also SF, RF, F), P, WL.
//
// A tag that a live system of the job already has updates that system (its
// performance table is kept); columns the header leaves out keep their values.
// Every row is checked with System.Validate.
func ParseEquipmentSchedule(r io.Reader, snap *Snapshot) ([]System, []ImportProblem) {
	p := &problemList{}
	u, ok := scheduleJob(snap, p)
	if !ok {
		return nil, p.result()
	}
	t := readSchedule(r, equipmentColumns, u, "an equipment schedule", p)
	if t == nil {
		return nil, p.result()
	}
	existing := make(map[string]*System, len(snap.Systems))
	for i := range snap.Systems {
		if s := &snap.Systems[i]; !s.Deleted {
			existing[s.Tag] = s
		}
	}
	seen := map[string]int{}
	out := []System{}
	for _, row := range t.rows {
		before := p.count()
		tag, _ := t.cell(row, "tag")
		s := System{JobID: snap.Job.ID}
		if ex, ok := existing[tag]; ok && tag != "" {
			s = *ex
		}
		s.Tag = tag
		scheduleTag(row, tag, seen, p)
		text, _ := t.cell(row, "kind")
		switch k, ok := systemKindWords[normName(text)]; {
		case text == "":
			p.add(row.line, "kind", "is required: air_handler, rooftop_unit, fan, pump or water_loop (or AHU, RTU, EF, P, WL)")
		case !ok:
			p.add(row.line, "kind", "%q is not an equipment kind; accepted are air_handler, rooftop_unit, fan, pump, water_loop (or AHU, RTU, EF, P, WL)", text)
		default:
			s.Kind = k
		}
		if v, ok := t.cell(row, "name"); ok {
			s.Name = v
		}
		if v, ok := t.cell(row, "location"); ok {
			s.Location = v
		}
		d := &s.Design
		for _, f := range []struct {
			col string
			dst *float64
		}{
			{"airflow", &d.Airflow}, {"outdoor_air", &d.OutdoorAir}, {"external_static", &d.ExternalStatic},
			{"rated_total", &d.RatedTotal}, {"rated_sensible", &d.RatedSensible}, {"motor_hp", &d.MotorHP},
			{"fla", &d.FLA}, {"volts", &d.Volts}, {"fan_rpm", &d.FanRPM}, {"motor_rpm", &d.MotorRPM},
			{"water_flow", &d.WaterFlow},
		} {
			if v, present, _, ok := t.number(row, f.col, p); ok && present {
				*f.dst = v
			}
		}
		if v, present, _, ok := t.number(row, "phase", p); ok && present {
			if v != math.Trunc(v) {
				p.add(row.line, "phase", "%s is not accepted; accepted values are 1 and 3 (empty or 0 for not given)", fmtValue(v))
			} else {
				d.Phase = int(v)
			}
		}
		if p.count() == before {
			if err := s.Validate(u); err != nil {
				p.add(row.line, columnOf(ErrorField(err), equipmentColumns), "%s", ErrorMessage(err))
			}
		}
		if p.count() == before {
			out = append(out, s)
		}
	}
	return out, p.result()
}

func scheduleJob(snap *Snapshot, p *problemList) (measure.UnitSystem, bool) {
	if snap == nil {
		p.add(0, "", "no job to import into")
		return 0, false
	}
	u, err := snap.Job.UnitSystem()
	if err != nil {
		p.add(0, "", "the job's unit system is not set: %s", ErrorMessage(err))
		return 0, false
	}
	return u, true
}

// scheduleTag records a row's tag, reporting it when empty or already seen.
func scheduleTag(row schedRow, tag string, seen map[string]int, p *problemList) {
	switch line, dup := seen[tag]; {
	case tag == "":
		p.add(row.line, "tag", "is required")
	case dup:
		p.add(row.line, "tag", "%q is also on line %d; each tag may appear once", tag, line)
	default:
		seen[tag] = row.line
	}
}

func knownTags(prefix string, tags []string) string {
	if len(tags) == 0 {
		return "it has no systems yet: import the equipment schedule first"
	}
	sort.Slice(tags, func(i, j int) bool { return tagLess(tags[i], tags[j]) })
	if len(tags) > 12 {
		return prefix + " " + strings.Join(tags[:12], ", ") + ", …"
	}
	return prefix + " " + strings.Join(tags, ", ")
}

// ImportOutletSchedule imports an outlet schedule (see ParseOutletSchedule)
// into job jobID: new tags create outlets, existing ones update them, all in
// one transaction. With dryRun it only reports what it would do. When any row
// has a problem nothing is imported and the report lists every problem, with
// a nil error. Errors: NotFound (field "job_id"); reading r or the store
// failing, wrapped.
func (db *DB) ImportOutletSchedule(ctx context.Context, a Actor, jobID string, r io.Reader, dryRun bool) (ImportReport, error) {
	return importSchedule(ctx, db, a, jobID, r, dryRun, "outlet_schedule", ParseOutletSchedule)
}

// ImportEquipmentSchedule imports an equipment schedule (see
// ParseEquipmentSchedule) into job jobID, as ImportOutletSchedule does
// outlets. Errors as ImportOutletSchedule.
func (db *DB) ImportEquipmentSchedule(ctx context.Context, a Actor, jobID string, r io.Reader, dryRun bool) (ImportReport, error) {
	return importSchedule(ctx, db, a, jobID, r, dryRun, "equipment_schedule", ParseEquipmentSchedule)
}

func importSchedule[T any, P recordPtr[T]](ctx context.Context, db *DB, a Actor, jobID string, r io.Reader, dryRun bool,
	source string, parse func(io.Reader, *Snapshot) ([]T, []ImportProblem)) (ImportReport, error) {
	rep := ImportReport{DryRun: dryRun, Problems: []ImportProblem{}}
	if !validUUID(jobID) {
		return rep, Errorf(NotFound, "job_id", "job %q not found", jobID)
	}
	// Read the whole file before the transaction: a slow upload must not hold
	// the writer.
	b, err := io.ReadAll(io.LimitReader(r, maxScheduleBytes+1))
	if err != nil {
		return rep, fmt.Errorf("import %s: read: %w", strings.ReplaceAll(source, "_", " "), err)
	}
	if len(b) > maxScheduleBytes {
		rep.Problems = append(rep.Problems, ImportProblem{Message: fmt.Sprintf("the file is larger than %d MiB", maxScheduleBytes>>20)})
		return rep, nil
	}
	at, now := db.stamp()
	run := func(tx *sql.Tx) error {
		snap, err := scheduleSnapshot(ctx, tx, jobID)
		if err != nil {
			return err
		}
		recs, problems := parse(bytes.NewReader(b), snap)
		if len(problems) > 0 {
			rep.Problems = problems
			return nil
		}
		u, err := snap.Job.UnitSystem()
		if err != nil {
			return err
		}
		detail := map[string]any{"source": source}
		for i := range recs {
			rec := P(&recs[i])
			if *rec.keys().id == "" {
				rep.Created++
				if !dryRun {
					if err := createRecordTx(tx, at, now, a, rec, u, detail); err != nil {
						return err
					}
				}
				continue
			}
			var changed bool
			if dryRun {
				changed, err = recordChanged(tx, rec)
			} else {
				changed, err = updateRecordTx(tx, at, now, a, rec, u, detail)
			}
			if err != nil {
				return err
			}
			if changed {
				rep.Updated++
			} else {
				rep.Unchanged++
			}
		}
		return nil
	}
	if dryRun {
		err = db.readTx(ctx, run)
	} else {
		err = db.writeTx(ctx, run)
	}
	if err != nil {
		return ImportReport{DryRun: dryRun, Problems: []ImportProblem{}}, wrapStore("import "+strings.ReplaceAll(source, "_", " "), err)
	}
	if len(rep.Problems) > 0 {
		rep.Created, rep.Updated, rep.Unchanged = 0, 0, 0
	}
	return rep, nil
}

// scheduleSnapshot reads, in tx, what a schedule is checked against: the job
// and its live systems and outlets.
func scheduleSnapshot(ctx context.Context, tx *sql.Tx, jobID string) (*Snapshot, error) {
	s := &Snapshot{}
	var err error
	if s.Job, err = loadJob(tx, jobID, nil); err != nil {
		return nil, err
	}
	if s.Systems, err = listRecords[System](ctx, tx, "WHERE job_id = ? AND deleted = 0", jobID); err != nil {
		return nil, err
	}
	if s.Outlets, err = listRecords[Outlet](ctx, tx, "WHERE job_id = ? AND deleted = 0", jobID); err != nil {
		return nil, err
	}
	return s, nil
}

// ---- design-record writes inside a caller's transaction ----
//
// Create and Update run these in a transaction of their own; an import runs
// many of them in one.

// createRecordTx stores a new live record in tx, assigning its ID when empty.
func createRecordTx(tx *sql.Tx, at time.Time, now string, a Actor, rec designRecord, u measure.UnitSystem, detail map[string]any) error {
	k, keys := rec.kind(), rec.keys()
	if *keys.id == "" {
		*keys.id = NewID()
	}
	if err := rec.validate(u); err != nil {
		return err
	}
	if err := checkRefs(tx, *keys.jobID, rec.refs()); err != nil {
		return err
	}
	*rec.meta() = recordMeta{}
	_, data, err := encodeData(rec, recordColumnKeys)
	if err != nil {
		return err
	}
	seq, err := insertRecordRow(tx, k, keys, data, now, now, false)
	if err != nil {
		return err
	}
	if err := addAudit(tx, at, a, *keys.jobID, "create", k.entity, *keys.id, auditDetail(detail, seq, keys.tag, nil)); err != nil {
		return err
	}
	*rec.meta() = recordMeta{Seq: seq, CreatedAt: at, UpdatedAt: at}
	return nil
}

// updateRecordTx replaces a live record's fields in tx, and reports whether
// anything changed (no change keeps its Seq).
func updateRecordTx(tx *sql.Tx, at time.Time, now string, a Actor, rec designRecord, u measure.UnitSystem, detail map[string]any) (bool, error) {
	k, keys := rec.kind(), rec.keys()
	var oldData, created, updated string
	var m recordMeta
	err := tx.QueryRow("SELECT data, seq, created_at, updated_at FROM "+k.table+" WHERE id = ? AND job_id = ? AND deleted = 0",
		*keys.id, *keys.jobID).Scan(&oldData, &m.Seq, &created, &updated)
	if errors.Is(err, sql.ErrNoRows) {
		return false, Errorf(NotFound, "id", "%s %s not found in this job", k.entity, *keys.id)
	}
	if err != nil {
		return false, err
	}
	if err := rec.validate(u); err != nil {
		return false, err
	}
	if err := checkRefs(tx, *keys.jobID, rec.refs()); err != nil {
		return false, err
	}
	fields, data, err := encodeData(rec, recordColumnKeys)
	if err != nil {
		return false, err
	}
	if m.CreatedAt, err = parseStamp(created); err != nil {
		return false, err
	}
	changed := changedKeys(oldData, fields)
	if len(changed) == 0 {
		if m.UpdatedAt, err = parseStamp(updated); err != nil {
			return false, err
		}
		*rec.meta() = m
		return false, nil
	}
	if err := checkLayoutChange(tx, k, *keys.jobID, *keys.id, changed); err != nil {
		return false, err
	}
	if m.Seq, err = updateRecordRow(tx, k, keys, data, now, false); err != nil {
		return false, err
	}
	if err := addAudit(tx, at, a, *keys.jobID, "update", k.entity, *keys.id, auditDetail(detail, m.Seq, keys.tag, changed)); err != nil {
		return false, err
	}
	m.UpdatedAt = at
	*rec.meta() = m
	return true, nil
}

// traverseLayoutKeys are the traverse fields that place its points.
var traverseLayoutKeys = []string{"shape", "method", "width", "height", "diameter", "points_w", "points_h",
	"points_per_diameter", "diameters"}

// checkLayoutChange refuses to move a traverse's points once point readings
// exist: the readings are numbered by point, and a new layout would silently
// put them at other positions.
func checkLayoutChange(tx *sql.Tx, k *recordKind, jobID, id string, changed []string) error {
	if k != &traverseKind {
		return nil
	}
	for _, key := range changed {
		if !slices.Contains(traverseLayoutKeys, key) {
			continue
		}
		var n int
		err := tx.QueryRow(`SELECT COUNT(*) FROM readings WHERE job_id = ? AND subject_kind = ? AND subject_id = ?
			AND quantity IN ('vp', 'velocity')`, jobID, SubjectTraverse, id).Scan(&n)
		if err != nil {
			return err
		}
		if n > 0 {
			return Errorf(Conflict, key, "this traverse has %s at its present points; make a new traverse for another layout", plural(n, "point reading"))
		}
		return nil
	}
	return nil
}

// recordChanged reports whether rec differs from its stored live version.
func recordChanged(tx *sql.Tx, rec designRecord) (bool, error) {
	k, keys := rec.kind(), rec.keys()
	var oldData string
	err := tx.QueryRow("SELECT data FROM "+k.table+" WHERE id = ? AND job_id = ? AND deleted = 0", *keys.id, *keys.jobID).Scan(&oldData)
	if errors.Is(err, sql.ErrNoRows) {
		return false, Errorf(NotFound, "id", "%s %s not found in this job", k.entity, *keys.id)
	}
	if err != nil {
		return false, err
	}
	fields, _, err := encodeData(rec, recordColumnKeys)
	if err != nil {
		return false, err
	}
	return len(changedKeys(oldData, fields)) > 0, nil
}

// insertRecordRow inserts a record row with the job's next change number.
func insertRecordRow(tx *sql.Tx, k *recordKind, keys recordKeys, data []byte, created, updated string, deleted bool) (int64, error) {
	seq, err := nextSeq(tx, *keys.jobID)
	if err != nil {
		return 0, err
	}
	cols, vals := "id, job_id, tag, data, seq, created_at, updated_at, deleted", "?, ?, ?, ?, ?, ?, ?, ?"
	args := []any{*keys.id, *keys.jobID, keys.tag, data, seq, created, updated, deleted}
	if keys.systemID != nil {
		cols, vals, args = cols+", system_id", vals+", ?", append(args, *keys.systemID)
	}
	_, err = tx.Exec("INSERT INTO "+k.table+" ("+cols+") VALUES ("+vals+")", args...)
	return seq, constraintError(err, k, keys)
}

// updateRecordRow rewrites a record row with the job's next change number.
func updateRecordRow(tx *sql.Tx, k *recordKind, keys recordKeys, data []byte, updated string, deleted bool) (int64, error) {
	seq, err := nextSeq(tx, *keys.jobID)
	if err != nil {
		return 0, err
	}
	set, args := "tag = ?, data = ?, seq = ?, updated_at = ?, deleted = ?", []any{keys.tag, data, seq, updated, deleted}
	if keys.systemID != nil {
		set, args = set+", system_id = ?", append(args, *keys.systemID)
	}
	_, err = tx.Exec("UPDATE "+k.table+" SET "+set+" WHERE id = ?", append(args, *keys.id)...)
	return seq, constraintError(err, k, keys)
}

func auditDetail(base map[string]any, seq int64, tag string, changed []string) map[string]any {
	d := make(map[string]any, len(base)+3)
	for k, v := range base {
		d[k] = v
	}
	d["seq"], d["tag"] = seq, tag
	if changed != nil {
		d["changed"] = changed
	}
	return d
}

// ---- results as CSV ----

// WriteResultsCSV writes a job's results (r, computed from s) as one CSV table
// for spreadsheets (RFC 4180, by encoding/csv): a header row, then one row per
// item, each row with every column, so the table sorts and filters as one.
// The first column, "section", says what a row is: outlet, system, traverse,
// capacity_test, water_test or instrument, in that order. Units are in the
// header names ("design airflow (cfm)"), in the job's unit system. A column
// that does not apply to a section is empty:
//   - outlet: system, tag, room, kind, size, design airflow, as found and final
//     flow, % of design (final, else as found), status;
//   - system: tag, name, kind, design airflow, measured airflow (traverse or
//     supply outlets), % of design, fan rpm, highest amps, % FLA;
//   - traverse: system, tag, location, shape, duct size, the system's design
//     airflow, measured airflow, % of design, status;
//   - capacity_test: system, tag, mode, measured airflow, entering, leaving and
//     outdoor air, delivered total and sensible, expected total, % of expected;
//   - water_test: system, tag, fluid, design and measured water flow, % of
//     design, ΔP, water temperatures, water-side capacity;
//   - instrument: tag, kind, status (its calibration status), the due date in
//     notes.
//
// Every item's instrument-calibration flags and its errors, warnings and
// missing readings are in the last two columns. Text that a spreadsheet would
// take for a formula (starting with =, +, -, @, a tab or a carriage return) is
// prefixed with a single quote. Errors: Invalid (field "results") when s or r
// is nil; the writer's error.
func WriteResultsCSV(w io.Writer, s *Snapshot, r *Results) error {
	if s == nil || r == nil {
		return Errorf(Invalid, "results", "no job or results given")
	}
	un := r.Units
	if un.AirFlow == "" {
		un = UnitsFor(measure.IP)
		if u, err := s.Job.UnitSystem(); err == nil {
			un = UnitsFor(u)
		}
	}
	in := func(name, unit string) string { return name + " (" + unit + ")" }
	header := []string{"section", "system", "tag", "room or location", "kind", "size",
		in("design airflow", un.AirFlow), in("as found", un.AirFlow), in("final", un.AirFlow), in("measured airflow", un.AirFlow),
		"% of design",
		in("design water flow", un.WaterFlow), in("water flow", un.WaterFlow), in("water dp", un.WaterPressure),
		in("entering water", un.Temperature), in("leaving water", un.Temperature), in("water capacity", un.Power),
		in("entering db", un.Temperature), in("entering wb", un.Temperature), in("leaving db", un.Temperature),
		in("leaving wb", un.Temperature), in("outdoor db", un.Temperature),
		in("total capacity", un.Power), in("sensible capacity", un.Power), in("expected total", un.Power), "% of expected",
		"fan rpm", "highest amps (A)", "% FLA",
		"status", "instrument flags", "notes"}
	const (
		cSection = iota
		cSystem
		cTag
		cRoom
		cKind
		cSize
		cDesign
		cAsFound
		cFinal
		cMeasured
		cPct
		cDesignWater
		cWater
		cDP
		cEnterWater
		cLeaveWater
		cWaterCap
		cEnterDB
		cEnterWB
		cLeaveDB
		cLeaveWB
		cOutdoorDB
		cTotal
		cSensible
		cExpected
		cPctExpected
		cFanRPM
		cAmps
		cFLA
		cStatus
		cFlags
		cNotes
		nCols
	)
	airDec, waterDec := 0, 1
	if un.System == "si" {
		airDec, waterDec = 1, 2
	}
	cw := csv.NewWriter(w)
	if err := cw.Write(header); err != nil {
		return err
	}
	write := func(row []string) error {
		for i := range row {
			row[i] = safeCell(row[i])
		}
		return cw.Write(row)
	}
	newRow := func(section, system, tag string) []string {
		row := make([]string, nCols)
		row[cSection], row[cSystem], row[cTag] = section, system, tag
		return row
	}

	outlets := make(map[string]*Outlet, len(s.Outlets))
	for i := range s.Outlets {
		outlets[s.Outlets[i].ID] = &s.Outlets[i]
	}
	for _, o := range r.Outlets {
		row := newRow("outlet", o.SystemTag, o.Tag)
		row[cRoom], row[cKind], row[cDesign] = o.Room, o.Kind, csvNum(&o.DesignFlow, airDec)
		if so := outlets[o.ID]; so != nil {
			row[cSize] = so.Size
		}
		var gov *OutletReading
		if o.AsFound != nil {
			row[cAsFound] = csvNum(o.AsFound.Flow, airDec)
			gov = o.AsFound
		}
		if o.Final != nil {
			row[cFinal] = csvNum(o.Final.Flow, airDec)
			gov = o.Final
		}
		if gov != nil && gov.Tolerance != nil {
			row[cPct] = csvNum(&gov.Tolerance.PercentOfDesign, 1)
		}
		row[cStatus], row[cFlags], row[cNotes] = o.Status, flagText(o.Flags), joinNotes(o.Errors)
		if err := write(row); err != nil {
			return err
		}
	}
	for _, sy := range r.Systems {
		row := newRow("system", sy.Tag, sy.Tag)
		row[cRoom], row[cKind] = sy.Name, sy.Kind
		if sy.DesignAirflow > 0 {
			row[cDesign] = csvNum(&sy.DesignAirflow, airDec)
		}
		row[cMeasured] = csvNum(sy.Airflow, airDec)
		status := ""
		if t := sy.AirflowTolerance; t != nil {
			row[cPct], status = csvNum(&t.PercentOfDesign, 1), t.Status
		}
		row[cFanRPM] = csvNum(sy.FanRPM, 0)
		if len(sy.Amps) > 0 {
			maxA := 0.0
			for _, a := range sy.Amps {
				maxA = math.Max(maxA, a.Value)
			}
			row[cAmps] = csvNum(&maxA, 1)
		}
		row[cFLA] = csvNum(sy.PercentFLA, 1)
		notes := append([]string{}, sy.Notes...)
		if sy.AirflowSource != "" {
			notes = append([]string{"airflow from " + sy.AirflowSource}, notes...)
		}
		row[cStatus], row[cFlags], row[cNotes] = status, flagText(sy.Flags), joinNotes(notes, sy.Errors)
		if err := write(row); err != nil {
			return err
		}
	}
	traverses := make(map[string]*Traverse, len(s.Traverses))
	for i := range s.Traverses {
		traverses[s.Traverses[i].ID] = &s.Traverses[i]
	}
	design := make(map[string]float64, len(s.Systems))
	for _, sy := range s.Systems {
		design[sy.ID] = sy.Design.Airflow
	}
	for _, t := range r.Traverses {
		row := newRow("traverse", t.SystemTag, t.Tag)
		row[cRoom] = t.Location
		if st := traverses[t.ID]; st != nil {
			row[cKind] = st.Shape
			if st.Shape == "round" {
				row[cSize] = fmtValue(st.Diameter) + " " + un.Length + " round"
			} else {
				row[cSize] = fmtValue(st.Width) + " x " + fmtValue(st.Height) + " " + un.Length
			}
		}
		if d := design[t.SystemID]; d > 0 {
			row[cDesign] = csvNum(&d, airDec)
		}
		row[cMeasured] = csvNum(t.Flow, airDec)
		if t.Tolerance != nil {
			row[cPct] = csvNum(&t.Tolerance.PercentOfDesign, 1)
		}
		notes := []string{fmt.Sprintf("%d of %d points read (%s)", t.PointsRead, t.PointsTotal, strings.ReplaceAll(t.Stage, "_", " "))}
		row[cStatus], row[cFlags], row[cNotes] = t.Status, flagText(t.Flags), joinNotes(notes, t.Warnings, t.Errors)
		if err := write(row); err != nil {
			return err
		}
	}
	for _, c := range r.CapacityTests {
		row := newRow("capacity_test", c.SystemTag, c.Tag)
		row[cKind] = c.Mode
		row[cMeasured] = csvNum(c.Airflow, airDec)
		if c.Enter != nil {
			row[cEnterDB], row[cEnterWB] = csvNum(&c.Enter.DryBulb, 1), csvNum(&c.Enter.WetBulb, 1)
		}
		if c.Leave != nil {
			row[cLeaveDB], row[cLeaveWB] = csvNum(&c.Leave.DryBulb, 1), csvNum(&c.Leave.WetBulb, 1)
		}
		row[cOutdoorDB] = csvNum(c.OutdoorDB, 1)
		if c.Capacity != nil {
			row[cTotal], row[cSensible] = csvNum(&c.Capacity.Total, 0), csvNum(&c.Capacity.Sensible, 0)
		}
		var notes []string
		if c.Expected != nil {
			row[cExpected] = csvNum(&c.Expected.Total, 0)
			notes = append(notes, "expected from "+strings.ReplaceAll(c.Expected.Source, "_", " "))
			if c.Expected.Note != "" {
				notes = append(notes, c.Expected.Note)
			}
		}
		row[cPctExpected] = csvNum(c.PercentOfExpected, 1)
		if len(c.Missing) > 0 {
			notes = append(notes, "missing: "+strings.Join(c.Missing, ", "))
		}
		row[cStatus], row[cFlags], row[cNotes] = c.Status, flagText(c.Flags), joinNotes(notes, c.Warnings, c.Errors)
		if err := write(row); err != nil {
			return err
		}
	}
	waters := make(map[string]*WaterTest, len(s.WaterTests))
	for i := range s.WaterTests {
		waters[s.WaterTests[i].ID] = &s.WaterTests[i]
	}
	for _, wt := range r.WaterTests {
		row := newRow("water_test", wt.SystemTag, wt.Tag)
		if sw := waters[wt.ID]; sw != nil {
			row[cKind] = sw.Fluid
			if sw.Fluid != "water" {
				row[cKind] += " " + fmtValue(sw.Concentration) + " %"
			}
		}
		row[cDesignWater], row[cWater] = csvNum(&wt.DesignFlow, waterDec), csvNum(wt.Flow, waterDec)
		if wt.Tolerance != nil {
			row[cPct] = csvNum(&wt.Tolerance.PercentOfDesign, 1)
		}
		row[cDP] = csvNum(wt.DP, 2)
		row[cEnterWater], row[cLeaveWater] = csvNum(wt.EnterTemp, 1), csvNum(wt.LeaveTemp, 1)
		if wt.Capacity != nil {
			row[cWaterCap] = csvNum(&wt.Capacity.Capacity, 0)
		}
		notes := append([]string{}, wt.Notes...)
		if len(wt.Missing) > 0 {
			notes = append(notes, "missing: "+strings.Join(wt.Missing, ", "))
		}
		if wt.AirSide != nil && wt.AirSide.Note != "" {
			notes = append(notes, wt.AirSide.Note)
		}
		row[cStatus], row[cFlags], row[cNotes] = wt.Status, flagText(wt.Flags), joinNotes(notes, wt.Errors)
		if err := write(row); err != nil {
			return err
		}
	}
	for _, ir := range r.Instruments {
		row := newRow("instrument", "", ir.Tag)
		row[cKind], row[cStatus] = ir.Kind, ir.CalibrationStatus
		var notes []string
		if ir.CalibrationDue != "" {
			notes = append(notes, "calibration due "+ir.CalibrationDue)
		}
		row[cNotes] = joinNotes(notes, ir.Errors)
		if err := write(row); err != nil {
			return err
		}
	}
	cw.Flush()
	return cw.Error()
}

// safeCell keeps a spreadsheet from running text as a formula: text whose
// first character (after any spaces) is =, +, - or @, or that starts with a
// tab or carriage return, gets a leading single quote. Plain numbers ("-3.5")
// are left alone: a spreadsheet reads them as numbers, not formulas.
func safeCell(s string) string {
	if s == "" || plainNumber.MatchString(s) {
		return s
	}
	if s[0] == '\t' || s[0] == '\r' {
		return "'" + s
	}
	if t := strings.TrimLeft(s, " "); t != "" && strings.ContainsRune("=+-@", rune(t[0])) {
		return "'" + s
	}
	return s
}

var plainNumber = regexp.MustCompile(`^-?[0-9]+(\.[0-9]+)?$`)

func csvNum(v *float64, decimals int) string {
	if v == nil || math.IsNaN(*v) || math.IsInf(*v, 0) {
		return ""
	}
	s := strconv.FormatFloat(*v, 'f', decimals, 64)
	if strings.TrimLeft(s, "-0.") == "" {
		s = strings.TrimPrefix(s, "-") // no "-0"
	}
	return s
}

func flagText(flags []Flag) string {
	var parts []string
	for _, f := range flags {
		parts = append(parts, f.Text)
	}
	return strings.Join(parts, " ")
}

func joinNotes(lists ...[]string) string {
	var parts []string
	for _, l := range lists {
		for _, s := range l {
			if s = strings.TrimSpace(s); s != "" {
				parts = append(parts, s)
			}
		}
	}
	return strings.Join(parts, "; ")
}

// WriteReadingsCSV writes every reading of s (superseded and void ones
// included, in the order stored) as one CSV table: when taken, the subject
// (kind, tag and its system), quantity, point, stage, value and unit as
// entered, the instrument's tag, the technician, whether the reading counts
// ("current", "superseded" or "void"), what it supersedes, its note and its
// ID. Formula-like text is quoted as in WriteResultsCSV. Errors: Invalid
// (field "snapshot") when s is nil; the writer's error.
func WriteReadingsCSV(w io.Writer, s *Snapshot) error {
	if s == nil {
		return Errorf(Invalid, "snapshot", "no job snapshot given")
	}
	sysTag := map[string]string{}
	for _, sy := range s.Systems {
		sysTag[sy.ID] = sy.Tag
	}
	type subj struct{ tag, system string }
	subjects := map[string]subj{}
	for _, sy := range s.Systems {
		subjects[SubjectSystem+"/"+sy.ID] = subj{sy.Tag, sy.Tag}
	}
	for _, o := range s.Outlets {
		subjects[SubjectOutlet+"/"+o.ID] = subj{o.Tag, sysTag[o.SystemID]}
	}
	for _, t := range s.Traverses {
		subjects[SubjectTraverse+"/"+t.ID] = subj{t.Tag, sysTag[t.SystemID]}
	}
	for _, c := range s.CapacityTests {
		subjects[SubjectCapacityTest+"/"+c.ID] = subj{c.Tag, sysTag[c.SystemID]}
	}
	for _, wt := range s.WaterTests {
		subjects[SubjectWaterTest+"/"+wt.ID] = subj{wt.Tag, sysTag[wt.SystemID]}
	}
	instTag := map[string]string{}
	for _, in := range s.Instruments {
		instTag[in.ID] = in.Tag
	}
	superseded := map[string]bool{}
	for _, r := range s.Readings {
		if r.Supersedes != "" {
			superseded[r.Supersedes] = true
		}
	}
	cw := csv.NewWriter(w)
	if err := cw.Write([]string{"taken at (UTC)", "system", "subject", "tag", "quantity", "point", "stage", "value", "unit",
		"instrument", "technician", "state", "supersedes", "note", "id"}); err != nil {
		return err
	}
	for _, r := range s.Readings {
		sb := subjects[r.SubjectKind+"/"+r.SubjectID]
		state := "current"
		switch {
		case r.Void:
			state = "void"
		case superseded[r.ID]:
			state = "superseded"
		}
		value := ""
		if r.Value != nil {
			value = strconv.FormatFloat(*r.Value, 'f', -1, 64)
		}
		point := ""
		if r.Point > 0 {
			point = strconv.Itoa(r.Point)
		}
		row := []string{r.TakenAt.UTC().Format(time.RFC3339), safeCell(sb.system), r.SubjectKind, safeCell(sb.tag), r.Quantity,
			point, r.Stage, value, safeCell(r.Unit), safeCell(instTag[r.InstrumentID]), safeCell(r.Technician), state,
			r.Supersedes, safeCell(r.Note), r.ID}
		if err := cw.Write(row); err != nil {
			return err
		}
	}
	cw.Flush()
	return cw.Error()
}

// ---- the whole job as JSON ----

// The job document's format name and version.
const (
	JobDocumentFormat  = "fieldtab-job"
	JobDocumentVersion = 1
)

// maxJobDocumentBytes bounds an imported job document (a large job with every
// reading is a few tens of MiB).
const maxJobDocumentBytes = 256 << 20

// JobDocument is a whole job as one JSON document: the job, its design records
// (deleted ones too when the snapshot has them, with "deleted": true) and every
// reading, superseded and void ones included. Seq numbers and readings'
// received_at are the exporting server's; an importing server keeps its own.
type JobDocument struct {
	Format  string `json:"format"`  // JobDocumentFormat
	Version int    `json:"version"` // JobDocumentVersion
	Snapshot
}

// WriteJobJSON writes s as one JobDocument: each record list in tag order
// (then by ID), readings in the order stored (by Seq). Give it the full
// history (ChangesSince(ctx, id, 0), or use ExportJobJSON), which holds the
// deleted records that old readings may name: a Snapshot leaves them out, and a
// document whose readings name an instrument it lacks will not import. Errors:
// Invalid (field "snapshot") when s is nil; the writer's error.
func WriteJobJSON(w io.Writer, s *Snapshot) error {
	if s == nil {
		return Errorf(Invalid, "snapshot", "no job snapshot given")
	}
	doc := JobDocument{Format: JobDocumentFormat, Version: JobDocumentVersion, Snapshot: Snapshot{Job: s.Job,
		Instruments: sortedByTag(s.Instruments, func(r *Instrument) (string, string) { return r.Tag, r.ID }),
		Systems:     sortedByTag(s.Systems, func(r *System) (string, string) { return r.Tag, r.ID }),
		Outlets:     sortedByTag(s.Outlets, func(r *Outlet) (string, string) { return r.Tag, r.ID }),
		Traverses:   sortedByTag(s.Traverses, func(r *Traverse) (string, string) { return r.Tag, r.ID }),
		CapacityTests: sortedByTag(s.CapacityTests,
			func(r *CapacityTest) (string, string) { return r.Tag, r.ID }),
		WaterTests: sortedByTag(s.WaterTests, func(r *WaterTest) (string, string) { return r.Tag, r.ID }),
		Readings:   append([]Reading{}, s.Readings...),
	}}
	sort.SliceStable(doc.Readings, func(i, j int) bool { return doc.Readings[i].Seq < doc.Readings[j].Seq })
	enc := json.NewEncoder(w)
	enc.SetEscapeHTML(false)
	return enc.Encode(&doc)
}

// sortedByTag returns a sorted copy, never nil (so the document has [] not null).
func sortedByTag[T any](list []T, key func(*T) (tag, id string)) []T {
	out := append(make([]T, 0, len(list)), list...)
	sortByTag(out, key)
	return out
}

// ExportJobJSON writes job jobID with its whole history (deleted records
// included) as a JobDocument, read in one transaction. Errors: NotFound.
func (db *DB) ExportJobJSON(ctx context.Context, jobID string, w io.Writer) error {
	s, err := db.ChangesSince(ctx, jobID, 0)
	if err != nil {
		return err
	}
	return WriteJobJSON(w, s)
}

// MergeReport is what ImportJobJSON did. Records are the design records
// (instruments, systems, outlets, traverses, capacity and water tests).
type MergeReport struct {
	JobID      string `json:"job_id"`
	JobCreated bool   `json:"job_created"` // the job was new here
	JobUpdated bool   `json:"job_updated"` // the incoming job was newer and replaced this one's fields
	Created    int    `json:"created"`     // records new here
	Updated    int    `json:"updated"`     // records replaced by a newer incoming version
	Skipped    int    `json:"skipped"`     // records this server holds in the same or a newer version
	Stored     int    `json:"stored"`      // readings new here
	Duplicate  int    `json:"duplicate"`   // readings this server already has
	// DevicesAdded counts the devices of the other server that readings name
	// and that were recorded here as revoked placeholders.
	DevicesAdded int `json:"devices_added"`
}

// ImportJobJSON imports a JobDocument (see WriteJobJSON) in one transaction,
// so that two crews working on separate servers can merge their work:
//   - a job whose ID is new here is created with its IDs, fields and times; an
//     existing one is merged: the incoming job's fields replace this one's
//     when its updated_at is later (its unit system must be the same);
//   - design records are a union by ID: a record new here is stored with its
//     times (and deleted flag); one this server has is replaced when the
//     incoming updated_at is later, else skipped;
//   - readings are a union by ID: an ID this server has in the job is a
//     duplicate; a new one is stored with its provenance as taken (taken_at,
//     technician, instrument, device, stage, note, what it supersedes);
//     received_at is this server's clock;
//   - a reading's device_id that this server does not know is kept, and the
//     device recorded as a revoked placeholder ("device of another server",
//     technician role, no token that can ever match), so provenance survives
//     without breaking the device reference;
//   - change numbers are this server's own.
//
// Records and readings are checked as when entered (Validate, references to
// records of the job), except that a reading's taken_at is not compared with
// this server's clock and a reading may be on a deleted record. Nothing is
// stored when anything fails.
//
// Errors: Invalid (field "format", "version", "job.…", or "outlets[3].…" and
// the like naming the list item) for a document that is not a valid job;
// Conflict when an ID belongs to another job here (field "….id"), a tag clashes
// with another record's (field "….tag"), or the unit systems differ (field
// "job.units"); the reader's or store's failure, wrapped.
func (db *DB) ImportJobJSON(ctx context.Context, a Actor, r io.Reader) (MergeReport, error) {
	var doc JobDocument
	src := &countingReader{r: io.LimitReader(r, maxJobDocumentBytes+1)}
	dec := json.NewDecoder(src)
	dec.DisallowUnknownFields()
	err := dec.Decode(&doc)
	if err == nil {
		if _, terr := dec.Token(); terr != io.EOF {
			err = errors.New("unexpected data after the job document")
		}
	}
	switch {
	case src.err != nil:
		return MergeReport{}, fmt.Errorf("import job: read: %w", src.err)
	case src.n > maxJobDocumentBytes:
		return MergeReport{}, Errorf(Invalid, "document", "is larger than %d MiB", maxJobDocumentBytes>>20)
	case err != nil:
		return MergeReport{}, Errorf(Invalid, "document", "not a fieldtab job document: %v", err)
	}
	if err := doc.check(db.Now()); err != nil {
		return MergeReport{}, err
	}
	rep := MergeReport{JobID: doc.Job.ID}
	at, now := db.stamp()
	err = db.writeTx(ctx, func(tx *sql.Tx) error {
		m := &merger{ctx: ctx, tx: tx, a: a, at: at, now: now, doc: &doc, rep: &rep}
		return m.run()
	})
	if err != nil {
		return MergeReport{}, wrapStore("import job", err)
	}
	return rep, nil
}

// countingReader counts the bytes read and keeps the reader's own error, so
// that a failing upload is not reported as a bad document.
type countingReader struct {
	r   io.Reader
	n   int64
	err error
}

func (c *countingReader) Read(p []byte) (int, error) {
	n, err := c.r.Read(p)
	c.n += int64(n)
	if err != nil && err != io.EOF {
		c.err = err
	}
	return n, err
}

// check validates a document without the store.
func (d *JobDocument) check(now time.Time) error {
	if d.Format != JobDocumentFormat {
		return Errorf(Invalid, "format", "%q is not %q: this is not a fieldtab job document", d.Format, JobDocumentFormat)
	}
	if d.Version != JobDocumentVersion {
		if d.Version > JobDocumentVersion {
			return Errorf(Invalid, "version", "version %d was written by a newer fieldtab (this one reads version %d): upgrade fieldtab",
				d.Version, JobDocumentVersion)
		}
		return Errorf(Invalid, "version", "version %d is not accepted; this fieldtab reads version %d", d.Version, JobDocumentVersion)
	}
	j := &d.Job
	if j.ID == "" {
		return Errorf(Invalid, "job.id", "is required")
	}
	if err := j.Validate(); err != nil {
		return prefixField("job", err)
	}
	if j.Status == "" {
		j.Status = JobOpen
	}
	if j.Tolerances == (Tolerances{}) {
		j.Tolerances = DefaultTolerances()
	}
	u, _ := j.UnitSystem()
	ids := map[string]string{}
	checkList := func(list string, n int, rec func(i int) designRecord) error {
		for i := 0; i < n; i++ {
			r := rec(i)
			keys, where := r.keys(), fmt.Sprintf("%s[%d]", list, i)
			if *keys.id == "" {
				return Errorf(Invalid, where+".id", "is required")
			}
			if *keys.jobID != j.ID {
				return Errorf(Invalid, where+".job_id", "is %q, not the document's job %s", *keys.jobID, j.ID)
			}
			if err := r.validate(u); err != nil {
				return prefixField(where, err)
			}
			key := r.kind().table + "/" + *keys.id
			if other, dup := ids[key]; dup {
				return Errorf(Invalid, where+".id", "%s is also %s", *keys.id, other)
			}
			ids[key] = where
		}
		return nil
	}
	for _, l := range []struct {
		name string
		n    int
		rec  func(i int) designRecord
	}{
		{"instruments", len(d.Instruments), func(i int) designRecord { return &d.Instruments[i] }},
		{"systems", len(d.Systems), func(i int) designRecord { return &d.Systems[i] }},
		{"outlets", len(d.Outlets), func(i int) designRecord { return &d.Outlets[i] }},
		{"traverses", len(d.Traverses), func(i int) designRecord { return &d.Traverses[i] }},
		{"capacity_tests", len(d.CapacityTests), func(i int) designRecord { return &d.CapacityTests[i] }},
		{"water_tests", len(d.WaterTests), func(i int) designRecord { return &d.WaterTests[i] }},
	} {
		if err := checkList(l.name, l.n, l.rec); err != nil {
			return err
		}
	}
	seen := make(map[string]int, len(d.Readings))
	for i := range d.Readings {
		r := &d.Readings[i]
		where := fmt.Sprintf("readings[%d]", i)
		if r.JobID == "" {
			r.JobID = j.ID
		}
		if r.JobID != j.ID {
			return Errorf(Invalid, where+".job_id", "is %q, not the document's job %s", r.JobID, j.ID)
		}
		// The entering server checked the device's clock; this one's may differ.
		if err := r.Validate(laterOf(now, r.TakenAt)); err != nil {
			return prefixField(where, err)
		}
		if k, dup := seen[r.ID]; dup {
			return Errorf(Invalid, where+".id", "%s is also readings[%d]", r.ID, k)
		}
		seen[r.ID] = i
	}
	return nil
}

func laterOf(a, b time.Time) time.Time {
	if b.After(a) {
		return b
	}
	return a
}

// prefixField puts prefix before an *Error's field ("outlets[3]" + "tag").
func prefixField(prefix string, err error) error {
	var e *Error
	if !errors.As(err, &e) {
		return err
	}
	field := prefix
	if e.Field != "" {
		field += "." + e.Field
	}
	return &Error{Code: e.Code, Field: field, Message: e.Message}
}

// merger is the state of one ImportJobJSON transaction.
type merger struct {
	ctx     context.Context
	tx      *sql.Tx
	a       Actor
	at      time.Time
	now     string
	doc     *JobDocument
	rep     *MergeReport
	units   measure.UnitSystem
	devices map[string]bool
}

func (m *merger) run() error {
	if err := m.job(); err != nil {
		return err
	}
	d := m.doc
	// First the incoming deletions of records held here, dependents before
	// what they depend on, as Delete requires; then everything else, what is
	// depended on first.
	for _, deletions := range []bool{true, false} {
		steps := []func() error{
			func() error { return mergeRecords[Outlet](m, "outlets", d.Outlets, deletions) },
			func() error { return mergeRecords[WaterTest](m, "water_tests", d.WaterTests, deletions) },
			func() error { return mergeRecords[CapacityTest](m, "capacity_tests", d.CapacityTests, deletions) },
			func() error { return mergeRecords[Traverse](m, "traverses", d.Traverses, deletions) },
			func() error { return mergeRecords[System](m, "systems", d.Systems, deletions) },
			func() error { return mergeRecords[Instrument](m, "instruments", d.Instruments, deletions) },
		}
		if !deletions {
			slices.Reverse(steps)
		}
		for _, step := range steps {
			if err := step(); err != nil {
				return err
			}
		}
	}
	if err := m.readings(); err != nil {
		return err
	}
	r := m.rep
	if r.JobCreated || r.JobUpdated || r.Created+r.Updated+r.Stored+r.DevicesAdded > 0 {
		return addAudit(m.tx, m.at, m.a, d.Job.ID, "import", "job", d.Job.ID, map[string]any{
			"job_created": r.JobCreated, "job_updated": r.JobUpdated, "created": r.Created, "updated": r.Updated,
			"skipped": r.Skipped, "stored": r.Stored, "duplicate": r.Duplicate, "devices_added": r.DevicesAdded})
	}
	return nil
}

// stampOr is t as stored text, or the import's time when t is zero.
func (m *merger) stampOr(t time.Time) string {
	if t.IsZero() {
		return m.now
	}
	return t.UTC().Truncate(time.Millisecond).Format(timeLayout)
}

func (m *merger) job() error {
	j := m.doc.Job
	m.units, _ = j.UnitSystem()
	_, data, err := encodeData(&j, jobColumnKeys)
	if err != nil {
		return err
	}
	old, err := loadJob(m.tx, j.ID, nil)
	var e *Error
	if errors.As(err, &e) && e.Code == NotFound {
		_, err := m.tx.Exec("INSERT INTO jobs (id, data, seq, created_at, updated_at) VALUES (?, ?, 1, ?, ?)",
			j.ID, data, m.stampOr(j.CreatedAt), m.stampOr(j.UpdatedAt))
		if err != nil {
			return err
		}
		m.rep.JobCreated = true
		return nil
	}
	if err != nil {
		return err
	}
	if old.Units != j.Units {
		return Errorf(Conflict, "job.units", "the document's job is in %s units, this server's copy in %s: they cannot be merged",
			j.Units, old.Units)
	}
	if !j.UpdatedAt.After(old.UpdatedAt) {
		return nil
	}
	seq, err := nextSeq(m.tx, j.ID)
	if err != nil {
		return err
	}
	if _, err := m.tx.Exec("UPDATE jobs SET data = ?, updated_at = ? WHERE id = ?", data, m.stampOr(j.UpdatedAt), j.ID); err != nil {
		return err
	}
	m.rep.JobUpdated = true
	return addAudit(m.tx, m.at, m.a, j.ID, "import", "job", j.ID, map[string]any{"seq": seq, "as": "update"})
}

// mergeRecords merges one list of design records: with deletions, only the
// incoming deletions of records this server holds; otherwise the rest,
// incoming deletions first so that a live record may take the tag of one
// deleted meanwhile.
func mergeRecords[T any, P recordPtr[T]](m *merger, list string, recs []T, deletions bool) error {
	order := make([]int, len(recs))
	for i := range order {
		order[i] = i
	}
	sort.SliceStable(order, func(x, y int) bool {
		return P(&recs[order[x]]).meta().Deleted && !P(&recs[order[y]]).meta().Deleted
	})
	for _, i := range order {
		if err := m.record(P(&recs[i]), deletions); err != nil {
			return prefixField(fmt.Sprintf("%s[%d]", list, i), err)
		}
	}
	return nil
}

// record merges one design record in the deletion phase or the main one (see
// mergeRecords).
func (m *merger) record(rec designRecord, deletions bool) error {
	k, keys, meta := rec.kind(), rec.keys(), *rec.meta()
	var job, updated string
	err := m.tx.QueryRow("SELECT job_id, updated_at FROM "+k.table+" WHERE id = ?", *keys.id).Scan(&job, &updated)
	exists := err == nil
	switch {
	case errors.Is(err, sql.ErrNoRows):
	case err != nil:
		return err
	case job != *keys.jobID:
		return Errorf(Conflict, "id", "%s %s belongs to another job on this server", strings.ReplaceAll(k.entity, "_", " "), *keys.id)
	}
	if deletions != (exists && meta.Deleted) {
		return nil // the other phase's
	}
	if exists {
		stored, err := parseStamp(updated)
		if err != nil {
			return err
		}
		if !meta.UpdatedAt.After(stored) {
			m.rep.Skipped++
			return nil
		}
	}
	if deletions {
		if err := m.checkNoDependents(k, keys); err != nil {
			return err
		}
	} else if err := m.checkRecordRefs(rec); err != nil {
		return err
	}
	_, data, err := encodeData(rec, recordColumnKeys)
	if err != nil {
		return err
	}
	var seq int64
	action := "create"
	if exists {
		action = "update"
		seq, err = updateRecordRow(m.tx, k, keys, data, m.stampOr(meta.UpdatedAt), meta.Deleted)
		m.rep.Updated++
	} else {
		seq, err = insertRecordRow(m.tx, k, keys, data, m.stampOr(meta.CreatedAt), m.stampOr(meta.UpdatedAt), meta.Deleted)
		m.rep.Created++
	}
	if err != nil {
		return err
	}
	return addAudit(m.tx, m.at, m.a, *keys.jobID, "import", k.entity, *keys.id,
		map[string]any{"seq": seq, "tag": keys.tag, "as": action, "deleted": meta.Deleted})
}

// checkNoDependents refuses an incoming deletion of a record that live
// records here still refer to (records the other server did not know), as
// Delete does.
func (m *merger) checkNoDependents(k *recordKind, keys recordKeys) error {
	var still []string
	for _, d := range k.dependents {
		var n int
		err := m.tx.QueryRow("SELECT COUNT(*) FROM "+d.table+" WHERE job_id = ? AND deleted = 0 AND "+d.column+" = ?",
			*keys.jobID, *keys.id).Scan(&n)
		if err != nil {
			return err
		}
		if n > 0 {
			still = append(still, plural(n, d.entity))
		}
	}
	if len(still) > 0 {
		return Errorf(Conflict, "deleted", "%s %s is deleted in the document but still has %s on this server; delete or move them first",
			strings.ReplaceAll(k.entity, "_", " "), keys.tag, strings.Join(still, ", "))
	}
	return nil
}

// checkRecordRefs requires a live record's references to be live records of
// the job; a deleted record's need only exist (the database's references).
func (m *merger) checkRecordRefs(rec designRecord) error {
	jobID := *rec.keys().jobID
	if !rec.meta().Deleted {
		return checkRefs(m.tx, jobID, rec.refs())
	}
	for _, r := range rec.refs() {
		var one int
		err := m.tx.QueryRow("SELECT 1 FROM "+r.table+" WHERE id = ? AND job_id = ?", r.id, jobID).Scan(&one)
		if errors.Is(err, sql.ErrNoRows) {
			return Errorf(Invalid, r.field, "no %s %s in this job or the document", r.entity, r.id)
		}
		if err != nil {
			return err
		}
	}
	return nil
}

// readings stores the document's readings, each after the one it supersedes.
func (m *merger) readings() error {
	d := m.doc
	index := make(map[string]int, len(d.Readings))
	for i := range d.Readings {
		index[d.Readings[i].ID] = i
	}
	state := make([]uint8, len(d.Readings)) // 0 to do, 1 in progress, 2 done
	m.devices = map[string]bool{}
	lookup, err := m.tx.PrepareContext(m.ctx, "SELECT job_id FROM readings WHERE id = ?")
	if err != nil {
		return err
	}
	defer lookup.Close()
	insert, err := m.tx.PrepareContext(m.ctx, insertReadingSQL)
	if err != nil {
		return err
	}
	defer insert.Close()
	var add func(i int) error
	add = func(i int) error {
		switch state[i] {
		case 2:
			return nil
		case 1:
			return Errorf(Invalid, fmt.Sprintf("readings[%d].supersedes", i), "the readings supersede each other in a loop")
		}
		state[i] = 1
		r := &d.Readings[i]
		if j, ok := index[r.Supersedes]; ok && r.Supersedes != "" {
			if err := add(j); err != nil {
				return err
			}
		}
		if err := m.reading(r, lookup, insert); err != nil {
			return prefixField(fmt.Sprintf("readings[%d]", i), err)
		}
		state[i] = 2
		return nil
	}
	for i := range d.Readings {
		if err := add(i); err != nil {
			return err
		}
	}
	return nil
}

func (m *merger) reading(r *Reading, lookup, insert *sql.Stmt) error {
	var job string
	err := lookup.QueryRowContext(m.ctx, r.ID).Scan(&job)
	switch {
	case err == nil && job == r.JobID:
		m.rep.Duplicate++
		return nil
	case err == nil:
		return Errorf(Conflict, "id", "reading %s belongs to another job on this server", r.ID)
	case !errors.Is(err, sql.ErrNoRows):
		return err
	}
	if err := m.exists(subjectTables[r.SubjectKind], "subject_id", r.SubjectID, "no %s %s in this job or the document",
		strings.ReplaceAll(r.SubjectKind, "_", " ")); err != nil {
		return err
	}
	if r.InstrumentID != "" {
		if err := m.exists("instruments", "instrument_id", r.InstrumentID,
			"no %s %s in this job or the document (export the job with its deleted records: ExportJobJSON)", "instrument"); err != nil {
			return err
		}
	}
	if err := checkSupersedes(func(q string, args ...any) rowScanner { return m.tx.QueryRowContext(m.ctx, q, args...) }, r.JobID, r); err != nil {
		return err
	}
	if r.DeviceID != "" {
		if err := m.device(r.DeviceID); err != nil {
			return err
		}
	}
	seq, err := nextSeq(m.tx, r.JobID)
	if err != nil {
		return err
	}
	_, err = insert.ExecContext(m.ctx, r.ID, r.JobID, r.SubjectKind, r.SubjectID, r.Quantity, r.Point, r.Value, r.Unit,
		r.Stage, nullString(r.InstrumentID), r.Technician, nullString(r.DeviceID), r.TakenAt.UTC().Format(timeLayout), m.now,
		nullString(r.Supersedes), r.Void, r.Note, seq, r.Confirmed)
	if err != nil {
		return fmt.Errorf("store reading %s: %w", r.ID, err)
	}
	m.rep.Stored++
	return nil
}

// exists requires a row of table with id in the document's job, deleted or
// not; msg gets the entity and id.
func (m *merger) exists(table, field, id, msg, entity string) error {
	var one int
	err := m.tx.QueryRow("SELECT 1 FROM "+table+" WHERE id = ? AND job_id = ?", id, m.doc.Job.ID).Scan(&one)
	if errors.Is(err, sql.ErrNoRows) {
		return Errorf(Invalid, field, msg, entity, id)
	}
	return err
}

// device makes sure a reading's device is known here, recording an unknown
// one as a revoked placeholder whose token hash no token can match (a real
// hash is hex; this one has a colon).
func (m *merger) device(id string) error {
	if m.devices[id] {
		return nil
	}
	var one int
	err := m.tx.QueryRow("SELECT 1 FROM devices WHERE id = ?", id).Scan(&one)
	if err == nil {
		m.devices[id] = true
		return nil
	}
	if !errors.Is(err, sql.ErrNoRows) {
		return err
	}
	name := "device of another server"
	if len(id) >= 8 {
		name += " (" + id[:8] + ")"
	}
	_, err = m.tx.Exec("INSERT INTO devices (id, name, role, token_hash, created_at, revoked_at) VALUES (?, ?, ?, ?, ?, ?)",
		id, name, RoleTechnician, "imported:"+id, m.now, m.now)
	if isConstraint(err, sqlite3.ErrConstraintUnique) || isConstraint(err, sqlite3.ErrConstraintPrimaryKey) {
		return Errorf(Conflict, "device_id", "device %s cannot be recorded here", id)
	}
	if err != nil {
		return err
	}
	m.devices[id] = true
	m.rep.DevicesAdded++
	return addAudit(m.tx, m.at, m.a, "", "import", "device", id, map[string]any{"name": name, "revoked": true, "job_id": m.doc.Job.ID})
}
