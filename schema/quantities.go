package schema

import (
	"math"
	"strings"

	"fieldtab/measure"
)

// What may be read on each subject, in the trade's terms, with the units a
// reading may be entered in and a plausible range that catches typing slips
// (a value ten times too big, the wrong unit picked). The ranges are wide on
// purpose: they are checked in SI after conversion, and measure still checks
// the ranges of its own methods when results are computed.

// Subject kinds: what a reading is taken on.
const (
	SubjectOutlet       = "outlet"
	SubjectTraverse     = "traverse"
	SubjectCapacityTest = "capacity_test"
	SubjectWaterTest    = "water_test"
	SubjectSystem       = "system"
)

// SubjectKinds are the accepted values of Reading.SubjectKind.
var SubjectKinds = []string{SubjectOutlet, SubjectTraverse, SubjectCapacityTest, SubjectWaterTest, SubjectSystem}

// Units, as a reading carries them in Reading.Unit. Water-column units are of
// water at 60 °F under standard gravity, as in measure (1 in. w.g. = 248.84 Pa).
const (
	UnitCFM     = "cfm"   // ft³/min
	UnitLps     = "L/s"   // litres per second
	UnitM3h     = "m3/h"  // m³/h
	UnitGPM     = "gpm"   // US gallons per minute
	UnitFPM     = "fpm"   // ft/min
	UnitMps     = "m/s"   // metres per second
	UnitInWG    = "in_wg" // inches of water (in. w.g.)
	UnitPa      = "Pa"    // pascals
	UnitKPa     = "kPa"   // kilopascals
	UnitPsi     = "psi"   // lbf/in² (differential)
	UnitFtWater = "ft"    // feet of water (head)
	UnitMWater  = "m"     // metres of water (head)
	UnitBar     = "bar"   // 100 kPa
	UnitDegF    = "F"     // °F
	UnitDegC    = "C"     // °C
	UnitPercent = "%"     // percent (relative humidity)
	UnitRPM     = "rpm"   // revolutions per minute
	UnitVolt    = "V"     // volts
	UnitAmp     = "A"     // amperes
	UnitInch    = "in"    // inches (sheave pitch diameter)
	UnitMm      = "mm"    // millimetres
	UnitNone    = ""      // dimensionless (power factor)
)

// Dimension is the physical kind of a quantity. It says which Reading
// accessor reads the value and which measure type it becomes.
type Dimension string

// The dimensions, with the accessor for each and the unit its range is given in.
const (
	DimFlow        Dimension = "flow"        // Reading.Flow → measure.VolumeFlow; range in L/s
	DimVelocity    Dimension = "velocity"    // Reading.Velocity → measure.Velocity; range in m/s
	DimPressure    Dimension = "pressure"    // Reading.Pressure → measure.Pressure; range in Pa (kPa for water)
	DimTemperature Dimension = "temperature" // Reading.Temperature → measure.Temperature; range in °C
	DimLength      Dimension = "length"      // Reading.Length → measure.Length; range in mm
	DimPercent     Dimension = "percent"     // Reading.Number, percent 0–100
	DimSpeed       Dimension = "speed"       // Reading.Number, rpm
	DimVoltage     Dimension = "voltage"     // Reading.Number, V
	DimCurrent     Dimension = "current"     // Reading.Number, A
	DimRatio       Dimension = "ratio"       // Reading.Number, dimensionless
)

// PointRule says what Reading.Point may be for a quantity.
type PointRule uint8

// The point rules.
const (
	PointNone     PointRule = iota // point must be 0
	PointTraverse                  // 1 to the traverse layout's point count, in measure.TraverseLayout.Points order
	PointLeg                       // 0 for a single reading, or the leg 1 to 3
)

// maxLeg is the highest motor leg (three-phase).
const maxLeg = 3

// QuantitySpec describes one quantity that may be read on one kind of subject.
type QuantitySpec struct {
	SubjectKind string
	Quantity    string
	Description string
	Dimension   Dimension
	Units       []string // accepted units, the usual IP one first
	// Min and Max bound a plausible value, in RangeUnit, checked after
	// converting the entered value; they catch slips, not physics.
	Min, Max  float64
	RangeUnit string
	Points    PointRule
}

// unitDef converts a unit to the SI base unit of its dimension's measure type
// (m³/s, m/s, Pa, K, m, or the value itself), using measure's constructors so
// the factors are measure's.
type unitDef struct {
	dim    Dimension
	toSI   func(float64) float64
	fromSI func(float64) float64
}

func identityConv(v float64) float64 { return v }

var unitDefs = map[string]unitDef{
	UnitCFM:     {DimFlow, func(v float64) float64 { return float64(measure.CFM(v)) }, func(v float64) float64 { return measure.VolumeFlow(v).CFM() }},
	UnitLps:     {DimFlow, func(v float64) float64 { return float64(measure.LitersPerSecond(v)) }, func(v float64) float64 { return measure.VolumeFlow(v).Lps() }},
	UnitM3h:     {DimFlow, func(v float64) float64 { return float64(measure.CubicMetersPerHour(v)) }, func(v float64) float64 { return measure.VolumeFlow(v).M3h() }},
	UnitGPM:     {DimFlow, func(v float64) float64 { return float64(measure.GPM(v)) }, func(v float64) float64 { return measure.VolumeFlow(v).GPM() }},
	UnitFPM:     {DimVelocity, func(v float64) float64 { return float64(measure.FPM(v)) }, func(v float64) float64 { return measure.Velocity(v).FPM() }},
	UnitMps:     {DimVelocity, func(v float64) float64 { return float64(measure.MetersPerSecond(v)) }, func(v float64) float64 { return measure.Velocity(v).MPS() }},
	UnitInWG:    {DimPressure, func(v float64) float64 { return float64(measure.InWG(v)) }, func(v float64) float64 { return measure.Pressure(v).InWG() }},
	UnitPa:      {DimPressure, func(v float64) float64 { return float64(measure.Pascals(v)) }, func(v float64) float64 { return measure.Pressure(v).Pa() }},
	UnitKPa:     {DimPressure, func(v float64) float64 { return float64(measure.Kilopascals(v)) }, func(v float64) float64 { return measure.Pressure(v).KPa() }},
	UnitPsi:     {DimPressure, func(v float64) float64 { return float64(measure.Psi(v)) }, func(v float64) float64 { return measure.Pressure(v).Psi() }},
	UnitFtWater: {DimPressure, func(v float64) float64 { return float64(measure.FtWater(v)) }, func(v float64) float64 { return measure.Pressure(v).FtWater() }},
	UnitMWater:  {DimPressure, func(v float64) float64 { return float64(measure.MWater(v)) }, func(v float64) float64 { return measure.Pressure(v).MWater() }},
	UnitBar:     {DimPressure, func(v float64) float64 { return float64(measure.Kilopascals(v * 100)) }, func(v float64) float64 { return measure.Pressure(v).KPa() / 100 }},
	UnitDegF:    {DimTemperature, func(v float64) float64 { return float64(measure.DegF(v)) }, func(v float64) float64 { return measure.Temperature(v).F() }},
	UnitDegC:    {DimTemperature, func(v float64) float64 { return float64(measure.DegC(v)) }, func(v float64) float64 { return measure.Temperature(v).C() }},
	UnitInch:    {DimLength, func(v float64) float64 { return float64(measure.Inches(v)) }, func(v float64) float64 { return measure.Length(v).Inch() }},
	UnitMm:      {DimLength, func(v float64) float64 { return float64(measure.Millimeters(v)) }, func(v float64) float64 { return measure.Length(v).Mm() }},
	UnitPercent: {DimPercent, identityConv, identityConv},
	UnitRPM:     {DimSpeed, identityConv, identityConv},
	UnitVolt:    {DimVoltage, identityConv, identityConv},
	UnitAmp:     {DimCurrent, identityConv, identityConv},
	UnitNone:    {DimRatio, identityConv, identityConv},
}

// rangeUnits are the units ranges are written in, one per dimension; water
// pressures are the exception (kPa, set in the table).
var rangeUnits = map[Dimension]string{
	DimFlow: UnitLps, DimVelocity: UnitMps, DimPressure: UnitPa, DimTemperature: UnitDegC, DimLength: UnitMm,
	DimPercent: UnitPercent, DimSpeed: UnitRPM, DimVoltage: UnitVolt, DimCurrent: UnitAmp, DimRatio: UnitNone,
}

// Unit sets.
var (
	airFlowUnits     = []string{UnitCFM, UnitLps, UnitM3h}
	waterFlowUnits   = []string{UnitGPM, UnitLps, UnitM3h}
	velocityUnits    = []string{UnitFPM, UnitMps}
	ductPressUnits   = []string{UnitInWG, UnitPa}
	waterPressUnits  = []string{UnitPsi, UnitFtWater, UnitKPa, UnitMWater, UnitBar}
	tempUnits        = []string{UnitDegF, UnitDegC}
	percentUnits     = []string{UnitPercent}
	sheaveUnits      = []string{UnitInch, UnitMm}
	rpmUnits         = []string{UnitRPM}
	dimensionlessSet = []string{UnitNone}
)

// Plausible ranges (fieldtab's own typo catchers, not from a standard):
//   - outlet flow 0–25 000 L/s (about 53 000 cfm, the design-flow limit of
//     Outlet.Validate); outlet velocity 0–50 m/s (about 9 800 fpm);
//   - traverse velocity pressure −500 to 5 000 Pa (a pitot can read negative in
//     turbulent spots; 5 000 Pa is measure's limit); traverse velocity −50 to
//     150 m/s; duct and unit static pressures ±5 000 Pa (about ±20 in. w.g.);
//   - air dry bulb, wet bulb and dew point −40 to 150 °C (kitchen and dryer
//     exhaust included); outdoor dry bulb −50 to 60 °C; relative humidity 0–100 %;
//   - a direct capacity-test airflow 0–250 000 L/s (about 530 000 cfm, the
//     system design-airflow limit);
//   - water ΔP −500 to 2 500 kPa (about 360 psi; negative when the hoses are
//     swapped); water flow 0–6 300 L/s (about 100 000 gpm, the design limit); water temperatures
//     −10 to 150 °C (glycol below freezing, hot water up to high-temperature
//     systems);
//   - fan and motor speed 0–20 000 rpm, volts 0–15 000 V and amps 0–5 000 A
//     (the limits of the system's nameplate data); sheave pitch diameters
//     10–2 000 mm (0.4–79 in); power factor 0–1.
var quantityTable = []QuantitySpec{
	{SubjectKind: SubjectOutlet, Quantity: "flow", Description: "outlet airflow read with a flow hood", Dimension: DimFlow, Units: airFlowUnits, Min: 0, Max: 25000},
	{SubjectKind: SubjectOutlet, Quantity: "velocity", Description: "outlet velocity, multiplied by the outlet's Ak", Dimension: DimVelocity, Units: velocityUnits, Min: 0, Max: 50},

	{SubjectKind: SubjectTraverse, Quantity: "vp", Description: "velocity pressure at a traverse point", Dimension: DimPressure, Units: ductPressUnits, Min: -500, Max: 5000, Points: PointTraverse},
	{SubjectKind: SubjectTraverse, Quantity: "velocity", Description: "velocity at a traverse point", Dimension: DimVelocity, Units: velocityUnits, Min: -50, Max: 150, Points: PointTraverse},
	{SubjectKind: SubjectTraverse, Quantity: "air_db", Description: "dry bulb of the air in the duct", Dimension: DimTemperature, Units: tempUnits, Min: -40, Max: 150},
	{SubjectKind: SubjectTraverse, Quantity: "air_rh", Description: "relative humidity of the air in the duct", Dimension: DimPercent, Units: percentUnits, Min: 0, Max: 100},
	{SubjectKind: SubjectTraverse, Quantity: "air_wb", Description: "wet bulb of the air in the duct", Dimension: DimTemperature, Units: tempUnits, Min: -40, Max: 150},
	{SubjectKind: SubjectTraverse, Quantity: "static", Description: "static pressure at the traverse plane", Dimension: DimPressure, Units: ductPressUnits, Min: -5000, Max: 5000},

	{SubjectKind: SubjectCapacityTest, Quantity: "flow", Description: "direct airflow reading", Dimension: DimFlow, Units: airFlowUnits, Min: 0, Max: 250000},
	{SubjectKind: SubjectCapacityTest, Quantity: "enter_db", Description: "entering-air dry bulb", Dimension: DimTemperature, Units: tempUnits, Min: -40, Max: 150},
	{SubjectKind: SubjectCapacityTest, Quantity: "enter_wb", Description: "entering-air wet bulb", Dimension: DimTemperature, Units: tempUnits, Min: -40, Max: 150},
	{SubjectKind: SubjectCapacityTest, Quantity: "enter_rh", Description: "entering-air relative humidity", Dimension: DimPercent, Units: percentUnits, Min: 0, Max: 100},
	{SubjectKind: SubjectCapacityTest, Quantity: "enter_dp", Description: "entering-air dew point", Dimension: DimTemperature, Units: tempUnits, Min: -40, Max: 150},
	{SubjectKind: SubjectCapacityTest, Quantity: "leave_db", Description: "leaving-air dry bulb", Dimension: DimTemperature, Units: tempUnits, Min: -40, Max: 150},
	{SubjectKind: SubjectCapacityTest, Quantity: "leave_wb", Description: "leaving-air wet bulb", Dimension: DimTemperature, Units: tempUnits, Min: -40, Max: 150},
	{SubjectKind: SubjectCapacityTest, Quantity: "leave_rh", Description: "leaving-air relative humidity", Dimension: DimPercent, Units: percentUnits, Min: 0, Max: 100},
	{SubjectKind: SubjectCapacityTest, Quantity: "leave_dp", Description: "leaving-air dew point", Dimension: DimTemperature, Units: tempUnits, Min: -40, Max: 150},
	{SubjectKind: SubjectCapacityTest, Quantity: "outdoor_db", Description: "outdoor dry bulb", Dimension: DimTemperature, Units: tempUnits, Min: -50, Max: 60},

	{SubjectKind: SubjectWaterTest, Quantity: "dp", Description: "differential pressure across the valve or coil", Dimension: DimPressure, Units: waterPressUnits, Min: -500, Max: 2500, RangeUnit: UnitKPa},
	{SubjectKind: SubjectWaterTest, Quantity: "flow", Description: "water flow read on a meter", Dimension: DimFlow, Units: waterFlowUnits, Min: 0, Max: 6300},
	{SubjectKind: SubjectWaterTest, Quantity: "enter_temp", Description: "entering water temperature", Dimension: DimTemperature, Units: tempUnits, Min: -10, Max: 150},
	{SubjectKind: SubjectWaterTest, Quantity: "leave_temp", Description: "leaving water temperature", Dimension: DimTemperature, Units: tempUnits, Min: -10, Max: 150},

	{SubjectKind: SubjectSystem, Quantity: "fan_rpm", Description: "fan speed", Dimension: DimSpeed, Units: rpmUnits, Min: 0, Max: 20000},
	{SubjectKind: SubjectSystem, Quantity: "motor_rpm", Description: "motor speed", Dimension: DimSpeed, Units: rpmUnits, Min: 0, Max: 20000},
	{SubjectKind: SubjectSystem, Quantity: "volts", Description: "motor voltage, per leg or single", Dimension: DimVoltage, Units: []string{UnitVolt}, Min: 0, Max: 15000, Points: PointLeg},
	{SubjectKind: SubjectSystem, Quantity: "amps", Description: "motor current, per leg or single", Dimension: DimCurrent, Units: []string{UnitAmp}, Min: 0, Max: 5000, Points: PointLeg},
	{SubjectKind: SubjectSystem, Quantity: "static_supply", Description: "supply static pressure", Dimension: DimPressure, Units: ductPressUnits, Min: -5000, Max: 5000},
	{SubjectKind: SubjectSystem, Quantity: "static_return", Description: "return static pressure", Dimension: DimPressure, Units: ductPressUnits, Min: -5000, Max: 5000},
	{SubjectKind: SubjectSystem, Quantity: "static_external", Description: "external static pressure", Dimension: DimPressure, Units: ductPressUnits, Min: -5000, Max: 5000},
	{SubjectKind: SubjectSystem, Quantity: "static_filter", Description: "pressure drop across the filters", Dimension: DimPressure, Units: ductPressUnits, Min: -5000, Max: 5000},
	{SubjectKind: SubjectSystem, Quantity: "static_coil", Description: "pressure drop across the coil", Dimension: DimPressure, Units: ductPressUnits, Min: -5000, Max: 5000},
	{SubjectKind: SubjectSystem, Quantity: "motor_sheave", Description: "motor sheave pitch diameter", Dimension: DimLength, Units: sheaveUnits, Min: 10, Max: 2000},
	{SubjectKind: SubjectSystem, Quantity: "fan_sheave", Description: "fan sheave pitch diameter", Dimension: DimLength, Units: sheaveUnits, Min: 10, Max: 2000},
	{SubjectKind: SubjectSystem, Quantity: "power_factor", Description: "motor power factor", Dimension: DimRatio, Units: dimensionlessSet, Min: 0, Max: 1},
}

var quantityIndex = func() map[[2]string]QuantitySpec {
	m := make(map[[2]string]QuantitySpec, len(quantityTable))
	for i := range quantityTable {
		q := &quantityTable[i]
		if q.RangeUnit == "" {
			q.RangeUnit = rangeUnits[q.Dimension]
		}
		m[[2]string{q.SubjectKind, q.Quantity}] = *q
	}
	return m
}()

// Quantities returns every quantity that may be read, grouped by subject kind
// in the order of SubjectKinds. The slice is a copy.
func Quantities() []QuantitySpec {
	out := make([]QuantitySpec, len(quantityTable))
	for i, q := range quantityTable {
		q.Units = append([]string(nil), q.Units...)
		out[i] = q
	}
	return out
}

// LookupQuantity returns the spec of quantity on subjectKind, and false when
// that quantity may not be read on that kind of subject.
func LookupQuantity(subjectKind, quantity string) (QuantitySpec, bool) {
	q, ok := quantityIndex[[2]string{subjectKind, quantity}]
	if ok {
		q.Units = append([]string(nil), q.Units...)
	}
	return q, ok
}

// quantityNames lists the quantities of a subject kind, for error messages.
func quantityNames(subjectKind string) []string {
	var names []string
	for _, q := range quantityTable {
		if q.SubjectKind == subjectKind {
			names = append(names, q.Quantity)
		}
	}
	return names
}

// spec returns the quantity spec and unit of r without copying, or an Invalid
// error naming "subject_kind", "quantity" or "unit".
func (r *Reading) spec() (*QuantitySpec, unitDef, error) {
	if err := checkOneOf("subject_kind", r.SubjectKind, SubjectKinds); err != nil {
		return nil, unitDef{}, err
	}
	q, ok := quantityIndex[[2]string{r.SubjectKind, r.Quantity}]
	if !ok {
		return nil, unitDef{}, Errorf(Invalid, "quantity", "%q is not read on a %s; accepted quantities are %s",
			r.Quantity, words(r.SubjectKind), wordList(quantityNames(r.SubjectKind)))
	}
	u, ok := unitDefs[r.Unit]
	if !ok || u.dim != q.Dimension || !hasString(q.Units, r.Unit) {
		return nil, unitDef{}, Errorf(Invalid, "unit", "%q is not a unit of the %s; accepted units are %s",
			r.Unit, q.Description, qtyUnitList(q.Units))
	}
	return &q, u, nil
}

func hasString(list []string, s string) bool {
	for _, x := range list {
		if x == s {
			return true
		}
	}
	return false
}

func qtyUnitList(us []string) string {
	out := make([]string, len(us))
	for i, u := range us {
		if u == UnitNone {
			u = `"" (none)`
		}
		out[i] = u
	}
	return strings.Join(out, ", ")
}

// checkValue converts v from unit u and checks it against q's range, saying
// the range both in the entered unit and in the range unit.
func checkValue(q *QuantitySpec, unit string, u unitDef, v float64) error {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return Errorf(Invalid, "value", "must be a finite number")
	}
	ru := unitDefs[q.RangeUnit]
	inRange := ru.fromSI(u.toSI(v))
	if inRange >= q.Min && inRange <= q.Max && !math.IsNaN(inRange) {
		return nil
	}
	msg := "%s %s is outside the accepted range for the %s: %s to %s%s"
	args := []any{fmtValue(v), unit, q.Description, fmtValue(u.fromSI(ru.toSI(q.Min))), fmtValue(u.fromSI(ru.toSI(q.Max))), qtySuffix(unit)}
	if unit != q.RangeUnit {
		msg += " (%s to %s%s)"
		args = append(args, fmtValue(q.Min), fmtValue(q.Max), qtySuffix(q.RangeUnit))
	}
	return Errorf(Invalid, "value", msg, args...)
}

func qtySuffix(unit string) string {
	if unit == UnitNone {
		return ""
	}
	return " " + unit
}

// siValue returns r's value in the SI base unit of dim, or an Invalid error:
// "value" for a void or a non-finite value, "quantity" or "unit" when the
// reading is not of dim. It does not check the plausible range, so a reading
// stored under wider ranges still reads back.
func (r Reading) siValue(dim Dimension) (float64, error) {
	q, u, err := r.spec()
	if err != nil {
		return 0, err
	}
	if q.Dimension != dim {
		return 0, Errorf(Invalid, "quantity", "the %s is a %s, not a %s", q.Description, q.Dimension, dim)
	}
	if r.Value == nil {
		return 0, Errorf(Invalid, "value", "the reading has no value (a void)")
	}
	v := *r.Value
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return 0, Errorf(Invalid, "value", "must be a finite number")
	}
	return u.toSI(v), nil
}

// Flow returns a flow reading (outlet, capacity-test or water-test "flow") as
// a measure.VolumeFlow, converted from its unit with measure's factors.
// Errors are *Error with Code Invalid (see siValue): "value" for a void,
// "quantity" when the reading is not a flow, "unit" for an unknown unit. The
// plausible range is not checked here.
func (r Reading) Flow() (measure.VolumeFlow, error) {
	v, err := r.siValue(DimFlow)
	return measure.VolumeFlow(v), err
}

// Velocity returns a velocity reading as a measure.Velocity. Errors as Flow.
func (r Reading) Velocity() (measure.Velocity, error) {
	v, err := r.siValue(DimVelocity)
	return measure.Velocity(v), err
}

// Pressure returns a pressure reading (velocity pressure, static pressure,
// water ΔP) as a measure.Pressure. Errors as Flow.
func (r Reading) Pressure() (measure.Pressure, error) {
	v, err := r.siValue(DimPressure)
	return measure.Pressure(v), err
}

// Temperature returns a temperature reading (dry bulb, wet bulb, dew point,
// water temperature) as a measure.Temperature. Errors as Flow.
func (r Reading) Temperature() (measure.Temperature, error) {
	v, err := r.siValue(DimTemperature)
	return measure.Temperature(v), err
}

// Length returns a length reading (sheave pitch diameter) as a measure.Length.
// Errors as Flow.
func (r Reading) Length() (measure.Length, error) {
	v, err := r.siValue(DimLength)
	return measure.Length(v), err
}

// Number returns a reading that has no measure type, in its only unit:
// relative humidity in percent 0–100, speed in rpm, volts, amps, or a power
// factor. Errors as Flow ("quantity" when the reading has a measure type).
func (r Reading) Number() (float64, error) {
	q, _, err := r.spec()
	if err != nil {
		return 0, err
	}
	switch q.Dimension {
	case DimPercent, DimSpeed, DimVoltage, DimCurrent, DimRatio:
		return r.siValue(q.Dimension)
	}
	return 0, Errorf(Invalid, "quantity", "the %s is a %s; read it with its typed accessor", q.Description, q.Dimension)
}

// DefaultUnit is the unit a reading of q is entered in on a job in unit system
// u: the usual IP unit (first in Units), or the SI unit of its dimension.
func (q QuantitySpec) DefaultUnit(u measure.UnitSystem) string {
	if u != measure.SI {
		return q.Units[0]
	}
	si := map[Dimension]string{DimFlow: UnitLps, DimVelocity: UnitMps, DimPressure: UnitPa, DimTemperature: UnitDegC, DimLength: UnitMm}
	if q.Dimension == DimPressure && q.RangeUnit == UnitKPa {
		return UnitKPa // water-side pressures
	}
	if unit, ok := si[q.Dimension]; ok && hasString(q.Units, unit) {
		return unit
	}
	return q.Units[0]
}

// UnitLabels maps each reading unit code to the name shown to people.
func UnitLabels() map[string]string {
	return map[string]string{
		UnitCFM: "cfm", UnitLps: "L/s", UnitM3h: "m³/h", UnitGPM: "gpm", UnitFPM: "fpm", UnitMps: "m/s",
		UnitInWG: "in. w.g.", UnitPa: "Pa", UnitKPa: "kPa", UnitPsi: "psi", UnitFtWater: "ft w.c.", UnitMWater: "m w.c.",
		UnitBar: "bar", UnitDegF: "°F", UnitDegC: "°C", UnitPercent: "%", UnitRPM: "rpm", UnitVolt: "V", UnitAmp: "A",
		UnitInch: "in", UnitMm: "mm", UnitNone: "",
	}
}

// quantityWords is a quantity as a message says it: its description, or its
// name in words when the pair is unknown.
func quantityWords(subjectKind, quantity string) string {
	if q, ok := quantityIndex[[2]string{subjectKind, quantity}]; ok {
		return q.Description
	}
	return words(quantity)
}
