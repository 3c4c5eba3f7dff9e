package report

import (
	"context"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"testing"
	"time"

	"fieldtab/measure"
	"fieldtab/schema"
)

// Test jobs. The demo job is built in package main (cmd_demo.go), out of
// reach of these tests, so the fixture here is a job of the same shape built
// through schema's API: every name and number is invented, and the
// performance table is testdata's invented example.

// plan is a job to be stored or held in memory: design records with their
// IDs set, and readings in the order they are stored.
type plan struct {
	job         schema.Job
	instruments []schema.Instrument
	systems     []schema.System
	outlets     []schema.Outlet
	traverses   []schema.Traverse
	caps        []schema.CapacityTest
	waters      []schema.WaterTest
	readings    []schema.Reading
	inst        map[string]string // instrument tag → ID
}

func newPlan(job schema.Job) *plan {
	job.ID = schema.NewID()
	if job.Tolerances == (schema.Tolerances{}) {
		job.Tolerances = schema.DefaultTolerances()
	}
	if job.Status == "" {
		job.Status = "open"
	}
	return &plan{job: job, inst: map[string]string{}}
}

func (p *plan) instrument(in schema.Instrument) {
	in.ID, in.JobID = schema.NewID(), p.job.ID
	p.instruments = append(p.instruments, in)
	p.inst[in.Tag] = in.ID
}

func (p *plan) system(s schema.System) *schema.System {
	s.ID, s.JobID = schema.NewID(), p.job.ID
	p.systems = append(p.systems, s)
	return &p.systems[len(p.systems)-1]
}

func (p *plan) outlet(sysID, tag, room, kind, size string, design float64) string {
	o := schema.Outlet{ID: schema.NewID(), JobID: p.job.ID, SystemID: sysID, Tag: tag, Room: room, Kind: kind, Size: size,
		DesignFlow: design, Method: "hood", Factor: 1}
	p.outlets = append(p.outlets, o)
	return o.ID
}

// read queues a reading taken with the instrument tagged inst ("" none).
func (p *plan) read(kind, subject, qty string, point int, v float64, unit, stage, inst string, at time.Time) {
	val := v
	p.readings = append(p.readings, schema.Reading{ID: schema.NewID(), JobID: p.job.ID, SubjectKind: kind, SubjectID: subject,
		Quantity: qty, Point: point, Value: &val, Unit: unit, Stage: stage, InstrumentID: p.inst[inst], Technician: "Fixture tech",
		TakenAt: at})
}

// traverseReadings queues velocity pressures (in. w.g.) whose mean velocity
// gives flow (cfm, actual) at density rho (lb/ft³), slower near the walls;
// VP = ρ·(V/1096.7)² is the pitot relation in IP units (ASHRAE Handbook—
// Fundamentals, duct design chapter; the constant from memory).
func (p *plan) traverseReadings(tb testing.TB, t *schema.Traverse, flow, rho float64, at time.Time) {
	tb.Helper()
	layout, err := t.Layout(measure.IP)
	if err != nil {
		tb.Fatal(err)
	}
	pts, err := layout.Points()
	if err != nil {
		tb.Fatal(err)
	}
	area := t.Width * t.Height / 144
	if t.Shape == "round" {
		area = math.Pi * t.Diameter * t.Diameter / 4 / 144
	}
	shape := make([]float64, len(pts))
	sum := 0.0
	for i, pt := range pts {
		var r float64
		if t.Shape == "round" {
			r = math.Abs(pt.Depth.Inch()-t.Diameter/2) / (t.Diameter / 2)
		} else {
			r = math.Max(math.Abs(pt.X.Inch()/t.Width*2-1), math.Abs(pt.Y.Inch()/t.Height*2-1))
		}
		shape[i] = (1 - 0.12*r*r) * (1 + 0.02*math.Sin(float64(i)*1.7))
		sum += shape[i]
	}
	for i := range pts {
		v := flow / area * shape[i] * float64(len(pts)) / sum
		vp := rho * math.Pow(v/1096.7, 2)
		p.read(schema.SubjectTraverse, t.ID, "vp", i+1, math.Round(vp*1000)/1000, schema.UnitInWG, schema.StageFinal,
			"Manometer 1", at.Add(time.Duration(i)*time.Minute))
	}
}

// fanReadings queues a unit's drive and motor readings.
func (p *plan) fanReadings(sysID string, fanRPM, motorRPM float64, volts, amps [3]float64, ext, sup, ret float64, pf float64, at time.Time) {
	r := func(q string, pt int, v float64, unit, inst string) {
		p.read(schema.SubjectSystem, sysID, q, pt, v, unit, schema.StageFinal, inst, at)
	}
	r("fan_rpm", 0, fanRPM, schema.UnitRPM, "Tach 1")
	r("motor_rpm", 0, motorRPM, schema.UnitRPM, "Tach 1")
	for leg := 1; leg <= 3; leg++ {
		r("volts", leg, volts[leg-1], schema.UnitVolt, "Clamp 1")
		r("amps", leg, amps[leg-1], schema.UnitAmp, "Clamp 1")
	}
	r("static_external", 0, ext, schema.UnitInWG, "Manometer 1")
	r("static_supply", 0, sup, schema.UnitInWG, "Manometer 1")
	r("static_return", 0, ret, schema.UnitInWG, "Manometer 1")
	r("motor_sheave", 0, 4.5, schema.UnitInch, "")
	r("fan_sheave", 0, 6.9, schema.UnitInch, "")
	if pf > 0 {
		r("power_factor", 0, pf, schema.UnitNone, "Clamp 1")
	}
}

func (p *plan) instrumentsFor(now time.Time) {
	date := func(days int) string { return now.AddDate(0, 0, days).Format(time.DateOnly) }
	for _, in := range []schema.Instrument{
		{Tag: "Hood 1", Kind: "flow_hood", Make: "Fixture", Model: "capture hood", Serial: "FX-H1",
			CalibratedOn: date(-100), CalibrationDue: date(265), AccuracyPct: 3, AccuracyAbs: 7, AccuracyUnit: "cfm"},
		// Hood 2's calibration ran out before the crew used it.
		{Tag: "Hood 2", Kind: "flow_hood", Make: "Fixture", Model: "capture hood", Serial: "FX-H2",
			CalibratedOn: date(-400), CalibrationDue: date(-20), AccuracyPct: 3, AccuracyAbs: 7, AccuracyUnit: "cfm"},
		{Tag: "Manometer 1", Kind: "manometer", Model: "digital manometer", Serial: "FX-M1",
			CalibratedOn: date(-30), CalibrationDue: date(335), AccuracyPct: 1, AccuracyAbs: 0.002, AccuracyUnit: "in. w.g."},
		{Tag: "Psychrometer 1", Kind: "psychrometer", Model: "thermo-hygrometer", Serial: "FX-T1",
			CalibratedOn: date(-60), CalibrationDue: date(305), AccuracyAbs: 0.5, AccuracyUnit: "°F"},
		{Tag: "Tach 1", Kind: "tachometer", Serial: "FX-R1", CalibratedOn: date(-10), CalibrationDue: date(355), AccuracyPct: 0.05},
		{Tag: "Clamp 1", Kind: "clamp_meter", Serial: "FX-C1", CalibratedOn: date(-10), CalibrationDue: date(355), AccuracyPct: 2},
		{Tag: "Hydronic 1", Kind: "hydronic_meter", Serial: "FX-W1", CalibratedOn: date(-350), CalibrationDue: date(15),
			AccuracyPct: 1, AccuracyAbs: 0.05, AccuracyUnit: "psi"},
	} {
		p.instrument(in)
	}
}

func perfTable(tb testing.TB) string {
	tb.Helper()
	b, err := os.ReadFile(filepath.Join("..", "testdata", "perf_rtu_example.csv"))
	if err != nil {
		tb.Fatal(err)
	}
	return string(b)
}

// fixtureNow is the fixture's clock: readings are taken before it, and the
// report is generated at it.
var fixtureNow = time.Date(2025, 6, 12, 16, 30, 0, 0, time.UTC)

// demoPlan is the fixture job: three systems, outlets within, low, high,
// undetermined and not read, an overdue hood, a rectangular and a round
// traverse, three capacity tests (one short) and three water tests.
func demoPlan(tb testing.TB, now time.Time) *plan {
	tb.Helper()
	elev := 1120.0
	p := newPlan(schema.Job{Name: "Fixture: Hollin Lane Library and Health Centre", SiteAddress: "4 Hollin Lane, Wendmoor (fictional)",
		Client: "Wendmoor Borough (fictional)", Engineer: "Fixture engineer of record", Contractor: "Fixture mechanical contractor",
		TABFirm: "Fixture balancing crew", Units: "ip", Elevation: &elev, ProjectNumber: "HL-2025-014",
		Remarks: "Level 2 ceiling closed before the final readings"})
	p.instrumentsFor(now)
	day1, day2 := now.Add(-50*time.Hour), now.Add(-26*time.Hour)
	rated := func(cfm, oa, rpm float64) schema.SystemDesign {
		return schema.SystemDesign{Airflow: cfm, OutdoorAir: oa, ExternalStatic: 0.8, RatedTotal: 120_000, RatedSensible: 86_400,
			MotorHP: 3, FLA: 4.8, Volts: 460, Phase: 3, FanRPM: rpm, MotorRPM: 1760, PerfTableCSV: perfTable(tb)}
	}
	rtu := p.system(schema.System{Tag: "RTU-1", Kind: "rooftop_unit", Name: "Library floor", Location: "Roof, north end",
		Design: rated(4000, 800, 1150)})
	rtuID := rtu.ID
	ahuID := p.system(schema.System{Tag: "AHU-1", Kind: "air_handler", Name: "Health centre", Location: "Plant room",
		Design: schema.SystemDesign{Airflow: 6000, OutdoorAir: 1500, ExternalStatic: 1.5, RatedTotal: 216_000, RatedSensible: 160_000,
			MotorHP: 7.5, FLA: 11, Volts: 460, Phase: 3, FanRPM: 1250, MotorRPM: 1765}}).ID
	efID := p.system(schema.System{Tag: "EF-1", Kind: "fan", Name: "Toilet exhaust", Location: "Roof, centre",
		Design: schema.SystemDesign{Airflow: 700, ExternalStatic: 0.5, MotorHP: 1, FLA: 2.1, Volts: 460, Phase: 3, FanRPM: 1050, MotorRPM: 1725}}).ID

	// Outlets: design cfm, as found and final as % of design (0: none).
	type o struct {
		sys, tag, room, kind, size string
		design, found, final       float64
		hood                       string
	}
	outlets := []o{
		{rtuID, "S-1", "1.01 Entrance", "supply", "24x24", 500, 82, 101, "Hood 2"},
		{rtuID, "S-2", "1.01 Entrance", "supply", "24x24", 500, 120, 98, "Hood 2"},
		{rtuID, "S-3", "1.02 Reading room", "supply", "24x24", 450, 91, 103, "Hood 1"},
		{rtuID, "S-4", "1.02 Reading room", "supply", "24x24", 450, 88, 97, "Hood 1"},
		{rtuID, "S-5", "1.03 Stacks", "supply", "24x24", 400, 110, 100, "Hood 1"},
		{rtuID, "S-6", "1.03 Stacks", "supply", "24x24", 400, 75, 79, "Hood 1"}, // low: kinked flex
		{rtuID, "S-7", "1.04 Study", "supply", "12x12", 250, 95, 99, "Hood 1"},
		{rtuID, "S-8", "1.05 Office", "supply", "12x12", 150, 130, 121, "Hood 1"}, // high: no damper
		{rtuID, "S-9", "1.06 Store", "supply", "12x12", 100, 0, 0, "Hood 1"},      // never read
		{rtuID, "S-10", "1.07 Corridor", "supply", "12x12", 800, 97, 102, "Hood 1"},
		{rtuID, "R-1", "1.01 Entrance", "return", "24x24", 2000, 90, 0, "Hood 1"}, // as found only
		{rtuID, "R-2", "1.03 Stacks", "return", "24x24", 1500, 104, 99, "Hood 1"},
		{ahuID, "S-11", "2.01 Waiting", "supply", "24x24", 1000, 85, 100, "Hood 1"},
		{ahuID, "S-12", "2.02 Consult 1", "supply", "24x24", 1000, 93, 102, "Hood 1"},
		{ahuID, "S-13", "2.03 Consult 2", "supply", "24x24", 1000, 107, 98, "Hood 1"},
		{ahuID, "S-14", "2.04 Treatment", "supply", "24x24", 1500, 96, 101, "Hood 1"},
		{ahuID, "S-15", "2.05 Clean utility", "supply", "12x12", 125, 80, 90, "Hood 1"}, // undetermined: small outlet
		{ahuID, "S-16", "2.06 Staff", "supply", "24x24", 1375, 99, 99, "Hood 1"},
		{ahuID, "R-3", "2.01 Waiting", "return", "36x24", 4500, 94, 100, "Hood 1"},
		{ahuID, "OA-1", "Plant room", "outdoor_air", "48x24", 1500, 0, 0, ""},
		{efID, "E-1", "1.08 Toilets", "exhaust", "12x12", 300, 96, 101, "Hood 1"},
		{efID, "E-2", "2.07 Toilets", "exhaust", "12x12", 300, 131, 0, "Hood 1"},
		{efID, "E-3", "2.08 Sluice", "exhaust", "10x10", 100, 102, 100, "Hood 1"},
	}
	for i, x := range outlets {
		id := p.outlet(x.sys, x.tag, x.room, x.kind, x.size, x.design)
		if x.found > 0 {
			p.read(schema.SubjectOutlet, id, "flow", 0, math.Round(x.design*x.found/100), schema.UnitCFM, schema.StageAsFound,
				x.hood, day1.Add(time.Duration(3*i)*time.Minute))
		}
		if x.final > 0 {
			p.read(schema.SubjectOutlet, id, "flow", 0, math.Round(x.design*x.final/100), schema.UnitCFM, schema.StageFinal,
				"Hood 1", day2.Add(time.Duration(3*i)*time.Minute))
		}
	}

	t1 := schema.Traverse{ID: schema.NewID(), JobID: p.job.ID, SystemID: rtuID, Tag: "T-1", Location: "RTU-1 supply duct, roof",
		Shape: "rect", Method: "log-tchebycheff", Width: 24, Height: 16, PointsW: 6, PointsH: 5}
	t2 := schema.Traverse{ID: schema.NewID(), JobID: p.job.ID, SystemID: ahuID, Tag: "T-2", Location: "AHU-1 supply duct, plant room",
		Shape: "round", Method: "log-tchebycheff", Diameter: 34, PointsPerDiameter: 6, Diameters: 2}
	p.traverses = append(p.traverses, t1, t2)
	at := day2.Add(5 * time.Hour)
	p.traverseReadings(tb, &t1, 3950, 0.0733, at)
	p.read(schema.SubjectTraverse, t1.ID, "air_db", 0, 56.4, schema.UnitDegF, schema.StageFinal, "Psychrometer 1", at.Add(40*time.Minute))
	p.read(schema.SubjectTraverse, t1.ID, "air_rh", 0, 88, schema.UnitPercent, schema.StageFinal, "Psychrometer 1", at.Add(40*time.Minute))
	p.traverseReadings(tb, &t2, 5870, 0.0734, at.Add(time.Hour))
	p.read(schema.SubjectTraverse, t2.ID, "air_db", 0, 55.2, schema.UnitDegF, schema.StageFinal, "Psychrometer 1", at.Add(80*time.Minute))

	caps := []schema.CapacityTest{
		{ID: schema.NewID(), JobID: p.job.ID, SystemID: rtuID, Tag: "CT-1", Mode: "cooling", FlowSource: "traverse", TraverseID: t1.ID},
		{ID: schema.NewID(), JobID: p.job.ID, SystemID: ahuID, Tag: "CT-2", Mode: "cooling", FlowSource: "traverse", TraverseID: t2.ID},
		{ID: schema.NewID(), JobID: p.job.ID, SystemID: rtuID, Tag: "CT-3", Mode: "cooling", FlowSource: "outlets", FlowBasis: "standard"},
	}
	p.caps = caps
	// Entering dry and wet bulb, leaving dry and wet bulb, outdoor dry bulb (°F).
	states := [][5]float64{{78.2, 64.6, 55.2, 53.9, 91}, {80.4, 66.3, 55.0, 53.9, 90}, {76.8, 63.6, 62.6, 58.6, 92}}
	for i, ct := range caps {
		at := now.Add(-time.Duration(6-i) * time.Hour)
		for k, q := range []string{"enter_db", "enter_wb", "leave_db", "leave_wb", "outdoor_db"} {
			p.read(schema.SubjectCapacityTest, ct.ID, q, 0, states[i][k], schema.UnitDegF, schema.StageFinal, "Psychrometer 1",
				at.Add(time.Duration(k)*time.Minute))
		}
	}

	p.waters = []schema.WaterTest{
		{ID: schema.NewID(), JobID: p.job.ID, SystemID: ahuID, Tag: "CHW coil AHU-1", Mode: "cooling", FlowSource: "valve", ValveCv: 12.5, Fluid: "water",
			DesignFlow: 40, CapacityTest: caps[1].ID},
		{ID: schema.NewID(), JobID: p.job.ID, SystemID: ahuID, Tag: "HW coil AHU-1", Mode: "heating", FlowSource: "valve", ValveCv: 6.3, Fluid: "water",
			DesignFlow: 18},
		{ID: schema.NewID(), JobID: p.job.ID, SystemID: rtuID, Tag: "Glycol loop RTU-1", Mode: "cooling", FlowSource: "meter", Fluid: "pg",
			Concentration: 30, DesignFlow: 12},
	}
	water := [][3]float64{{10.2, 44.2, 56.0}, {8.0, 180.5, 160.2}, {13.1, 140.0, 125.0}}
	for i, wt := range p.waters {
		at := now.Add(-time.Duration(3-i) * time.Hour)
		q0, u0 := "dp", schema.UnitPsi
		if wt.FlowSource == "meter" {
			q0, u0 = "flow", schema.UnitGPM
		}
		p.read(schema.SubjectWaterTest, wt.ID, q0, 0, water[i][0], u0, schema.StageFinal, "Hydronic 1", at)
		p.read(schema.SubjectWaterTest, wt.ID, "enter_temp", 0, water[i][1], schema.UnitDegF, schema.StageFinal, "Hydronic 1", at.Add(time.Minute))
		p.read(schema.SubjectWaterTest, wt.ID, "leave_temp", 0, water[i][2], schema.UnitDegF, schema.StageFinal, "Hydronic 1", at.Add(2*time.Minute))
	}

	fans := day2.Add(9 * time.Hour)
	p.fanReadings(rtuID, 1148, 1752, [3]float64{472, 469, 474}, [3]float64{4.2, 4.4, 4.1}, 0.83, 0.52, -0.31, 0, fans)
	p.fanReadings(ahuID, 1236, 1760, [3]float64{468, 466, 471}, [3]float64{9.6, 9.9, 9.5}, 1.57, 1.02, -0.55, 0.84, fans.Add(time.Hour))
	p.fanReadings(efID, 1040, 1718, [3]float64{473, 472, 470}, [3]float64{1.6, 1.7, 1.6}, 0.46, 0.2, -0.42, 0, fans.Add(2*time.Hour))
	return p
}

// store writes the plan into a new SQLite file in dir through schema's API
// and returns the snapshot read back.
func (p *plan) store(tb testing.TB, dir string, now time.Time) *schema.Snapshot {
	tb.Helper()
	ctx := context.Background()
	db, err := schema.Open(ctx, filepath.Join(dir, "job.db"))
	if err != nil {
		tb.Fatal(err)
	}
	tb.Cleanup(func() { db.Close() })
	db.Now = func() time.Time { return now }
	a := schema.Actor{Name: "report test", Role: schema.RoleLead}
	job := p.job
	if err := db.CreateJob(ctx, a, &job); err != nil {
		tb.Fatalf("job: %v", err)
	}
	must := func(what string, err error) {
		if err != nil {
			tb.Fatalf("%s: %v", what, err)
		}
	}
	for i := range p.instruments {
		must("instrument "+p.instruments[i].Tag, schema.Create(ctx, db, a, &p.instruments[i]))
	}
	for i := range p.systems {
		must("system "+p.systems[i].Tag, schema.Create(ctx, db, a, &p.systems[i]))
	}
	for i := range p.outlets {
		must("outlet "+p.outlets[i].Tag, schema.Create(ctx, db, a, &p.outlets[i]))
	}
	for i := range p.traverses {
		must("traverse "+p.traverses[i].Tag, schema.Create(ctx, db, a, &p.traverses[i]))
	}
	for i := range p.caps {
		must("capacity test "+p.caps[i].Tag, schema.Create(ctx, db, a, &p.caps[i]))
	}
	for i := range p.waters {
		must("water test "+p.waters[i].Tag, schema.Create(ctx, db, a, &p.waters[i]))
	}
	for i := 0; i < len(p.readings); i += schema.MaxReadingsBatch {
		batch := p.readings[i:min(i+schema.MaxReadingsBatch, len(p.readings))]
		res, err := db.AddReadings(ctx, a, p.job.ID, batch)
		must("readings", err)
		for j, r := range res {
			if r.Status != schema.ReadingStored {
				tb.Fatalf("reading %d (%s %s): %s %s %s", i+j, batch[j].SubjectKind, batch[j].Quantity, r.Status, r.Field, r.Reason)
			}
		}
	}
	s, err := db.Snapshot(ctx, p.job.ID)
	must("snapshot", err)
	return s
}

// memory assembles the plan as a snapshot without a store, numbering the
// readings as the store would.
func (p *plan) memory() *schema.Snapshot {
	s := &schema.Snapshot{Job: p.job, Instruments: p.instruments, Systems: p.systems, Outlets: p.outlets,
		Traverses: p.traverses, CapacityTests: p.caps, WaterTests: p.waters, Readings: p.readings}
	for i := range s.Readings {
		s.Readings[i].Seq = int64(i + 1)
		s.Readings[i].ReceivedAt = s.Readings[i].TakenAt
	}
	return s
}

// inputFor computes the results of s and returns a report input at the
// fixture's clock in a site time zone.
func inputFor(tb testing.TB, s *schema.Snapshot, now time.Time) Input {
	tb.Helper()
	loc := time.FixedZone("EST", -5*3600)
	r, err := schema.ComputeResults(s, now.In(loc))
	if err != nil {
		tb.Fatal(err)
	}
	return Input{Snapshot: s, Results: r, Revision: 1, Generated: now.In(loc)}
}

func demoInput(tb testing.TB) Input {
	tb.Helper()
	return inputFor(tb, demoPlan(tb, fixtureNow).store(tb, tb.TempDir(), fixtureNow), fixtureNow)
}

var _ = fmt.Sprintf
