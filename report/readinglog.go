package report

import (
	"fmt"
	"strconv"

	"fieldtab/schema"
)

// readingLog lists every reading stored for the job, superseded and void ones
// included, in the order the store received them: the record behind every
// figure in the report, and what was corrected on site.
func (d *doc) readingLog() {
	rs := d.s.Readings
	d.heading(0, "Reading log")
	if len(rs) == 0 {
		d.para("No readings are stored for this job.", "", sizeBody)
		return
	}
	d.para(fmt.Sprintf("All %d readings as entered, in the order they reached the store, times in the report's time zone. "+
		"A correction replaces the reading it names and a void (no value) removes one; both stay on record. "+
		"Only readings marked \u201ccounts\u201d enter the figures above.", len(rs)), "", sizeBody)
	replacedBy := make(map[string]*schema.Reading, len(rs)/8)
	for i := range rs {
		if rs[i].Supersedes != "" {
			replacedBy[rs[i].Supersedes] = &rs[i]
		}
	}
	labels := schema.UnitLabels()
	t := d.newTable(column{head: "Taken", w: 1.6}, column{head: "On", w: 1.9}, column{head: "Reading", w: 1.7},
		column{head: "Stage", w: 1}, column{head: "Value", w: 1.4, align: "R"}, column{head: "Instrument", w: 1.2},
		column{head: "By", w: 1.3}, column{head: "Status", w: 1.4})
	for i := range rs {
		r := &rs[i]
		what := label(r.Quantity)
		if r.Point > 0 {
			what += " " + strconv.Itoa(r.Point)
		}
		value := dash
		if r.Value != nil {
			value = strconv.FormatFloat(*r.Value, 'f', -1, 64)
			if l := labels[r.Unit]; l != "" {
				value += " " + l
			}
		}
		inst := dash
		if in := d.insts[r.InstrumentID]; in != nil {
			inst = in.Tag
		}
		st := "counts"
		switch by := replacedBy[r.ID]; {
		case r.Void && by == nil:
			st = "void" // removes the reading it names
		case by != nil && by.Void:
			st = "voided"
		case by != nil:
			st = "corrected"
		}
		t.row(d.dateTime(r.TakenAt), d.subjectTag(r.SubjectKind, r.SubjectID), what, label(r.Stage), value, inst,
			orDash(r.Technician), st)
	}
	t.end()
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
