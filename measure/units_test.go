package measure

import (
	"math"
	"testing"
)

// Conversion factors from NIST Special Publication 811 (2008), Appendix B.8
// ("factors for units listed alphabetically"), from memory; the exact ones
// (ft, in, lb, ft/min, Btu/(lb·°F)) follow from the definitions of the units.
func TestUnitConversionsNIST(t *testing.T) {
	for _, tc := range []struct {
		name    string
		gotSI   float64
		wantSI  float64
		relTol  float64
		comment string
	}{
		{"ExactFoot", Feet(1).M(), 0.3048, 0, "exact"},
		{"ExactInch", Inches(1).M(), 0.0254, 0, "exact"},
		{"ExactMm", Millimeters(25.4).Inch(), 1, 1e-15, "exact"},
		{"CFM", CFM(1).M3s(), 4.719474e-4, 1e-6, "ft³/min"},
		{"GPM", GPM(1).M3s(), 6.309020e-5, 1e-6, "gal (US)/min"},
		{"LitersPerSecond", LitersPerSecond(1).M3s(), 1e-3, 1e-15, "exact"},
		{"CubicMetersPerHour", CubicMetersPerHour(3600).M3s(), 1, 1e-15, "exact"},
		{"Psi", Psi(1).Pa(), 6.894757e3, 1e-6, "lbf/in²"},
		{"InWG60F", InWG(1).Pa(), 2.4884e2, 1e-4, "inch of water (60 °F)"},
		{"FtWater60F", FtWater(1).Pa(), 12 * 2.4884e2, 1e-4, "12 × inch of water (60 °F)"},
		{"InHg32F", InHg(1).Pa(), 3.38638e3, 1e-5, "inch of mercury (32 °F)"},
		{"BtuPerHour", BtuPerHour(1).W(), 2.930711e-1, 1e-6, "Btu_IT/h"},
		{"Ton", Tons(1).W(), 3.516853e3, 1e-6, "ton of refrigeration (12 000 Btu_IT/h)"},
		{"Horsepower", Horsepower(1).W(), 7.456999e2, 1e-6, "horsepower (550 ft·lbf/s)"},
		{"FPM", FPM(1).MPS(), 5.08e-3, 1e-15, "exact"},
		{"SquareFoot", SquareFeet(1).M2(), 9.290304e-2, 1e-15, "exact"},
		{"SquareInch", SquareInches(1).M2(), 6.4516e-4, 1e-15, "exact"},
		{"LbPerFt3", LbPerFt3(1).KgM3(), 1.601846e1, 1e-6, "lb/ft³"},
		{"LbPerHour", LbPerHour(1).KgS(), 1.259979e-4, 1e-6, "lb/h"},
		{"BtuPerLbF", BtuPerLbF(1).JKgK(), 4.1868e3, 1e-15, "exact by the IT calorie"},
		{"Kilowatts", Kilowatts(1).W(), 1000, 0, "exact"},
		{"Kilopascals", Kilopascals(1).Pa(), 1000, 0, "exact"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			if d := math.Abs(tc.gotSI - tc.wantSI); d > tc.relTol*math.Abs(tc.wantSI) {
				t.Errorf("%s: got %.9g, want %.9g (rel %.2g)", tc.comment, tc.gotSI, tc.wantSI, d/tc.wantSI)
			}
		})
	}
}

// Fixed points of the temperature scales (their definitions) and round trips
// through every unit of every type.
func TestUnitTemperatureScales(t *testing.T) {
	for _, tc := range []struct {
		name       string
		temp       Temperature
		f, c, k, r float64
	}{
		{"IcePoint", DegF(32), 32, 0, 273.15, 491.67},
		{"SteamPoint", DegC(100), 212, 100, 373.15, 671.67},
		{"MinusForty", DegC(-40), -40, -40, 233.15, 419.67},
		{"AbsoluteZero", Rankine(0), -459.67, -273.15, 0, 0},
		{"Kelvin", Kelvin(300), 80.33, 26.85, 300, 540},
	} {
		t.Run(tc.name, func(t *testing.T) {
			for _, got := range []struct {
				unit      string
				got, want float64
			}{{"°F", tc.temp.F(), tc.f}, {"°C", tc.temp.C(), tc.c}, {"K", tc.temp.K(), tc.k}, {"°R", tc.temp.R(), tc.r}} {
				if math.Abs(got.got-got.want) > 1e-9 {
					t.Errorf("%s = %.12g, want %g", got.unit, got.got, got.want)
				}
			}
		})
	}
	if d := DeltaF(18).C(); math.Abs(d-10) > 1e-12 {
		t.Errorf("ΔT 18 °F = %g °C, want 10", d)
	}
	if d := TempDiffIn(IP, 9).In(SI); math.Abs(d-5) > 1e-12 {
		t.Errorf("ΔT 9 °F = %g °C, want 5", d)
	}
}

func TestUnitSystemRoundTrips(t *testing.T) {
	const v = 123.456
	for _, u := range []UnitSystem{IP, SI} {
		for _, tc := range []struct {
			name string
			got  float64
		}{
			{"Temperature", TemperatureIn(u, v).In(u)},
			{"TempDiff", TempDiffIn(u, v).In(u)},
			{"AirFlow", AirFlowIn(u, v).AirIn(u)},
			{"WaterFlow", WaterFlowIn(u, v).WaterIn(u)},
			{"Barometric", BarometricIn(u, v).BarometricIn(u)},
			{"DuctPressure", DuctPressureIn(u, v).DuctIn(u)},
			{"DuctSize", DuctSizeIn(u, v).DuctSizeIn(u)},
			{"Elevation", ElevationIn(u, v).ElevationIn(u)},
			{"Area", AreaIn(u, v).In(u)},
			{"Velocity", VelocityIn(u, v).In(u)},
			{"Density", DensityIn(u, v).In(u)},
			{"MassFlowLbH", LbPerHour(v).LbH()},
			{"PowerBtuH", BtuPerHour(v).BtuH()},
			{"PowerTons", Tons(v).Tons()},
			{"PowerHP", Horsepower(v).HP()},
			{"PressureFtWater", FtWater(v).FtWater()},
			{"PressureMWater", MWater(v).MWater()},
			{"PressureInHg", InHg(v).InHg()},
			{"FlowM3h", CubicMetersPerHour(v).M3h()},
			{"SpecificHeat", BtuPerLbF(v).BtuLbF()},
		} {
			if math.Abs(tc.got-v) > 1e-12*v {
				t.Errorf("%s %s: round trip gives %.15g, want %g", u, tc.name, tc.got, v)
			}
		}
	}
	// 1 psi is 2.31 ft of water at 60 °F (common practice; REFERENCES.md gives 2.3089
	// from the IAPWS density).
	if ft := Psi(1).FtWater(); math.Abs(ft-2.3089) > 0.0005 {
		t.Errorf("1 psi = %.5f ft of water, want 2.3089", ft)
	}
}

func TestParseUnitSystem(t *testing.T) {
	for in, want := range map[string]UnitSystem{"ip": IP, "IP": IP, " si ": SI} {
		if got, err := ParseUnitSystem(in); err != nil || got != want {
			t.Errorf("ParseUnitSystem(%q) = %v, %v; want %v", in, got, err, want)
		}
	}
	if _, err := ParseUnitSystem("metric"); err == nil {
		t.Error(`ParseUnitSystem("metric"): no error`)
	}
	if UnitSystem(0).valid() == nil {
		t.Error("the zero UnitSystem must not be valid")
	}
}

func TestInputErrorText(t *testing.T) {
	for _, tc := range []struct {
		name string
		err  error
		want string
	}{
		{"Range", checkRange("rel_hum", 120, 0, 100, "%"), "rel_hum = 120 % is outside the accepted range 0 to 100 %"},
		{"NaN", checkRange("dry_bulb", math.NaN(), -100, 200, "°F"), "dry_bulb = NaN °F is outside the accepted range -100 to 200 °F"},
		{"Positive", checkPositive("flow", -3, "cfm"), "flow = -3 cfm: must be a finite value above 0 cfm"},
		{"Reason", invalid("dp", 0, "psi", "no pressure drop means no flow"), "dp = 0 psi: no pressure drop means no flow"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			if tc.err == nil || tc.err.Error() != tc.want {
				t.Errorf("got %v, want %q", tc.err, tc.want)
			}
		})
	}
	if checkRange("x", 5, 0, 10, "") != nil {
		t.Error("checkRange(5 in 0..10) returned an error")
	}
	e := &InputError{Input: "x", Min: 0, Max: math.Inf(1), Unit: "cfm"}
	if got := e.RangeText(); got != "at least 0 cfm" {
		t.Errorf("RangeText = %q", got)
	}
}
