package report

import (
	"fieldtab/schema"
)

// outletTables lists every outlet, system by system.
func (d *doc) outletTables() {
	if len(d.r.Outlets) == 0 {
		return
	}
	u := d.u
	d.heading(0, "Outlets")
	tol := d.s.Job.Tolerances
	d.para("Flows in "+u.AirFlow+". The % of design and the status are the final reading's, else the as-found one's, against "+
		"the outlet tolerance of −"+u.pct(tol.OutletLowPct)+" / +"+u.pct(tol.OutletHighPct)+" with the instrument's accuracy "+
		"carried through; an undetermined status says on which side of the limit the reading lies. A status marked * rests on a "+
		"reading taken with an instrument past its calibration date, one marked † on a reading with no instrument accuracy on "+
		"record, judged as read with no ±.", "", sizeBody)

	bySystem := make(map[string][]*schema.OutletResult, len(d.r.Systems))
	for i := range d.r.Outlets {
		o := &d.r.Outlets[i]
		bySystem[o.SystemID] = append(bySystem[o.SystemID], o)
	}
	for _, sr := range d.r.Systems {
		list := bySystem[sr.ID]
		if len(list) == 0 {
			continue
		}
		title := "System " + sr.Tag
		if sr.Name != "" {
			title += ": " + sr.Name
		}
		d.outletTable(title, list)
		delete(bySystem, sr.ID)
	}
	// Outlets whose system is not in the job (results keep them), in the
	// results' order.
	var orphans []*schema.OutletResult
	for i := range d.r.Outlets {
		if o := &d.r.Outlets[i]; bySystem[o.SystemID] != nil {
			orphans = append(orphans, o)
		}
	}
	if len(orphans) > 0 {
		d.outletTable("Outlets of no system on record", orphans)
	}
}

func (d *doc) outletTable(title string, list []*schema.OutletResult) {
	u := d.u
	d.heading(1, title)
	t := d.newTable(column{head: "Tag", w: 1.3}, column{head: "Room", w: 3.2}, column{head: "Kind", w: 1.2},
		column{head: "Size", w: 1.3}, column{head: "Design", w: 1.1, align: "R"}, column{head: "As found", w: 1.1, align: "R"},
		column{head: "Final", w: 1.1, align: "R"}, column{head: "% of design", w: 1, align: "R"}, column{head: "Status", w: 1.4})
	t.strong = func(col int, s string) bool { return col == 8 && deficientLabel(s) }
	for _, o := range list {
		size := dash
		if oo := d.outlets[o.ID]; oo != nil {
			size = orDash(oo.Size)
		}
		pctD := dash
		if g := governing(o); g != nil && g.Tolerance != nil {
			pctD = u.pct(g.Tolerance.PercentOfDesign)
		}
		st := status(o.Status)
		if g := governing(o); g != nil && g.Tolerance != nil && g.Tolerance.Status == o.Status {
			st = tolStatus(g.Tolerance, true)
			if g.Tolerance.UncertaintyUnknown {
				st += " †"
			}
		}
		for _, f := range o.Flags {
			if f.Kind == schema.FlagInstrumentOverdue {
				st += " *"
				break
			}
		}
		t.row(o.Tag, orDash(o.Room), label(o.Kind), size, u.air(o.DesignFlow), stageFlow(u, o.AsFound),
			stageFlow(u, o.Final), pctD, st)
	}
	t.end()
	for _, o := range list {
		d.itemNotes(o.Tag, nil, nil, nil, o.Errors)
	}
}

// stageFlow is a stage's flow, or what was read when it gave none.
func stageFlow(u units, r *schema.OutletReading) string {
	switch {
	case r == nil:
		return dash
	case r.Flow != nil:
		return u.air(*r.Flow)
	}
	return "read, not computed"
}
