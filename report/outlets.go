package report

import (
	"strings"

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
	d.para("Flows in "+u.AirFlow+", as measured (not corrected to standard air). The % of design and the status are the final "+
		"reading's, else the as-found one's, against the outlet tolerance of −"+u.pct(tol.OutletLowPct)+" / +"+
		u.pct(tol.OutletHighPct)+tolSource(tol)+" with the instrument's accuracy carried through; an undetermined status says on "+
		"which side of the limit the reading lies. A status marked * rests on a reading taken with an instrument past its "+
		"calibration date, one marked † on a reading with no instrument accuracy on record, judged as read with no ±. "+
		"Remarks are the outlet's own and those entered with its readings. Each system's totals by kind close its table; their "+
		"% of design is the final flows, else the as-found ones, over the design of the outlets read.", "", sizeBody)

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
	// The remarks column only where an outlet has a remark: without it the
	// table keeps the room and size wide enough for one line.
	remarks := make([]string, len(list))
	withRemarks := false
	for i, o := range list {
		own := ""
		if oo := d.outlets[o.ID]; oo != nil {
			own = oo.Remarks
		}
		remarks[i] = d.outletRemarks(own, o)
		withRemarks = withRemarks || remarks[i] != ""
	}
	cols := []column{{head: "Tag", w: 1.3}, {head: "Room", w: 3.2}, {head: "Kind", w: 1.2},
		{head: "Size", w: 1.3}, {head: "Design", w: 1.1, align: "R"}, {head: "As found", w: 1.15, align: "R"},
		{head: "Final", w: 1.05, align: "R"}, {head: "% of design", w: 1, align: "R"}, {head: "Status", w: 1.5}}
	if withRemarks {
		cols[1].w, cols[3].w, cols[8].w = 2.2, 1.2, 1.7
		cols = append(cols, column{head: "Remarks", w: 2.5})
	}
	t := d.newTable(cols...)
	t.strong = func(col int, s string) bool { return (col == 8 && deficientLabel(s)) || (col == 0 && s == "Total") }
	for i, o := range list {
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
			stageFlow(u, o.Final), pctD, st, remarks[i])
	}
	var partial []string
	for _, k := range schema.OutletTotals(list) {
		what := label(k.Kind) + ", " + d.count(k.Read) + " of " + d.count(k.Outlets) + " read"
		note := ""
		if k.Read > 0 && k.Read < k.Outlets {
			note = "% of the design of those read (" + u.airU(k.DesignRead) + ")"
			partial = append(partial, label(k.Kind)+" total: "+note)
		}
		af, fin := dash, dash
		if k.AsFoundRead > 0 {
			af = u.air(k.AsFound)
		}
		if k.FinalRead > 0 {
			fin = u.air(k.Final)
		}
		t.row("Total", what, "", "", u.air(k.Design), af, fin, u.pctP(k.PercentOfDesign), "", note)
	}
	t.end()
	if !withRemarks {
		d.notes(noteGroup{"Note", partial})
	}
	for _, o := range list {
		d.itemNotes(o.Tag, nil, nil, nil, o.Errors)
	}
}

// outletRemarks joins the outlet's remark and the notes entered with the
// readings that count.
func (d *doc) outletRemarks(own string, o *schema.OutletResult) string {
	parts := nonEmpty(strings.TrimSpace(own))
	for _, st := range []struct {
		name string
		r    *schema.OutletReading
	}{{"as found", o.AsFound}, {"final", o.Final}} {
		if st.r == nil {
			continue
		}
		if rd := d.readings[st.r.ReadingID]; rd != nil {
			if n := strings.TrimSpace(rd.Note); n != "" {
				parts = append(parts, st.name+": "+n)
			}
			if rd.Confirmed {
				parts = append(parts, st.name+" confirmed far from design")
			}
		}
	}
	return strings.Join(parts, "; ")
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
