package report

import (
	"fmt"
	"strings"

	"fieldtab/measure"
	"fieldtab/schema"
)

// ---- cover ----

func (d *doc) cover() {
	d.section = "Cover"
	d.pdf.AddPage()
	j := d.s.Job
	d.setY(28)
	d.font(famSans, "", sizeH2)
	d.pdf.SetTextColor(90, 90, 90)
	d.textLines([]string{"Test and balance closeout report"}, sizeH2, "L")
	d.pdf.SetTextColor(0, 0, 0)
	d.setY(d.y() + 2)
	d.font(famSans, "B", sizeTitle)
	d.pdf.Bookmark(d.fit(j.Name, d.contentW()), 0, -1)
	d.textLines(d.wrap(j.Name, d.contentW()), sizeTitle, "L")
	d.setY(d.y() + 1)
	if j.SiteAddress != "" {
		d.para(j.SiteAddress, "", sizeH2)
	}
	d.setY(d.y() + 4)

	signed := "Not signed: this copy is a preview, not an issued report."
	if s := d.in.Signoff; s != nil && !d.preliminary() {
		signed = "Signed by " + s.Name + " on " + d.dateTime(s.SignedAt)
	}
	d.pairs(48, append([][2]string{
		{"Project number", orDash(j.ProjectNumber)},
		{"Client or owner", orDash(j.Client)},
		{"Engineer of record", orDash(j.Engineer)},
		{"Mechanical contractor", orDash(j.Contractor)},
		{"Test and balance firm", orDash(j.TABFirm)},
		{"Revision", itoa(d.in.Revision)},
		{"Report date", d.dateTime(d.in.Generated) + " (" + zoneName(d.in.Generated) + "; all times in this report are in this zone)"},
		{"Calibrations judged on", orDash(d.r.Today)},
		{"Units", unitSystemName(d.u.si)},
		{"Signature", signed},
	}, remarkPair(j.Remarks)...)...)
	d.setY(d.y() + 4)
	d.font(famSans, "B", sizeH2)
	d.textLines([]string{"Summary"}, sizeH2, "L")
	d.setY(d.y() + 1)
	t := d.newTable(column{head: "What", w: 3}, column{head: "Count", w: 2})
	for _, row := range d.summary() {
		t.row(row[0], row[1])
	}
	t.end()
	if len(d.r.Errors) > 0 {
		d.notes(noteGroup{"Problem with the job's data", d.r.Errors})
	}
}

func zoneName(t interface{ Zone() (string, int) }) string {
	name, off := t.Zone()
	sign := "+"
	if off < 0 {
		sign, off = "−", -off
	}
	utc := fmt.Sprintf("UTC%s%02d:%02d", sign, off/3600, off%3600/60)
	if name == "" || name == "UTC" || strings.HasPrefix(name, "+") || strings.HasPrefix(name, "-") {
		return utc
	}
	return name + ", " + utc
}

func unitSystemName(si bool) string {
	if si {
		return "SI (metric)"
	}
	return "IP (inch-pound)"
}

// summary tallies results' statuses for the cover; it counts, it does not
// compute figures.
func (d *doc) summary() [][2]string {
	r := d.r
	count := map[string]int{}
	for _, o := range r.Outlets {
		count[o.Status]++
	}
	n := len(r.Outlets)
	rows := [][2]string{
		{"Outlets within tolerance", fmt.Sprintf("%s of %s", d.count(count["within"]), d.count(n))},
		{"Outlets out of tolerance", fmt.Sprintf("%s (%s low, %s high)", d.count(count["low"]+count["high"]), d.count(count["low"]), d.count(count["high"]))},
		{"Outlets the instrument's accuracy cannot decide", d.count(count["undetermined"])},
		{"Outlets not read", d.count(count[schema.ResultNotRead])},
	}
	if c := count[schema.ResultError]; c > 0 {
		rows = append(rows, [2]string{"Outlets whose flow could not be computed", d.count(c)})
	}
	// Each system with a measured airflow is within, undetermined (the
	// instruments cannot decide), out of tolerance, or not judged (a partial
	// outlet sum, or no design airflow).
	var within, undet, out, notJudged int
	for _, s := range r.Systems {
		switch {
		case s.Airflow == nil:
		case s.AirflowTolerance == nil:
			notJudged++
		case s.AirflowTolerance.Status == "within":
			within++
		case s.AirflowTolerance.Status == "undetermined":
			undet++
		default:
			out++
		}
	}
	sysLine := fmt.Sprintf("%s within, %s undetermined, %s out of tolerance", d.count(within), d.count(undet), d.count(out))
	if notJudged > 0 {
		sysLine += fmt.Sprintf("; %s not judged (partial outlet sum or no design)", d.count(notJudged))
	}
	rows = append(rows, [2]string{"Systems' airflow against the fan tolerance", sysLine})
	// A system meets capacity when every capacity test on it meets.
	tested, meets := map[string]bool{}, map[string]bool{}
	var order []string
	capCount := map[string]int{}
	for _, ct := range r.CapacityTests {
		capCount[ct.Status]++
		if _, seen := tested[ct.SystemID]; !seen {
			order = append(order, ct.SystemID)
			meets[ct.SystemID] = true
		}
		tested[ct.SystemID] = true
		if ct.Status != schema.ResultMeets {
			meets[ct.SystemID] = false
		}
	}
	m := 0
	for _, id := range order {
		if meets[id] {
			m++
		}
	}
	rows = append(rows, [2]string{"Systems meeting capacity", fmt.Sprintf("%s of %s with a capacity test", d.count(m), d.count(len(order)))})
	if len(r.CapacityTests) > 0 {
		var parts []string
		for _, st := range []string{schema.ResultMeets, schema.ResultShort, "undetermined", schema.ResultNoExpected,
			schema.ResultIncomplete, schema.ResultError} {
			if c := capCount[st]; c > 0 {
				word := status(st)
				if st == schema.ResultMeets {
					word = "meet"
				}
				parts = append(parts, d.count(c)+" "+word)
			}
		}
		rows = append(rows, [2]string{"Capacity tests", strings.Join(parts, ", ")})
	}
	wIn := 0
	for _, w := range r.WaterTests {
		if w.Status == "within" {
			wIn++
		}
	}
	if len(r.WaterTests) > 0 {
		rows = append(rows, [2]string{"Water flows within tolerance", fmt.Sprintf("%s of %s", d.count(wIn), d.count(len(r.WaterTests)))})
	}
	over := 0
	for _, in := range r.Instruments {
		if in.CalibrationStatus == schema.CalibrationOverdue {
			over++
		}
	}
	rows = append(rows,
		[2]string{"Instruments past their calibration due date", fmt.Sprintf("%s of %s", d.count(over), d.count(len(r.Instruments)))},
		[2]string{"Findings (listed after the basis)", d.count(len(r.Findings))})
	return rows
}

// ---- basis and cautions ----

func (d *doc) basis() {
	d.heading(0, "Basis of the figures, and cautions")
	j := d.s.Job

	d.heading(1, "What this report is")
	d.para("This report records the conditions measured on the dates shown, with the instruments listed, and the figures "+
		"computed from those readings. It does not certify the design, and it defers to the project specification, "+
		"local codes and the engineer of record, who decide what is acceptable. Readings reflect the building as it "+
		"was operating when they were taken.", "", sizeBody)

	d.heading(1, "Site and air density")
	var src string
	switch d.r.SitePressureSource {
	case "barometric":
		src = "measured barometric pressure entered for the job"
	case "elevation":
		el := dash
		if j.Elevation != nil {
			el = d.u.elevationU(*j.Elevation)
		}
		src = "standard atmosphere at the site elevation of " + el +
			" (ASHRAE Handbook—Fundamentals 2017, ch. 1, eq. 3)"
	default:
		src = "standard atmosphere at sea level: no elevation or barometric pressure was entered for the job"
	}
	d.pairs(48,
		[2]string{"Barometric pressure", d.u.barometricU(d.r.SitePressure) + ", from the " + src},
		[2]string{"Psychrometrics", "at that pressure, not at sea level, for every air state, chart and capacity in this report"},
		[2]string{"Air flows", "as measured: outlet flows as read and corrected, traverse flows at the density of the air in the duct " +
			"(from its dry bulb and humidity at the site pressure; dry or standard air where those were not read, as each traverse says)"},
		[2]string{"Capacities", "from the dry-air mass flow: each capacity test states its flow basis, standard air (" +
			standardAir(d.u.si) + ") or the density at the entering or leaving state; a traverse's flow is carried as the " +
			"standard-air flow of the same dry-air mass"},
	)

	d.heading(1, "Methods and their sources")
	d.bullets([]string{
		"Moist air (wet bulb, dew point, relative humidity, humidity ratio, enthalpy, density): ASHRAE Handbook—Fundamentals (2017), ch. 1, " +
			"with the Hyland–Wexler saturation pressure and that chapter's separate IP and SI equations.",
		"Coil capacity: dry-air mass flow × enthalpy change (ASHRAE Handbook—Fundamentals 2017, ch. 1), split into sensible and latent; " +
			"the trade's shortcut factors are not used for these figures.",
		"Capacity uncertainty (±): the instruments' stated accuracies carried through the capacity by first-order propagation " +
			"(ISO GUM, JCGM 100:2008 §5.1; ASHRAE Guideline 2), root-sum-square over airflow, dry bulbs and humidities.",
		"Expected capacity: the manufacturer's performance table at the test's entering wet bulb, outdoor dry bulb and airflow, " +
			"interpolated and never extrapolated; else the nameplate rating, which is at the manufacturer's rating conditions, " +
			"not the test's, and is labelled so. A test meets when it delivers at least " +
			d.u.pct(schema.CapacityMeetsPct) + " of that (common practice), taking its ± into account.",
		"Pitot traverses: point positions by log-Tchebycheff (rectangular ducts: ISO 3966 / ASHRAE Standard 111; round ducts: " +
			"ISO 5802:2001) or equal areas (round ducts: US EPA Method 1, Table 1-2); each point's velocity from its velocity " +
			"pressure at the air's density in the duct, and the velocities averaged, not the pressures. A traverse's ± is the " +
			"manometer's stated accuracy (% of reading and absolute) carried through each point's velocity and the mean, combined " +
			"root-sum-square with the method's own ±" + d.u.pct(measure.TraverseMethodUncertaintyPct) + " of flow, common practice for " +
			"a field plane (the same figure a trade certifying body requires of pitot-velocity instruments; ISO 3966 claims about ±2 % " +
			"only under its straight-duct conditions). The status is judged with the instruments' accuracy alone, as an outlet's is: " +
			"the fan tolerance band itself allows for the method. Where two readings of one " +
			"point and stage each count, the traverse shows them as conflicting and computes no flow for that stage.",
		"Outlets and traverses: where every supply (or exhaust) outlet of a system is read and the system has a traverse, " +
			"their sum is compared with the traverse under the fan tolerance, with both figures' ±.",
		"Outlets: flow-hood reading × the outlet's correction factor, or anemometer velocity × the outlet's Ak effective area.",
		"Water: liquid water properties from IAPWS-IF97 (region 1); glycol solutions from the ASHRAE Handbook—Fundamentals " +
			"secondary-coolant tables by volume %, interpolated and never extrapolated; valve flow from Cv (IP) or Kv (SI) and the " +
			"measured pressure drop (ANSI/ISA-75.01, IEC 60534-2-1, non-choked liquid); water-side capacity = volume flow × density × " +
			"specific heat × temperature change. A valve's flow carries the valve's stated flow accuracy, or ±" +
			d.u.pct(schema.DefaultValveAccuracyPct) + " where none is entered (common practice, from memory), combined root-sum-square " +
			"with the gauge's. The water's warming (cooling) or cooling (heating) is set against the test's stated mode; a " +
			"temperature change within the two thermometers' accuracies is no heat transfer. Air and water sides agree when they differ by no more than " +
			d.u.pct(schema.AirWaterAgreementPct) + " of the water side (common practice).",
		"Motors: voltage and current imbalance as NEMA MG 1 defines it (the largest deviation from the average ÷ the average); " +
			"% of full-load amps at the highest leg. Findings: voltage imbalance above " + d.u.pct(measure.VoltageUnbalanceDeratePct) +
			" (NEMA MG 1 derating, from memory), current imbalance above " + d.u.pct(measure.CurrentUnbalanceNotePct) +
			" (common practice), more than " + d.u.pct(measure.FullLoadPct) + " of FLA; fan speed or external static pressure more than " +
			d.u.pct(schema.FanDesignDeviationPct) + " from design (common practice).",
		"Fan laws (AMCA; ASHRAE Handbook—HVAC Systems and Equipment, fans chapter): Q₂/Q₁ = N₂/N₁, P₂/P₁ = (N₂/N₁)², " +
			"W₂/W₁ = (N₂/N₁)³ (Q flow, N fan speed, P pressure, W power), on an unchanged system curve at constant density. They predict; a new reading proves.",
	}, sizeBody)

	d.heading(1, "Tolerances")
	tol := j.Tolerances
	where := "These are the bands entered for this job from the project specification."
	if tol == schema.DefaultTolerances() {
		where = "These are fieldtab's default bands, which are common practice and not from a standard: " +
			"check them against the project specification, which governs."
	}
	d.para(where, "", sizeBody)
	t := d.newTable(column{head: "Applies to", w: 3}, column{head: "Below design", w: 1.2, align: "R"},
		column{head: "Above design", w: 1.2, align: "R"})
	t.row("Air outlets and inlets", "−"+d.u.pct(tol.OutletLowPct), "+"+d.u.pct(tol.OutletHighPct))
	t.row("Fans and air handlers (system airflow, traverses)", "−"+d.u.pct(tol.FanLowPct), "+"+d.u.pct(tol.FanHighPct))
	t.row("Hydronic flows", "−"+d.u.pct(tol.HydronicLowPct), "+"+d.u.pct(tol.HydronicHighPct))
	t.end()

	d.heading(1, "Instrument accuracy")
	d.para("Each tolerance status carries the stated accuracy of the instrument that took the reading (for example ±3 % "+
		"of reading ± 7 cfm): \"within\" means the whole band of the reading ± its uncertainty lies inside the tolerance, "+
		"\"low\" or \"high\" that the whole of it lies outside, and \"undetermined\" that it straddles a limit, so that this "+
		"instrument cannot decide; an undetermined status says on which side of the limit the reading itself lies. A reading "+
		"with no instrument, or an instrument with no accuracy on record, is judged as read and shown with no ± (not ± 0); "+
		"such readings are listed among the findings. Readings taken with an instrument "+
		"after its calibration due date are listed among the findings.", "", sizeBody)

	d.heading(1, "Safety")
	d.bullets([]string{
		"Roofs and ladders: work at height needs fall protection and a safe means of access; keep clear of roof edges, skylights and openings.",
		"Rotating equipment: lock out and tag out the drive before touching sheaves, belts or fans, and keep guards in place while it runs.",
		"Live electrical readings (volts, amps) are for qualified people with suitable PPE and meters rated for the circuit; panel and disconnect covers are opened only by a qualified person under the site's electrical safety rules (NFPA 70E or the local equivalent), with arc-rated PPE.",
		"Hot water and steam: hydronic test ports and coils can scald; let pressure and temperature down before opening them.",
		"Closed discharge valves: a pump must not run against a closed discharge valve (dead-head) for more than a moment; read shut-off head only as the pump maker and the project specification allow, then open the valve again (common practice).",
		"Follow the site's safety rules and the project specification where they ask for more.",
	}, sizeBody)
}

func standardAir(si bool) string {
	if si {
		return "1.2 kg/m³"
	}
	return "0.075 lb/ft³"
}

// ---- findings ----

func (d *doc) findings() {
	d.heading(0, "Findings")
	if len(d.r.Findings) == 0 && len(d.r.Errors) == 0 {
		d.para("No deficiencies: every outlet and test was read and found within its tolerance.", "", sizeBody)
		return
	}
	d.para("Every deficiency the readings show, in the order of the sections that follow: what is out of tolerance, "+
		"capacity short of expected, motors and fans off their limits or design, conflicting readings for the lead to resolve, "+
		"water that contradicts its test's mode, readings taken with no instrument or with one past its calibration date, "+
		"and outlets never read. "+d.limitsNote()+governsOnce(d.s.Job.Tolerances), "", sizeBody)
	t := d.newTable(column{head: "#", w: 0.5, align: "R"}, column{head: "Kind", w: 2.2},
		column{head: "Where", w: 3}, column{head: "What", w: 7})
	n := 0
	for _, e := range d.r.Errors {
		n++
		t.row(itoa(n), "Problem with the job's data", "Job", e)
	}
	for _, f := range d.r.Findings {
		n++
		t.row(itoa(n), findingLabel(f.Kind), d.where(f.Subject), f.Text)
	}
	t.end()
}

// where names a finding's subject and what it belongs to.
func (d *doc) where(s schema.SubjectRef) string {
	switch s.Kind {
	case schema.SubjectOutlet:
		if o := d.rOutlets[s.ID]; o != nil {
			return strings.Join(nonEmpty("Outlet "+o.Tag, o.Room, "system "+o.SystemTag), ", ")
		}
	case schema.SubjectSystem:
		if sys := d.systems[s.ID]; sys != nil {
			return strings.Join(nonEmpty(label(sys.Kind)+" "+sys.Tag, sys.Location), ", ")
		}
	case schema.SubjectTraverse:
		if t := d.rTraverses[s.ID]; t != nil {
			return strings.Join(nonEmpty("Traverse "+t.Tag, t.Location, "system "+t.SystemTag), ", ")
		}
	case schema.SubjectCapacityTest:
		if c := d.rCaps[s.ID]; c != nil {
			return "Capacity test " + c.Tag + ", system " + c.SystemTag
		}
	case schema.SubjectWaterTest:
		if w := d.waters[s.ID]; w != nil {
			return "Water test " + w.Tag + ", system " + d.systemTag(w.SystemID)
		}
	case "instrument":
		if in := d.insts[s.ID]; in != nil {
			return "Instrument " + in.Tag
		}
	}
	return strings.TrimSpace(label(s.Kind) + " " + s.Tag)
}

func (d *doc) systemTag(id string) string {
	if s := d.systems[id]; s != nil {
		return s.Tag
	}
	return dash
}

// nonEmpty drops the parts that are empty or end in a space (a label with
// no value after it).
func nonEmpty(parts ...string) []string {
	var out []string
	for _, p := range parts {
		if strings.TrimSpace(p) != "" && !strings.HasSuffix(p, " ") {
			out = append(out, p)
		}
	}
	return out
}

// ---- water tests ----

func (d *doc) waterTests() {
	if len(d.r.WaterTests) == 0 {
		return
	}
	u := d.u
	d.heading(0, "Water tests")
	d.para("Water flow against design (job hydronic tolerance), and the water-side capacity set beside the air side of the "+
		"linked capacity test. Each test's stated mode is set beside what its water shows.", "", sizeBody)
	if hot := d.heatingWaterTests(); len(hot) > 0 {
		d.para("Caution, hot water ("+joinTags(hot)+"): heating-water test ports, coils and hoses can scald. Wear gloves and eye "+
			"protection, open ports slowly, and let pressure and temperature down before opening a circuit; follow the site's "+
			"safety rules and the project specification.", "B", sizeBody)
	}
	t := d.newTable(column{head: "Coil or circuit", w: 2}, column{head: "System", w: 0.9},
		column{head: "Fluid", w: 1.3}, column{head: "Flow from", w: 2.9},
		column{head: "ΔP (" + u.WaterPressure + ")", w: 0.9, align: "R"}, column{head: "Design (" + u.WaterFlow + ")", w: 1, align: "R"},
		column{head: "Flow (" + u.WaterFlow + ")", w: 1.3, align: "R"}, column{head: "% of design", w: 0.9, align: "R"},
		column{head: "Status", w: 1.6})
	t.strong = func(col int, s string) bool { return col == 8 && deficientLabel(s) }
	for i := range d.r.WaterTests {
		w := &d.r.WaterTests[i]
		wt := d.waters[w.ID]
		fluid, from := dash, label(w.FlowSource)
		if wt != nil {
			fluid = fluidName(wt)
			if w.FlowSource == "valve" {
				coef := "Cv"
				if u.si {
					coef = "Kv"
				}
				from = "valve, " + coef + " " + u.n(wt.ValveCv, 2)
				if w.ValveAccuracyPct != nil {
					from += ", ±" + u.pct(*w.ValveAccuracyPct)
					if w.ValveAccuracySource == "default" {
						from += " (default, common practice)"
					}
				}
			}
		}
		flow, pctD := dash, dash
		if w.Flow != nil {
			flow = u.water(*w.Flow)
			if w.Tolerance != nil {
				flow = withPM(flow, w.Tolerance, u.water)
				pctD = u.pct(w.Tolerance.PercentOfDesign)
			}
		}
		st := status(w.Status)
		if w.Tolerance != nil && w.Status == w.Tolerance.Status {
			st = tolStatus(w.Tolerance, true)
		}
		t.row(w.Tag+" ("+waterProcessText(w)+")", w.SystemTag, fluid, from, ptr(w.DP, func(v float64) string { return u.n(v, 2) }),
			u.water(w.DesignFlow), flow, pctD, st)
	}
	t.end()

	d.heading(1, "Water-side capacity and agreement with the air side")
	t = d.newTable(column{head: "Coil or circuit", w: 2.3},
		column{head: "Entering (" + u.Temperature + ")", w: 1, align: "R"}, column{head: "Leaving (" + u.Temperature + ")", w: 1, align: "R"},
		column{head: "Water side (" + u.Power + ")", w: 1.7, align: "R"}, column{head: "Capacity test", w: 1.2},
		column{head: "Air side (" + u.Power + ")", w: 1.3, align: "R"}, column{head: "Difference", w: 1.2, align: "R"},
		column{head: "Note", w: 3})
	for i := range d.r.WaterTests {
		w := &d.r.WaterTests[i]
		water, ctTag, air, diff, note := dash, dash, dash, dash, ""
		if w.Capacity != nil {
			water = u.power(w.Capacity.Capacity) + " (" + u.capAlt(w.Capacity.Capacity, w.Capacity.Process == "cooling") + ") " + w.Capacity.Process
		}
		if wt := d.waters[w.ID]; wt != nil && wt.CapacityTest != "" {
			if c := d.rCaps[wt.CapacityTest]; c != nil {
				ctTag = c.Tag
			}
		}
		if a := w.AirSide; a != nil {
			air, diff, note = u.power(a.AirTotal)+" ("+u.capAlt(a.AirTotal, w.Capacity != nil && w.Capacity.Process == "cooling")+")", signedPct(u, a.DifferencePct), a.Note
		}
		if note == "" && len(w.Notes) > 0 {
			note = strings.Join(w.Notes, "; ")
		}
		if w.ModeNote != "" {
			note = strings.Join(nonEmpty(w.ModeNote, note), "; ")
		}
		t.row(w.Tag, ptr(w.EnterTemp, u.temp), ptr(w.LeaveTemp, u.temp), water, ctTag, air, diff, note)
	}
	t.end()
	for i := range d.r.WaterTests {
		w := &d.r.WaterTests[i]
		d.itemNotes(w.Tag, w.Missing, nil, w.Flags, w.Errors)
		if wt := d.waters[w.ID]; wt != nil {
			d.remarks(w.Tag, wt.Remarks, schema.SubjectWaterTest, w.ID)
		}
	}
}

func signedPct(u units, v float64) string {
	s := u.pct1(v)
	if v > 0 {
		s = "+" + s
	}
	return s
}

func fluidName(wt *schema.WaterTest) string {
	switch wt.Fluid {
	case "water":
		return "water"
	case "pg":
		return "propylene glycol " + formatNumber(wt.Concentration, 0, false) + " %"
	case "eg":
		return "ethylene glycol " + formatNumber(wt.Concentration, 0, false) + " %"
	}
	return label(wt.Fluid)
}

// deficientLabel is deficient for a status already put into words.
func deficientLabel(s string) bool {
	switch strings.TrimSuffix(s, " *") {
	case "low", "high", "short", "overdue", "not computed", "conflicting readings":
		return true
	}
	return false
}

// itemNotes prints what an item is missing, its cautions, its flags and its
// errors under the item's tag.
func (d *doc) itemNotes(tag string, missing, warnings []string, flags []schema.Flag, errs []string) {
	var fl []string
	for _, f := range flags {
		fl = append(fl, f.Text)
	}
	if len(missing) == 0 && len(warnings) == 0 && len(fl) == 0 && len(errs) == 0 {
		return
	}
	var miss []string
	if len(missing) > 0 {
		miss = []string{"not yet read: " + strings.Join(missing, "; ")}
	}
	d.notes(noteGroup{tag, miss}, noteGroup{tag + ", caution", warnings}, noteGroup{tag + ", instrument", fl},
		noteGroup{tag + ", not computed", errs})
}

// ---- instruments ----

func (d *doc) instruments() {
	d.heading(0, "Instruments")
	if len(d.r.Instruments) == 0 {
		d.para("No instruments are on record for this job.", "", sizeBody)
		return
	}
	d.para("Calibration status on "+orDash(d.r.Today)+". A reading taken after its instrument's due date is flagged "+
		"on the item it was taken on and listed among the findings.", "", sizeBody)
	t := d.newTable(column{head: "Tag", w: 1.5}, column{head: "Kind", w: 1.4}, column{head: "Make and model", w: 2},
		column{head: "Serial", w: 1.3, mono: true}, column{head: "Calibrated", w: 1.2}, column{head: "Due", w: 1.2},
		column{head: "Accuracy", w: 1.8}, column{head: "Status", w: 1.6})
	t.strong = func(col int, s string) bool { return col == 7 && strings.HasPrefix(s, "overdue") }
	for _, ir := range d.r.Instruments {
		in := d.insts[ir.ID]
		if in == nil {
			t.row(ir.Tag, label(ir.Kind), dash, dash, dash, orDash(ir.CalibrationDue), dash, status(ir.CalibrationStatus))
			continue
		}
		st := status(ir.CalibrationStatus)
		if ir.DaysToDue != nil {
			switch n := *ir.DaysToDue; {
			case n < 0:
				st += fmt.Sprintf(" (%d days)", -n)
			case ir.CalibrationStatus == schema.CalibrationDueSoon:
				st += fmt.Sprintf(" (in %d days)", n)
			}
		}
		t.row(in.Tag, label(in.Kind), orDash(strings.TrimSpace(in.Make+" "+in.Model)), orDash(in.Serial),
			orDash(in.CalibratedOn), orDash(in.CalibrationDue), accuracyText(in), st)
	}
	t.end()
	for _, ir := range d.r.Instruments {
		d.itemNotes(ir.Tag, nil, nil, nil, ir.Errors)
		if in := d.insts[ir.ID]; in != nil {
			d.remarks(in.Tag, in.Remarks, "instrument", in.ID)
		}
	}
}

func accuracyText(in *schema.Instrument) string {
	var parts []string
	if in.AccuracyPct > 0 {
		parts = append(parts, "±"+formatNumber(in.AccuracyPct, -1, false)+" % of reading")
	}
	if in.AccuracyAbs > 0 {
		parts = append(parts, "±"+formatNumber(in.AccuracyAbs, -1, false)+" "+in.AccuracyUnit)
	}
	if len(parts) == 0 {
		return "not on record"
	}
	return strings.Join(parts, " ")
}

// ---- revision history ----

func (d *doc) history() {
	d.heading(0, "Revision history")
	d.para("Each issued revision is frozen when it is signed: readings after it start the next revision. The data digest "+
		"is the SHA-256 of the job data the revision was made from.", "", sizeBody)
	t := d.newTable(column{head: "Revision", w: 0.9, align: "R"}, column{head: "Issued", w: 1.6}, column{head: "Signed by", w: 1.8},
		column{head: "Data digest (SHA-256)", w: 4.2, mono: true}, column{head: "Note", w: 2.2})
	current := false
	for _, h := range d.in.History {
		if h.Number == d.in.Revision {
			current = true
		}
		t.row(itoa(h.Number), d.dateTime(h.IssuedAt), orDash(h.Signer), orDash(groupHex(h.SnapshotSHA256)), h.Note)
	}
	if !current {
		signer, note := "not signed", "this report"
		if s := d.in.Signoff; s != nil {
			signer = s.Name
		}
		t.row(itoa(d.in.Revision), d.dateTime(d.in.Generated), signer, dash, note)
	}
	t.end()
}

// groupHex splits a digest into groups of 16 digits, so that it wraps
// between them and reads in pieces.
func groupHex(h string) string {
	var parts []string
	for len(h) > 16 {
		parts, h = append(parts, h[:16]), h[16:]
	}
	return strings.Join(append(parts, h), " ")
}

// unitSystem is the measure unit system of the results.
func (d *doc) unitSystem() measure.UnitSystem {
	if d.u.si {
		return measure.SI
	}
	return measure.IP
}

// governsOnce closes the findings' intro with the deferral to the
// specification, unless the tolerance source already said it.
func governsOnce(tol schema.Tolerances) string {
	if strings.Contains(tolSource(tol), "governs") {
		return ""
	}
	return " The project specification governs."
}
