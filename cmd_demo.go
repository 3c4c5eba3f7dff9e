package main

import (
	"context"
	_ "embed"
	"fmt"
	"math"
	"math/rand/v2"
	"time"

	"fieldtab/measure"
	"fieldtab/schema"
)

// The demo job: a fictional three-storey library and clinic in an invented
// town, with everything a new user should see at once. Every name, place and
// number is invented; the performance table is testdata's invented example.
// The values are deterministic (a seeded generator); only the dates move, so
// that the overdue instrument stays overdue and the readings stay recent.

//go:embed testdata/perf_rtu_example.csv
var demoPerfTable string

// demoJobName is how ensureDemo recognises the demo job.
const demoJobName = "Demo: Tarrowby Library and Clinic"

// demoLoadingName marks a demo job while it loads, so that a load cut short
// is not taken for the demo next time.
const demoLoadingName = demoJobName + " (loading)"

var demoActor = schema.Actor{Name: "demo loader", Role: schema.RoleLead}

// ensureDemo creates the demo job unless the store already has a job named
// demoJobName, and returns its ID and whether it was created now.
func ensureDemo(ctx context.Context, db *schema.DB) (jobID string, created bool, err error) {
	jobs, err := db.Jobs(ctx)
	if err != nil {
		return "", false, err
	}
	for _, j := range jobs {
		if j.Name == demoJobName {
			return j.ID, false, nil
		}
	}
	l := &demoLoader{ctx: ctx, db: db, now: db.Now().UTC().Truncate(time.Minute), rng: rand.New(rand.NewPCG(2024, 1120))}
	if err := l.load(); err != nil {
		return "", false, err
	}
	return l.job.ID, true, nil
}

// demoLoader builds the demo job.
type demoLoader struct {
	ctx      context.Context
	db       *schema.DB
	now      time.Time
	rng      *rand.Rand
	job      *schema.Job
	inst     map[string]string         // instrument tag → ID
	sys      map[string]*schema.System // by tag
	readings []schema.Reading
}

// day returns a time on the crew's first (as found) or second (final) day.
func (l *demoLoader) day(d int, minutes int) time.Time {
	// A site day starts at 07:00: day 1 the day before yesterday, day 2
	// yesterday, so every reading is in the past and in working hours.
	y, m, dd := l.now.UTC().Date()
	start := time.Date(y, m, dd, 7, 0, 0, 0, time.UTC).AddDate(0, 0, d-3)
	return start.Add(time.Duration(minutes) * time.Minute)
}

func (l *demoLoader) date(days int) string {
	return l.now.AddDate(0, 0, days).Format(time.DateOnly)
}

func (l *demoLoader) load() error {
	ctx, db := l.ctx, l.db
	elevation := 1120.0
	l.job = &schema.Job{Name: demoLoadingName, SiteAddress: "Market Square, Tarrowby (a fictional town)",
		Client: "Tarrowby Town Council (fictional)", Engineer: "Demo engineer of record (fictional)",
		Contractor: "Demo mechanical contractor (fictional)", TABFirm: "Demo balancing crew (fictional)",
		Units: "ip", Elevation: &elevation}
	if err := db.CreateJob(ctx, demoActor, l.job); err != nil {
		return err
	}
	if err := l.instruments(); err != nil {
		return err
	}
	if err := l.systems(); err != nil {
		return err
	}
	if err := l.outlets(); err != nil {
		return err
	}
	if err := l.tests(); err != nil {
		return err
	}
	l.fans()
	for i := 0; i < len(l.readings); i += schema.MaxReadingsBatch {
		batch := l.readings[i:min(i+schema.MaxReadingsBatch, len(l.readings))]
		res, err := db.AddReadings(ctx, demoActor, l.job.ID, batch)
		if err != nil {
			return err
		}
		for j, r := range res {
			if r.Status != schema.ReadingStored {
				return fmt.Errorf("demo reading %d (%s %s) %s: %s %s", i+j, batch[j].SubjectKind, batch[j].Quantity,
					r.Status, r.Field, r.Reason)
			}
		}
	}
	l.job.Name = demoJobName
	return db.UpdateJob(ctx, demoActor, l.job)
}

func (l *demoLoader) instruments() error {
	l.inst = map[string]string{}
	for _, in := range []schema.Instrument{
		{Tag: "Hood 1", Kind: "flow_hood", Model: "demo capture hood", Serial: "DEMO-H1",
			CalibratedOn: l.date(-120), CalibrationDue: l.date(245), AccuracyPct: 3, AccuracyAbs: 7, AccuracyUnit: "cfm"},
		// Hood 2 went past its due date weeks ago; the crew used it on day one.
		{Tag: "Hood 2", Kind: "flow_hood", Model: "demo capture hood", Serial: "DEMO-H2",
			CalibratedOn: l.date(-400), CalibrationDue: l.date(-35), AccuracyPct: 3, AccuracyAbs: 7, AccuracyUnit: "cfm",
			Remarks: "Sent for calibration after day one; its readings are to be repeated with Hood 1"},
		{Tag: "Manometer 1", Kind: "manometer", Model: "demo digital manometer", Serial: "DEMO-M1",
			CalibratedOn: l.date(-60), CalibrationDue: l.date(305), AccuracyPct: 1, AccuracyAbs: 0.002, AccuracyUnit: "in. w.g."},
		{Tag: "Pitot 1", Kind: "pitot_tube", Model: "demo 36 in pitot tube", Serial: "DEMO-P1"},
		{Tag: "Psychrometer 1", Kind: "psychrometer", Model: "demo thermo-hygrometer", Serial: "DEMO-T1",
			CalibratedOn: l.date(-90), CalibrationDue: l.date(275), AccuracyAbs: 0.5, AccuracyUnit: "°F"},
		{Tag: "Tach 1", Kind: "tachometer", Model: "demo optical tachometer", Serial: "DEMO-R1",
			CalibratedOn: l.date(-150), CalibrationDue: l.date(215), AccuracyPct: 0.05},
		{Tag: "Clamp 1", Kind: "clamp_meter", Model: "demo clamp meter", Serial: "DEMO-C1",
			CalibratedOn: l.date(-200), CalibrationDue: l.date(165), AccuracyPct: 2},
		{Tag: "Hydronic 1", Kind: "hydronic_meter", Model: "demo hydronic manometer", Serial: "DEMO-W1",
			CalibratedOn: l.date(-345), CalibrationDue: l.date(20), AccuracyPct: 1, AccuracyAbs: 0.05, AccuracyUnit: "psi"},
	} {
		in.JobID = l.job.ID
		if err := schema.Create(l.ctx, l.db, demoActor, &in); err != nil {
			return fmt.Errorf("demo instrument %s: %w", in.Tag, err)
		}
		l.inst[in.Tag] = in.ID
	}
	return nil
}

func (l *demoLoader) systems() error {
	l.sys = map[string]*schema.System{}
	// Nameplates are of an invented maker; each drive's pitch diameters are
	// the ones the crew measures (demoFans) and agree with its speeds (fan rpm
	// = motor rpm × motor pitch ÷ fan pitch).
	rtu := func(airflow, oa, fanRPM, motorPitch float64, serial string) schema.SystemDesign {
		return schema.SystemDesign{Airflow: airflow, OutdoorAir: oa, ExternalStatic: 0.8, RatedTotal: 120_000,
			RatedSensible: 86_400, MotorHP: 3, FLA: 4.8, Volts: 460, Phase: 3, FanRPM: fanRPM, MotorRPM: 1760,
			PerfTableCSV: demoPerfTable,
			Make:         demoMaker, Model: "QR-10 (demo)", Serial: serial, MotorMake: demoMotorMaker, MotorFrame: "182T", ServiceFactor: 1.15,
			FanSheaveSize: "1-groove B, fixed", FanSheavePitch: 6.9, MotorSheaveSize: "1-groove B, adjustable", MotorSheavePitch: motorPitch,
			Belts: "1 × B51", FanBushing: "1 3/16 in bore", MotorBushing: "1 1/8 in bore", Filters: "8 × 20×25×2 MERV 8"}
	}
	for _, s := range []schema.System{
		{Tag: "RTU-1", Kind: "rooftop_unit", Name: "Library, ground floor", Location: "Roof, east end", Design: rtu(4000, 800, 1150, 4.5, "QR10-0417-A")},
		{Tag: "RTU-2", Kind: "rooftop_unit", Name: "Clinic, level 2", Location: "Roof, west end", Design: rtu(3800, 950, 1120, 4.4, "QR10-0418-A"),
			Remarks: "Condenser coil fins bent on the north face; reported to the contractor"},
		{Tag: "AHU-1", Kind: "air_handler", Name: "Level 3: community hall and reading rooms", Location: "Level 3 mechanical room",
			Design: schema.SystemDesign{Airflow: 6000, OutdoorAir: 1500, ExternalStatic: 1.5, RatedTotal: 216_000,
				RatedSensible: 160_000, MotorHP: 7.5, FLA: 11, Volts: 460, Phase: 3, FanRPM: 1250, MotorRPM: 1765,
				Make: demoMaker, Model: "MA-60 (demo)", Serial: "MA60-1123-C", MotorMake: demoMotorMaker, MotorFrame: "213T", ServiceFactor: 1.15,
				FanSheaveSize: "2-groove B, fixed", FanSheavePitch: 8.4, MotorSheaveSize: "2-groove B, adjustable", MotorSheavePitch: 5.9,
				Belts: "2 × B60 (matched set)", FanBushing: "1 7/16 in bore", MotorBushing: "1 3/8 in bore", Filters: "12 × 24×24×2 MERV 13"},
			Remarks: "Fan section door sticks; use the side access door"},
		{Tag: "EF-1", Kind: "fan", Name: "Toilet and utility exhaust", Location: "Roof, centre",
			Design: schema.SystemDesign{Airflow: 1100, ExternalStatic: 0.5, MotorHP: 1, FLA: 2.1, Volts: 460, Phase: 3,
				FanRPM: 1050, MotorRPM: 1725,
				Make: demoMaker, Model: "UX-12 (demo)", Serial: "UX12-0932-B", MotorMake: demoMotorMaker, MotorFrame: "56", ServiceFactor: 1.25,
				FanSheaveSize: "1-groove A, fixed", FanSheavePitch: 5.1, MotorSheaveSize: "1-groove A, adjustable", MotorSheavePitch: 3.1,
				Belts: "1 × A38", FanBushing: "1 in bore", MotorBushing: "5/8 in bore"}},
	} {
		s.JobID = l.job.ID
		if err := schema.Create(l.ctx, l.db, demoActor, &s); err != nil {
			return fmt.Errorf("demo system %s: %w", s.Tag, err)
		}
		l.sys[s.Tag] = &s
	}
	return nil
}

// demoOutlet is one line of the demo's outlet schedule and the story of its
// readings.
type demoOutlet struct {
	system, tag, room, kind, size string
	design, factor                float64
	// finalPct is the final reading in % of design (0: drawn within
	// tolerance, -1: no final reading yet, -2: never read); note goes with it.
	finalPct float64
	note     string
}

// The schedule: ground floor library on RTU-1, clinic on RTU-2, level 3 on
// AHU-1, toilets and utility rooms on EF-1.
var demoOutlets = []demoOutlet{
	{"RTU-1", "S-101", "101 Entrance lobby", "supply", "24x24", 400, 1, 0, ""},
	{"RTU-1", "S-102", "101 Entrance lobby", "supply", "24x24", 400, 1, 0, ""},
	{"RTU-1", "S-103", "102 Circulation desk", "supply", "24x24", 300, 1, 0, ""},
	{"RTU-1", "S-104", "103 Children's library", "supply", "24x24", 350, 1, 0, ""},
	{"RTU-1", "S-105", "103 Children's library", "supply", "24x24", 350, 1, 0, ""},
	{"RTU-1", "S-106", "103 Children's library", "supply", "24x24", 350, 1, 78, "damper fully open; flex duct kinked above the ceiling, reported to the contractor"},
	{"RTU-1", "S-107", "104 Reading room", "supply", "24x24", 325, 1, 0, ""},
	{"RTU-1", "S-108", "104 Reading room", "supply", "24x24", 325, 1, 0, ""},
	{"RTU-1", "S-109", "105 Stacks", "supply", "24x24", 275, 1, 0, ""},
	{"RTU-1", "S-110", "105 Stacks", "supply", "24x24", 275, 1, 0, ""},
	{"RTU-1", "S-111", "106 Study room A", "supply", "12x12", 150, 1, 0, ""},
	{"RTU-1", "S-112", "107 Study room B", "supply", "12x12", 150, 1, 0, ""},
	{"RTU-1", "S-113", "108 Staff workroom", "supply", "24x12", 200, 1, 0, ""},
	{"RTU-1", "S-114", "109 Corridor", "supply", "12x12", 150, 1, 0, ""},
	{"RTU-1", "R-101", "101 Entrance lobby", "return", "24x24", 1200, 1, 0, ""},
	{"RTU-1", "R-102", "103 Children's library", "return", "24x24", 1000, 1, 0, ""},
	{"RTU-1", "R-103", "105 Stacks", "return", "24x24", 1000, 1, 0, ""},

	{"RTU-2", "S-201", "201 Waiting room", "supply", "24x24", 350, 1, 0, ""},
	{"RTU-2", "S-202", "201 Waiting room", "supply", "24x24", 350, 1, 0, ""},
	{"RTU-2", "S-203", "201 Waiting room", "supply", "24x24", 350, 1, 0, ""},
	{"RTU-2", "S-204", "202 Reception", "supply", "24x24", 250, 1, 0, ""},
	{"RTU-2", "S-205", "203 Exam room 1", "supply", "12x12", 200, 1, 0, ""},
	{"RTU-2", "S-206", "204 Exam room 2", "supply", "12x12", 200, 1, 0, ""},
	{"RTU-2", "S-207", "205 Exam room 3", "supply", "12x12", 200, 1, 0, ""},
	{"RTU-2", "S-208", "206 Exam room 4", "supply", "12x12", 200, 1, 0, ""},
	{"RTU-2", "S-209", "207 Treatment room", "supply", "24x24", 375, 1, 123, "no balancing damper on this branch; reported to the contractor"},
	{"RTU-2", "S-210", "207 Treatment room", "supply", "24x24", 375, 1, 0, ""},
	{"RTU-2", "S-211", "208 Consult room", "supply", "12x12", 175, 1, 0, ""},
	{"RTU-2", "S-212", "209 Clean utility", "supply", "12x12", 125, 1, 89.6, "small outlet: the hood's accuracy cannot decide"},
	{"RTU-2", "S-213", "210 Office", "supply", "12x12", 150, 1, 0, ""},
	{"RTU-2", "S-214", "211 Staff room", "supply", "24x12", 200, 1, 0, ""},
	{"RTU-2", "S-215", "212 Corridor", "supply", "12x12", 150, 1, 0, ""},
	{"RTU-2", "S-216", "212 Corridor", "supply", "12x12", 150, 1, 0, ""},
	{"RTU-2", "R-201", "201 Waiting room", "return", "24x24", 1400, 1, 0, ""},
	{"RTU-2", "R-202", "207 Treatment room", "return", "24x24", 800, 1, 0, ""},
	{"RTU-2", "R-203", "212 Corridor", "return", "24x24", 650, 1, 0, ""},

	{"AHU-1", "S-301", "301 Community hall", "supply", "24x24", 500, 1, 0, ""},
	{"AHU-1", "S-302", "301 Community hall", "supply", "24x24", 500, 1, 0, ""},
	{"AHU-1", "S-303", "301 Community hall", "supply", "24x24", 500, 1, 0, ""},
	{"AHU-1", "S-304", "301 Community hall", "supply", "24x24", 500, 1, 0, ""},
	{"AHU-1", "S-305", "301 Community hall", "supply", "24x24", 500, 1, 86, "damper fully open; the branch is undersized on the drawings, raised with the engineer"},
	{"AHU-1", "S-306", "301 Community hall", "supply", "24x24", 500, 1, 0, ""},
	{"AHU-1", "S-307", "302 Meeting room A", "supply", "24x24", 450, 1, 0, ""},
	{"AHU-1", "S-308", "302 Meeting room A", "supply", "24x24", 450, 1, 0, ""},
	{"AHU-1", "S-309", "303 Meeting room B", "supply", "24x24", 400, 1, 0, ""},
	{"AHU-1", "S-310", "304 Quiet reading", "supply", "24x24", 350, 1, 0, ""},
	{"AHU-1", "S-311", "304 Quiet reading", "supply", "24x24", 350, 1, 0, ""},
	{"AHU-1", "S-312", "305 Local history room", "supply", "24x24", 400, 1, 0, ""},
	{"AHU-1", "S-313", "306 Archive", "supply", "24x12", 250, 1, -2, ""},
	{"AHU-1", "S-314", "307 Corridor", "supply", "12x12", 200, 1, 0, ""},
	{"AHU-1", "S-315", "307 Corridor", "supply", "12x12", 150, 1, 0, ""},
	{"AHU-1", "R-301", "301 Community hall", "return", "36x24", 2800, 1.04, 0, ""},
	{"AHU-1", "R-302", "302 Meeting room A", "return", "24x24", 800, 1, 0, ""},
	{"AHU-1", "R-303", "304 Quiet reading", "return", "24x24", 900, 1, 0, ""},
	{"AHU-1", "OA-301", "Level 3 mechanical room", "outdoor_air", "48x24", 1500, 1, -2, ""},

	{"EF-1", "E-101", "110 Public toilets", "exhaust", "12x12", 250, 1, 0, ""},
	{"EF-1", "E-102", "111 Staff toilet", "exhaust", "8x8", 75, 1, -2, ""},
	{"EF-1", "E-201", "213 Patient toilet", "exhaust", "8x8", 100, 1, -1, ""},
	{"EF-1", "E-202", "214 Staff toilet", "exhaust", "8x8", 75, 1, -1, ""},
	{"EF-1", "E-203", "215 Soiled utility", "exhaust", "10x10", 150, 1, -1, ""},
	{"EF-1", "E-301", "308 Kitchenette", "exhaust", "10x10", 150, 1, 0, ""},
	{"EF-1", "E-302", "309 Toilets", "exhaust", "12x12", 250, 1, 0, ""},
}

// read queues a reading and returns its ID.
func (l *demoLoader) read(kind, subject, qty string, point int, v float64, unit, stage, inst, tech string, at time.Time, note string) string {
	id := schema.NewID()
	val := v
	l.readings = append(l.readings, schema.Reading{ID: id, SubjectKind: kind, SubjectID: subject, Quantity: qty, Point: point,
		Value: &val, Unit: unit, Stage: stage, InstrumentID: l.inst[inst], Technician: tech, TakenAt: at, Note: note})
	return id
}

func (l *demoLoader) supersede(prev string, r schema.Reading) {
	r.ID, r.Supersedes = schema.NewID(), prev
	l.readings = append(l.readings, r)
}

// Technicians of the demo crew (invented).
const (
	techA = "Rosa A."
	techB = "Tomas B."
	techC = "Imke C."
)

// The demo's invented makers: no real brand.
const (
	demoMaker      = "Quillmoor Air (demo maker)"
	demoMotorMaker = "Brackenfield Motors (demo maker)"
)

// demoOutletRemarks are remarks on the outlet records (a reading's own
// remark is its note).
var demoOutletRemarks = map[string]string{
	"S-104": "Above the bookshelves: use the tall ladder",
	"R-101": "Grille behind the lobby display board",
}

func (l *demoLoader) outlets() error {
	ids := map[string]string{}
	for i, d := range demoOutlets {
		o := schema.Outlet{JobID: l.job.ID, SystemID: l.sys[d.system].ID, Tag: d.tag, Room: d.room, Kind: d.kind,
			Size: d.size, DesignFlow: d.design, Method: "hood", Factor: d.factor, Remarks: demoOutletRemarks[d.tag]}
		if err := schema.Create(l.ctx, l.db, demoActor, &o); err != nil {
			return fmt.Errorf("demo outlet %s: %w", d.tag, err)
		}
		ids[d.tag] = o.ID
		if d.finalPct == -2 {
			continue
		}
		// Day one, as found: the community hall's first diffusers with Hood 2
		// (overdue: it should have gone back to the lab), the rest with Hood 1.
		hood, tech := "Hood 1", techA
		if d.tag == "S-301" || d.tag == "S-302" || d.tag == "S-303" {
			hood, tech = "Hood 2", techB
		}
		asFound := math.Round(d.design * (0.7 + 0.6*l.rng.Float64()) / d.factor)
		if d.tag == "E-203" {
			asFound = math.Round(d.design * 1.31)
		}
		if d.tag == "S-204" {
			// A slipped digit, corrected a minute later.
			typo := l.read(schema.SubjectOutlet, o.ID, "flow", 0, asFound*10, schema.UnitCFM, schema.StageAsFound, hood, tech,
				l.day(1, 3*i), "")
			l.supersede(typo, schema.Reading{SubjectKind: schema.SubjectOutlet, SubjectID: o.ID, Quantity: "flow",
				Value: ptrTo(asFound), Unit: schema.UnitCFM, Stage: schema.StageAsFound, InstrumentID: l.inst[hood],
				Technician: tech, TakenAt: l.day(1, 3*i+1), Note: "typo: one digit too many"})
		} else {
			l.read(schema.SubjectOutlet, o.ID, "flow", 0, asFound, schema.UnitCFM, schema.StageAsFound, hood, tech, l.day(1, 3*i), "")
		}
		if d.finalPct == -1 {
			continue
		}
		// Day two, final, after the dampers were set.
		pct := d.finalPct
		if pct == 0 {
			// Within the band with room for the hood's ±3 % ± 7 cfm.
			room := 10 - 3 - 7/d.design*100
			pct = 100 + (2*l.rng.Float64()-1)*math.Max(room*0.6, 0)
		}
		final := math.Round(d.design * pct / 100 / d.factor)
		at := l.day(2, 3*i)
		if d.tag == "S-111" {
			// Entered on S-111 by mistake (it was S-112's reading) and voided.
			wrong := l.read(schema.SubjectOutlet, o.ID, "flow", 0, 171, schema.UnitCFM, schema.StageFinal, "Hood 1", techA, at, "")
			l.readings = append(l.readings, schema.Reading{ID: schema.NewID(), SubjectKind: schema.SubjectOutlet, SubjectID: o.ID,
				Quantity: "flow", Unit: schema.UnitCFM, Stage: schema.StageFinal, Void: true, Supersedes: wrong,
				Technician: techA, TakenAt: at.Add(time.Minute), Note: "entered on the wrong outlet"})
			at = at.Add(2 * time.Minute)
		}
		l.read(schema.SubjectOutlet, o.ID, "flow", 0, final, schema.UnitCFM, schema.StageFinal, "Hood 1", techA, at, d.note)
	}
	return nil
}

func ptrTo(v float64) *float64 { return &v }

// traverse queues a full set of velocity-pressure readings whose mean
// velocity gives flow (cfm, actual) through area (ft²) at density rho
// (lb/ft³), with the usual profile: slower near the walls.
func (l *demoLoader) traverse(t *schema.Traverse, flow, rho float64, start time.Time) error {
	layout, err := t.Layout(measure.IP)
	if err != nil {
		return err
	}
	pts, err := layout.Points()
	if err != nil {
		return err
	}
	area := t.Width * t.Height / 144
	half := t.Width / 2
	if t.Shape == "round" {
		area = math.Pi * t.Diameter * t.Diameter / 4 / 144
		half = t.Diameter / 2
	}
	shape := make([]float64, len(pts))
	sum := 0.0
	for i, p := range pts {
		var r float64 // distance from the centre, 0 to 1
		if t.Shape == "round" {
			r = math.Abs(p.Depth.Inch()-half) / half
		} else {
			dx := (p.X.Inch() - t.Width/2) / (t.Width / 2)
			dy := (p.Y.Inch() - t.Height/2) / (t.Height / 2)
			r = math.Max(math.Abs(dx), math.Abs(dy))
		}
		shape[i] = (1 - 0.12*r*r) * (1 + 0.03*(2*l.rng.Float64()-1))
		sum += shape[i]
	}
	mean := flow / area // fpm
	for i := range pts {
		v := mean * shape[i] * float64(len(pts)) / sum
		vp := rho * math.Pow(v/1096.7, 2) // in. w.g., v in fpm, rho in lb/ft³
		l.read(schema.SubjectTraverse, t.ID, "vp", i+1, math.Round(vp*1000)/1000, schema.UnitInWG, schema.StageFinal,
			"Manometer 1", techC, start.Add(time.Duration(i)*time.Minute), "")
	}
	return nil
}

func (l *demoLoader) tests() error {
	ctx, db := l.ctx, l.db
	t1 := &schema.Traverse{JobID: l.job.ID, SystemID: l.sys["RTU-1"].ID, Tag: "T-1", Location: "RTU-1 main supply, above the roof curb",
		Shape: "rect", Method: "log-tchebycheff", Width: 24, Height: 16, PointsW: 6, PointsH: 5,
		Remarks: "Ports drilled in the duct's short side; plugged and sealed after the test"}
	t2 := &schema.Traverse{JobID: l.job.ID, SystemID: l.sys["AHU-1"].ID, Tag: "T-2", Location: "AHU-1 main supply, mechanical room",
		Shape: "round", Method: "log-tchebycheff", Diameter: 34, PointsPerDiameter: 6, Diameters: 2}
	for _, t := range []*schema.Traverse{t1, t2} {
		if err := schema.Create(ctx, db, demoActor, t); err != nil {
			return fmt.Errorf("demo traverse %s: %w", t.Tag, err)
		}
	}
	at := l.day(2, 300)
	if err := l.traverse(t1, 3950, 0.0733, at); err != nil {
		return err
	}
	l.read(schema.SubjectTraverse, t1.ID, "air_db", 0, 56.4, schema.UnitDegF, schema.StageFinal, "Psychrometer 1", techC, at.Add(31*time.Minute), "")
	l.read(schema.SubjectTraverse, t1.ID, "air_rh", 0, 88, schema.UnitPercent, schema.StageFinal, "Psychrometer 1", techC, at.Add(31*time.Minute), "")
	l.read(schema.SubjectTraverse, t1.ID, "static", 0, 0.62, schema.UnitInWG, schema.StageFinal, "Manometer 1", techC, at.Add(32*time.Minute), "")
	at = l.day(2, 400)
	if err := l.traverse(t2, 5870, 0.0734, at); err != nil {
		return err
	}
	l.read(schema.SubjectTraverse, t2.ID, "air_db", 0, 55.2, schema.UnitDegF, schema.StageFinal, "Psychrometer 1", techC, at.Add(17*time.Minute), "")
	l.read(schema.SubjectTraverse, t2.ID, "air_rh", 0, 90, schema.UnitPercent, schema.StageFinal, "Psychrometer 1", techC, at.Add(17*time.Minute), "")
	l.read(schema.SubjectTraverse, t2.ID, "static", 0, 1.05, schema.UnitInWG, schema.StageFinal, "Manometer 1", techC, at.Add(18*time.Minute), "")

	caps := []*schema.CapacityTest{
		{JobID: l.job.ID, SystemID: l.sys["RTU-1"].ID, Tag: "CT-RTU-1", Mode: "cooling", FlowSource: "traverse", TraverseID: t1.ID},
		{JobID: l.job.ID, SystemID: l.sys["RTU-2"].ID, Tag: "CT-RTU-2", Mode: "cooling", FlowSource: "outlets", FlowBasis: "standard"},
		{JobID: l.job.ID, SystemID: l.sys["AHU-1"].ID, Tag: "CT-AHU-1", Mode: "cooling", FlowSource: "traverse", TraverseID: t2.ID},
	}
	// Entering and leaving dry bulb and wet bulb, outdoor dry bulb (°F).
	states := [][5]float64{
		{78.2, 64.6, 55.2, 53.9, 91},
		{76.8, 63.6, 59.6, 56.6, 92}, // RTU-2 falls short: the refrigerant charge is to be checked
		{80.4, 66.3, 55.0, 53.9, 90},
	}
	for i, ct := range caps {
		if err := schema.Create(ctx, db, demoActor, ct); err != nil {
			return fmt.Errorf("demo capacity test %s: %w", ct.Tag, err)
		}
		at := l.day(2, 420+40*i)
		s := states[i]
		for k, q := range []string{"enter_db", "enter_wb", "leave_db", "leave_wb", "outdoor_db"} {
			note := ""
			if i == 1 && q == "leave_db" {
				note = "leaving air warm for the load: refrigerant charge to be checked by the contractor"
			}
			l.read(schema.SubjectCapacityTest, ct.ID, q, 0, s[k], schema.UnitDegF, schema.StageFinal, "Psychrometer 1", techB,
				at.Add(time.Duration(k)*2*time.Minute), note)
		}
	}

	waters := []*schema.WaterTest{
		{JobID: l.job.ID, SystemID: l.sys["AHU-1"].ID, Tag: "CHW coil AHU-1", Mode: "cooling", FlowSource: "valve", ValveCv: 21, Fluid: "water",
			DesignFlow: 40, CapacityTest: caps[2].ID},
		{JobID: l.job.ID, SystemID: l.sys["AHU-1"].ID, Tag: "HW coil AHU-1", Mode: "heating", FlowSource: "valve", ValveCv: 6.3, Fluid: "water",
			DesignFlow: 18, Remarks: "Balancing valve above the corridor ceiling by room 305; ladder needed"},
	}
	// ΔP across the balancing valve (psi), entering and leaving water (°F).
	water := [][3]float64{{3.6, 44.2, 56.0}, {8.0, 180.5, 160.2}}
	for i, wt := range waters {
		if err := schema.Create(ctx, db, demoActor, wt); err != nil {
			return fmt.Errorf("demo water test %s: %w", wt.Tag, err)
		}
		at := l.day(2, 560+30*i)
		for k, q := range []struct{ qty, unit string }{{"dp", schema.UnitPsi}, {"enter_temp", schema.UnitDegF}, {"leave_temp", schema.UnitDegF}} {
			l.read(schema.SubjectWaterTest, wt.ID, q.qty, 0, water[i][k], q.unit, schema.StageFinal, "Hydronic 1", techC,
				at.Add(time.Duration(k)*3*time.Minute), "")
		}
	}
	return nil
}

// demoFan is a unit's drive and motor readings: fan rpm as found and final,
// motor rpm, volts and amps per leg, statics (in. w.g.: supply, return,
// external, filter, coil; 0 when not read), sheave pitch diameters (in) and
// a power factor (0 when not read).
type demoFan struct {
	tag                    string
	fanFound, fanFinal     float64
	motorRPM               float64
	volts, amps            [3]float64
	statics                [5]float64
	motorSheave, fanSheave float64
	pf                     float64
}

var demoFans = []demoFan{
	{"RTU-1", 1105, 1148, 1752, [3]float64{472, 469, 474}, [3]float64{4.2, 4.4, 4.1}, [5]float64{0.52, -0.31, 0.83, 0.18, 0}, 4.5, 6.9, 0},
	{"RTU-2", 1120, 1120, 1755, [3]float64{471, 470, 476}, [3]float64{4.0, 4.1, 3.9}, [5]float64{0.49, -0.28, 0.77, 0.21, 0}, 4.4, 6.9, 0},
	{"AHU-1", 1190, 1236, 1760, [3]float64{468, 466, 471}, [3]float64{9.6, 9.9, 9.5}, [5]float64{1.02, -0.55, 1.57, 0.35, 0.62}, 5.9, 8.4, 0.84},
	{"EF-1", 1040, 1040, 1718, [3]float64{473, 472, 470}, [3]float64{1.6, 1.7, 1.6}, [5]float64{0, -0.42, 0.46, 0, 0}, 3.1, 5.1, 0},
}

// fans queues the drive and motor readings of every unit. Rotating equipment:
// in the demo as on site, sheaves are read with the drive locked out.
func (l *demoLoader) fans() {
	for i, f := range demoFans {
		id := l.sys[f.tag].ID
		found, final := l.day(1, 400+30*i), l.day(2, 600+30*i)
		sys := func(qty string, point int, v float64, unit, stage, inst string, at time.Time, note string) {
			l.read(schema.SubjectSystem, id, qty, point, v, unit, stage, inst, techB, at, note)
		}
		sys("fan_rpm", 0, f.fanFound, schema.UnitRPM, schema.StageAsFound, "Tach 1", found, "")
		note := ""
		if f.fanFinal != f.fanFound {
			note = "after the motor sheave was opened a quarter turn (drive locked out)"
		}
		sys("fan_rpm", 0, f.fanFinal, schema.UnitRPM, schema.StageFinal, "Tach 1", final, note)
		sys("motor_rpm", 0, f.motorRPM, schema.UnitRPM, schema.StageFinal, "Tach 1", final.Add(time.Minute), "")
		for leg := 1; leg <= 3; leg++ {
			sys("volts", leg, f.volts[leg-1], schema.UnitVolt, schema.StageFinal, "Clamp 1", final.Add(2*time.Minute), "")
			sys("amps", leg, f.amps[leg-1], schema.UnitAmp, schema.StageFinal, "Clamp 1", final.Add(3*time.Minute), "")
		}
		for k, q := range []string{"static_supply", "static_return", "static_external", "static_filter", "static_coil"} {
			if f.statics[k] != 0 {
				sys(q, 0, f.statics[k], schema.UnitInWG, schema.StageFinal, "Manometer 1", final.Add(time.Duration(4+k)*time.Minute), "")
			}
		}
		sys("motor_sheave", 0, f.motorSheave, schema.UnitInch, schema.StageFinal, "", final.Add(10*time.Minute), "")
		sys("fan_sheave", 0, f.fanSheave, schema.UnitInch, schema.StageFinal, "", final.Add(10*time.Minute), "")
		if f.pf > 0 {
			sys("power_factor", 0, f.pf, schema.UnitNone, schema.StageFinal, "Clamp 1", final.Add(11*time.Minute), "")
		}
	}
}
