package schema

import (
	"context"
	"database/sql"
	"encoding/json"
	"math"
	"reflect"
	"strconv"
	"strings"
	"testing"

	"fieldtab/measure"
)

// A fictional job: the records below are invented for the tests.

func testJob() *Job {
	return &Job{Name: "Harbour View Clinic", SiteAddress: "12 Quay Road", Client: "Harbour Health Trust", Units: "ip"}
}

const testPerfCSV = `ewb_f,odb_f,flow_cfm,total_mbh,sensible_mbh
62,85,3000,100,80
62,85,5000,110,92
62,105,3000,90,76
62,105,5000,100,88
72,85,3000,120,70
72,85,5000,132,82
72,105,3000,108,66
72,105,5000,120,78
`

func testInstrument(jobID string) *Instrument {
	return &Instrument{JobID: jobID, Tag: "Hood 1", Kind: "flow_hood", Make: "Acme", Model: "FH-9", Serial: "A123",
		CalibratedOn: "2024-06-01", CalibrationDue: "2025-06-01", AccuracyPct: 3, AccuracyAbs: 7, AccuracyUnit: "cfm"}
}

func testSystem(jobID string) *System {
	return &System{JobID: jobID, Tag: "RTU-1", Kind: "rooftop_unit", Name: "Clinic wing", Location: "Roof",
		Design: SystemDesign{Airflow: 4000, OutdoorAir: 800, ExternalStatic: 0.8, RatedTotal: 120_000, RatedSensible: 90_000,
			MotorHP: 3, FLA: 4.8, Volts: 460, Phase: 3, FanRPM: 1100, MotorRPM: 1750, PerfTableCSV: testPerfCSV}}
}

func testOutlet(jobID, systemID string) *Outlet {
	return &Outlet{JobID: jobID, SystemID: systemID, Tag: "S-101", Room: "101 Waiting", Kind: "supply", Size: "24x24",
		DesignFlow: 350, Method: "hood", Factor: 1}
}

func testTraverse(jobID, systemID string) *Traverse {
	return &Traverse{JobID: jobID, SystemID: systemID, Tag: "T-1", Location: "Main supply, roof curb", Shape: "rect",
		Method: "log-tchebycheff", Width: 24, Height: 16, PointsW: 6, PointsH: 5}
}

func testCapacityTest(jobID, systemID, traverseID string) *CapacityTest {
	return &CapacityTest{JobID: jobID, SystemID: systemID, Tag: "CT-1", Mode: "cooling", FlowSource: "traverse", TraverseID: traverseID}
}

func testWaterTest(jobID, systemID, capacityTestID string) *WaterTest {
	return &WaterTest{JobID: jobID, SystemID: systemID, Tag: "CHW coil RTU-1", Mode: "cooling", FlowSource: "valve", ValveCv: 12.5,
		Fluid: "pg", Concentration: 30, DesignFlow: 40, CapacityTest: capacityTestID}
}

// assertErr checks an error's code and field.
func assertErr(t *testing.T, err error, code Code, field string) {
	t.Helper()
	if ErrorCode(err) != code || ErrorField(err) != field {
		t.Fatalf("got error %v (code %q, field %q), want code %q field %q", err, ErrorCode(err), ErrorField(err), code, field)
	}
	if code == Invalid && ErrorMessage(err) == "" {
		t.Fatalf("invalid error with no message")
	}
}

// fixture is a job holding one record of every kind.
type fixture struct {
	db   *DB
	job  *Job
	inst *Instrument
	sys  *System
	out  *Outlet
	trav *Traverse
	cap  *CapacityTest
	wat  *WaterTest
}

var lead = Actor{DeviceID: "", Name: "Dana (lead)", Role: RoleLead}

func mustCreate[T designRecord](t *testing.T, db *DB, rec T) T {
	t.Helper()
	if err := Create(context.Background(), db, lead, rec); err != nil {
		t.Fatalf("create %s: %v", rec.kind().entity, err)
	}
	return rec
}

func newFixture(t *testing.T) *fixture {
	t.Helper()
	db := MustOpenDB(t)
	j := testJob()
	if err := db.CreateJob(context.Background(), lead, j); err != nil {
		t.Fatal(err)
	}
	f := &fixture{db: db, job: j}
	f.inst = mustCreate(t, db, testInstrument(j.ID))
	f.sys = mustCreate(t, db, testSystem(j.ID))
	f.out = mustCreate(t, db, testOutlet(j.ID, f.sys.ID))
	f.trav = mustCreate(t, db, testTraverse(j.ID, f.sys.ID))
	f.cap = mustCreate(t, db, testCapacityTest(j.ID, f.sys.ID, f.trav.ID))
	f.wat = mustCreate(t, db, testWaterTest(j.ID, f.sys.ID, f.cap.ID))
	return f
}

func TestNewID(t *testing.T) {
	seen := map[string]bool{}
	for i := 0; i < 1000; i++ {
		id := NewID()
		if !validUUID(id) {
			t.Fatalf("NewID() = %q, not a canonical UUID", id)
		}
		if id[14] != '4' || !strings.ContainsRune("89ab", rune(id[19])) {
			t.Fatalf("NewID() = %q: not version 4 / RFC variant", id)
		}
		if seen[id] {
			t.Fatalf("NewID() repeated %q", id)
		}
		seen[id] = true
	}
}

func TestJobValidate(t *testing.T) {
	f := func(v float64) *float64 { return &v }
	tests := []struct {
		name  string
		edit  func(j *Job)
		field string
	}{
		{"OK", func(j *Job) {}, ""},
		{"OKSI", func(j *Job) { j.Units = "si"; j.Elevation = f(7500); j.Barometric = f(101.3) }, ""},
		{"OKProjectNumber", func(j *Job) { j.ProjectNumber = "P-2026-114"; j.Remarks = "night work only" }, ""},
		{"ErrProjectNumberTooLong", func(j *Job) { j.ProjectNumber = strings.Repeat("9", 81) }, "project_number"},
		{"OKElevationLowIP", func(j *Job) { j.Elevation = f(-1500) }, ""},
		{"OKClosed", func(j *Job) { j.Status = "closed" }, ""},
		{"ErrIDNotUUID", func(j *Job) { j.ID = "job-1" }, "id"},
		{"ErrNameRequired", func(j *Job) { j.Name = "  " }, "name"},
		{"ErrNameTooLong", func(j *Job) { j.Name = strings.Repeat("x", 201) }, "name"},
		{"ErrNameControl", func(j *Job) { j.Name = "a\nb" }, "name"},
		{"ErrSiteAddressTooLong", func(j *Job) { j.SiteAddress = strings.Repeat("x", 201) }, "site_address"},
		{"ErrTABFirmControl", func(j *Job) { j.TABFirm = "x\x00" }, "tab_firm"},
		{"ErrUnitsMissing", func(j *Job) { j.Units = "" }, "units"},
		{"ErrUnitsUnknown", func(j *Job) { j.Units = "IP" }, "units"},
		{"ErrElevationHighIP", func(j *Job) { j.Elevation = f(25_001) }, "elevation"},
		{"ErrElevationLowIP", func(j *Job) { j.Elevation = f(-1_501) }, "elevation"},
		{"ErrElevationHighSI", func(j *Job) { j.Units = "si"; j.Elevation = f(7_501) }, "elevation"},
		{"ErrElevationNaN", func(j *Job) { j.Elevation = f(math.NaN()) }, "elevation"},
		{"ErrBarometricLowIP", func(j *Job) { j.Barometric = f(4.9) }, "barometric"},
		{"ErrBarometricKPaInIPJob", func(j *Job) { j.Barometric = f(101.3) }, "barometric"},
		{"ErrBarometricHighSI", func(j *Job) { j.Units = "si"; j.Barometric = f(111) }, "barometric"},
		{"ErrToleranceNegative", func(j *Job) { j.Tolerances.OutletLowPct = -1 }, "tolerances.outlet_low_pct"},
		{"ErrToleranceAbove100", func(j *Job) { j.Tolerances.HydronicHighPct = 101 }, "tolerances.hydronic_high_pct"},
		{"ErrStatus", func(j *Job) { j.Status = "done" }, "status"},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			j := testJob()
			j.Tolerances = DefaultTolerances()
			tt.edit(j)
			err := j.Validate()
			if tt.field == "" {
				if err != nil {
					t.Fatalf("unexpected error: %v", err)
				}
				return
			}
			assertErr(t, err, Invalid, tt.field)
		})
	}
}

// validationCase is one edit of a valid record and the field it must be
// rejected on ("" for accepted).
type validationCase[T any] struct {
	name  string
	units measure.UnitSystem
	edit  func(r T)
	field string
}

func runValidation[T any](t *testing.T, fresh func() T, validate func(r T, u measure.UnitSystem) error, tests []validationCase[T]) {
	t.Helper()
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			r := fresh()
			tt.edit(r)
			u := tt.units
			if u == 0 {
				u = measure.IP
			}
			err := validate(r, u)
			if tt.field == "" {
				if err != nil {
					t.Fatalf("unexpected error: %v", err)
				}
				return
			}
			assertErr(t, err, Invalid, tt.field)
		})
	}
}

const (
	jid = "0b7e6f0c-6b0e-4c8e-9d1a-1f2e3d4c5b6a"
	sid = "1c8f7a1d-7c1f-4d9f-8e2b-2a3f4e5d6c7b"
)

func TestInstrumentValidate(t *testing.T) {
	runValidation(t, func() *Instrument { return testInstrument(jid) },
		func(r *Instrument, _ measure.UnitSystem) error { return r.Validate() },
		[]validationCase[*Instrument]{
			{"OK", 0, func(r *Instrument) {}, ""},
			{"OKNoDates", 0, func(r *Instrument) { r.CalibratedOn, r.CalibrationDue = "", "" }, ""},
			{"OKSameDay", 0, func(r *Instrument) { r.CalibrationDue = r.CalibratedOn }, ""},
			{"ErrJobIDMissing", 0, func(r *Instrument) { r.JobID = "" }, "job_id"},
			{"ErrIDNotUUID", 0, func(r *Instrument) { r.ID = "ABC" }, "id"},
			{"ErrTagRequired", 0, func(r *Instrument) { r.Tag = "" }, "tag"},
			{"ErrTagTooLong", 0, func(r *Instrument) { r.Tag = strings.Repeat("h", 41) }, "tag"},
			{"ErrKindMissing", 0, func(r *Instrument) { r.Kind = "" }, "kind"},
			{"ErrKindUnknown", 0, func(r *Instrument) { r.Kind = "barometer" }, "kind"},
			{"ErrModelTooLong", 0, func(r *Instrument) { r.Model = strings.Repeat("m", 201) }, "model"},
			{"ErrCalibratedOnFormat", 0, func(r *Instrument) { r.CalibratedOn = "06/01/2024" }, "calibrated_on"},
			{"ErrCalibratedOnNoDay", 0, func(r *Instrument) { r.CalibratedOn = "2024-02-30" }, "calibrated_on"},
			{"ErrCalibrationDueFormat", 0, func(r *Instrument) { r.CalibrationDue = "2025-6-1" }, "calibration_due"},
			{"ErrDueBeforeCalibrated", 0, func(r *Instrument) { r.CalibrationDue = "2024-05-31" }, "calibration_due"},
			{"ErrAccuracyPctAbove100", 0, func(r *Instrument) { r.AccuracyPct = 101 }, "accuracy_pct"},
			{"ErrAccuracyPctNegative", 0, func(r *Instrument) { r.AccuracyPct = -1 }, "accuracy_pct"},
			{"ErrAccuracyAbsNegative", 0, func(r *Instrument) { r.AccuracyAbs = -7 }, "accuracy_abs"},
			{"ErrAccuracyUnitMissing", 0, func(r *Instrument) { r.AccuracyUnit = "" }, "accuracy_unit"},
		})
}

func TestSystemValidate(t *testing.T) {
	runValidation(t, func() *System { return testSystem(jid) },
		func(r *System, u measure.UnitSystem) error { return r.Validate(u) },
		[]validationCase[*System]{
			{"OK", 0, func(r *System) {}, ""},
			{"OKNoDesign", 0, func(r *System) { r.Design = SystemDesign{} }, ""},
			{"OKSI", measure.SI, func(r *System) {
				r.Design = SystemDesign{Airflow: 1900, OutdoorAir: 380, ExternalStatic: 200, RatedTotal: 35_000, MotorHP: 2.2}
			}, ""},
			{"OKPump", 0, func(r *System) { r.Kind = "pump"; r.Design = SystemDesign{WaterFlow: 120, MotorHP: 5} }, ""},
			{"OKNameplate", 0, func(r *System) {
				r.Design.Make, r.Design.Model, r.Design.Serial = "Make", "RT-240", "SN 0042"
				r.Design.MotorFrame, r.Design.ServiceFactor = "184T", 1.15
				r.Design.FanSheaveSize, r.Design.FanSheavePitch = "1B5V124", 12.4
				r.Design.MotorSheaveSize, r.Design.MotorSheavePitch = "1VP56 adjustable", 5.2
				r.Design.Belts, r.Design.Filters = "1 × B55", "8 × 24×24×2 MERV 13"
				r.Remarks = "access from the roof hatch"
			}, ""},
			{"OKSheaveSI", measure.SI, func(r *System) { r.Design = SystemDesign{FanSheavePitch: 315, MotorSheavePitch: 132} }, ""},
			{"ErrServiceFactorLow", 0, func(r *System) { r.Design.ServiceFactor = 0.9 }, "design.service_factor"},
			{"ErrFanSheaveHigh", 0, func(r *System) { r.Design.FanSheavePitch = 81 }, "design.fan_sheave_pitch"},
			{"ErrMotorSheaveNegative", 0, func(r *System) { r.Design.MotorSheavePitch = -1 }, "design.motor_sheave_pitch"},
			{"ErrBeltsTooLong", 0, func(r *System) { r.Design.Belts = strings.Repeat("b", 81) }, "design.belts"},
			{"ErrRemarksControl", 0, func(r *System) { r.Remarks = "a\u202Eb\x07" }, "remarks"},
			{"ErrTagRequired", 0, func(r *System) { r.Tag = "" }, "tag"},
			{"ErrKind", 0, func(r *System) { r.Kind = "chiller" }, "kind"},
			{"ErrNameTooLong", 0, func(r *System) { r.Name = strings.Repeat("n", 201) }, "name"},
			{"ErrLocationControl", 0, func(r *System) { r.Location = "roof\t" }, "location"},
			{"ErrAirflowNegative", 0, func(r *System) { r.Design.Airflow = -1 }, "design.airflow"},
			{"ErrAirflowHighIP", 0, func(r *System) { r.Design.Airflow = 500_001 }, "design.airflow"},
			{"ErrAirflowHighSI", measure.SI, func(r *System) { r.Design.Airflow = 250_001; r.Design.OutdoorAir = 0 }, "design.airflow"},
			{"ErrOutdoorAirAboveAirflow", 0, func(r *System) { r.Design.OutdoorAir = 4001 }, "design.outdoor_air"},
			{"ErrExternalStatic", 0, func(r *System) { r.Design.ExternalStatic = 21 }, "design.external_static"},
			{"ErrRatedTotal", 0, func(r *System) { r.Design.RatedTotal = math.Inf(1) }, "design.rated_total"},
			{"ErrSensibleAboveTotal", 0, func(r *System) { r.Design.RatedSensible = 130_000 }, "design.rated_sensible"},
			{"ErrMotorHP", 0, func(r *System) { r.Design.MotorHP = 2001 }, "design.motor_hp"},
			{"ErrFLA", 0, func(r *System) { r.Design.FLA = -4 }, "design.fla"},
			{"ErrVolts", 0, func(r *System) { r.Design.Volts = 15_001 }, "design.volts"},
			{"ErrPhase", 0, func(r *System) { r.Design.Phase = 2 }, "design.phase"},
			{"ErrFanRPM", 0, func(r *System) { r.Design.FanRPM = 20_001 }, "design.fan_rpm"},
			{"ErrMotorRPM", 0, func(r *System) { r.Design.MotorRPM = math.NaN() }, "design.motor_rpm"},
			{"ErrWaterFlow", 0, func(r *System) { r.Design.WaterFlow = 100_001 }, "design.water_flow"},
			{"ErrPerfTableBadHeader", 0, func(r *System) { r.Design.PerfTableCSV = "a,b\n1,2\n" }, "design.perf_table_csv"},
			{"ErrPerfTableBadCell", 0, func(r *System) {
				r.Design.PerfTableCSV = strings.Replace(testPerfCSV, "62,105,5000,100,88", "62,105,5000,abc,88", 1)
			}, "design.perf_table_csv"},
			{"ErrPerfTableTooBig", 0, func(r *System) { r.Design.PerfTableCSV = strings.Repeat("#\n", 200_000) }, "design.perf_table_csv"},
		})
	t.Run("ErrUnitsUnset", func(t *testing.T) {
		assertErr(t, testSystem(jid).Validate(0), Invalid, "units")
	})
	t.Run("PerfTableMessageNamesLine", func(t *testing.T) {
		r := testSystem(jid)
		r.Design.PerfTableCSV = strings.Replace(testPerfCSV, "62,105,5000,100,88", "62,105,5000,abc,88", 1)
		if msg := ErrorMessage(r.Validate(measure.IP)); !strings.Contains(msg, "line 5") {
			t.Errorf("message %q should name the CSV line", msg)
		}
	})
}

func TestOutletValidate(t *testing.T) {
	runValidation(t, func() *Outlet { return testOutlet(jid, sid) },
		func(r *Outlet, u measure.UnitSystem) error { return r.Validate(u) },
		[]validationCase[*Outlet]{
			{"OK", 0, func(r *Outlet) {}, ""},
			{"OKAk", 0, func(r *Outlet) { r.Method, r.Factor, r.Ak = "ak", 0, 0.85 }, ""},
			{"OKMaxFlowIP", 0, func(r *Outlet) { r.DesignFlow = 50_000 }, ""},
			{"OKSI", measure.SI, func(r *Outlet) { r.DesignFlow = 165; r.Method, r.Factor, r.Ak = "ak", 0, 0.08 }, ""},
			{"ErrSystemIDMissing", 0, func(r *Outlet) { r.SystemID = "" }, "system_id"},
			{"ErrSystemIDNotUUID", 0, func(r *Outlet) { r.SystemID = "RTU-1" }, "system_id"},
			{"ErrTagRequired", 0, func(r *Outlet) { r.Tag = "" }, "tag"},
			{"ErrRoomTooLong", 0, func(r *Outlet) { r.Room = strings.Repeat("r", 201) }, "room"},
			{"ErrSizeTooLong", 0, func(r *Outlet) { r.Size = strings.Repeat("9", 41) }, "size"},
			{"ErrKind", 0, func(r *Outlet) { r.Kind = "transfer" }, "kind"},
			{"ErrDesignFlowZero", 0, func(r *Outlet) { r.DesignFlow = 0 }, "design_flow"},
			{"ErrDesignFlowHighIP", 0, func(r *Outlet) { r.DesignFlow = 50_001 }, "design_flow"},
			{"ErrDesignFlowHighSI", measure.SI, func(r *Outlet) { r.DesignFlow = 25_001 }, "design_flow"},
			{"ErrMethodMissing", 0, func(r *Outlet) { r.Method = "" }, "method"},
			{"ErrMethod", 0, func(r *Outlet) { r.Method = "pitot" }, "method"},
			{"ErrFactorMissingForHood", 0, func(r *Outlet) { r.Factor = 0 }, "factor"},
			{"ErrFactorLow", 0, func(r *Outlet) { r.Factor = 0.19 }, "factor"},
			{"ErrFactorHigh", 0, func(r *Outlet) { r.Factor = 5.1 }, "factor"},
			{"ErrAkMissing", 0, func(r *Outlet) { r.Method, r.Factor = "ak", 0 }, "ak"},
			{"ErrAkHighIP", 0, func(r *Outlet) { r.Method, r.Ak = "ak", 101 }, "ak"},
			{"ErrAkHighSI", measure.SI, func(r *Outlet) { r.DesignFlow = 100; r.Method, r.Ak = "ak", 9.3 }, "ak"},
			{"ErrAkNegative", 0, func(r *Outlet) { r.Ak = -0.5 }, "ak"},
		})
}

func TestTraverseValidate(t *testing.T) {
	round := func(r *Traverse) {
		r.Shape, r.Width, r.Height, r.PointsW, r.PointsH = "round", 0, 0, 0, 0
		r.Diameter, r.PointsPerDiameter, r.Diameters = 20, 6, 2
	}
	runValidation(t, func() *Traverse { return testTraverse(jid, sid) },
		func(r *Traverse, u measure.UnitSystem) error { return r.Validate(u) },
		[]validationCase[*Traverse]{
			{"OK", 0, func(r *Traverse) {}, ""},
			{"OKRound", 0, round, ""},
			{"OKEqualArea", 0, func(r *Traverse) { r.Method, r.PointsW, r.PointsH = "equal-area", 8, 4 }, ""},
			{"OKSI", measure.SI, func(r *Traverse) { r.Width, r.Height = 600, 400 }, ""},
			{"ErrSystemID", 0, func(r *Traverse) { r.SystemID = "" }, "system_id"},
			{"ErrTag", 0, func(r *Traverse) { r.Tag = "" }, "tag"},
			{"ErrLocation", 0, func(r *Traverse) { r.Location = strings.Repeat("l", 201) }, "location"},
			{"ErrShape", 0, func(r *Traverse) { r.Shape = "oval" }, "shape"},
			{"ErrMethodMissing", 0, func(r *Traverse) { r.Method = "" }, "method"},
			{"ErrMethod", 0, func(r *Traverse) { r.Method = "tchebycheff" }, "method"},
			{"ErrWidthZero", 0, func(r *Traverse) { r.Width = 0 }, "width"},
			{"ErrHeightHighIP", 0, func(r *Traverse) { r.Height = 391 }, "height"},
			{"ErrWidthInchesInSIJob", measure.SI, func(r *Traverse) { r.Width, r.Height = 24, 400 }, "width"},
			{"ErrDiameterMissing", 0, func(r *Traverse) { round(r); r.Diameter = 0 }, "diameter"},
			{"ErrPointsWLogTchebycheff", 0, func(r *Traverse) { r.PointsW = 4 }, "points_w"},
			{"ErrPointsH", 0, func(r *Traverse) { r.PointsH = 0 }, "points_h"},
			{"ErrPointsPerDiameter", 0, func(r *Traverse) { round(r); r.PointsPerDiameter = 7 }, "points_per_diameter"},
			{"ErrDiameters", 0, func(r *Traverse) { round(r); r.Diameters = 5 }, "diameters"},
			{"ErrLogLinearRect", 0, func(r *Traverse) { r.Method = "log-linear" }, "method"},
		})
}

func TestCapacityTestValidate(t *testing.T) {
	runValidation(t, func() *CapacityTest { return testCapacityTest(jid, sid, sid) },
		func(r *CapacityTest, _ measure.UnitSystem) error { return r.Validate() },
		[]validationCase[*CapacityTest]{
			{"OK", 0, func(r *CapacityTest) {}, ""},
			{"OKOutlets", 0, func(r *CapacityTest) { r.FlowSource, r.TraverseID = "outlets", "" }, ""},
			{"OKDirect", 0, func(r *CapacityTest) { r.FlowSource, r.TraverseID, r.FlowBasis = "direct", "", "standard" }, ""},
			{"OKHeating", 0, func(r *CapacityTest) { r.Mode = "heating" }, ""},
			{"ErrSystemID", 0, func(r *CapacityTest) { r.SystemID = "x" }, "system_id"},
			{"ErrTag", 0, func(r *CapacityTest) { r.Tag = "" }, "tag"},
			{"ErrMode", 0, func(r *CapacityTest) { r.Mode = "dehumidify" }, "mode"},
			{"ErrFlowSource", 0, func(r *CapacityTest) { r.FlowSource = "" }, "flow_source"},
			{"ErrTraverseIDMissing", 0, func(r *CapacityTest) { r.TraverseID = "" }, "traverse_id"},
			{"ErrTraverseIDNotForOutlets", 0, func(r *CapacityTest) { r.FlowSource = "outlets" }, "traverse_id"},
			{"ErrFlowBasisMissingForDirect", 0, func(r *CapacityTest) { r.FlowSource, r.TraverseID = "direct", "" }, "flow_basis"},
			{"ErrFlowBasis", 0, func(r *CapacityTest) { r.FlowBasis = "actual" }, "flow_basis"},
		})
}

func TestWaterTestValidate(t *testing.T) {
	runValidation(t, func() *WaterTest { return testWaterTest(jid, sid, "") },
		func(r *WaterTest, u measure.UnitSystem) error { return r.Validate(u) },
		[]validationCase[*WaterTest]{
			{"OK", 0, func(r *WaterTest) {}, ""},
			{"OKWater", 0, func(r *WaterTest) { r.Fluid, r.Concentration = "water", 0 }, ""},
			{"OKMeter", 0, func(r *WaterTest) { r.FlowSource, r.ValveCv = "meter", 0 }, ""},
			{"OKCapacityTest", 0, func(r *WaterTest) { r.CapacityTest = sid }, ""},
			{"OKHeating", 0, func(r *WaterTest) { r.Mode = "heating" }, ""},
			{"ErrModeMissing", 0, func(r *WaterTest) { r.Mode = "" }, "mode"},
			{"ErrMode", 0, func(r *WaterTest) { r.Mode = "both" }, "mode"},
			{"ErrRemarksTooLong", 0, func(r *WaterTest) { r.Remarks = strings.Repeat("r", 501) }, "remarks"},
			{"OKSI", measure.SI, func(r *WaterTest) { r.DesignFlow = 2.5; r.ValveCv = 10.8 }, ""},
			{"ErrSystemID", 0, func(r *WaterTest) { r.SystemID = "" }, "system_id"},
			{"ErrTag", 0, func(r *WaterTest) { r.Tag = strings.Repeat("t", 41) }, "tag"},
			{"ErrFlowSource", 0, func(r *WaterTest) { r.FlowSource = "ultrasonic" }, "flow_source"},
			{"ErrValveCvMissing", 0, func(r *WaterTest) { r.ValveCv = 0 }, "valve_cv"},
			{"ErrValveCvHigh", 0, func(r *WaterTest) { r.ValveCv = 10_001 }, "valve_cv"},
			{"ErrFluid", 0, func(r *WaterTest) { r.Fluid = "brine" }, "fluid"},
			{"ErrConcentrationMissing", 0, func(r *WaterTest) { r.Concentration = 0 }, "concentration"},
			{"ErrConcentrationLow", 0, func(r *WaterTest) { r.Concentration = 9 }, "concentration"},
			{"ErrConcentrationHigh", 0, func(r *WaterTest) { r.Fluid, r.Concentration = "eg", 61 }, "concentration"},
			{"ErrConcentrationForWater", 0, func(r *WaterTest) { r.Fluid = "water" }, "concentration"},
			{"ErrDesignFlowZero", 0, func(r *WaterTest) { r.DesignFlow = 0 }, "design_flow"},
			{"ErrDesignFlowHighSI", measure.SI, func(r *WaterTest) { r.DesignFlow = 6_301 }, "design_flow"},
			{"ErrCapacityTestID", 0, func(r *WaterTest) { r.CapacityTest = "CT-1" }, "capacity_test_id"},
		})
}

func TestValidateMessages(t *testing.T) {
	o := testOutlet(jid, sid)
	o.DesignFlow = 60_000
	if msg := ErrorMessage(o.Validate(measure.IP)); !strings.Contains(msg, "50,000 cfm") {
		t.Errorf("IP message %q should state the range in cfm", msg)
	}
	if msg := ErrorMessage(o.Validate(measure.SI)); !strings.Contains(msg, "25,000 L/s") {
		t.Errorf("SI message %q should state the range in L/s", msg)
	}
	tr := testTraverse(jid, sid)
	tr.PointsW = 9
	if msg := ErrorMessage(tr.Validate(measure.IP)); !strings.Contains(msg, "9") {
		t.Errorf("traverse message %q should give the value", msg)
	}
}

func TestJobStore(t *testing.T) {
	ctx := context.Background()
	db := MustOpenDB(t)

	t.Run("OKCreateDefaults", func(t *testing.T) {
		j := testJob()
		if err := db.CreateJob(ctx, lead, j); err != nil {
			t.Fatal(err)
		}
		if !validUUID(j.ID) || j.Status != JobOpen || j.Tolerances != DefaultTolerances() || j.Seq != 1 {
			t.Errorf("created job %+v: want a UUID, status open, default tolerances, seq 1", j)
		}
		if !j.CreatedAt.Equal(testNow) || !j.UpdatedAt.Equal(testNow) {
			t.Errorf("times %v %v, want %v", j.CreatedAt, j.UpdatedAt, testNow)
		}
		got, err := db.Job(ctx, j.ID)
		if err != nil {
			t.Fatal(err)
		}
		if !reflect.DeepEqual(got, *j) {
			t.Errorf("Job() = %+v\nwant %+v", got, *j)
		}
	})
	t.Run("OKCreateGivenID", func(t *testing.T) {
		j := testJob()
		j.ID = NewID()
		want := j.ID
		if err := db.CreateJob(ctx, lead, j); err != nil {
			t.Fatal(err)
		}
		if j.ID != want {
			t.Errorf("ID changed to %s", j.ID)
		}
		t.Run("ErrDuplicateID", func(t *testing.T) {
			k := testJob()
			k.ID = want
			assertErr(t, db.CreateJob(ctx, lead, k), Conflict, "id")
		})
	})
	t.Run("ErrCreateInvalid", func(t *testing.T) {
		j := testJob()
		j.Units = "metric"
		assertErr(t, db.CreateJob(ctx, lead, j), Invalid, "units")
		if j.ID != "" {
			t.Errorf("a rejected job keeps the ID %q it was given", j.ID)
		}
	})
	t.Run("ErrJobNotFound", func(t *testing.T) {
		_, err := db.Job(ctx, NewID())
		assertErr(t, err, NotFound, "job_id")
		_, err = db.Job(ctx, "nonsense")
		assertErr(t, err, NotFound, "id")
	})
	t.Run("OKUpdate", func(t *testing.T) {
		j := testJob()
		if err := db.CreateJob(ctx, lead, j); err != nil {
			t.Fatal(err)
		}
		j.Name, j.Status = "Harbour View Clinic, phase 2", "" // "" keeps the status
		j.Tolerances = Tolerances{}                           // zero keeps the tolerances
		if err := db.UpdateJob(ctx, lead, j); err != nil {
			t.Fatal(err)
		}
		if j.Seq != 2 || j.Status != JobOpen || j.Tolerances != DefaultTolerances() {
			t.Errorf("updated job %+v: want seq 2, status open, default tolerances", j)
		}
		again := *j
		if err := db.UpdateJob(ctx, lead, &again); err != nil {
			t.Fatal(err)
		}
		if again.Seq != 2 {
			t.Errorf("an update that changes nothing moved seq to %d", again.Seq)
		}
		j.Units = "si" // no design data yet: allowed
		if err := db.UpdateJob(ctx, lead, j); err != nil {
			t.Fatalf("units change on an empty job: %v", err)
		}
	})
	t.Run("ErrUpdateNotFound", func(t *testing.T) {
		j := testJob()
		j.ID = NewID()
		assertErr(t, db.UpdateJob(ctx, lead, j), NotFound, "job_id")
	})
	t.Run("ErrUpdateInvalid", func(t *testing.T) {
		j := testJob()
		if err := db.CreateJob(ctx, lead, j); err != nil {
			t.Fatal(err)
		}
		j.Status = "archived"
		assertErr(t, db.UpdateJob(ctx, lead, j), Invalid, "status")
	})
	t.Run("OKJobsNewestFirst", func(t *testing.T) {
		jobs, err := db.Jobs(ctx)
		if err != nil {
			t.Fatal(err)
		}
		if len(jobs) < 4 {
			t.Errorf("Jobs() returned %d jobs, want at least 4", len(jobs))
		}
		for i := 1; i < len(jobs); i++ {
			if jobs[i].CreatedAt.After(jobs[i-1].CreatedAt) {
				t.Errorf("jobs not newest first at %d", i)
			}
		}
	})
}

func TestJobUnitsLocked(t *testing.T) {
	ctx := context.Background()
	f := newFixture(t)
	j := *f.job
	j.Units = "si"
	assertErr(t, f.db.UpdateJob(ctx, lead, &j), Conflict, "units")

	// Once every design record is gone, the unit system may change again.
	for _, del := range []func() error{
		func() error { return Delete[*WaterTest](ctx, f.db, lead, f.job.ID, f.wat.ID) },
		func() error { return Delete[*CapacityTest](ctx, f.db, lead, f.job.ID, f.cap.ID) },
		func() error { return Delete[*Traverse](ctx, f.db, lead, f.job.ID, f.trav.ID) },
		func() error { return Delete[*Outlet](ctx, f.db, lead, f.job.ID, f.out.ID) },
		func() error { return Delete[*System](ctx, f.db, lead, f.job.ID, f.sys.ID) },
		func() error { return Delete[*Instrument](ctx, f.db, lead, f.job.ID, f.inst.ID) },
	} {
		if err := del(); err != nil {
			t.Fatal(err)
		}
	}
	if err := f.db.UpdateJob(ctx, lead, &j); err != nil {
		t.Errorf("units change after every record was deleted: %v", err)
	}
}

// crud runs create, get, update, duplicate tag, delete and not found for one
// kind of record.
func crud[T designRecord](t *testing.T, f *fixture, fresh func() T, edit func(T), tagOf func(T) *string) {
	t.Helper()
	ctx := context.Background()
	db := f.db
	var rec T

	t.Run("OKCreate", func(t *testing.T) {
		rec = fresh()
		*tagOf(rec) = "NEW-1"
		before := f.seq(t)
		if err := Create(ctx, db, lead, rec); err != nil {
			t.Fatal(err)
		}
		m := rec.meta()
		if !validUUID(*rec.keys().id) || m.Seq != before+1 || !m.CreatedAt.Equal(testNow) || m.Deleted {
			t.Errorf("created meta %+v id %q: want a UUID and seq %d", m, *rec.keys().id, before+1)
		}
	})
	t.Run("OKGet", func(t *testing.T) {
		got, err := Get[T](ctx, db, f.job.ID, *rec.keys().id)
		if err != nil {
			t.Fatal(err)
		}
		if !reflect.DeepEqual(got, rec) {
			t.Errorf("Get = %+v\nwant %+v", got, rec)
		}
	})
	t.Run("ErrDuplicateTag", func(t *testing.T) {
		dup := fresh()
		*tagOf(dup) = "NEW-1"
		assertErr(t, Create(ctx, db, lead, dup), Conflict, "tag")
		if *dup.keys().id != "" {
			t.Errorf("a rejected record keeps the ID %q it was given", *dup.keys().id)
		}
	})
	t.Run("ErrDuplicateID", func(t *testing.T) {
		dup := fresh()
		*tagOf(dup) = "NEW-2"
		*dup.keys().id = *rec.keys().id
		assertErr(t, Create(ctx, db, lead, dup), Conflict, "id")
	})
	t.Run("ErrCreateUnknownJob", func(t *testing.T) {
		r := fresh()
		*r.keys().jobID = NewID()
		assertErr(t, Create(ctx, db, lead, r), NotFound, "job_id")
	})
	t.Run("ErrCreateInvalid", func(t *testing.T) {
		r := fresh()
		*tagOf(r) = ""
		assertErr(t, Create(ctx, db, lead, r), Invalid, "tag")
	})
	t.Run("OKUpdate", func(t *testing.T) {
		before := f.seq(t)
		edit(rec)
		if err := Update(ctx, db, lead, rec); err != nil {
			t.Fatal(err)
		}
		if rec.meta().Seq != before+1 {
			t.Errorf("seq %d after update, want %d", rec.meta().Seq, before+1)
		}
		got, err := Get[T](ctx, db, f.job.ID, *rec.keys().id)
		if err != nil {
			t.Fatal(err)
		}
		if !reflect.DeepEqual(got, rec) {
			t.Errorf("after update Get = %+v\nwant %+v", got, rec)
		}
		if err := Update(ctx, db, lead, rec); err != nil {
			t.Fatal(err)
		}
		if rec.meta().Seq != before+1 || f.seq(t) != before+1 {
			t.Errorf("an update that changes nothing moved seq to %d", rec.meta().Seq)
		}
	})
	t.Run("ErrUpdateTagTaken", func(t *testing.T) {
		other := fresh()
		*tagOf(other) = "NEW-3"
		if err := Create(ctx, db, lead, other); err != nil {
			t.Fatal(err)
		}
		*tagOf(other) = *tagOf(rec)
		assertErr(t, Update(ctx, db, lead, other), Conflict, "tag")
	})
	t.Run("ErrUpdateOtherJob", func(t *testing.T) {
		r := fresh()
		*r.keys().id = *rec.keys().id
		*r.keys().jobID = NewID()
		assertErr(t, Update(ctx, db, lead, r), NotFound, "id")
	})
	t.Run("ErrUpdateUnknown", func(t *testing.T) {
		r := fresh()
		*r.keys().id = NewID()
		assertErr(t, Update(ctx, db, lead, r), NotFound, "id")
	})
	t.Run("OKDelete", func(t *testing.T) {
		before := f.seq(t)
		if err := Delete[T](ctx, db, lead, f.job.ID, *rec.keys().id); err != nil {
			t.Fatal(err)
		}
		if f.seq(t) != before+1 {
			t.Errorf("delete did not take a new seq")
		}
		_, err := Get[T](ctx, db, f.job.ID, *rec.keys().id)
		assertErr(t, err, NotFound, "id")
		assertErr(t, Update(ctx, db, lead, rec), NotFound, "id")
		assertErr(t, Delete[T](ctx, db, lead, f.job.ID, *rec.keys().id), NotFound, "id")
		// The tag is free again.
		again := fresh()
		*tagOf(again) = *tagOf(rec)
		if err := Create(ctx, db, lead, again); err != nil {
			t.Errorf("re-using a deleted record's tag: %v", err)
		}
	})
	t.Run("ErrGetNotFound", func(t *testing.T) {
		_, err := Get[T](ctx, db, f.job.ID, NewID())
		assertErr(t, err, NotFound, "id")
		_, err = Get[T](ctx, db, f.job.ID, "S-101")
		assertErr(t, err, NotFound, "id")
		_, err = Get[T](ctx, db, NewID(), *rec.keys().id)
		assertErr(t, err, NotFound, "id")
	})
}

func (f *fixture) seq(t *testing.T) int64 {
	t.Helper()
	j, err := f.db.Job(context.Background(), f.job.ID)
	if err != nil {
		t.Fatal(err)
	}
	return j.Seq
}

func TestDesignRecordStore(t *testing.T) {
	f := newFixture(t)
	jobID, sysID := f.job.ID, f.sys.ID
	t.Run("Instrument", func(t *testing.T) {
		crud(t, f, func() *Instrument { return testInstrument(jobID) },
			func(r *Instrument) { r.CalibrationDue = "2026-06-01" }, func(r *Instrument) *string { return &r.Tag })
	})
	t.Run("System", func(t *testing.T) {
		crud(t, f, func() *System { return testSystem(jobID) },
			func(r *System) { r.Design.Airflow = 4200 }, func(r *System) *string { return &r.Tag })
	})
	t.Run("Outlet", func(t *testing.T) {
		crud(t, f, func() *Outlet { return testOutlet(jobID, sysID) },
			func(r *Outlet) { r.DesignFlow, r.Method, r.Factor, r.Ak = 400, "ak", 0, 0.9 }, func(r *Outlet) *string { return &r.Tag })
	})
	t.Run("Traverse", func(t *testing.T) {
		crud(t, f, func() *Traverse { return testTraverse(jobID, sysID) },
			func(r *Traverse) { r.PointsW = 7 }, func(r *Traverse) *string { return &r.Tag })
	})
	t.Run("CapacityTest", func(t *testing.T) {
		crud(t, f, func() *CapacityTest { return testCapacityTest(jobID, sysID, f.trav.ID) },
			func(r *CapacityTest) { r.FlowSource, r.TraverseID, r.FlowBasis = "direct", "", "enter" },
			func(r *CapacityTest) *string { return &r.Tag })
	})
	t.Run("WaterTest", func(t *testing.T) {
		crud(t, f, func() *WaterTest { return testWaterTest(jobID, sysID, f.cap.ID) },
			func(r *WaterTest) { r.Fluid, r.Concentration = "water", 0 }, func(r *WaterTest) *string { return &r.Tag })
	})
}

func TestDesignRecordRefs(t *testing.T) {
	ctx := context.Background()
	f := newFixture(t)
	db, jobID := f.db, f.job.ID

	other := testJob()
	if err := db.CreateJob(ctx, lead, other); err != nil {
		t.Fatal(err)
	}
	otherSys := mustCreate(t, db, testSystem(other.ID))
	spare := testSystem(jobID)
	spare.Tag = "RTU-9"
	spare = mustCreate(t, db, spare)
	if err := Delete[*System](ctx, db, lead, jobID, spare.ID); err != nil {
		t.Fatal(err)
	}

	tests := []struct {
		name  string
		rec   designRecord
		field string
	}{
		{"ErrOutletUnknownSystem", testOutlet(jobID, NewID()), "system_id"},
		{"ErrOutletSystemOfOtherJob", testOutlet(jobID, otherSys.ID), "system_id"},
		{"ErrOutletDeletedSystem", testOutlet(jobID, spare.ID), "system_id"},
		{"ErrTraverseUnknownSystem", testTraverse(jobID, NewID()), "system_id"},
		{"ErrCapacityTestUnknownSystem", testCapacityTest(jobID, NewID(), f.trav.ID), "system_id"},
		{"ErrCapacityTestUnknownTraverse", testCapacityTest(jobID, f.sys.ID, NewID()), "traverse_id"},
		{"ErrWaterTestUnknownSystem", testWaterTest(jobID, spare.ID, ""), "system_id"},
		{"ErrWaterTestUnknownCapacityTest", testWaterTest(jobID, f.sys.ID, NewID()), "capacity_test_id"},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			var err error
			switch r := tt.rec.(type) {
			case *Outlet:
				r.Tag = "X-1"
				err = Create(ctx, db, lead, r)
			case *Traverse:
				r.Tag = "X-1"
				err = Create(ctx, db, lead, r)
			case *CapacityTest:
				r.Tag = "X-1"
				err = Create(ctx, db, lead, r)
			case *WaterTest:
				r.Tag = "X-1"
				err = Create(ctx, db, lead, r)
			}
			assertErr(t, err, Invalid, tt.field)
		})
	}
	t.Run("ErrUpdateToUnknownSystem", func(t *testing.T) {
		o := *f.out
		o.SystemID = NewID()
		assertErr(t, Update(ctx, db, lead, &o), Invalid, "system_id")
	})
	t.Run("OKMoveOutlet", func(t *testing.T) {
		sys2 := testSystem(jobID)
		sys2.Tag = "AHU-2"
		sys2 = mustCreate(t, db, sys2)
		o := *f.out
		o.SystemID = sys2.ID
		if err := Update(ctx, db, lead, &o); err != nil {
			t.Fatal(err)
		}
		o.SystemID = f.sys.ID
		if err := Update(ctx, db, lead, &o); err != nil {
			t.Fatal(err)
		}
	})
	t.Run("ErrDeleteSystemInUse", func(t *testing.T) {
		err := Delete[*System](ctx, db, lead, jobID, f.sys.ID)
		assertErr(t, err, Conflict, "id")
		if msg := ErrorMessage(err); !strings.Contains(msg, "1 outlet") || !strings.Contains(msg, "RTU-1") {
			t.Errorf("message %q should say what still uses the system", msg)
		}
	})
	t.Run("ErrDeleteTraverseInUse", func(t *testing.T) {
		assertErr(t, Delete[*Traverse](ctx, db, lead, jobID, f.trav.ID), Conflict, "id")
	})
	t.Run("ErrDeleteCapacityTestInUse", func(t *testing.T) {
		assertErr(t, Delete[*CapacityTest](ctx, db, lead, jobID, f.cap.ID), Conflict, "id")
	})
	t.Run("ErrDeleteOtherJob", func(t *testing.T) {
		assertErr(t, Delete[*System](ctx, db, lead, other.ID, f.sys.ID), NotFound, "id")
	})
	t.Run("ErrCreateInSIJobWithIPValues", func(t *testing.T) {
		si := testJob()
		si.Units = "si"
		if err := db.CreateJob(ctx, lead, si); err != nil {
			t.Fatal(err)
		}
		s := testSystem(si.ID)
		s.Design = SystemDesign{}
		s = mustCreate(t, db, s)
		o := testOutlet(si.ID, s.ID)
		o.DesignFlow = 30_000 // cfm-sized, too big for L/s
		assertErr(t, Create(ctx, db, lead, o), Invalid, "design_flow")
	})
}

func TestDataColumnHoldsNoMeta(t *testing.T) {
	f := newFixture(t)
	for _, k := range recordKinds {
		var data string
		if err := f.db.read.QueryRow("SELECT data FROM " + k.table + " LIMIT 1").Scan(&data); err != nil {
			t.Fatalf("%s: %v", k.table, err)
		}
		var m map[string]any
		if err := json.Unmarshal([]byte(data), &m); err != nil {
			t.Fatal(err)
		}
		for _, key := range recordColumnKeys {
			if _, ok := m[key]; ok {
				t.Errorf("%s data holds %q, which lives in a column: %s", k.table, key, data)
			}
		}
		if m["tag"] == nil || m["id"] == nil {
			t.Errorf("%s data lacks its tag or id: %s", k.table, data)
		}
	}
	var data string
	if err := f.db.read.QueryRow("SELECT data FROM jobs").Scan(&data); err != nil {
		t.Fatal(err)
	}
	if strings.Contains(data, `"seq"`) || strings.Contains(data, `"created_at"`) {
		t.Errorf("job data holds column fields: %s", data)
	}
}

// insertReading stores a reading directly (the readings API is another file's
// work); it is enough to test that snapshots carry readings.
func insertReading(t *testing.T, db *DB, jobID, subjectKind, subjectID string, value *float64, supersedes string) string {
	t.Helper()
	id := NewID()
	err := db.writeTx(context.Background(), func(tx *sql.Tx) error {
		seq, err := nextSeq(tx, jobID)
		if err != nil {
			return err
		}
		void := 0
		if value == nil {
			void = 1
		}
		_, err = tx.Exec(`INSERT INTO readings (id, job_id, subject_kind, subject_id, quantity, value, unit, stage, technician,
			taken_at, received_at, supersedes, void, seq) VALUES (?, ?, ?, ?, 'flow', ?, 'cfm', 'as_found', 'Sam', ?, ?, ?, ?, ?)`,
			id, jobID, subjectKind, subjectID, value, testNow.Format(timeLayout), testNow.Format(timeLayout),
			nullString(supersedes), void, seq)
		return err
	})
	if err != nil {
		t.Fatal(err)
	}
	return id
}

func TestSnapshot(t *testing.T) {
	ctx := context.Background()
	f := newFixture(t)
	db, jobID := f.db, f.job.ID
	for _, tag := range []string{"S-10", "S-2", "s-3", "R-1"} {
		o := testOutlet(jobID, f.sys.ID)
		o.Tag = tag
		mustCreate(t, db, o)
	}
	ahu := testSystem(jobID)
	ahu.Tag = "AHU-1"
	ahu = mustCreate(t, db, ahu)
	o := testOutlet(jobID, ahu.ID)
	o.Tag = "Z-1"
	mustCreate(t, db, o)
	gone := testOutlet(jobID, f.sys.ID)
	gone.Tag = "S-99"
	gone = mustCreate(t, db, gone)
	if err := Delete[*Outlet](ctx, db, lead, jobID, gone.ID); err != nil {
		t.Fatal(err)
	}
	v1, v2 := 340.0, 352.0
	r1 := insertReading(t, db, jobID, SubjectOutlet, f.out.ID, &v1, "")
	r2 := insertReading(t, db, jobID, SubjectOutlet, f.out.ID, &v2, r1)

	s, err := db.Snapshot(ctx, jobID)
	if err != nil {
		t.Fatal(err)
	}
	var tags []string
	for _, o := range s.Outlets {
		tags = append(tags, o.Tag)
	}
	// AHU-1 sorts before RTU-1; within RTU-1, natural order ignoring case.
	if want := "Z-1 R-1 S-2 s-3 S-10 S-101"; strings.Join(tags, " ") != want {
		t.Errorf("outlet order %q, want %q", strings.Join(tags, " "), want)
	}
	if len(s.Systems) != 2 || s.Systems[0].Tag != "AHU-1" {
		t.Errorf("systems %+v, want AHU-1 then RTU-1", s.Systems)
	}
	for _, o := range s.Outlets {
		if o.ID == gone.ID || o.Deleted {
			t.Errorf("snapshot holds deleted outlet %s", o.Tag)
		}
	}
	if len(s.Instruments) != 1 || len(s.Traverses) != 1 || len(s.CapacityTests) != 1 || len(s.WaterTests) != 1 {
		t.Errorf("snapshot record counts wrong: %d %d %d %d", len(s.Instruments), len(s.Traverses), len(s.CapacityTests), len(s.WaterTests))
	}
	if len(s.Readings) != 2 || s.Readings[0].ID != r1 || s.Readings[1].ID != r2 || s.Readings[1].Supersedes != r1 {
		t.Fatalf("readings %+v, want r1 then r2 superseding it", s.Readings)
	}
	rd := s.Readings[1]
	if rd.Value == nil || *rd.Value != 352 || rd.Unit != "cfm" || rd.InstrumentID != "" || rd.DeviceID != "" ||
		!rd.TakenAt.Equal(testNow) || rd.Seq <= s.Readings[0].Seq || rd.Seq > s.Job.Seq {
		t.Errorf("reading read back as %+v", rd)
	}
	if s.Job.ID != jobID || s.Job.Seq != f.seq(t) {
		t.Errorf("snapshot job %+v", s.Job)
	}
	t.Run("ErrNotFound", func(t *testing.T) {
		_, err := db.Snapshot(ctx, NewID())
		assertErr(t, err, NotFound, "job_id")
	})
	t.Run("OKEmptyListsNotNil", func(t *testing.T) {
		j := testJob()
		if err := db.CreateJob(ctx, lead, j); err != nil {
			t.Fatal(err)
		}
		s, err := db.Snapshot(ctx, j.ID)
		if err != nil {
			t.Fatal(err)
		}
		b, _ := json.Marshal(s)
		if strings.Contains(string(b), "null") {
			t.Errorf("empty snapshot has null lists: %s", b)
		}
	})
}

func TestChangesSince(t *testing.T) {
	ctx := context.Background()
	f := newFixture(t)
	db, jobID := f.db, f.job.ID
	mark := f.seq(t)

	// Nothing changed yet: only the job, with its current seq.
	c, err := db.ChangesSince(ctx, jobID, mark)
	if err != nil {
		t.Fatal(err)
	}
	if c.Job.Seq != mark || len(c.Outlets)+len(c.Systems)+len(c.Instruments)+len(c.Readings) != 0 {
		t.Fatalf("changes since now: %+v", c)
	}

	o := *f.out
	o.DesignFlow = 375
	if err := Update(ctx, db, lead, &o); err != nil {
		t.Fatal(err)
	}
	if err := Delete[*WaterTest](ctx, db, lead, jobID, f.wat.ID); err != nil {
		t.Fatal(err)
	}
	v := 360.0
	rid := insertReading(t, db, jobID, SubjectOutlet, f.out.ID, &v, "")

	c, err = db.ChangesSince(ctx, jobID, mark)
	if err != nil {
		t.Fatal(err)
	}
	if c.Job.Seq != mark+3 {
		t.Errorf("job seq %d, want %d", c.Job.Seq, mark+3)
	}
	if len(c.Outlets) != 1 || c.Outlets[0].ID != o.ID || c.Outlets[0].DesignFlow != 375 || c.Outlets[0].Seq != mark+1 {
		t.Errorf("changed outlets %+v, want the updated one at seq %d", c.Outlets, mark+1)
	}
	if len(c.WaterTests) != 1 || !c.WaterTests[0].Deleted || c.WaterTests[0].Seq != mark+2 {
		t.Errorf("changed water tests %+v, want the deleted one at seq %d", c.WaterTests, mark+2)
	}
	if len(c.Systems)+len(c.Instruments)+len(c.Traverses)+len(c.CapacityTests) != 0 {
		t.Errorf("unchanged records returned: %+v", c)
	}
	if len(c.Readings) != 1 || c.Readings[0].ID != rid {
		t.Errorf("changed readings %+v, want %s", c.Readings, rid)
	}

	all, err := db.ChangesSince(ctx, jobID, 0)
	if err != nil {
		t.Fatal(err)
	}
	if len(all.Instruments) != 1 || len(all.Systems) != 1 || len(all.Outlets) != 1 || len(all.WaterTests) != 1 || len(all.Readings) != 1 {
		t.Errorf("changes since 0 should hold every record, deleted included: %+v", all)
	}
	t.Run("ErrNegative", func(t *testing.T) {
		_, err := db.ChangesSince(ctx, jobID, -1)
		assertErr(t, err, Invalid, "since")
	})
	t.Run("ErrAheadOfTheStore", func(t *testing.T) {
		// A device that has seen more than the store holds: a restored backup.
		j, err := db.Job(ctx, jobID)
		if err != nil {
			t.Fatal(err)
		}
		_, err = db.ChangesSince(ctx, jobID, j.Seq+1)
		assertErr(t, err, Conflict, "since")
		if _, err := db.ChangesSince(ctx, jobID, j.Seq); err != nil {
			t.Errorf("since = the job's seq: %v; want an empty answer", err)
		}
	})
	t.Run("ErrNotFound", func(t *testing.T) {
		_, err := db.ChangesSince(ctx, NewID(), 0)
		assertErr(t, err, NotFound, "job_id")
	})
}

func TestAudit(t *testing.T) {
	ctx := context.Background()
	f := newFixture(t)
	db, jobID := f.db, f.job.ID
	tech := Actor{DeviceID: "", Name: "Dana (lead)"}
	o := *f.out
	o.Room = "101 Waiting (east)"
	if err := Update(ctx, db, tech, &o); err != nil {
		t.Fatal(err)
	}
	if err := Delete[*WaterTest](ctx, db, lead, jobID, f.wat.ID); err != nil {
		t.Fatal(err)
	}
	entries, err := db.Audit(ctx, jobID)
	if err != nil {
		t.Fatal(err)
	}
	var got []string
	for _, e := range entries {
		got = append(got, e.Action+" "+e.Entity)
		if e.JobID != jobID || e.Actor != "Dana (lead)" || !e.At.Equal(testNow) {
			t.Errorf("entry %+v", e)
		}
	}
	want := "create job,create instrument,create system,create outlet,create traverse,create capacity_test," +
		"create water_test,update outlet,delete water_test"
	if strings.Join(got, ",") != want {
		t.Errorf("audit %q\nwant %q", strings.Join(got, ","), want)
	}
	var detail struct {
		Seq     int64    `json:"seq"`
		Changed []string `json:"changed"`
	}
	upd := entries[len(entries)-2]
	if err := json.Unmarshal(upd.Detail, &detail); err != nil {
		t.Fatal(err)
	}
	if upd.EntityID != o.ID || detail.Seq != o.Seq || strings.Join(detail.Changed, ",") != "room" {
		t.Errorf("update entry %+v detail %+v, want outlet %s seq %d changed [room]", upd, detail, o.ID, o.Seq)
	}
	t.Run("ErrUnknownJob", func(t *testing.T) {
		_, err := db.Audit(ctx, NewID())
		assertErr(t, err, NotFound, "job_id")
	})
}

// BenchmarkSnapshot1500Outlets reads a job of 1,500 outlets, the size the
// issue's GET target names.
func BenchmarkSnapshot1500Outlets(b *testing.B) {
	ctx := context.Background()
	db := MustOpenDB(b)
	j := testJob()
	if err := db.CreateJob(ctx, lead, j); err != nil {
		b.Fatal(err)
	}
	sys := testSystem(j.ID)
	if err := Create(ctx, db, lead, sys); err != nil {
		b.Fatal(err)
	}
	for i := 0; i < 1500; i++ {
		o := testOutlet(j.ID, sys.ID)
		o.Tag = "S-" + strconv.Itoa(i+1)
		if err := Create(ctx, db, lead, o); err != nil {
			b.Fatal(err)
		}
	}
	b.ResetTimer()
	for b.Loop() {
		s, err := db.Snapshot(ctx, j.ID)
		if err != nil || len(s.Outlets) != 1500 {
			b.Fatal(err)
		}
	}
}
