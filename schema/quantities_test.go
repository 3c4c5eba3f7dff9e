package schema

import (
	"math"
	"testing"
	"time"

	"fieldtab/measure"
)

// unitCase is one value in a unit and what it is in the SI base unit of its
// dimension (m³/s, m/s, Pa, K, m, or the value itself).
type unitCase struct {
	value float64
	si    float64
}

// Expected conversions, worked from the definitions rather than through
// measure: ft = 0.3048 m, in = 0.0254 m, US gallon = 3.785411784 L (exact, NIST
// SP 811 appendix B); psi = 6894.757 Pa (NIST SP 811); bar = 100 kPa (exact);
// water columns of water at 60 °F, 999.01 kg/m³ under g = 9.80665 m/s², the
// density measure documents, so 1 in. w.g. = 248.84 Pa; °F = °C × 1.8 + 32
// and K = °C + 273.15 (exact).
var unitCases = map[string]unitCase{
	UnitCFM:     {400, 400 * 0.3048 * 0.3048 * 0.3048 / 60}, // 400 cfm = 188.78 L/s
	UnitLps:     {100, 0.1},
	UnitM3h:     {1000, 1000.0 / 3600},
	UnitGPM:     {100, 100 * 3.785411784e-3 / 60}, // 6.309 L/s
	UnitFPM:     {800, 800 * 0.3048 / 60},         // 4.064 m/s
	UnitMps:     {5, 5},
	UnitInWG:    {1, 248.84},
	UnitPa:      {250, 250},
	UnitKPa:     {50, 50000},
	UnitPsi:     {10, 68947.57},
	UnitFtWater: {20, 20 * 999.01 * 9.80665 * 0.3048},
	UnitMWater:  {5, 5 * 999.01 * 9.80665},
	UnitBar:     {1, 100000},
	UnitDegF:    {70, (70-32)/1.8 + 273.15}, // 21.11 °C
	UnitDegC:    {21, 294.15},
	UnitPercent: {50, 50},
	UnitRPM:     {1750, 1750},
	UnitVolt:    {460, 460},
	UnitAmp:     {12, 12},
	UnitInch:    {6, 0.1524},
	UnitMm:      {150, 0.15},
	UnitNone:    {0.85, 0.85},
}

// siOf reads r through the accessor of its dimension.
func siOf(r Reading, dim Dimension) (float64, error) {
	switch dim {
	case DimFlow:
		v, err := r.Flow()
		return float64(v), err
	case DimVelocity:
		v, err := r.Velocity()
		return float64(v), err
	case DimPressure:
		v, err := r.Pressure()
		return float64(v), err
	case DimTemperature:
		v, err := r.Temperature()
		return float64(v), err
	case DimLength:
		v, err := r.Length()
		return float64(v), err
	}
	return r.Number()
}

func testReading(kind, quantity, unit string, v float64) Reading {
	point := 0
	if q, ok := LookupQuantity(kind, quantity); ok && q.Points == PointTraverse {
		point = 1
	}
	return Reading{
		ID: "0b6f3c1e-9d2a-4c1b-8f3e-2a1d4c5b6e7f", JobID: "1c2d3e4f-5a6b-4c7d-8e9f-0a1b2c3d4e5f",
		SubjectKind: kind, SubjectID: "2d3e4f5a-6b7c-4d8e-9f0a-1b2c3d4e5f6a",
		Quantity: quantity, Point: point, Value: &v, Unit: unit, Stage: StageFinal,
		Technician: "Dana", TakenAt: testNow.Add(-time.Hour),
	}
}

func TestQuantitiesConvert(t *testing.T) {
	pairs := 0
	for _, q := range Quantities() {
		for _, unit := range q.Units {
			c, ok := unitCases[unit]
			if !ok {
				t.Fatalf("no conversion case for unit %q of %s %s", unit, q.SubjectKind, q.Quantity)
			}
			pairs++
			t.Run("OK/"+q.SubjectKind+"/"+q.Quantity+"/"+unit, func(t *testing.T) {
				r := testReading(q.SubjectKind, q.Quantity, unit, c.value)
				got, err := siOf(r, q.Dimension)
				if err != nil {
					t.Fatalf("convert: %v", err)
				}
				if d := math.Abs(got - c.si); d > 1e-4*math.Abs(c.si)+1e-12 {
					t.Errorf("%g %s = %.9g in SI; want %.9g (±0.01 %%)", c.value, unit, got, c.si)
				}
				if err := r.Validate(testNow); err != nil {
					t.Errorf("validate %g %s: %v", c.value, unit, err)
				}
			})
		}
	}
	if pairs < 60 {
		t.Errorf("only %d quantity/unit pairs; the table lost some", pairs)
	}
}

// TestQuantitiesMeasureTypes checks the accessors against measure's own
// constructors and readers, the figures results will use.
func TestQuantitiesMeasureTypes(t *testing.T) {
	r := testReading(SubjectOutlet, "flow", UnitCFM, 400)
	f, err := r.Flow()
	if err != nil || math.Abs(f.Lps()-188.78) > 0.01 { // 400 × 0.471947 L/s per cfm
		t.Errorf("400 cfm = %v L/s, %v; want 188.78", f.Lps(), err)
	}
	r = testReading(SubjectTraverse, "vp", UnitInWG, 1)
	p, err := r.Pressure()
	if err != nil || math.Abs(p.Pa()-248.84) > 0.005 { // measure: 1 in. w.g. = 248.84 Pa
		t.Errorf("1 in_wg = %v Pa, %v; want 248.84", p.Pa(), err)
	}
	r = testReading(SubjectWaterTest, "dp", UnitPsi, 1)
	p, err = r.Pressure()
	if err != nil || math.Abs(p.FtWater()-2.3090) > 0.0005 { // measure: 1 psi = 2.3090 ft of water
		t.Errorf("1 psi = %v ft, %v; want 2.3090", p.FtWater(), err)
	}
	r = testReading(SubjectCapacityTest, "enter_db", UnitDegF, 80)
	temp, err := r.Temperature()
	if err != nil || math.Abs(temp.C()-26.6667) > 0.0001 {
		t.Errorf("80 °F = %v °C, %v; want 26.6667", temp.C(), err)
	}
	r = testReading(SubjectWaterTest, "flow", UnitGPM, 100)
	f, err = r.Flow()
	if err != nil || math.Abs(f.GPM()-100) > 1e-9 || f != measure.GPM(100) {
		t.Errorf("100 gpm read back as %v gpm, %v", f.GPM(), err)
	}
	r = testReading(SubjectSystem, "fan_sheave", UnitInch, 10)
	l, err := r.Length()
	if err != nil || math.Abs(l.Mm()-254) > 1e-9 {
		t.Errorf("10 in = %v mm, %v; want 254", l.Mm(), err)
	}
	r = testReading(SubjectOutlet, "velocity", UnitFPM, 500)
	v, err := r.Velocity()
	if err != nil || math.Abs(v.MPS()-2.54) > 1e-9 {
		t.Errorf("500 fpm = %v m/s, %v; want 2.54", v.MPS(), err)
	}
}

func TestQuantitiesAccessorErrors(t *testing.T) {
	void := testReading(SubjectOutlet, "flow", UnitCFM, 1)
	void.Value, void.Void = nil, true
	nan := testReading(SubjectOutlet, "flow", UnitCFM, math.NaN())
	cases := []struct {
		name  string
		read  func() error
		field string
	}{
		{"ErrVoid", func() error { _, err := void.Flow(); return err }, "value"},
		{"ErrNaN", func() error { _, err := nan.Flow(); return err }, "value"},
		{"ErrWrongAccessor", func() error {
			_, err := testReading(SubjectOutlet, "flow", UnitCFM, 1).Pressure()
			return err
		}, "quantity"},
		{"ErrNumberOfTyped", func() error {
			_, err := testReading(SubjectOutlet, "flow", UnitCFM, 1).Number()
			return err
		}, "quantity"},
		{"ErrUnknownUnit", func() error {
			_, err := testReading(SubjectOutlet, "flow", "cfh", 1).Flow()
			return err
		}, "unit"},
		{"ErrUnitOfOtherQuantity", func() error {
			_, err := testReading(SubjectOutlet, "flow", UnitGPM, 1).Flow()
			return err
		}, "unit"},
		{"ErrUnknownQuantity", func() error {
			_, err := testReading(SubjectOutlet, "vp", UnitPa, 1).Pressure()
			return err
		}, "quantity"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			err := c.read()
			if ErrorCode(err) != Invalid || ErrorField(err) != c.field {
				t.Errorf("got %v (code %q field %q); want invalid %q", err, ErrorCode(err), ErrorField(err), c.field)
			}
		})
	}
	n, err := testReading(SubjectSystem, "power_factor", UnitNone, 0.9).Number()
	if err != nil || n != 0.9 {
		t.Errorf("power factor read back as %v, %v", n, err)
	}
}

func TestQuantitiesValidate(t *testing.T) {
	cases := []struct {
		name  string
		r     Reading
		field string
	}{
		{"OKOutletFlowLps", testReading(SubjectOutlet, "flow", UnitLps, 25000), ""},
		{"OKZeroFlow", testReading(SubjectOutlet, "flow", UnitCFM, 0), ""},
		{"OKNegativeVP", testReading(SubjectTraverse, "vp", UnitInWG, -0.02), ""},
		{"OKOutdoorColdF", testReading(SubjectCapacityTest, "outdoor_db", UnitDegF, -58), ""},
		{"OKPowerFactor", testReading(SubjectSystem, "power_factor", UnitNone, 1), ""},
		{"ErrUnitCfmOnWater", testReading(SubjectWaterTest, "flow", UnitCFM, 10), "unit"},
		{"ErrUnitGpmOnOutlet", testReading(SubjectOutlet, "flow", UnitGPM, 10), "unit"},
		{"ErrUnitPsiOnDuctStatic", testReading(SubjectSystem, "static_external", UnitPsi, 1), "unit"},
		{"ErrUnitKOnTemp", testReading(SubjectWaterTest, "enter_temp", "K", 280), "unit"},
		{"ErrUnitCaseMatters", testReading(SubjectOutlet, "flow", "CFM", 10), "unit"},
		{"ErrUnitPercentOnPF", testReading(SubjectSystem, "power_factor", UnitPercent, 85), "unit"},
		{"ErrValueOutletFlowTooBig", testReading(SubjectOutlet, "flow", UnitCFM, 60000), "value"},
		{"ErrValueNegativeFlow", testReading(SubjectOutlet, "flow", UnitLps, -1), "value"},
		{"ErrValueVPTooBigInWG", testReading(SubjectTraverse, "vp", UnitInWG, 25), "value"},
		{"ErrValueRHAbove100", testReading(SubjectCapacityTest, "enter_rh", UnitPercent, 101), "value"},
		{"ErrValueDryBulbTypo", testReading(SubjectCapacityTest, "leave_db", UnitDegF, 550), "value"},
		{"ErrValueOutdoorTooHot", testReading(SubjectCapacityTest, "outdoor_db", UnitDegC, 61), "value"},
		{"ErrValueWaterDPTooBig", testReading(SubjectWaterTest, "dp", UnitBar, 30), "value"},
		{"ErrValuePowerFactor", testReading(SubjectSystem, "power_factor", UnitNone, 1.2), "value"},
		{"ErrValueSheaveTiny", testReading(SubjectSystem, "motor_sheave", UnitMm, 2), "value"},
		{"ErrValueInf", testReading(SubjectSystem, "amps", UnitAmp, math.Inf(1)), "value"},
		{"ErrValueNaN", testReading(SubjectSystem, "volts", UnitVolt, math.NaN()), "value"},
		{"ErrQuantityNotOnSubject", testReading(SubjectOutlet, "fan_rpm", UnitRPM, 900), "quantity"},
		{"ErrSubjectKind", testReading("duct", "flow", UnitCFM, 900), "subject_kind"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			err := c.r.Validate(testNow)
			if c.field == "" {
				if err != nil {
					t.Fatalf("unexpected error: %v", err)
				}
				return
			}
			if ErrorCode(err) != Invalid || ErrorField(err) != c.field {
				t.Fatalf("got %v (code %q field %q); want invalid %q", err, ErrorCode(err), ErrorField(err), c.field)
			}
		})
	}
}

// TestQuantitiesRangeMessage checks that a range error states the range in the
// unit the technician typed as well as in SI.
func TestQuantitiesRangeMessage(t *testing.T) {
	r := testReading(SubjectOutlet, "flow", UnitCFM, 60000)
	err := r.Validate(testNow)
	want := "value: 60,000 cfm is outside the accepted range for the outlet airflow read with a flow hood: 0 to 52972 cfm (0 to 25,000 L/s)"
	if err == nil || err.Error() != want {
		t.Errorf("got %v\nwant %s", err, want)
	}
}

func TestQuantitiesTable(t *testing.T) {
	seen := map[[2]string]bool{}
	for _, q := range Quantities() {
		k := [2]string{q.SubjectKind, q.Quantity}
		if seen[k] {
			t.Errorf("%v listed twice", k)
		}
		seen[k] = true
		if err := checkOneOf("subject_kind", q.SubjectKind, SubjectKinds); err != nil {
			t.Errorf("%v: %v", k, err)
		}
		if q.Min >= q.Max || q.Description == "" || len(q.Units) == 0 {
			t.Errorf("%v: bad spec %+v", k, q)
		}
		if u, ok := unitDefs[q.RangeUnit]; !ok || u.dim != q.Dimension {
			t.Errorf("%v: range unit %q is not a %s unit", k, q.RangeUnit, q.Dimension)
		}
		for _, unit := range q.Units {
			if u, ok := unitDefs[unit]; !ok || u.dim != q.Dimension {
				t.Errorf("%v: unit %q is not a %s unit", k, unit, q.Dimension)
			}
		}
	}
	if _, ok := LookupQuantity(SubjectTraverse, "vp"); !ok {
		t.Error("traverse vp not found")
	}
	if _, ok := LookupQuantity(SubjectOutlet, "vp"); ok {
		t.Error("outlet vp found")
	}
}

// Every quantity has an entry unit in both systems that it accepts, and every
// unit a label; SI entry units are SI (water pressure in kPa, the others in
// their base or usual unit).
func TestQuantitiesDefaultUnits(t *testing.T) {
	labels := UnitLabels()
	siUnits := map[string]bool{UnitLps: true, UnitMps: true, UnitPa: true, UnitKPa: true, UnitDegC: true, UnitMm: true,
		UnitPercent: true, UnitRPM: true, UnitVolt: true, UnitAmp: true, UnitNone: true}
	for _, q := range Quantities() {
		for _, u := range []measure.UnitSystem{measure.IP, measure.SI} {
			unit := q.DefaultUnit(u)
			if !hasString(q.Units, unit) {
				t.Errorf("%s %s: entry unit %q not accepted (%v)", q.SubjectKind, q.Quantity, unit, q.Units)
			}
			if u == measure.SI && !siUnits[unit] {
				t.Errorf("%s %s: SI entry unit %q", q.SubjectKind, q.Quantity, unit)
			}
		}
		for _, unit := range q.Units {
			if _, ok := labels[unit]; !ok {
				t.Errorf("unit %q has no label", unit)
			}
		}
	}
	if got := mustQuantity(t, SubjectWaterTest, "dp").DefaultUnit(measure.SI); got != UnitKPa {
		t.Errorf("water dp in SI: %q, want kPa", got)
	}
	if got := mustQuantity(t, SubjectTraverse, "vp").DefaultUnit(measure.SI); got != UnitPa {
		t.Errorf("traverse vp in SI: %q, want Pa", got)
	}
}

func mustQuantity(t *testing.T, kind, quantity string) QuantitySpec {
	t.Helper()
	q, ok := LookupQuantity(kind, quantity)
	if !ok {
		t.Fatalf("no quantity %s %s", kind, quantity)
	}
	return q
}
