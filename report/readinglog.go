package report

import (
	"fmt"
	"strconv"
	"strings"

	"fieldtab/schema"
)

// readingLog lists every reading stored for the job, superseded and void ones
// included, in the order the store received them: the record behind every
// figure in the report, and what was corrected on site. Each row says
// whether the reading counts and, when it does not, what took its place.
func (d *doc) readingLog() {
	rs := d.s.Readings
	d.heading(0, "Reading log")
	if len(rs) == 0 {
		d.para("No readings are stored for this job.", "", sizeBody)
		return
	}
	d.para(fmt.Sprintf("All %s readings as entered (a hood reading before the outlet's correction factor), in the order they reached the store, times in the report's time zone. "+
		"A correction replaces the reading it names and a void (no value) withdraws one, with its reason; both stay on record. "+
		"Of the readings left, the latest taken of each item, point and stage counts; only readings marked \u201ccounts\u201d "+
		"enter the figures above. \u201cConfirmed\u201d marks a value the technician confirmed when it was far from design or "+
		"from its neighbours.", d.count(len(rs))), "", sizeBody)
	lg := newLogIndex(rs)
	labels := schema.UnitLabels()
	t := d.newTable(column{head: "Taken", w: 1.75}, column{head: "On", w: 1.15}, column{head: "Reading", w: 1.7},
		column{head: "Stage", w: 0.9}, column{head: "Value", w: 1.45, align: "R"}, column{head: "Instrument", w: 1.75},
		column{head: "By", w: 1.2}, column{head: "Status and remarks", w: 2.65})
	t.strong = func(col int, s string) bool { return col == 7 && strings.HasPrefix(s, "counts") }
	for i := range rs {
		r := &rs[i]
		valve := false
		if w := d.waters[r.SubjectID]; w != nil && r.SubjectKind == schema.SubjectWaterTest {
			valve = w.FlowSource == "valve"
		}
		what := quantityName(r.SubjectKind, r.Quantity, r.Point, valve)
		inst := dash
		if in := d.insts[r.InstrumentID]; in != nil {
			inst = in.Tag
		}
		t.row(d.dateTime(r.TakenAt), d.subjectTag(r.SubjectKind, r.SubjectID), what, label(r.Stage),
			d.readingValue(r, labels), inst, orDash(r.Technician), d.logStatus(r, lg, labels))
	}
	t.end()
}

// logIndex is what the log needs to know about each reading's fate.
type logIndex struct {
	byID       map[string]*schema.Reading
	replacedBy map[string]*schema.Reading
	latest     map[logKey]*schema.Reading // the current reading that counts, per key
	current    map[logKey]int             // how many current readings share the key
}

type logKey struct {
	kind, subject, qty, stage string
	point                     int
}

func keyOf(r *schema.Reading) logKey {
	return logKey{r.SubjectKind, r.SubjectID, r.Quantity, r.Stage, r.Point}
}

func newLogIndex(rs []schema.Reading) *logIndex {
	lg := &logIndex{byID: make(map[string]*schema.Reading, len(rs)), replacedBy: make(map[string]*schema.Reading, len(rs)/8),
		latest: make(map[logKey]*schema.Reading, len(rs)), current: make(map[logKey]int, len(rs))}
	for i := range rs {
		lg.byID[rs[i].ID] = &rs[i]
		if rs[i].Supersedes != "" {
			lg.replacedBy[rs[i].Supersedes] = &rs[i]
		}
	}
	// The same rule as the results: of the current readings of an item,
	// quantity, point and stage, the latest taken counts (then the later stored).
	for i := range rs {
		r := &rs[i]
		if r.Void || lg.replacedBy[r.ID] != nil {
			continue
		}
		k := keyOf(r)
		lg.current[k]++
		if b := lg.latest[k]; b == nil || r.TakenAt.After(b.TakenAt) || (r.TakenAt.Equal(b.TakenAt) && r.Seq >= b.Seq) {
			lg.latest[k] = r
		}
	}
	return lg
}

// readingValue is the value as entered, its thousands grouped, with its unit.
func (d *doc) readingValue(r *schema.Reading, labels map[string]string) string {
	if r.Value == nil {
		return dash
	}
	s := strconv.FormatFloat(*r.Value, 'f', -1, 64)
	dec := 0
	if i := strings.IndexByte(s, '.'); i >= 0 {
		dec = len(s) - i - 1
	}
	return nu(formatNumber(*r.Value, dec, d.u.si), labels[r.Unit])
}

// logStatus says whether r counts and, if not, why: what superseded it,
// the void that withdrew it and its reason, or the later reading that counts.
func (d *doc) logStatus(r *schema.Reading, lg *logIndex, labels map[string]string) string {
	at := func(x *schema.Reading) string {
		s := d.dateTime(x.TakenAt)
		if x.Value != nil {
			s += " (" + d.readingValue(x, labels) + ")"
		}
		return s
	}
	var parts []string
	by := lg.replacedBy[r.ID]
	switch {
	case r.Void:
		reason := "no reason given"
		if strings.TrimSpace(r.Note) != "" {
			reason = "reason: " + r.Note
		}
		target := "a reading"
		if x := lg.byID[r.Supersedes]; x != nil {
			target = "the reading of " + at(x)
		}
		if by != nil {
			parts = append(parts, "void of "+target+", itself withdrawn on "+at(by))
		} else {
			parts = append(parts, "void: withdraws "+target+"; "+reason)
		}
	case by != nil && by.Void:
		reason := "no reason given"
		if strings.TrimSpace(by.Note) != "" {
			reason = by.Note
		}
		parts = append(parts, "voided on "+d.dateTime(by.TakenAt)+": "+reason)
	case by != nil:
		parts = append(parts, "superseded by the correction of "+at(by))
	case lg.latest[keyOf(r)] != r:
		parts = append(parts, "does not count: the reading of "+at(lg.latest[keyOf(r)])+" is later")
	case lg.current[keyOf(r)] > 1:
		parts = append(parts, fmt.Sprintf("counts (latest of %d)", lg.current[keyOf(r)]))
	default:
		parts = append(parts, "counts")
	}
	if r.Supersedes != "" && !r.Void {
		if x := lg.byID[r.Supersedes]; x != nil {
			parts = append(parts, "corrects the reading of "+at(x))
		}
	}
	if r.Confirmed {
		parts = append(parts, "confirmed far from design or its neighbours")
	}
	if !r.Void && strings.TrimSpace(r.Note) != "" {
		parts = append(parts, "remark: "+r.Note)
	}
	return strings.Join(parts, "; ")
}

// subjectTag names what a reading was taken on, by its kind and tag.
func (d *doc) subjectTag(kind, id string) string {
	tag := ""
	switch kind {
	case schema.SubjectOutlet:
		if o := d.outlets[id]; o != nil {
			tag = o.Tag
		}
	case schema.SubjectTraverse:
		if t := d.traverses[id]; t != nil {
			tag = t.Tag
		}
	case schema.SubjectCapacityTest:
		if c := d.captests[id]; c != nil {
			tag = c.Tag
		}
	case schema.SubjectWaterTest:
		if w := d.waters[id]; w != nil {
			tag = w.Tag
		}
	case schema.SubjectSystem:
		if s := d.systems[id]; s != nil {
			tag = s.Tag
		}
	}
	if tag == "" {
		return label(kind) + " (deleted)"
	}
	return tag
}
