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
	d.para("Flows in "+u.AirFlow+", as measured (not corrected to standard air): a hood reading × the outlet's hood correction "+
		"factor, or an anemometer velocity × its Ak, as the Factor column gives; the reading log lists the readings as entered. "+
		"The % of design and the status are the final "+
		"reading's, else the as-found one's, against the outlet tolerance of −"+u.pct(tol.OutletLowPct)+" / +"+
		u.pct(tol.OutletHighPct)+tolSource(tol)+" with the instrument's accuracy carried through; an undetermined status says on "+
		"which side of the limit the reading lies. A status marked * rests on a reading taken with an instrument past its "+
		"calibration date, one marked † on a reading with no instrument accuracy on record, judged as read with no ±. "+
		"Remarks are the outlet's own and those entered with its readings. Each system's totals by kind close its table: "+
		"the as-found total sums the as-found readings; the final total sums each read outlet's final flow, else its as-found "+
		"one; its % of design is over the design of the outlets read, the basis the system pages use too.", "", sizeBody)

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
	cols := []column{{head: "Tag", w: 1.2}, {head: "Room", w: 2.85}, {head: "Kind", w: 1.1},
		{head: "Size", w: 1.3}, {head: "Factor", w: 0.85, align: "R"}, {head: "Design", w: 1.1, align: "R"},
		{head: "As found", w: 1.15, align: "R"}, {head: "Final", w: 1.05, align: "R"}, {head: "% of design", w: 1, align: "R"},
		{head: "Status", w: 1.5}}
	if withRemarks {
		cols[1].w, cols[3].w, cols[9].w = 1.95, 1.0, 1.7
		cols = append(cols, column{head: "Remarks", w: 2.3})
	}
	t := d.newTable(cols...)
	t.strong = func(col int, s string) bool { return (col == 9 && deficientLabel(s)) || (col == 0 && s == "Total") }
	for i, o := range list {
		size, factor := dash, dash
		if oo := d.outlets[o.ID]; oo != nil {
			size, factor = orDash(oo.Size), outletFactor(u, oo)
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
		if g := governing(o); g != nil && overdueReading(o.Flags, g.ReadingID) {
			st += " *"
		}
		t.row(o.Tag, orDash(o.Room), label(o.Kind), size, factor, u.air(o.DesignFlow), stageFlow(u, o.AsFound),
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
		// One figure for the final column: each read outlet's final flow,
		// else its as-found one, the sum the % of design is taken on.
		if k.Read > 0 {
			fin = u.air(k.Measured)
		}
		if k.FinalRead < k.Read {
			note = strings.TrimPrefix(note+"; final total: final, else as found ("+d.count(k.Read-k.FinalRead)+" as found)", "; ")
			partial = append(partial, label(k.Kind)+" total: final, else as found ("+d.count(k.Read-k.FinalRead)+" as found)")
		}
		t.row("Total", what, "", "", "", u.air(k.Design), af, fin, u.pctP(k.PercentOfDesign), "", note)
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

// overdueReading says whether the reading with id is one an overdue
// instrument took: the * marks the reading the status rests on, not the
// outlet.
func overdueReading(flags []schema.Flag, id string) bool {
	for _, f := range flags {
		if f.Kind != schema.FlagInstrumentOverdue {
			continue
		}
		for _, r := range f.ReadingIDs {
			if r == id {
				return true
			}
		}
	}
	return false
}

// outletFactor is what turns an outlet's reading into its flow: the hood
// correction factor the reading is multiplied by, or the Ak of an
// anemometer reading.
func outletFactor(u units, o *schema.Outlet) string {
	if o.Method == "ak" {
		return "Ak " + u.n(o.Ak, 3)
	}
	if o.Factor <= 0 {
		return dash
	}
	return u.n(o.Factor, 2)
}
