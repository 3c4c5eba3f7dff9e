package schema

import (
	"errors"
	"fmt"
	"math"
	"strings"
	"time"

	"fieldtab/measure"
)

// Results are computed on read, never stored (DESIGN.md §2): ComputeResults
// turns a snapshot's current readings into every derived figure the app and
// the report show, by measure. A problem with one item (a bad performance
// table, a reading outside a method's range) becomes text on that item, so the
// job always displays.

// Thresholds of common practice, not from a standard: the project
// specification governs.
const (
	// CapacityMeetsPct is the share of its expected capacity, in percent, that a
	// unit must deliver for its capacity test to meet (common practice).
	CapacityMeetsPct = 95.0
	// AirWaterAgreementPct is the largest difference between air-side and
	// water-side capacity, in percent of the water side, that passes without a
	// note (common practice).
	AirWaterAgreementPct = 10.0
	// CalibrationDueSoonDays is how many days before its due date an
	// instrument's calibration is reported as due soon.
	CalibrationDueSoonDays = 30
)

// Calibration statuses of an instrument on the results' date.
const (
	CalibrationCurrent = "current"
	CalibrationDueSoon = "due_soon" // due within CalibrationDueSoonDays
	CalibrationOverdue = "overdue"  // past its due date
	CalibrationUnknown = "unknown"  // no due date on record
)

// Result statuses beside measure's tolerance statuses (within, low, high,
// undetermined).
const (
	ResultNotRead    = "not_read"    // an outlet with no current reading
	ResultIncomplete = "incomplete"  // readings are missing; the item lists which
	ResultComputed   = "computed"    // a traverse whose every point is read
	ResultError      = "error"       // the figures could not be computed; see Errors
	ResultMeets      = "meets"       // capacity at least CapacityMeetsPct of expected
	ResultShort      = "short"       // capacity below CapacityMeetsPct of expected
	ResultNoExpected = "no_expected" // no rating or table to compare the capacity with
	ResultConflict   = "conflict"    // two current readings of one traverse point and stage: the lead resolves
)

// Finding kinds.
const (
	FindingOutletOutOfTolerance  = "outlet_out_of_tolerance"
	FindingOutletNotRead         = "outlet_not_read"
	FindingAirflowOutOfTolerance = "airflow_out_of_tolerance" // a system's or traverse's airflow outside the fan band
	FindingCapacityShort         = "capacity_short"
	FindingWaterFlowOutOfTol     = "water_flow_out_of_tolerance"
	FindingAirWaterMismatch      = "air_water_mismatch"
	FindingInstrumentOverdue     = "instrument_overdue" // readings taken with an instrument past its calibration due date
	FindingTraverseWarning       = "traverse_warning"
)

// FlagInstrumentOverdue is the Flag kind for readings taken with an instrument
// past its calibration due date.
const FlagInstrumentOverdue = "instrument_overdue"

// Standard air as measure.FlowStandard takes it.
const (
	resStdAirIP = 0.075 // lb of dry air per ft³
	resStdAirSI = 1.2   // kg of dry air per m³
)

// Results is every derived figure of a job. Figures are in the job's unit
// system, whose unit names Units gives; a figure that could not be computed is
// absent (null), and its item says why in Status, Missing or Errors. Lists
// follow the snapshot's order.
type Results struct {
	JobID              string               `json:"job_id"`
	Units              ResultUnits          `json:"units"`
	Today              string               `json:"today"`                // YYYY-MM-DD, the date calibrations are judged on
	SitePressure       float64              `json:"site_pressure"`        // barometric, psia or kPa
	SitePressureSource string               `json:"site_pressure_source"` // "barometric", "elevation" or "sea_level"
	Instruments        []InstrumentResult   `json:"instruments"`
	Systems            []SystemResult       `json:"systems"`
	Outlets            []OutletResult       `json:"outlets"`
	Traverses          []TraverseResult     `json:"traverses"`
	CapacityTests      []CapacityTestResult `json:"capacity_tests"`
	WaterTests         []WaterTestResult    `json:"water_tests"`
	Findings           []Finding            `json:"findings"`
	Errors             []string             `json:"errors,omitempty"` // problems with the job itself
}

// ResultUnits names the unit of each kind of figure in Results.
type ResultUnits struct {
	System        string `json:"system"`         // "ip" or "si"
	AirFlow       string `json:"air_flow"`       // cfm or L/s
	WaterFlow     string `json:"water_flow"`     // gpm or L/s
	Power         string `json:"power"`          // heat rates: Btu/h or W
	ElectricPower string `json:"electric_power"` // motor input power: kW
	Temperature   string `json:"temperature"`    // °F or °C
	DuctPressure  string `json:"duct_pressure"`  // in. w.g. or Pa
	WaterPressure string `json:"water_pressure"` // psi or kPa
	Barometric    string `json:"barometric"`     // psia or kPa
	Velocity      string `json:"velocity"`       // fpm or m/s
	Length        string `json:"length"`         // duct and sheave sizes: in or mm
	Area          string `json:"area"`           // ft² or m²
	Density       string `json:"density"`        // lb/ft³ or kg/m³
	Enthalpy      string `json:"enthalpy"`       // Btu/lb or kJ/kg of dry air
	HumRatio      string `json:"hum_ratio"`      // lb/lb or kg/kg of dry air
	SpecificHeat  string `json:"specific_heat"`  // Btu/(lb·°F) or kJ/(kg·K)
}

// UnitsFor returns the unit names of results in unit system u (IP unless u is SI).
func UnitsFor(u measure.UnitSystem) ResultUnits {
	if u == measure.SI {
		return ResultUnits{System: "si", AirFlow: "L/s", WaterFlow: "L/s", Power: "W", ElectricPower: "kW",
			Temperature: "°C", DuctPressure: "Pa", WaterPressure: "kPa", Barometric: "kPa", Velocity: "m/s",
			Length: "mm", Area: "m²", Density: "kg/m³", Enthalpy: "kJ/kg", HumRatio: "kg/kg", SpecificHeat: "kJ/(kg·K)"}
	}
	return ResultUnits{System: "ip", AirFlow: "cfm", WaterFlow: "gpm", Power: "Btu/h", ElectricPower: "kW",
		Temperature: "°F", DuctPressure: "in. w.g.", WaterPressure: "psi", Barometric: "psia", Velocity: "fpm",
		Length: "in", Area: "ft²", Density: "lb/ft³", Enthalpy: "Btu/lb", HumRatio: "lb/lb", SpecificHeat: "Btu/(lb·°F)"}
}

// SubjectRef names what a finding is about.
type SubjectRef struct {
	Kind string `json:"kind"` // a subject kind (outlet, traverse, capacity_test, water_test, system) or "instrument"
	ID   string `json:"id"`
	Tag  string `json:"tag"`
}

// Finding is one deficiency for the report's list and the app's.
type Finding struct {
	Kind    string     `json:"kind"` // one of the Finding* kinds
	Subject SubjectRef `json:"subject"`
	Text    string     `json:"text"` // plain English
}

// Flag marks readings of a subject that need a caution, such as readings taken
// with an instrument past its calibration due date.
type Flag struct {
	Kind         string   `json:"kind"` // FlagInstrumentOverdue
	InstrumentID string   `json:"instrument_id,omitempty"`
	ReadingIDs   []string `json:"reading_ids"`
	Text         string   `json:"text"`
}

// ToleranceCheck is measure.CheckTolerance's outcome, in the unit of the value
// checked (air flow, or water flow).
type ToleranceCheck struct {
	Status          string  `json:"status"` // within, low, high or undetermined
	PercentOfDesign float64 `json:"percent_of_design"`
	Low             float64 `json:"low"`         // lowest value within the band
	High            float64 `json:"high"`        // highest value within the band
	Uncertainty     float64 `json:"uncertainty"` // ± instrument uncertainty of the value
	// UncertaintyUnknown: the reading's instrument (or its accuracy) is not on
	// record, so Uncertainty leaves it out; show no ± rather than ± 0.
	UncertaintyUnknown bool `json:"uncertainty_unknown,omitempty"`
	// Side and SideText, for an undetermined status: where the value itself
	// lies ("low", "high" or "within"), within the uncertainty of a limit.
	Side     string `json:"side,omitempty"`
	SideText string `json:"side_text,omitempty"`
}

// InstrumentResult is an instrument's calibration status on the results' date.
type InstrumentResult struct {
	ID                string   `json:"id"`
	Tag               string   `json:"tag"`
	Kind              string   `json:"kind"`
	CalibrationDue    string   `json:"calibration_due"`
	CalibrationStatus string   `json:"calibration_status"`    // one of the Calibration* statuses
	DaysToDue         *int     `json:"days_to_due,omitempty"` // negative once overdue
	Errors            []string `json:"errors,omitempty"`
}

// OutletResult is an outlet's flow as found and final against its design.
type OutletResult struct {
	ID         string         `json:"id"`
	Tag        string         `json:"tag"`
	Room       string         `json:"room"`
	Kind       string         `json:"kind"`
	SystemID   string         `json:"system_id"`
	SystemTag  string         `json:"system_tag"`
	DesignFlow float64        `json:"design_flow"`
	AsFound    *OutletReading `json:"as_found,omitempty"`
	Final      *OutletReading `json:"final,omitempty"`
	// Status is the final reading's tolerance status, else the as-found one's,
	// else "not_read"; "error" when the governing reading could not be used.
	Status string   `json:"status"`
	Flags  []Flag   `json:"flags,omitempty"`
	Errors []string `json:"errors,omitempty"`
}

// OutletReading is the reading of one stage that counts (the latest current
// one) and the flow it gives.
type OutletReading struct {
	ReadingID    string          `json:"reading_id"`
	Quantity     string          `json:"quantity"` // "flow" (hood reading × factor) or "velocity" (× Ak)
	Reading      float64         `json:"reading"`  // air flow or velocity as read, in the job's units
	Flow         *float64        `json:"flow,omitempty"`
	Tolerance    *ToleranceCheck `json:"tolerance,omitempty"`
	Status       string          `json:"status"` // the tolerance status, or "error"
	InstrumentID string          `json:"instrument_id,omitempty"`
	TakenAt      time.Time       `json:"taken_at"`
}

// OutletSummary counts a system's outlets by their status and sums the
// supply flow.
type OutletSummary struct {
	Total        int `json:"total"`
	Read         int `json:"read"`
	Within       int `json:"within"`
	Low          int `json:"low"`
	High         int `json:"high"`
	Undetermined int `json:"undetermined"`
	Errors       int `json:"errors"`
	// Supply outlets: how many are read, their flow (final, else as found),
	// its sum of design flows, and the flow as a percentage of the system's
	// design airflow.
	SupplyTotal           int      `json:"supply_total"`
	SupplyRead            int      `json:"supply_read"`
	SupplyFlow            float64  `json:"supply_flow"`
	SupplyDesign          float64  `json:"supply_design"`
	SupplyPercentOfDesign *float64 `json:"supply_percent_of_design,omitempty"`
	// SupplyDesignRead sums the design flows of the supply outlets read, and
	// SupplyPercentOfDesignRead is SupplyFlow over it: the like-for-like
	// figure the report gives, the same basis as its outlet totals.
	SupplyDesignRead          float64  `json:"supply_design_read"`
	SupplyPercentOfDesignRead *float64 `json:"supply_percent_of_design_read,omitempty"`
}

// SystemResult is a system's outlet summary, airflow, motor and fan-law
// figures.
type SystemResult struct {
	ID            string        `json:"id"`
	Tag           string        `json:"tag"`
	Kind          string        `json:"kind"`
	Name          string        `json:"name"`
	DesignAirflow float64       `json:"design_airflow"`
	Outlets       OutletSummary `json:"outlets"`
	// Airflow is the measured airflow: the first computed traverse of the
	// system, else the sum of its supply outlets.
	Airflow           *float64        `json:"airflow,omitempty"`
	AirflowSource     string          `json:"airflow_source,omitempty"` // "traverse" or "outlets"
	AirflowTraverseID string          `json:"airflow_traverse_id,omitempty"`
	AirflowTolerance  *ToleranceCheck `json:"airflow_tolerance,omitempty"` // job fan band
	// AirflowOutletsRead of AirflowOutletsTotal outlets (of AirflowOutletKind,
	// "supply" or "exhaust") make an outlet-sum airflow. A partial sum gets no
	// tolerance status and no fan-law prediction: the unread outlets are
	// missing from it.
	AirflowOutletsRead  int        `json:"airflow_outlets_read,omitempty"`
	AirflowOutletsTotal int        `json:"airflow_outlets_total,omitempty"`
	AirflowOutletKind   string     `json:"airflow_outlet_kind,omitempty"`
	FanRPM              *float64   `json:"fan_rpm,omitempty"`
	MotorRPM            *float64   `json:"motor_rpm,omitempty"`
	Volts               []LegValue `json:"volts,omitempty"`
	Amps                []LegValue `json:"amps,omitempty"`
	PowerFactor         *float64   `json:"power_factor,omitempty"`
	InputPowerKW        *float64   `json:"input_power_kw,omitempty"` // three-phase, with a power_factor reading
	PercentFLA          *float64   `json:"percent_fla,omitempty"`    // highest leg
	VoltageImbalance    *float64   `json:"voltage_imbalance_pct,omitempty"`
	CurrentImbalance    *float64   `json:"current_imbalance_pct,omitempty"`
	// MotorStatus is "ok" or "warning" once a motor check can be made (the
	// checks of `fieldtab calc motor`); MotorWarnings says which failed.
	MotorStatus   string   `json:"motor_status,omitempty"`
	MotorWarnings []string `json:"motor_warnings,omitempty"`
	// Fan speed and external static as a percentage of design.
	FanRPMPercentOfDesign         *float64 `json:"fan_rpm_percent_of_design,omitempty"`
	ExternalStaticPercentOfDesign *float64 `json:"external_static_percent_of_design,omitempty"`
	// OutletsVsTraverse compares the fully read outlets' sum with the traverse.
	OutletsVsTraverse *FlowAgreement     `json:"outlets_vs_traverse,omitempty"`
	Statics           map[string]float64 `json:"statics,omitempty"` // static_* readings by quantity, duct pressure units
	MotorSheave       *float64           `json:"motor_sheave,omitempty"`
	FanSheave         *float64           `json:"fan_sheave,omitempty"`
	FanLaw            *FanLawPrediction  `json:"fan_law,omitempty"`
	Notes             []string           `json:"notes,omitempty"`
	Flags             []Flag             `json:"flags,omitempty"`
	Errors            []string           `json:"errors,omitempty"`
}

// LegValue is a motor reading on one leg (1 to 3; 0 for a single reading).
type LegValue struct {
	Leg   int     `json:"leg"`
	Value float64 `json:"value"`
}

// FanLawPrediction is what the fan laws give for reaching the design airflow
// from the measured one on the same system curve.
type FanLawPrediction struct {
	TargetFlow     float64  `json:"target_flow"`
	FanRPM         float64  `json:"fan_rpm"`
	StaticPressure *float64 `json:"static_pressure,omitempty"` // from static_external
	InputPowerKW   *float64 `json:"input_power_kw,omitempty"`
	MotorSheave    *float64 `json:"motor_sheave,omitempty"` // pitch diameter for the new speed
	Note           string   `json:"note"`
}

// TraverseResult is a pitot traverse's point readings and, when every point
// is read, its flow.
type TraverseResult struct {
	ID          string               `json:"id"`
	Tag         string               `json:"tag"`
	SystemID    string               `json:"system_id"`
	SystemTag   string               `json:"system_tag"`
	Location    string               `json:"location"`
	Status      string               `json:"status"` // "computed", "incomplete", "conflict" or "error"
	Stage       string               `json:"stage"`  // the stage whose point readings count: final when there are any
	PointsTotal int                  `json:"points_total"`
	PointsRead  int                  `json:"points_read"`
	Points      []TraversePointValue `json:"points"`
	// Density of the air at the plane, and how it was found: "measured"
	// (air_db with air_rh or air_wb), "dry_air" (air_db alone) or "standard".
	Density       float64         `json:"density"`
	DensitySource string          `json:"density_source"`
	Area          *float64        `json:"area,omitempty"`
	MeanVelocity  *float64        `json:"mean_velocity,omitempty"`
	Flow          *float64        `json:"flow,omitempty"`
	Tolerance     *ToleranceCheck `json:"tolerance,omitempty"` // flow vs the system's design airflow, job fan band
	// FlowUncertainty is ± on Flow: the instruments' accuracy through each
	// point and the method's own (see UncertaintyNote).
	FlowUncertainty *float64 `json:"flow_uncertainty,omitempty"`
	UncertaintyNote string   `json:"uncertainty_note,omitempty"`
	// AsFound is the as-found stage computed on its own, whenever as-found
	// point readings exist (beside the final figures above).
	AsFound *TraverseStageResult `json:"as_found,omitempty"`
	// Conflicts lists points of either stage with two or more current
	// readings, neither superseding the other: no flow is computed for that
	// stage until the lead corrects or voids all but one.
	Conflicts []TraverseConflict `json:"conflicts,omitempty"`
	Warnings  []string           `json:"warnings,omitempty"`
	Flags     []Flag             `json:"flags,omitempty"`
	Errors    []string           `json:"errors,omitempty"`
}

// TraversePointValue is one traverse point: its reading in the job's units
// (velocity pressure or velocity) and, once computed, its velocity.
type TraversePointValue struct {
	Point int    `json:"point"` // 1-based, in measure.TraverseLayout.Points order
	Label string `json:"label"`
	// Where to put the probe tip, in the job's length unit: Depth is the
	// insertion depth from the inside of the duct wall (rectangular: across the
	// width; round: along the diameter); PortOffset, rectangular only, is the
	// line's port position along the height from the same corner.
	Depth      float64  `json:"depth"`
	PortOffset *float64 `json:"port_offset,omitempty"`
	ReadingID  string   `json:"reading_id,omitempty"`
	Conflict   bool     `json:"conflict,omitempty"` // two current readings of this point and stage: see TraverseResult.Conflicts
	Quantity   string   `json:"quantity,omitempty"` // "vp" or "velocity"; "" when not read
	Value      *float64 `json:"value,omitempty"`
	Velocity   *float64 `json:"velocity,omitempty"`
}

// AirStateResult is a moist-air state in the job's units.
type AirStateResult struct {
	DryBulb  float64 `json:"dry_bulb"`
	WetBulb  float64 `json:"wet_bulb"`
	DewPoint float64 `json:"dew_point"`
	RelHum   float64 `json:"rel_hum"` // percent
	HumRatio float64 `json:"hum_ratio"`
	Enthalpy float64 `json:"enthalpy"`
	Density  float64 `json:"density"`
}

// CapacityTestResult is a capacity test's delivered capacity against what the
// unit should deliver.
type CapacityTestResult struct {
	ID        string `json:"id"`
	Tag       string `json:"tag"`
	SystemID  string `json:"system_id"`
	SystemTag string `json:"system_tag"`
	Mode      string `json:"mode"`
	// Status: "meets", "short", "undetermined" (the uncertainty band straddles
	// CapacityMeetsPct), "no_expected", "incomplete" (see Missing) or "error".
	Status string `json:"status"`
	// Side and SideText, when undetermined: which side of the line the
	// delivered capacity itself lies on ("meets" or "short").
	Side       string          `json:"side,omitempty"`
	SideText   string          `json:"side_text,omitempty"`
	Missing    []string        `json:"missing,omitempty"`
	FlowSource string          `json:"flow_source"`
	Airflow    *float64        `json:"airflow,omitempty"`
	FlowBasis  string          `json:"flow_basis,omitempty"` // "standard", "enter" or "leave"
	Enter      *AirStateResult `json:"enter,omitempty"`
	Leave      *AirStateResult `json:"leave,omitempty"`
	OutdoorDB  *float64        `json:"outdoor_db,omitempty"`
	Capacity   *CoilFigures    `json:"capacity,omitempty"`
	// Uncertainty is ± on total and sensible from the instruments' stated
	// accuracies; Omits names the inputs whose accuracy is not on record.
	Uncertainty       *CapacityUncertainty `json:"uncertainty,omitempty"`
	Expected          *ExpectedCapacity    `json:"expected,omitempty"`
	PercentOfExpected *float64             `json:"percent_of_expected,omitempty"`
	// PercentOfExpectedUncertainty is the delivered total's ± as a % of the
	// expected total.
	PercentOfExpectedUncertainty *float64 `json:"percent_of_expected_uncertainty,omitempty"`
	Warnings                     []string `json:"warnings,omitempty"`
	Flags                        []Flag   `json:"flags,omitempty"`
	Errors                       []string `json:"errors,omitempty"`
}

// CoilFigures is measure.CoilCapacity's result in the job's units.
type CoilFigures struct {
	Process  string  `json:"process"` // "cooling" or "heating", as the air shows
	Total    float64 `json:"total"`
	Sensible float64 `json:"sensible"`
	Latent   float64 `json:"latent"`
	SHR      float64 `json:"shr"`
}

// CapacityUncertainty is the ± uncertainty of a coil's total and sensible
// capacity.
type CapacityUncertainty struct {
	Total    float64  `json:"total"`
	Sensible float64  `json:"sensible"`
	Omits    []string `json:"omits,omitempty"`
}

// Words for ExpectedCapacity.Basis.
const (
	ExpectedBasisPerfTable = "manufacturer's performance table at the test's conditions"
	ExpectedBasisRated     = "rated, at the manufacturer's rating conditions, not the test's"
	// An air handler's coil is selected for the job: its figure is the
	// schedule's, at the design conditions the schedule gives.
	ExpectedBasisScheduled = "scheduled capacity, at the schedule's design rating conditions, not the test's"
)

// ExpectedCapacity is what the unit should deliver: from its performance
// table at the test's conditions, or its nameplate rating.
type ExpectedCapacity struct {
	Source string `json:"source"` // "perf_table" or "nameplate"
	// AtTestConditions: the figure is at the test's entering wet bulb,
	// outdoor dry bulb and airflow (the performance table), not at the
	// manufacturer's rating conditions (the nameplate); Basis says so in words.
	AtTestConditions bool     `json:"at_test_conditions"`
	Basis            string   `json:"basis"`
	Total            float64  `json:"total"`
	Sensible         *float64 `json:"sensible,omitempty"`
	Note             string   `json:"note,omitempty"`
}

// WaterTestResult is a coil's or circuit's water flow against design and its
// water-side capacity.
type WaterTestResult struct {
	ID         string  `json:"id"`
	Tag        string  `json:"tag"`
	SystemID   string  `json:"system_id"`
	SystemTag  string  `json:"system_tag"`
	FlowSource string  `json:"flow_source"`
	DesignFlow float64 `json:"design_flow"`
	// Mode is the test's stated mode ("cooling", "heating", or "" on a record
	// made before it was asked for); Process is what the water shows once
	// both temperatures are read (WaterCooling, WaterHeating or
	// WaterNoTransfer); ModeNote says where the two disagree, or that the
	// mode is not stated.
	Mode     string `json:"mode"`
	Process  string `json:"process,omitempty"`
	ModeNote string `json:"mode_note,omitempty"`
	// ValveAccuracyPct is the valve's ± flow accuracy used for a valve's
	// flow, and ValveAccuracySource "stated" or "default" (common practice).
	ValveAccuracyPct    *float64 `json:"valve_accuracy_pct,omitempty"`
	ValveAccuracySource string   `json:"valve_accuracy_source,omitempty"`
	// Status is the flow's tolerance status (within, low, high, undetermined),
	// "incomplete" when a reading is missing (see Missing), or "error".
	Status          string             `json:"status"`
	Missing         []string           `json:"missing,omitempty"`
	DP              *float64           `json:"dp,omitempty"` // water pressure units
	Flow            *float64           `json:"flow,omitempty"`
	Tolerance       *ToleranceCheck    `json:"tolerance,omitempty"` // job hydronic band
	EnterTemp       *float64           `json:"enter_temp,omitempty"`
	LeaveTemp       *float64           `json:"leave_temp,omitempty"`
	SpecificGravity *float64           `json:"specific_gravity,omitempty"` // used for the valve flow
	Capacity        *WaterFigures      `json:"capacity,omitempty"`
	AirSide         *AirWaterAgreement `json:"air_side,omitempty"`
	Notes           []string           `json:"notes,omitempty"`
	Flags           []Flag             `json:"flags,omitempty"`
	Errors          []string           `json:"errors,omitempty"`
}

// WaterFigures is measure.WaterCapacity's result in the job's units.
type WaterFigures struct {
	Process      string  `json:"process"` // as WaterTestResult.Process: "cooling" when the water warms, "no heat transfer"
	Capacity     float64 `json:"capacity"`
	MeanTemp     float64 `json:"mean_temp"`
	Density      float64 `json:"density"`
	SpecificHeat float64 `json:"specific_heat"`
}

// AirWaterAgreement compares a linked capacity test's air-side total with the
// water side: DifferencePct = (air − water)/water × 100.
type AirWaterAgreement struct {
	CapacityTestID string  `json:"capacity_test_id"`
	AirTotal       float64 `json:"air_total"`
	WaterCapacity  float64 `json:"water_capacity"`
	DifferencePct  float64 `json:"difference_pct"`
	Note           string  `json:"note,omitempty"` // set when |DifferencePct| > AirWaterAgreementPct
}

// ComputeResults computes every derived figure of the job in s from its
// current readings (CurrentReadings: superseded and void readings do not
// count), judging calibrations on today's calendar date in today's location
// (a reading counts as taken on its TakenAt date in that location). The site
// pressure is the job's barometric pressure, else the standard atmosphere at
// its elevation (sea level when none). Where a quantity has several current
// readings, the latest taken counts, a final one over an as-found one.
//
// A failure of one item is text on that item, never an error of the whole: the
// only error is an *Error with Code Invalid when s is nil.
func ComputeResults(s *Snapshot, today time.Time) (*Results, error) {
	if s == nil {
		return nil, Errorf(Invalid, "snapshot", "no job snapshot given")
	}
	c := newResultsCalc(s, today)
	return c.run(), nil
}

// resultsCalc holds the indexes one ComputeResults call builds.
type resultsCalc struct {
	s     *Snapshot
	u     measure.UnitSystem
	units ResultUnits
	pres  float64 // psia or kPa
	today time.Time
	loc   *time.Location

	inst      map[string]*resInstrument
	readings  map[resKey][]*Reading
	flags     map[resKey][]Flag
	sysTag    map[string]string
	sysByID   map[string]*System
	supply    map[string]*resFlowSum // by system ID: supply outlets' flow
	exhaust   map[string]*resFlowSum // by system ID: exhaust outlets' flow, for exhaust fans
	travFlow  map[string]*resTraverse
	sysTrav   map[string]*resTraverse // first computed traverse by system ID
	capAir    map[string]float64      // capacity test ID → air-side total in its mode's sense, W
	perf      map[string]resPerf      // by system ID
	outletIdx map[string]int          // results.Outlets index by outlet ID
	r         *Results
}

type resKey struct{ kind, id string }

type resInstrument struct {
	in     *Instrument
	due    time.Time
	hasDue bool
	acc    resAccuracy
}

// resFlowSum is a sum of outlet flows with the sum of their uncertainties.
type resFlowSum struct {
	flow, unc   float64 // job air-flow units
	designRead  float64 // design flows of the outlets read, job units
	read, total int
	unknown     bool // some outlet's instrument accuracy is not on record
}

// resTraverse is what a computed traverse hands to the system and capacity
// results.
type resTraverse struct {
	id, tag   string
	computed  bool
	flow      measure.VolumeFlow
	stdFactor float64 // × flow = standard-air flow of the same dry-air mass
	accPct    float64 // ± % of flow from the instruments' stated accuracy
	accKnown  bool
	read, n   int
}

type resPerf struct {
	t   *measure.PerfTable
	err error
}

func newResultsCalc(s *Snapshot, today time.Time) *resultsCalc {
	loc := today.Location()
	y, m, d := today.Date()
	c := &resultsCalc{
		s: s, today: time.Date(y, m, d, 0, 0, 0, 0, time.UTC), loc: loc,
		inst:      make(map[string]*resInstrument, len(s.Instruments)),
		readings:  make(map[resKey][]*Reading, len(s.Outlets)+len(s.Systems)+16),
		flags:     make(map[resKey][]Flag),
		sysTag:    make(map[string]string, len(s.Systems)),
		sysByID:   make(map[string]*System, len(s.Systems)),
		supply:    make(map[string]*resFlowSum, len(s.Systems)),
		exhaust:   make(map[string]*resFlowSum, len(s.Systems)),
		travFlow:  make(map[string]*resTraverse, len(s.Traverses)),
		sysTrav:   make(map[string]*resTraverse),
		capAir:    make(map[string]float64),
		perf:      make(map[string]resPerf),
		outletIdx: make(map[string]int, len(s.Outlets)),
	}
	return c
}

func (c *resultsCalc) run() *Results {
	s := c.s
	r := &Results{JobID: s.Job.ID, Today: c.today.Format(time.DateOnly),
		Instruments: []InstrumentResult{}, Systems: []SystemResult{}, Outlets: []OutletResult{},
		Traverses: []TraverseResult{}, CapacityTests: []CapacityTestResult{}, WaterTests: []WaterTestResult{},
		Findings: []Finding{}}
	c.r = r
	for i := range s.Instruments {
		r.Instruments = append(r.Instruments, c.instrument(&s.Instruments[i]))
	}
	u, err := s.Job.UnitSystem()
	if err != nil {
		r.Errors = append(r.Errors, "job: "+err.Error()+"; no figures can be computed")
		return r
	}
	c.u, c.units = u, UnitsFor(u)
	r.Units = c.units
	c.sitePressure()

	for i := range s.Systems {
		c.sysTag[s.Systems[i].ID] = s.Systems[i].Tag
		c.sysByID[s.Systems[i].ID] = &s.Systems[i]
	}
	current := CurrentReadings(s.Readings)
	for i := range current {
		rd := &current[i]
		k := resKey{rd.SubjectKind, rd.SubjectID}
		c.readings[k] = append(c.readings[k], rd)
		c.checkOverdue(k, rd)
		c.checkNoInstrument(k, rd)
	}
	for _, fl := range c.flags {
		for i := range fl {
			if fl[i].Kind == FlagNoInstrument {
				noInstrumentText(&fl[i])
			}
			if n := len(fl[i].ReadingIDs); n > 1 && fl[i].Kind == FlagInstrumentOverdue {
				in := c.inst[fl[i].InstrumentID].in
				fl[i].Text = fmt.Sprintf("%d readings were taken with %s after its calibration was due on %s.",
					n, resInstName(in), in.CalibrationDue)
			}
		}
	}

	for i := range s.Outlets {
		c.outletIdx[s.Outlets[i].ID] = len(r.Outlets)
		r.Outlets = append(r.Outlets, c.outlet(&s.Outlets[i]))
	}
	for i := range s.Traverses {
		r.Traverses = append(r.Traverses, c.traverse(&s.Traverses[i]))
	}
	for i := range s.CapacityTests {
		r.CapacityTests = append(r.CapacityTests, c.capacity(&s.CapacityTests[i]))
	}
	for i := range s.WaterTests {
		r.WaterTests = append(r.WaterTests, c.water(&s.WaterTests[i]))
	}
	for i := range s.Systems {
		r.Systems = append(r.Systems, c.system(&s.Systems[i]))
	}
	c.findings()
	return r
}

// sitePressure sets the barometric pressure the psychrometrics use.
func (c *resultsCalc) sitePressure() {
	p, src, note := SitePressure(c.s.Job)
	if note != "" {
		c.r.Errors = append(c.r.Errors, note)
	}
	c.pres = p
	c.r.SitePressure, c.r.SitePressureSource = p, src
}

// SitePressure is the barometric pressure (psia or kPa, the job's units) the
// job's psychrometrics use, and its source: the measured barometric pressure,
// else the standard atmosphere at the site's elevation, else sea level. note
// says why an elevation out of range was replaced by sea level.
func SitePressure(j Job) (p float64, source, note string) {
	u, err := j.UnitSystem()
	if err != nil {
		u = measure.IP
	}
	if j.Barometric != nil {
		return *j.Barometric, "barometric", ""
	}
	z, src := 0.0, "sea_level"
	if j.Elevation != nil {
		z, src = *j.Elevation, "elevation"
	}
	p, err = measure.StandardPressure(u, z)
	if err != nil {
		p, _ = measure.StandardPressure(u, 0)
		return p, "sea_level", "site elevation: " + err.Error() + "; sea level used"
	}
	return p, src, ""
}

// ---- instruments ----

func (c *resultsCalc) instrument(in *Instrument) InstrumentResult {
	ir := InstrumentResult{ID: in.ID, Tag: in.Tag, Kind: in.Kind, CalibrationDue: in.CalibrationDue,
		CalibrationStatus: CalibrationUnknown}
	info := &resInstrument{in: in, acc: instrumentAccuracy(in)}
	c.inst[in.ID] = info
	if in.CalibrationDue == "" {
		return ir
	}
	due, err := time.Parse(time.DateOnly, in.CalibrationDue)
	if err != nil {
		ir.Errors = append(ir.Errors, fmt.Sprintf("the calibration due date %q is not a date (YYYY-MM-DD)", in.CalibrationDue))
		return ir
	}
	info.due, info.hasDue = due, true
	days := int(due.Sub(c.today).Hours() / 24)
	ir.DaysToDue = &days
	switch {
	case days < 0:
		ir.CalibrationStatus = CalibrationOverdue
	case days <= CalibrationDueSoonDays:
		ir.CalibrationStatus = CalibrationDueSoon
	default:
		ir.CalibrationStatus = CalibrationCurrent
	}
	return ir
}

// checkOverdue flags rd on its subject when its instrument's calibration was
// past due on the day the reading was taken.
func (c *resultsCalc) checkOverdue(k resKey, rd *Reading) {
	info := c.inst[rd.InstrumentID]
	if rd.InstrumentID == "" || info == nil || !info.hasDue {
		return
	}
	y, m, d := rd.TakenAt.In(c.loc).Date()
	taken := time.Date(y, m, d, 0, 0, 0, 0, time.UTC)
	if !taken.After(info.due) {
		return
	}
	fl := c.flags[k]
	for i := range fl {
		if fl[i].Kind == FlagInstrumentOverdue && fl[i].InstrumentID == rd.InstrumentID {
			fl[i].ReadingIDs = append(fl[i].ReadingIDs, rd.ID)
			return
		}
	}
	c.flags[k] = append(fl, Flag{Kind: FlagInstrumentOverdue, InstrumentID: rd.InstrumentID,
		ReadingIDs: []string{rd.ID},
		Text: fmt.Sprintf("A reading (%s, %s) was taken with %s on %s, after its calibration was due on %s.",
			quantityWords(rd.SubjectKind, rd.Quantity), words(rd.Stage), resInstName(info.in), taken.Format(time.DateOnly), info.in.CalibrationDue)})
}

func resInstName(in *Instrument) string {
	name := in.Tag
	if in.Serial != "" {
		name += " (serial " + in.Serial + ")"
	}
	return name
}

// resAccuracy is an instrument's stated accuracy: Pct of reading, and Abs as
// an SI value of dimension dim ("" when none or its unit is not understood).
type resAccuracy struct {
	known bool // an instrument with some accuracy on record
	pct   float64
	dim   Dimension
	abs   float64 // SI base unit of dim; percentage points for DimPercent; K for temperature differences
}

func (c *resultsCalc) accuracy(instrumentID string) resAccuracy {
	if info := c.inst[instrumentID]; info != nil {
		return info.acc
	}
	return resAccuracy{}
}

func instrumentAccuracy(in *Instrument) resAccuracy {
	a := resAccuracy{known: in.AccuracyPct > 0 || in.AccuracyAbs > 0, pct: in.AccuracyPct}
	if in.AccuracyAbs > 0 {
		a.dim, a.abs = resAccuracyAbs(in.AccuracyUnit, in.AccuracyAbs)
		if a.dim == "" {
			a.known = in.AccuracyPct > 0
		}
	}
	return a
}

var resUnitCleaner = strings.NewReplacer("°", "", "º", "", " ", "", ".", "", "_", "", "³", "3")

// resAccuracyAbs reads an instrument's absolute accuracy in the free-text unit
// it was entered with ("cfm", "°F", "%RH", "in. w.g." …), as an SI value of
// its dimension. A temperature accuracy is a difference, so °F converts by
// 5/9 with no offset. An unknown unit returns dim "".
func resAccuracyAbs(unit string, v float64) (Dimension, float64) {
	u := resUnitCleaner.Replace(strings.ToLower(strings.TrimSpace(unit)))
	switch u {
	case "cfm":
		return DimFlow, float64(measure.CFM(v))
	case "l/s", "lps":
		return DimFlow, float64(measure.LitersPerSecond(v))
	case "m3/h", "m3h", "cmh":
		return DimFlow, float64(measure.CubicMetersPerHour(v))
	case "gpm":
		return DimFlow, float64(measure.GPM(v))
	case "fpm", "ft/min":
		return DimVelocity, float64(measure.FPM(v))
	case "m/s", "mps":
		return DimVelocity, float64(measure.MetersPerSecond(v))
	case "inwg", "inwc", "inh2o":
		return DimPressure, float64(measure.InWG(v))
	case "pa":
		return DimPressure, v
	case "kpa":
		return DimPressure, float64(measure.Kilopascals(v))
	case "psi", "psid":
		return DimPressure, float64(measure.Psi(v))
	case "ft", "ftwg", "ftwc", "fth2o", "fthd":
		return DimPressure, float64(measure.FtWater(v))
	case "f", "degf":
		return DimTemperature, float64(measure.DeltaF(v))
	case "c", "degc", "k":
		return DimTemperature, float64(measure.DeltaC(v))
	case "%rh", "rh", "%", "pct", "%pts", "points":
		return DimPercent, v
	}
	return "", 0
}

// ---- readings ----

func (c *resultsCalc) subjectReadings(kind, id string) []*Reading {
	return c.readings[resKey{kind, id}]
}

// resLater says whether a was taken after b (then stored after it).
func resLater(a, b *Reading) bool {
	if !a.TakenAt.Equal(b.TakenAt) {
		return a.TakenAt.After(b.TakenAt)
	}
	return a.Seq >= b.Seq
}

// resLatest returns the latest reading of qty at point in stage ("" any stage).
func resLatest(rs []*Reading, qty, stage string, point int) *Reading {
	var best *Reading
	for _, r := range rs {
		if r.Quantity != qty || r.Point != point || (stage != "" && r.Stage != stage) {
			continue
		}
		if best == nil || resLater(r, best) {
			best = r
		}
	}
	return best
}

// resCurrent returns the latest final reading of qty at point, else the latest
// as-found one.
func resCurrent(rs []*Reading, qty string, point int) *Reading {
	if r := resLatest(rs, qty, StageFinal, point); r != nil {
		return r
	}
	return resLatest(rs, qty, StageAsFound, point)
}

// resLaterOf returns the later of two readings, either of which may be nil.
func resLaterOf(a, b *Reading) *Reading {
	switch {
	case a == nil:
		return b
	case b == nil:
		return a
	case resLater(b, a):
		return b
	}
	return a
}

func resPtr(v float64) *float64 { return &v }

// resErr renders an error for an item's Errors list.
func resErr(what string, err error) string {
	return what + ": " + err.Error()
}

func (c *resultsCalc) tolerance(measured, design float64, band measure.Band, acc measure.Accuracy) (*ToleranceCheck, error) {
	t, err := measure.CheckTolerance(measured, design, band, acc)
	if err != nil {
		return nil, err
	}
	return &ToleranceCheck{Status: string(t.Status), PercentOfDesign: t.PercentOfDesign, Low: t.Low, High: t.High,
		Uncertainty: t.Uncertainty, Side: string(t.Side), SideText: sideText(t.Side)}, nil
}

func (c *resultsCalc) outletBand() measure.Band {
	t := c.s.Job.Tolerances
	return measure.Band{LowPct: t.OutletLowPct, HighPct: t.OutletHighPct}
}

func (c *resultsCalc) fanBand() measure.Band {
	t := c.s.Job.Tolerances
	return measure.Band{LowPct: t.FanLowPct, HighPct: t.FanHighPct}
}

func (c *resultsCalc) hydronicBand() measure.Band {
	t := c.s.Job.Tolerances
	return measure.Band{LowPct: t.HydronicLowPct, HighPct: t.HydronicHighPct}
}

// ---- outlets ----

func (c *resultsCalc) outlet(o *Outlet) OutletResult {
	res := OutletResult{ID: o.ID, Tag: o.Tag, Room: o.Room, Kind: o.Kind, SystemID: o.SystemID,
		SystemTag: c.sysTag[o.SystemID], DesignFlow: o.DesignFlow, Status: ResultNotRead,
		Flags: c.flags[resKey{SubjectOutlet, o.ID}]}
	rs := c.subjectReadings(SubjectOutlet, o.ID)
	var unc [2]float64 // ± flow of the as-found and final readings
	for i, stage := range Stages {
		rd := resLaterOf(resLatest(rs, "flow", stage, 0), resLatest(rs, "velocity", stage, 0))
		if rd == nil {
			continue
		}
		st, u, err := c.outletReading(o, rd)
		if err != nil {
			res.Errors = append(res.Errors, resErr(words(stage)+" "+quantityWords(SubjectOutlet, rd.Quantity), err))
		}
		if stage == StageFinal {
			res.Final = st
		} else {
			res.AsFound = st
		}
		res.Status = st.Status
		unc[i] = u
	}
	// The system's supply (or exhaust) sum takes the final flow, else the as-found one.
	if sums := map[string]map[string]*resFlowSum{"supply": c.supply, "exhaust": c.exhaust}[o.Kind]; sums != nil {
		sum := sums[o.SystemID]
		if sum == nil {
			sum = &resFlowSum{}
			sums[o.SystemID] = sum
		}
		sum.total++
		gov, u := res.Final, unc[1]
		if gov == nil || gov.Flow == nil {
			gov, u = res.AsFound, unc[0]
		}
		if gov != nil && gov.Flow != nil {
			sum.read++
			sum.flow += *gov.Flow
			sum.designRead += o.DesignFlow
			sum.unc += u
			if gov.Tolerance == nil || gov.Tolerance.UncertaintyUnknown {
				sum.unknown = true
			}
		}
	}
	return res
}

// outletReading turns one reading into the outlet's flow and tolerance. It
// returns the flow's ± uncertainty in job units too. The instrument's accuracy
// applies to what it read, so its absolute part scales with the hood factor
// (or, for a velocity accuracy, with Ak) into flow; the percentage carries over.
func (c *resultsCalc) outletReading(o *Outlet, rd *Reading) (*OutletReading, float64, error) {
	st := &OutletReading{ReadingID: rd.ID, Quantity: rd.Quantity, InstrumentID: rd.InstrumentID,
		TakenAt: rd.TakenAt, Status: ResultError}
	acc := c.accuracy(rd.InstrumentID)
	var flow measure.VolumeFlow
	var absFlow float64 // job air-flow units
	switch rd.Quantity {
	case "flow":
		q, err := rd.Flow()
		if err != nil {
			return st, 0, err
		}
		st.Reading = q.AirIn(c.u)
		if o.Factor == 0 {
			return st, 0, errors.New("the outlet has no hood correction factor on record (1 when none)")
		}
		if flow, err = measure.OutletFlowHood(q, o.Factor); err != nil {
			return st, 0, err
		}
		if acc.dim == DimFlow {
			absFlow = measure.VolumeFlow(acc.abs).AirIn(c.u) * o.Factor
		}
	case "velocity":
		v, err := rd.Velocity()
		if err != nil {
			return st, 0, err
		}
		st.Reading = v.In(c.u)
		if o.Ak == 0 {
			return st, 0, errors.New("the outlet has no Ak on record")
		}
		ak := measure.AreaIn(c.u, o.Ak)
		if flow, err = measure.OutletFlowAk(v, ak); err != nil {
			return st, 0, err
		}
		switch acc.dim {
		case DimVelocity:
			absFlow = measure.VolumeFlow(acc.abs * float64(ak)).AirIn(c.u)
		case DimFlow:
			absFlow = measure.VolumeFlow(acc.abs).AirIn(c.u)
		}
	default:
		return st, 0, fmt.Errorf("quantity %q is not an outlet flow", rd.Quantity)
	}
	f := flow.AirIn(c.u)
	st.Flow = &f
	tol, err := c.tolerance(f, o.DesignFlow, c.outletBand(), measure.Accuracy{Pct: acc.pct, Abs: absFlow})
	if err != nil {
		return st, f*acc.pct/100 + absFlow, err
	}
	tol.UncertaintyUnknown = !acc.known
	st.Tolerance, st.Status = tol, tol.Status
	return st, tol.Uncertainty, nil
}

// ---- traverses ----

// airDensity is the density at a traverse plane from its air_db and air_rh or
// air_wb readings at the site pressure, or standard air.
type resDensity struct {
	rho       measure.Density
	stdFactor float64 // dry-air density ÷ standard dry-air density
	source    string
	note      string
}

func (c *resultsCalc) stdAir() float64 {
	if c.u == measure.SI {
		return resStdAirSI
	}
	return resStdAirIP
}

func (c *resultsCalc) airDensity(rs []*Reading) (resDensity, error) {
	std := resDensity{rho: measure.DensityIn(c.u, c.stdAir()), stdFactor: 1, source: "standard"}
	dbR := resCurrent(rs, "air_db", 0)
	if dbR == nil {
		return std, nil
	}
	t, err := dbR.Temperature()
	if err != nil {
		return std, fmt.Errorf("%s: %w; standard air used", quantityWords(SubjectTraverse, "air_db"), err)
	}
	spec := measure.AirSpec{DryBulb: t.In(c.u), Kind: measure.RelHum}
	source := "dry_air"
	rhR, wbR := resCurrent(rs, "air_rh", 0), resCurrent(rs, "air_wb", 0)
	switch h := resLaterOf(rhR, wbR); {
	case h == nil:
	case h.Quantity == "air_rh":
		v, err := h.Number()
		if err != nil {
			return std, fmt.Errorf("%s: %w; standard air used", quantityWords(SubjectTraverse, "air_rh"), err)
		}
		spec.Humidity, source = v, "measured"
	default:
		wt, err := h.Temperature()
		if err != nil {
			return std, fmt.Errorf("%s: %w; standard air used", quantityWords(SubjectTraverse, "air_wb"), err)
		}
		spec.Kind, spec.Humidity, source = measure.WetBulb, wt.In(c.u), "measured"
	}
	st, err := spec.State(c.u, c.pres)
	if err != nil {
		return std, fmt.Errorf("duct air state: %w; standard air used", err)
	}
	d := resDensity{rho: measure.DensityIn(c.u, st.Density), stdFactor: 1 / st.SpecVolume / c.stdAir(), source: source}
	if source == "dry_air" {
		d.note = "no relative humidity or wet bulb read in the duct: density taken for dry air (slightly high in humid air)"
	}
	return d, nil
}

func (c *resultsCalc) traverse(t *Traverse) TraverseResult {
	res := TraverseResult{ID: t.ID, Tag: t.Tag, SystemID: t.SystemID, SystemTag: c.sysTag[t.SystemID],
		Location: t.Location, Status: ResultError, Stage: StageAsFound, Points: []TraversePointValue{},
		Flags: c.flags[resKey{SubjectTraverse, t.ID}]}
	tf := &resTraverse{id: t.ID, tag: t.Tag}
	c.travFlow[t.ID] = tf
	layout, err := t.Layout(c.u)
	if err != nil {
		res.Errors = append(res.Errors, resErr("layout", err))
		return res
	}
	pts, err := layout.Points()
	if err != nil {
		res.Errors = append(res.Errors, resErr("layout", err))
		return res
	}
	res.Warnings = append(res.Warnings, layout.Warnings()...)
	res.PointsTotal, tf.n = len(pts), len(pts)

	rs := c.subjectReadings(SubjectTraverse, t.ID)
	dens, err := c.airDensity(rs)
	if err != nil {
		res.Errors = append(res.Errors, err.Error())
	}
	if dens.note != "" {
		res.Warnings = append(res.Warnings, dens.note)
	}
	res.Density, res.DensitySource = dens.rho.In(c.u), dens.source
	c.traverseReadings(t, layout, pts, rs, dens, &res, tf)
	return res
}

func (c *resultsCalc) systemDesignAirflow(id string) float64 {
	if s := c.sysByID[id]; s != nil {
		return s.Design.Airflow
	}
	return 0
}

// ---- capacity tests ----

func (c *resultsCalc) capacity(ct *CapacityTest) CapacityTestResult {
	res := CapacityTestResult{ID: ct.ID, Tag: ct.Tag, SystemID: ct.SystemID, SystemTag: c.sysTag[ct.SystemID],
		Mode: ct.Mode, FlowSource: ct.FlowSource, Status: ResultError,
		Flags: c.flags[resKey{SubjectCapacityTest, ct.ID}]}
	rs := c.subjectReadings(SubjectCapacityTest, ct.ID)

	flow, basis, flowAcc, flowKnown := c.capacityFlow(ct, rs, &res)
	if flow > 0 {
		res.Airflow, res.FlowBasis = resPtr(flow.AirIn(c.u)), basis.String()
	}
	enter, enterR, enterOK := c.airSpecOf(rs, "enter", &res)
	leave, leaveR, leaveOK := c.airSpecOf(rs, "leave", &res)
	odbR := resCurrent(rs, "outdoor_db", 0)
	var odb measure.Temperature
	if odbR != nil {
		t, err := odbR.Temperature()
		if err != nil {
			res.Errors = append(res.Errors, resErr(quantityWords(SubjectCapacityTest, "outdoor_db"), err))
			odbR = nil
		} else {
			odb = t
			res.OutdoorDB = resPtr(t.In(c.u))
		}
	}

	// A performance table needs the outdoor dry bulb; without it and without a
	// nameplate rating to fall back on, the test cannot be judged.
	if sys := c.sysByID[ct.SystemID]; sys != nil && ct.Mode == "cooling" && sys.Design.PerfTableCSV != "" &&
		odbR == nil && sys.Design.RatedTotal <= 0 {
		res.Missing = append(res.Missing, "outdoor_db")
	}

	var enterSt, leaveSt measure.AirState
	if enterOK {
		st, err := enter.State(c.u, c.pres)
		if err != nil {
			res.Errors = append(res.Errors, resErr("entering air", err))
			enterOK = false
		} else {
			enterSt, res.Enter = st, c.airStateResult(st)
		}
	}
	if leaveOK {
		st, err := leave.State(c.u, c.pres)
		if err != nil {
			res.Errors = append(res.Errors, resErr("leaving air", err))
			leaveOK = false
		} else {
			leaveSt, res.Leave = st, c.airStateResult(st)
		}
	}
	if len(res.Missing) > 0 {
		res.Status = ResultIncomplete
		return res
	}
	if flow <= 0 || !enterOK || !leaveOK {
		return res
	}

	cr, err := measure.CoilCapacity(flow, basis, enterSt, leaveSt)
	if err != nil {
		res.Errors = append(res.Errors, resErr("capacity", err))
		return res
	}
	res.Capacity = &CoilFigures{Process: cr.Process, Total: cr.Total.In(c.u), Sensible: cr.Sensible.In(c.u),
		Latent: cr.Latent.In(c.u), SHR: cr.SHR}
	res.Warnings = append(res.Warnings, cr.Warnings...)
	// The total in the sense of the test's mode: a cooling test whose air
	// leaves warmer delivered negative cooling.
	modeTotal := cr.Total
	if cr.Process != ct.Mode {
		modeTotal = -cr.Total
		res.Warnings = append(res.Warnings, fmt.Sprintf("the air shows %s, but this is a %s test", cr.Process, ct.Mode))
	}
	c.capAir[ct.ID] = float64(modeTotal)

	unc := c.capacityUncertainty(rs, flow, basis, enter, leave, enterR, leaveR, flowAcc, flowKnown, &res)

	exp := c.expectedCapacity(ct, enterSt, odbR != nil, odb, flow, &res)
	if exp == nil {
		res.Status = ResultNoExpected
		return res
	}
	res.Expected = exp
	total := modeTotal.In(c.u)
	if exp.Total <= 0 {
		res.Status = ResultNoExpected
		return res
	}
	res.PercentOfExpected = resPtr(total / exp.Total * 100)
	threshold := exp.Total * CapacityMeetsPct / 100
	u := 0.0
	if unc != nil {
		u = unc.Total
		res.PercentOfExpectedUncertainty = resPtr(u / exp.Total * 100)
	}
	switch {
	case total-u >= threshold:
		res.Status = ResultMeets
	case total+u < threshold:
		res.Status = ResultShort
	default:
		res.Status = string(measure.StatusUndetermined)
		res.Side, res.SideText = ResultShort, "below"
		if total >= threshold {
			res.Side, res.SideText = ResultMeets, "above"
		}
		res.SideText += " the " + c.num(CapacityMeetsPct, 0) + " % line, but within the test's uncertainty of it"
	}
	return res
}

// capacityFlow finds the test's airflow and the basis its mass flow is read
// on, with its ± accuracy in % of flow. Missing readings go into res.Missing.
func (c *resultsCalc) capacityFlow(ct *CapacityTest, rs []*Reading, res *CapacityTestResult) (measure.VolumeFlow, measure.FlowBasis, float64, bool) {
	basis := measure.FlowStandard
	if ct.FlowBasis != "" {
		b, err := measure.ParseFlowBasis(ct.FlowBasis)
		if err != nil {
			res.Errors = append(res.Errors, resErr("flow basis", err))
		} else {
			basis = b
		}
	}
	switch ct.FlowSource {
	case "traverse":
		tf := c.travFlow[ct.TraverseID]
		switch {
		case tf == nil:
			res.Errors = append(res.Errors, "airflow from a traverse: the traverse is not in this job")
		case !tf.computed:
			res.Missing = append(res.Missing, fmt.Sprintf("traverse %s (%d of %d points read)", tf.tag, tf.read, tf.n))
		default:
			// The traverse is actual flow at the plane's density: carry its dry-air
			// mass as the standard-air flow that holds the same mass.
			return measure.VolumeFlow(float64(tf.flow) * tf.stdFactor), measure.FlowStandard, tf.accPct, tf.accKnown
		}
	case "outlets":
		sum := c.supply[ct.SystemID]
		if sum == nil || sum.read == 0 {
			res.Missing = append(res.Missing, "supply outlet readings")
			break
		}
		if sum.read < sum.total {
			res.Warnings = append(res.Warnings, fmt.Sprintf("only %d of %d supply outlets are read: the airflow is a partial sum",
				sum.read, sum.total))
		}
		if ct.FlowBasis == "" {
			res.Warnings = append(res.Warnings, "the supply outlets' flows, as measured, are taken as standard air (no flow basis given)")
		}
		pct := 0.0
		if sum.flow > 0 {
			pct = sum.unc / sum.flow * 100
		}
		return measure.AirFlowIn(c.u, sum.flow), basis, pct, sum.unc > 0
	case "direct":
		r := resCurrent(rs, "flow", 0)
		if r == nil {
			res.Missing = append(res.Missing, "flow")
			break
		}
		q, err := r.Flow()
		if err != nil {
			res.Errors = append(res.Errors, resErr("flow", err))
			break
		}
		a := c.accuracy(r.InstrumentID)
		pct := a.pct
		if a.dim == DimFlow && q > 0 {
			pct += a.abs / float64(q) * 100
		}
		return q, basis, pct, a.known
	default:
		res.Errors = append(res.Errors, fmt.Sprintf("airflow source %q is not a traverse, the supply outlets or a direct reading", ct.FlowSource))
	}
	return 0, basis, 0, false
}

// airSpecOf reads side's ("enter" or "leave") dry bulb and one humidity
// reading (the latest of wet bulb, relative humidity and dew point).
func (c *resultsCalc) airSpecOf(rs []*Reading, side string, res *CapacityTestResult) (measure.AirSpec, [2]*Reading, bool) {
	var used [2]*Reading
	dbR := resCurrent(rs, side+"_db", 0)
	h := resLaterOf(resLaterOf(resCurrent(rs, side+"_wb", 0), resCurrent(rs, side+"_rh", 0)), resCurrent(rs, side+"_dp", 0))
	if dbR == nil {
		res.Missing = append(res.Missing, side+"_db")
	}
	if h == nil {
		res.Missing = append(res.Missing, side+"_wb, "+side+"_rh or "+side+"_dp")
	}
	if dbR == nil || h == nil {
		return measure.AirSpec{}, used, false
	}
	used = [2]*Reading{dbR, h}
	t, err := dbR.Temperature()
	if err != nil {
		res.Errors = append(res.Errors, resErr(quantityWords(SubjectCapacityTest, side+"_db"), err))
		return measure.AirSpec{}, used, false
	}
	spec := measure.AirSpec{DryBulb: t.In(c.u)}
	switch h.Quantity {
	case side + "_rh":
		v, err := h.Number()
		if err != nil {
			res.Errors = append(res.Errors, resErr(quantityWords(SubjectCapacityTest, h.Quantity), err))
			return spec, used, false
		}
		spec.Kind, spec.Humidity = measure.RelHum, v
	default:
		v, err := h.Temperature()
		if err != nil {
			res.Errors = append(res.Errors, resErr(quantityWords(SubjectCapacityTest, h.Quantity), err))
			return spec, used, false
		}
		spec.Kind, spec.Humidity = measure.WetBulb, v.In(c.u)
		if h.Quantity == side+"_dp" {
			spec.Kind = measure.DewPoint
		}
	}
	return spec, used, true
}

func (c *resultsCalc) airStateResult(st measure.AirState) *AirStateResult {
	return &AirStateResult{DryBulb: st.DryBulb, WetBulb: st.WetBulb, DewPoint: st.DewPoint, RelHum: st.RelHum,
		HumRatio: st.HumRatio, Enthalpy: st.Enthalpy, Density: st.Density}
}

// capacityUncertainty propagates the stated accuracies of the instruments
// behind the test into its capacity, when at least one of them is known.
func (c *resultsCalc) capacityUncertainty(rs []*Reading, flow measure.VolumeFlow, basis measure.FlowBasis,
	enter, leave measure.AirSpec, enterR, leaveR [2]*Reading, flowPct float64, flowKnown bool,
	res *CapacityTestResult) *CapacityUncertainty {
	acc := measure.AirAccuracy{FlowPct: flowPct}
	var omits []string
	if !flowKnown {
		omits = append(omits, "airflow")
	}
	tempKnown, tempMissing, rhKnown, rhMissing := false, false, false, false
	for _, r := range []*Reading{enterR[0], enterR[1], leaveR[0], leaveR[1]} {
		a := c.accuracy(r.InstrumentID)
		if strings.HasSuffix(r.Quantity, "_rh") {
			if !a.known {
				rhMissing = true
				continue
			}
			pts := 0.0
			if a.dim == DimPercent {
				pts = a.abs
			}
			if v, err := r.Number(); err == nil {
				pts += a.pct / 100 * v
			}
			acc.RHPoints = math.Max(acc.RHPoints, pts)
			rhKnown = true
			continue
		}
		if a.dim != DimTemperature {
			tempMissing = true
			continue
		}
		acc.Temp = measure.TempDiff(math.Max(float64(acc.Temp), a.abs))
		tempKnown = true
	}
	if tempMissing {
		omits = append(omits, "some temperatures")
	}
	if rhMissing {
		omits = append(omits, "some relative humidities")
	}
	if !flowKnown && !tempKnown && !rhKnown {
		return nil
	}
	cu, err := measure.CoilUncertainty(c.u, c.pres, flow, basis, enter, leave, acc)
	if err != nil {
		res.Errors = append(res.Errors, resErr("uncertainty", err))
		return nil
	}
	res.Uncertainty = &CapacityUncertainty{Total: cu.Total.In(c.u), Sensible: cu.Sensible.In(c.u), Omits: omits}
	return res.Uncertainty
}

// expectedCapacity is the system's performance table at the test's entering
// wet bulb, outdoor dry bulb and airflow (cooling only), else its rated
// cooling capacity. It returns nil when there is neither.
func (c *resultsCalc) expectedCapacity(ct *CapacityTest, enter measure.AirState, haveODB bool, odb measure.Temperature,
	flow measure.VolumeFlow, res *CapacityTestResult) *ExpectedCapacity {
	sys := c.sysByID[ct.SystemID]
	if sys == nil {
		res.Errors = append(res.Errors, "the test's system is not in this job")
		return nil
	}
	if ct.Mode != "cooling" {
		res.Warnings = append(res.Warnings, "no heating rating on record: the rated capacity and performance table are cooling figures")
		return nil
	}
	note := ""
	if sys.Design.PerfTableCSV != "" {
		pt, ok := c.perf[sys.ID]
		if !ok {
			pt.t, pt.err = measure.ParsePerfTableCSV(strings.NewReader(sys.Design.PerfTableCSV))
			c.perf[sys.ID] = pt
		}
		switch {
		case pt.err != nil:
			res.Errors = append(res.Errors, resErr("performance table of "+sys.Tag, pt.err))
			note = "the performance table could not be read"
		case !haveODB:
			note = "no outdoor dry bulb reading for the performance table"
		default:
			tot, sen, err := pt.t.Expected(measure.TemperatureIn(c.u, enter.WetBulb), odb, flow)
			if err == nil {
				return &ExpectedCapacity{Source: "perf_table", AtTestConditions: true, Basis: ExpectedBasisPerfTable,
					Total: tot.In(c.u), Sensible: resPtr(sen.In(c.u))}
			}
			note = "outside the performance table: " + err.Error()
		}
	}
	if sys.Design.RatedTotal > 0 {
		e := &ExpectedCapacity{Source: "nameplate", Basis: ExpectedBasisRated, Total: sys.Design.RatedTotal}
		if sys.Kind == "air_handler" {
			e.Basis = ExpectedBasisScheduled
		}
		if sys.Design.RatedSensible > 0 {
			e.Sensible = resPtr(sys.Design.RatedSensible)
		}
		if note != "" {
			e.Note = note + "; the nameplate rating is used"
		}
		return e
	}
	if note != "" {
		res.Warnings = append(res.Warnings, note)
	}
	return nil
}

// ---- water tests ----

func (c *resultsCalc) water(wt *WaterTest) WaterTestResult {
	res := WaterTestResult{ID: wt.ID, Tag: wt.Tag, SystemID: wt.SystemID, SystemTag: c.sysTag[wt.SystemID],
		FlowSource: wt.FlowSource, DesignFlow: wt.DesignFlow, Status: ResultError,
		Flags: c.flags[resKey{SubjectWaterTest, wt.ID}]}
	rs := c.subjectReadings(SubjectWaterTest, wt.ID)
	kind, err := measure.ParseFluidKind(wt.Fluid)
	if err != nil {
		res.Errors = append(res.Errors, resErr("fluid", err))
		return res
	}
	fluid := measure.Fluid{Kind: kind, VolPct: wt.Concentration}

	var enter, leave measure.Temperature
	haveTemps := true
	for _, q := range []string{"enter_temp", "leave_temp"} {
		r := resCurrent(rs, q, 0)
		if r == nil {
			res.Missing = append(res.Missing, q)
			haveTemps = false
			continue
		}
		t, err := r.Temperature()
		if err != nil {
			res.Errors = append(res.Errors, resErr(quantityWords(SubjectWaterTest, q), err))
			haveTemps = false
			continue
		}
		if q == "enter_temp" {
			enter, res.EnterTemp = t, resPtr(t.In(c.u))
		} else {
			leave, res.LeaveTemp = t, resPtr(t.In(c.u))
		}
	}

	c.waterMode(wt, &res)
	if haveTemps {
		c.waterProcess(wt, rs, enter, leave, &res)
	}
	var flow measure.VolumeFlow
	var acc measure.Accuracy
	instKnown := false
	switch wt.FlowSource {
	case "valve":
		r := resCurrent(rs, "dp", 0)
		if r == nil {
			res.Missing = append(res.Missing, "dp")
			break
		}
		dp, err := r.Pressure()
		if err != nil {
			res.Errors = append(res.Errors, resErr(quantityWords(SubjectWaterTest, "dp"), err))
			break
		}
		res.DP = resPtr(c.waterPressureIn(dp))
		if dp <= 0 {
			res.Errors = append(res.Errors, "valve pressure drop: it must be above 0 (a negative reading usually means the hoses are swapped)")
			break
		}
		// SG at the mean water temperature; 60 °F, the reference of Cv, when
		// the temperatures are not read.
		tSG := measure.DegF(60)
		if haveTemps {
			tSG = (enter + leave) / 2
		} else {
			res.Notes = append(res.Notes, "specific gravity taken at 60 °F: the water temperatures are not read")
		}
		rho, _, err := fluid.Props(tSG)
		if err != nil {
			res.Errors = append(res.Errors, resErr("specific gravity", err))
			break
		}
		sg := measure.SpecificGravity(rho)
		res.SpecificGravity = resPtr(sg)
		// valve_cv is Cv in an IP job and Kv in an SI one.
		if c.u == measure.SI {
			flow, err = measure.ValveFlowKv(wt.ValveCv, dp, sg)
		} else {
			flow, err = measure.ValveFlowCv(wt.ValveCv, dp, sg)
		}
		if err != nil {
			res.Errors = append(res.Errors, resErr("valve flow", err))
			flow = 0
			break
		}
		// Flow goes as √ΔP: a ΔP uncertainty of x % is about x/2 % on flow.
		// The valve's own flow accuracy is independent of the gauge's, so the
		// two combine root-sum-square.
		a := c.accuracy(r.InstrumentID)
		rel := a.pct / 100
		if a.dim == DimPressure {
			rel += a.abs / float64(dp)
		}
		vPct, vSrc := valveAccuracy(wt)
		res.ValveAccuracyPct, res.ValveAccuracySource = resPtr(vPct), vSrc
		acc.Pct = math.Min(math.Hypot(rel/2*100, vPct), 100)
		instKnown = a.known
	case "meter":
		r := resCurrent(rs, "flow", 0)
		if r == nil {
			res.Missing = append(res.Missing, "flow")
			break
		}
		q, err := r.Flow()
		if err != nil {
			res.Errors = append(res.Errors, resErr("flow", err))
			break
		}
		flow = q
		a := c.accuracy(r.InstrumentID)
		acc.Pct = a.pct
		instKnown = a.known
		if a.dim == DimFlow {
			acc.Abs = measure.VolumeFlow(a.abs).WaterIn(c.u)
		}
	default:
		res.Errors = append(res.Errors, fmt.Sprintf("water flow source %q is not a valve or a meter", wt.FlowSource))
	}

	if flow > 0 {
		f := flow.WaterIn(c.u)
		res.Flow = &f
		tol, err := c.tolerance(f, wt.DesignFlow, c.hydronicBand(), acc)
		if err != nil {
			res.Errors = append(res.Errors, resErr("tolerance", err))
		} else {
			tol.UncertaintyUnknown = !instKnown
			res.Tolerance, res.Status = tol, tol.Status
		}
		if haveTemps {
			wr, err := measure.WaterCapacity(flow, enter, leave, fluid)
			if err != nil {
				res.Errors = append(res.Errors, resErr("water capacity", err))
			} else {
				res.Capacity = &WaterFigures{Process: res.Process, Capacity: wr.Capacity.In(c.u),
					MeanTemp: wr.MeanTemp.In(c.u), Density: wr.Density.In(c.u), SpecificHeat: wr.SpecificHeat.In(c.u)}
				c.airWater(wt, wr.Capacity, &res)
			}
		}
	}
	if len(res.Missing) > 0 {
		res.Status = ResultIncomplete
	}
	return res
}

func (c *resultsCalc) waterPressureIn(p measure.Pressure) float64 {
	if c.u == measure.SI {
		return p.KPa()
	}
	return p.Psi()
}

// airWater compares the linked capacity test's air side with the water side.
func (c *resultsCalc) airWater(wt *WaterTest, water measure.Power, res *WaterTestResult) {
	if wt.CapacityTest == "" {
		return
	}
	air, ok := c.capAir[wt.CapacityTest]
	if !ok {
		res.Notes = append(res.Notes, "the linked capacity test has no computed capacity yet")
		return
	}
	if water <= 0 {
		res.Notes = append(res.Notes, "no water-side capacity (equal temperatures) to compare with the air side")
		return
	}
	diff := (air - float64(water)) / float64(water) * 100
	a := &AirWaterAgreement{CapacityTestID: wt.CapacityTest, AirTotal: measure.Power(air).In(c.u),
		WaterCapacity: water.In(c.u), DifferencePct: diff}
	if math.Abs(diff) > AirWaterAgreementPct {
		a.Note = fmt.Sprintf("air side and water side differ by %s %%, more than the %s %% of common practice: check the readings and the flows",
			c.num(diff, 0), c.num(AirWaterAgreementPct, 0))
	}
	res.AirSide = a
}

// ---- systems ----

func (c *resultsCalc) system(sys *System) SystemResult {
	res := SystemResult{ID: sys.ID, Tag: sys.Tag, Kind: sys.Kind, Name: sys.Name, DesignAirflow: sys.Design.Airflow,
		Flags: c.flags[resKey{SubjectSystem, sys.ID}]}
	c.outletSummary(sys, &res)
	rs := c.subjectReadings(SubjectSystem, sys.ID)

	number := func(q string, point int) (*float64, bool) {
		r := resCurrent(rs, q, point)
		if r == nil {
			return nil, false
		}
		v, err := r.Number()
		if err != nil {
			res.Errors = append(res.Errors, resErr(quantityWords(SubjectSystem, q), err))
			return nil, false
		}
		return &v, true
	}
	res.FanRPM, _ = number("fan_rpm", 0)
	res.MotorRPM, _ = number("motor_rpm", 0)
	res.PowerFactor, _ = number("power_factor", 0)
	volts, vLegs := resLegs("volts", number)
	amps, aLegs := resLegs("amps", number)
	res.Volts, res.Amps = volts, amps
	if len(vLegs) == 3 {
		if v, err := measure.VoltageImbalance(vLegs[0], vLegs[1], vLegs[2]); err != nil {
			res.Errors = append(res.Errors, resErr("voltage imbalance", err))
		} else {
			res.VoltageImbalance = &v
		}
	}
	if len(aLegs) == 3 {
		if v, err := measure.CurrentImbalance(aLegs[0], aLegs[1], aLegs[2]); err != nil {
			res.Errors = append(res.Errors, resErr("current imbalance", err))
		} else {
			res.CurrentImbalance = &v
		}
	}
	if len(amps) > 0 && sys.Design.FLA > 0 {
		maxA := 0.0
		for _, a := range amps {
			maxA = math.Max(maxA, a.Value)
		}
		if v, err := measure.PercentFLA(maxA, sys.Design.FLA); err != nil {
			res.Errors = append(res.Errors, resErr("% FLA", err))
		} else {
			res.PercentFLA = &v
		}
	}
	if res.PowerFactor != nil && len(volts) > 0 && len(amps) > 0 && sys.Design.Phase != 1 {
		p, err := measure.ThreePhasePower(resMean(volts), resMean(amps), *res.PowerFactor)
		if err != nil {
			res.Errors = append(res.Errors, resErr("input power", err))
		} else {
			res.InputPowerKW = resPtr(p.KW())
		}
	}
	for _, q := range []string{"static_supply", "static_return", "static_external", "static_filter", "static_coil"} {
		r := resCurrent(rs, q, 0)
		if r == nil {
			continue
		}
		p, err := r.Pressure()
		if err != nil {
			res.Errors = append(res.Errors, resErr(quantityWords(SubjectSystem, q), err))
			continue
		}
		if res.Statics == nil {
			res.Statics = make(map[string]float64)
		}
		res.Statics[q] = p.DuctIn(c.u)
	}
	var motorSheave measure.Length
	for _, q := range []string{"motor_sheave", "fan_sheave"} {
		r := resCurrent(rs, q, 0)
		if r == nil {
			continue
		}
		l, err := r.Length()
		if err != nil {
			res.Errors = append(res.Errors, resErr(quantityWords(SubjectSystem, q), err))
			continue
		}
		if q == "motor_sheave" {
			motorSheave, res.MotorSheave = l, resPtr(l.DuctSizeIn(c.u))
		} else {
			res.FanSheave = resPtr(l.DuctSizeIn(c.u))
		}
	}

	// Measured airflow: the system's first computed traverse, else its supply
	// outlets, else (an exhaust fan) its exhaust outlets.
	var flow measure.VolumeFlow
	var acc measure.Accuracy
	kind, sum := "supply", c.supply[sys.ID]
	if sum == nil || sum.read == 0 {
		if ex := c.exhaust[sys.ID]; ex != nil && ex.read > 0 {
			kind, sum = "exhaust", ex
		}
	}
	unknown, partial := false, false
	if tf := c.sysTrav[sys.ID]; tf != nil {
		flow, acc.Pct, unknown = tf.flow, tf.accPct, !tf.accKnown
		res.AirflowSource, res.AirflowTraverseID = "traverse", tf.id
	} else if sum != nil && sum.read > 0 {
		flow, acc.Abs, unknown = measure.AirFlowIn(c.u, sum.flow), sum.unc, sum.unknown
		res.AirflowSource = "outlets"
		res.AirflowOutletsRead, res.AirflowOutletsTotal, res.AirflowOutletKind = sum.read, sum.total, kind
		if sum.read < sum.total {
			partial = true
			res.Notes = append(res.Notes, fmt.Sprintf("airflow is the sum of %d of %d %s outlets: a partial sum, "+
				"so it is not judged against the design airflow and the fan laws are not applied to it", sum.read, sum.total, kind))
		}
	}
	if flow > 0 {
		res.Airflow = resPtr(flow.AirIn(c.u))
		if sys.Design.Airflow > 0 && !partial {
			tol, err := c.tolerance(*res.Airflow, sys.Design.Airflow, c.fanBand(), acc)
			if err != nil {
				res.Errors = append(res.Errors, resErr("airflow tolerance", err))
			} else {
				tol.UncertaintyUnknown = unknown
				res.AirflowTolerance = tol
			}
		}
	}
	if flow > 0 && sys.Design.Airflow > 0 && res.FanRPM != nil && !partial {
		c.fanLaw(sys, flow, *res.FanRPM, res.Statics, res.InputPowerKW, motorSheave, &res)
	}
	c.systemChecks(sys, &res)
	return res
}

// legs returns the readings of q on legs 1–3 (or the single reading, leg 0,
// when no leg is read) and their values when all three legs are read.
func resLegs(q string, number func(string, int) (*float64, bool)) ([]LegValue, []float64) {
	var out []LegValue
	for leg := 1; leg <= maxLeg; leg++ {
		if v, ok := number(q, leg); ok {
			out = append(out, LegValue{Leg: leg, Value: *v})
		}
	}
	if len(out) == 0 {
		if v, ok := number(q, 0); ok {
			out = append(out, LegValue{Leg: 0, Value: *v})
		}
	}
	var three []float64
	if len(out) == 3 {
		three = []float64{out[0].Value, out[1].Value, out[2].Value}
	}
	return out, three
}

func resMean(vs []LegValue) float64 {
	s := 0.0
	for _, v := range vs {
		s += v.Value
	}
	return s / float64(len(vs))
}

func (c *resultsCalc) fanLaw(sys *System, flow measure.VolumeFlow, rpm float64, statics map[string]float64,
	kw *float64, motorSheave measure.Length, res *SystemResult) {
	now := measure.FanPoint{Flow: flow, RPM: rpm}
	if sp, ok := statics["static_external"]; ok {
		if sp >= 0 {
			now.StaticPressure = measure.DuctPressureIn(c.u, sp)
		} else {
			res.Errors = append(res.Errors, "external static pressure is negative: left out of the fan-law prediction")
		}
	}
	if kw != nil {
		now.Power = measure.Kilowatts(*kw)
	}
	target := measure.AirFlowIn(c.u, sys.Design.Airflow)
	p, err := measure.FanLawsToFlow(now, target)
	if err != nil {
		res.Errors = append(res.Errors, resErr("fan laws", err))
		return
	}
	if change := (p.RPM/rpm - 1) * 100; math.Abs(change) > FanLawReachPct {
		res.Notes = append(res.Notes, fmt.Sprintf("no fan-law prediction: design airflow needs the fan %s %% %s, beyond the "+
			"±%s %% the fan laws are trusted for here (common practice); check the fan's curve, its maximum safe speed and the motor first",
			c.num(math.Abs(change), 0), map[bool]string{true: "faster", false: "slower"}[change > 0], c.num(FanLawReachPct, 0)))
		return
	}
	fl := &FanLawPrediction{TargetFlow: sys.Design.Airflow, FanRPM: p.RPM,
		Note: "Fan laws on an unchanged system curve; motor input power scales like shaft power only while the motor's efficiency holds. " +
			"Never run the fan past its maximum safe speed (the maker's data). Lock out and tag out the drive before changing a sheave or belt."}
	if now.StaticPressure > 0 {
		fl.StaticPressure = resPtr(p.StaticPressure.DuctIn(c.u))
	}
	if now.Power > 0 {
		fl.InputPowerKW = resPtr(p.Power.KW())
	}
	if motorSheave > 0 {
		l, err := measure.MotorSheaveFor(motorSheave, rpm, p.RPM)
		if err != nil {
			res.Errors = append(res.Errors, resErr("motor sheave", err))
		} else {
			fl.MotorSheave = resPtr(l.DuctSizeIn(c.u))
		}
	}
	res.FanLaw = fl
}

func (c *resultsCalc) outletSummary(sys *System, res *SystemResult) {
	sum := &res.Outlets
	for i := range c.s.Outlets {
		o := &c.s.Outlets[i]
		if o.SystemID != sys.ID {
			continue
		}
		or := &c.r.Outlets[c.outletIdx[o.ID]]
		sum.Total++
		if or.AsFound != nil || or.Final != nil {
			sum.Read++
		}
		switch or.Status {
		case string(measure.StatusWithin):
			sum.Within++
		case string(measure.StatusLow):
			sum.Low++
		case string(measure.StatusHigh):
			sum.High++
		case string(measure.StatusUndetermined):
			sum.Undetermined++
		case ResultError:
			sum.Errors++
		}
		if o.Kind == "supply" {
			sum.SupplyDesign += o.DesignFlow
		}
	}
	if s := c.supply[sys.ID]; s != nil {
		sum.SupplyTotal, sum.SupplyRead, sum.SupplyFlow, sum.SupplyDesignRead = s.total, s.read, s.flow, s.designRead
		if s.designRead > 0 {
			sum.SupplyPercentOfDesignRead = resPtr(s.flow / s.designRead * 100)
		}
	}
	if sys.Design.Airflow > 0 && sum.SupplyRead > 0 {
		sum.SupplyPercentOfDesign = resPtr(sum.SupplyFlow / sys.Design.Airflow * 100)
	}
}

// ---- findings ----

func (c *resultsCalc) findings() {
	r := c.r
	add := func(kind string, subj SubjectRef, text string) {
		r.Findings = append(r.Findings, Finding{Kind: kind, Subject: subj, Text: text})
	}
	flagFindings := func(subj SubjectRef, flags []Flag) {
		for _, f := range flags {
			switch f.Kind {
			case FlagInstrumentOverdue:
				add(FindingInstrumentOverdue, subj, subj.Tag+": "+f.Text)
			case FlagNoInstrument:
				add(FindingNoInstrument, subj, subj.Tag+": "+f.Text)
			}
		}
	}
	for _, s := range r.Systems {
		subj := SubjectRef{SubjectSystem, s.ID, s.Tag}
		if t := s.AirflowTolerance; t != nil && (t.Status == string(measure.StatusLow) || t.Status == string(measure.StatusHigh)) {
			add(FindingAirflowOutOfTolerance, subj, fmt.Sprintf("%s: airflow %s %s (from %s) is %s %% of design %s %s, %s the band %s–%s %s.",
				s.Tag, c.num(*s.Airflow, 0), c.units.AirFlow, s.AirflowSource, c.num(t.PercentOfDesign, 0),
				c.num(s.DesignAirflow, 0), c.units.AirFlow, resSide(t.Status), c.num(t.Low, 0), c.num(t.High, 0), c.units.AirFlow))
		}
		c.systemFindings(&s, add)
		flagFindings(subj, s.Flags)
	}
	for _, o := range r.Outlets {
		subj := SubjectRef{SubjectOutlet, o.ID, o.Tag}
		name := o.Tag
		if o.Room != "" {
			name += " (" + o.Room + ")"
		}
		gov, stage := o.Final, "final"
		if gov == nil {
			gov, stage = o.AsFound, "as found"
		}
		switch {
		case o.Status == ResultNotRead:
			add(FindingOutletNotRead, subj, fmt.Sprintf("%s: not read (design %s %s).", name, c.num(o.DesignFlow, 0), c.units.AirFlow))
		case gov != nil && gov.Tolerance != nil && (o.Status == string(measure.StatusLow) || o.Status == string(measure.StatusHigh)):
			t := gov.Tolerance
			add(FindingOutletOutOfTolerance, subj, fmt.Sprintf("%s: %s %s %s is %s %% of design %s %s, %s the band %s–%s %s.",
				name, stage, c.num(*gov.Flow, 0), c.units.AirFlow, c.num(t.PercentOfDesign, 0), c.num(o.DesignFlow, 0),
				c.units.AirFlow, resSide(t.Status), c.num(t.Low, 0), c.num(t.High, 0), c.units.AirFlow))
		}
		flagFindings(subj, o.Flags)
	}
	for _, t := range r.Traverses {
		subj := SubjectRef{SubjectTraverse, t.ID, t.Tag}
		if tol := t.Tolerance; tol != nil && (tol.Status == string(measure.StatusLow) || tol.Status == string(measure.StatusHigh)) {
			add(FindingAirflowOutOfTolerance, subj, fmt.Sprintf("%s: traverse flow %s %s is %s %% of the system's design, %s the band %s–%s %s.",
				t.Tag, c.num(*t.Flow, 0), c.units.AirFlow, c.num(tol.PercentOfDesign, 0), resSide(tol.Status),
				c.num(tol.Low, 0), c.num(tol.High, 0), c.units.AirFlow))
		}
		c.traverseFindings(&t, add)
		for _, w := range t.Warnings {
			add(FindingTraverseWarning, subj, t.Tag+": "+w)
		}
		flagFindings(subj, t.Flags)
	}
	for _, ct := range r.CapacityTests {
		subj := SubjectRef{SubjectCapacityTest, ct.ID, ct.Tag}
		if ct.Status == ResultShort && ct.PercentOfExpected != nil {
			add(FindingCapacityShort, subj, fmt.Sprintf("%s: delivered %s is %s %% of the expected %s (%s); the usual acceptance is %s %% (common practice; the project specification governs).",
				ct.Tag, c.capWords(ct.Capacity.Total, ct.Mode), c.num(*ct.PercentOfExpected, 0),
				c.capWords(ct.Expected.Total, ct.Mode), ct.Expected.Basis, c.num(CapacityMeetsPct, 0)))
		}
		flagFindings(subj, ct.Flags)
	}
	for _, w := range r.WaterTests {
		subj := SubjectRef{SubjectWaterTest, w.ID, w.Tag}
		if t := w.Tolerance; t != nil && (t.Status == string(measure.StatusLow) || t.Status == string(measure.StatusHigh)) {
			add(FindingWaterFlowOutOfTol, subj, fmt.Sprintf("%s: water flow %s %s is %s %% of design %s %s, %s the band %s–%s %s.",
				w.Tag, c.num(*w.Flow, 1), c.units.WaterFlow, c.num(t.PercentOfDesign, 0), c.num(w.DesignFlow, 1),
				c.units.WaterFlow, resSide(t.Status), c.num(t.Low, 1), c.num(t.High, 1), c.units.WaterFlow))
		}
		if w.AirSide != nil && w.AirSide.Note != "" {
			add(FindingAirWaterMismatch, subj, w.Tag+": "+w.AirSide.Note+".")
		}
		c.waterFindings(&w, add)
		flagFindings(subj, w.Flags)
	}
}

func resSide(status string) string {
	if status == string(measure.StatusLow) {
		return "below"
	}
	return "above"
}
