package report

import (
	"strings"

	"fieldtab/schema"
)

// Remarks: each record's own remark, and the notes the crew entered with
// its readings, printed beside the record they concern.

// remarkPair is a "Remarks" label–value row, or none for an empty remark.
func remarkPair(s string) [][2]string {
	if strings.TrimSpace(s) == "" {
		return nil
	}
	return [][2]string{{"Remarks", s}}
}

// readingNotes are the notes of the current readings taken on a subject
// (superseded and void ones are in the reading log), as "what: note".
func (d *doc) readingNotes(kind, id string) []string {
	if d.notesBy == nil {
		d.notesBy = map[string][]string{}
		replaced := map[string]bool{}
		for i := range d.s.Readings {
			if r := &d.s.Readings[i]; r.Supersedes != "" {
				replaced[r.Supersedes] = true
			}
		}
		for i := range d.s.Readings {
			r := &d.s.Readings[i]
			if r.Void || replaced[r.ID] || (strings.TrimSpace(r.Note) == "" && !r.Confirmed) {
				continue
			}
			valve := false
			if w := d.waters[r.SubjectID]; w != nil && r.SubjectKind == schema.SubjectWaterTest {
				valve = w.FlowSource == "valve"
			}
			what := quantityName(r.SubjectKind, r.Quantity, r.Point, valve) + " (" + label(r.Stage) + ", " + d.dateTime(r.TakenAt) + ")"
			var text []string
			if n := strings.TrimSpace(r.Note); n != "" {
				text = append(text, n)
			}
			if r.Confirmed {
				text = append(text, "value confirmed far from design or its neighbours")
			}
			k := r.SubjectKind + "/" + r.SubjectID
			d.notesBy[k] = append(d.notesBy[k], what+": "+strings.Join(text, "; "))
		}
	}
	return d.notesBy[kind+"/"+id]
}

// remarks prints a record's own remark and its readings' notes under its tag.
func (d *doc) remarks(tag, own, kind, id string) {
	var mine []string
	if strings.TrimSpace(own) != "" {
		mine = []string{own}
	}
	d.notes(noteGroup{tag + ", remarks", mine}, noteGroup{tag + ", reading remark", d.readingNotes(kind, id)})
}
