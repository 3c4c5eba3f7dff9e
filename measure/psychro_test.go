package measure

import (
	"encoding/json"
	"errors"
	"fmt"
	"math"
	"os"
	"testing"
)

// psychroFixture is testdata/psychrolib_states.json, written by
// testdata/psychrolib/gen.js from the pinned npm package psychrolib 1.1.1
// (PsychroLib 2.5.0). SI pressures are in kPa and SI enthalpies in kJ/kg there.
type psychroFixture struct {
	Source     string               `json:"source"`
	States     []psyFixtureState    `json:"states"`
	Capacities []psyFixtureCapacity `json:"capacities"`
}

type psyFixtureState struct {
	Units      string  `json:"units"`
	Elevation  float64 `json:"elevation"`
	Pressure   float64 `json:"pressure"`
	DryBulb    float64 `json:"dry_bulb"`
	Input      string  `json:"input"`
	Humidity   float64 `json:"humidity"`
	WetBulb    float64 `json:"wet_bulb"`
	DewPoint   float64 `json:"dew_point"`
	RelHum     float64 `json:"rel_hum"`
	HumRatio   float64 `json:"hum_ratio"`
	Enthalpy   float64 `json:"enthalpy"`
	SpecVolume float64 `json:"spec_volume"`
	Density    float64 `json:"density"`
	VapPres    float64 `json:"vap_pres"`
}

type psyFixtureCapacity struct {
	Units        string  `json:"units"`
	Elevation    float64 `json:"elevation"`
	Pressure     float64 `json:"pressure"`
	Flow         float64 `json:"flow"`
	Basis        string  `json:"basis"`
	EnterDryBulb float64 `json:"enter_dry_bulb"`
	EnterWetBulb float64 `json:"enter_wet_bulb"`
	LeaveDryBulb float64 `json:"leave_dry_bulb"`
	LeaveWetBulb float64 `json:"leave_wet_bulb"`
	Process      string  `json:"process"`
	MassFlow     float64 `json:"mass_flow"`
	DeltaH       float64 `json:"delta_h"`
	Total        float64 `json:"total"`
	Sensible     float64 `json:"sensible"`
	Latent       float64 `json:"latent"`
}

func loadPsychroFixture(tb testing.TB) psychroFixture {
	tb.Helper()
	b, err := os.ReadFile("../testdata/psychrolib_states.json")
	if err != nil {
		tb.Fatalf("read fixture: %v", err)
	}
	var f psychroFixture
	if err := json.Unmarshal(b, &f); err != nil {
		tb.Fatalf("parse fixture: %v", err)
	}
	if len(f.States) < 200 || len(f.Capacities) < 5 {
		tb.Fatalf("fixture has %d states and %d capacities; expected a few hundred and several", len(f.States), len(f.Capacities))
	}
	return f
}

func psyMustUnits(tb testing.TB, s string) UnitSystem {
	tb.Helper()
	u, err := ParseUnitSystem(s)
	if err != nil {
		tb.Fatal(err)
	}
	return u
}

func psyRelClose(got, want, rel float64) bool {
	return math.Abs(got-want) <= rel*math.Abs(want)
}

// psyTempTol is the agreement expected on wet bulb and dew point against PsychroLib,
// whose solvers stop at 0.001 °C (0.0018 °F); ours converge to 1e-6 degree.
func psyTempTol(u UnitSystem) float64 {
	if u == SI {
		return 0.003
	}
	return 0.005
}

// Every property of every fixture state against PsychroLib: relative 1e-5, and the
// solved temperatures within tempTol.
func TestPsychroStateMatchesPsychroLib(t *testing.T) {
	f := loadPsychroFixture(t)
	for _, c := range f.States {
		name := fmt.Sprintf("%s_z%g_t%g_%s=%g", c.Units, c.Elevation, c.DryBulb, c.Input, c.Humidity)
		t.Run(name, func(t *testing.T) {
			u := psyMustUnits(t, c.Units)
			kind, err := ParseHumidityKind(c.Input)
			if err != nil {
				t.Fatal(err)
			}
			st, err := AirSpec{DryBulb: c.DryBulb, Kind: kind, Humidity: c.Humidity}.State(u, c.Pressure)
			if err != nil {
				t.Fatalf("State: %v", err)
			}
			tt := psyTempTol(u)
			for _, p := range []struct {
				name      string
				got, want float64
			}{
				{"wet_bulb", st.WetBulb, c.WetBulb},
				{"dew_point", st.DewPoint, c.DewPoint},
			} {
				if math.Abs(p.got-p.want) > tt {
					t.Errorf("%s = %.6f, PsychroLib %.6f (tolerance %g)", p.name, p.got, p.want, tt)
				}
			}
			for _, p := range []struct {
				name      string
				got, want float64
			}{
				{"rel_hum", st.RelHum, c.RelHum},
				{"hum_ratio", st.HumRatio, c.HumRatio},
				{"enthalpy", st.Enthalpy, c.Enthalpy},
				{"spec_volume", st.SpecVolume, c.SpecVolume},
				{"density", st.Density, c.Density},
				{"vap_pres", st.VapPres, c.VapPres},
				{"pressure", st.Pressure, c.Pressure},
			} {
				if !psyRelClose(p.got, p.want, 1e-5) {
					t.Errorf("%s = %.9g, PsychroLib %.9g (relative tolerance 1e-5)", p.name, p.got, p.want)
				}
			}
			if st.Units != u || st.DryBulb != c.DryBulb {
				t.Errorf("Units, DryBulb = %v, %v; want %v, %v", st.Units, st.DryBulb, u, c.DryBulb)
			}
		})
	}
}

// StandardPressure against PsychroLib's GetStandardAtmPressure (same eq. 3).
func TestPsychroStandardPressureMatchesPsychroLib(t *testing.T) {
	f := loadPsychroFixture(t)
	seen := map[string]bool{}
	for _, c := range f.States {
		key := fmt.Sprintf("%s_z%g", c.Units, c.Elevation)
		if seen[key] {
			continue
		}
		seen[key] = true
		t.Run(key, func(t *testing.T) {
			got, err := StandardPressure(psyMustUnits(t, c.Units), c.Elevation)
			if err != nil {
				t.Fatal(err)
			}
			if !psyRelClose(got, c.Pressure, 1e-10) {
				t.Errorf("StandardPressure(%g) = %.12g, PsychroLib %.12g", c.Elevation, got, c.Pressure)
			}
		})
	}
	if len(seen) != 8 {
		t.Errorf("fixture covers %d elevations, want 8", len(seen))
	}
}

// Saturation pressure, ASHRAE Handbook—Fundamentals (2017) ch. 1 Table 3, as
// listed in REFERENCES.md (the values PsychroLib's own tests use); rel 3e-4.
func TestPsychroSatVapPresASHRAETable(t *testing.T) {
	cases := []struct {
		name string
		u    UnitSystem
		t    float64
		want float64 // psia (IP) or kPa (SI)
	}{
		{"IP41FWater", IP, 41, 0.12656},
		{"IP77FWater", IP, 77, 0.45973},
		{"IP122FWater", IP, 122, 1.79140},
		{"IP212FWater", IP, 212, 14.7094},
		{"IP23FIce", IP, 23, 0.058268},
		{"IPMinus4FIce", IP, -4, 0.014974},
		{"SI5CWater", SI, 5, 872.6e-3}, // table: 872.6 Pa
		{"SI25CWater", SI, 25, 3169.7e-3},
		{"SI50CWater", SI, 50, 12351.3e-3},
		{"SI100CWater", SI, 100, 101418.0e-3},
		{"SIMinus5CIce", SI, -5, 401.74e-3},
		{"SIMinus20CIce", SI, -20, 103.24e-3},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			got, err := SatVapPres(c.u, c.t)
			if err != nil {
				t.Fatal(err)
			}
			if !psyRelClose(got, c.want, 3e-4) {
				t.Errorf("SatVapPres(%g) = %.6g, ASHRAE table %.6g", c.t, got, c.want)
			}
		})
	}
}

// At the triple point (32.018 °F, 0.01 °C) the ice equation (ASHRAE 2017 ch. 1
// eq. 5) gives way to the water one (eq. 6); the two meet there to 6e-9 in SI and
// 4e-7 in IP (PsychroLib's formulas: 611.6570244 / 611.6570279 Pa and
// 0.0887132832 / 0.0887133176 psia over ice / water), and
// the triple-point pressure is 611.657 Pa (IAPWS, from memory). The fixture holds
// states either side of the switch.
func TestPsychroSatVapPresTriplePoint(t *testing.T) {
	for _, c := range []struct {
		name   string
		u      UnitSystem
		triple float64
		want   float64
	}{
		{"IP", IP, 32.018, Pascals(611.657).Psi()},
		{"SI", SI, 0.01, 0.611657},
	} {
		t.Run(c.name, func(t *testing.T) {
			at, _ := SatVapPres(c.u, c.triple)
			above, _ := SatVapPres(c.u, math.Nextafter(c.triple, 1000))
			if !psyRelClose(above, at, 1e-6) {
				t.Errorf("pws just above the triple point %.10g vs at it %.10g: not continuous to 1e-6", above, at)
			}
			if !psyRelClose(at, c.want, 1e-5) {
				t.Errorf("pws(triple point) = %.9g, want %.9g", at, c.want)
			}
		})
	}
}

// Saturated moist air at 14.696 psia / 101.325 kPa, ASHRAE 2017 ch. 1 Table 2 via
// REFERENCES.md: Ws rel 0.5 %, hs rel 1 %.
func TestPsychroSaturatedAirASHRAETable(t *testing.T) {
	cases := []struct {
		name   string
		u      UnitSystem
		p, t   float64
		ws, hs float64
	}{
		{"IP41F", IP, 14.696, 41, 0.005425, 15.699},
		{"IP77F", IP, 14.696, 77, 0.020173, 40.576},
		{"SI5C", SI, 101.325, 5, 0.005425, 18.639},
		{"SI25C", SI, 101.325, 25, 0.020173, 76.504},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			st, err := AirSpec{DryBulb: c.t, Kind: RelHum, Humidity: 100}.State(c.u, c.p)
			if err != nil {
				t.Fatal(err)
			}
			if !psyRelClose(st.HumRatio, c.ws, 5e-3) {
				t.Errorf("Ws = %.6g, ASHRAE table %.6g", st.HumRatio, c.ws)
			}
			if !psyRelClose(st.Enthalpy, c.hs, 1e-2) {
				t.Errorf("hs = %.6g, ASHRAE table %.6g", st.Enthalpy, c.hs)
			}
			if math.Abs(st.WetBulb-c.t) > 1e-3 || math.Abs(st.DewPoint-c.t) > 1e-3 {
				t.Errorf("saturated: wet bulb %.5f, dew point %.5f, want both %g", st.WetBulb, st.DewPoint, c.t)
			}
		})
	}
}

// Dry air (W = 0, floored to 1e-7 as in PsychroLib) at 14.696 psia / 101.325 kPa,
// ASHRAE 2017 ch. 1 Table 2 via REFERENCES.md: rel 0.1 %.
func TestPsychroDryAirASHRAETable(t *testing.T) {
	cases := []struct {
		name string
		u    UnitSystem
		p, t float64
		h, v float64
	}{
		{"IP77F", IP, 14.696, 77, 18.498, 13.5251},
		{"SI25C", SI, 101.325, 25, 25.148, 0.8443},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			st, err := AirSpec{DryBulb: c.t, Kind: HumRatio, Humidity: 0}.State(c.u, c.p)
			if err != nil {
				t.Fatal(err)
			}
			if !psyRelClose(st.Enthalpy, c.h, 1e-3) {
				t.Errorf("h = %.6g, ASHRAE table %.6g", st.Enthalpy, c.h)
			}
			if !psyRelClose(st.SpecVolume, c.v, 1e-3) {
				t.Errorf("v = %.6g, ASHRAE table %.6g", st.SpecVolume, c.v)
			}
			if st.HumRatio != minHumRatio {
				t.Errorf("W = %g, want PsychroLib's floor 1e-7", st.HumRatio)
			}
		})
	}
}

// Standard atmosphere, ASHRAE 2017 ch. 1 eq. 3 / Table 1 via REFERENCES.md: rel 0.2 %.
func TestPsychroStandardPressureASHRAE(t *testing.T) {
	cases := []struct {
		name      string
		u         UnitSystem
		elevation float64
		want      float64
	}{
		{"IP0ft", IP, 0, 14.696},
		{"IP10000ft", IP, 10000, 10.108},
		{"SI0m", SI, 0, 101.325},
		{"SI1000m", SI, 1000, 89.875},
		{"SI4000m", SI, 4000, 61.640},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			got, err := StandardPressure(c.u, c.elevation)
			if err != nil {
				t.Fatal(err)
			}
			if !psyRelClose(got, c.want, 2e-3) {
				t.Errorf("StandardPressure(%g) = %.6g, want %.6g", c.elevation, got, c.want)
			}
		})
	}
}

// The solvers converge far tighter than PsychroLib's 0.001 °C: a wet bulb or dew
// point turned into a humidity ratio and solved back returns within 1e-5 degree.
// (A consistency check of the solvers against the forward equations, not an
// outside source; the band within 1 degree of freezing, where the ice- and
// water-film equations can both have a root, is left to the PsychroLib fixture.)
func TestPsychroSolverRoundTrip(t *testing.T) {
	for _, u := range []UnitSystem{IP, SI} {
		k, _ := psyFor(u)
		p := k.p0
		for t0 := k.dbMin; t0 <= k.dbMin+(k.freeze-k.dbMin)*2.2; t0 += (k.freeze - k.dbMin) / 9 {
			for _, frac := range []float64{0.05, 0.3, 0.7, 0.95} {
				td := t0
				t.Run(fmt.Sprintf("%s_t%.2f_f%g", u, td, frac), func(t *testing.T) {
					// Dew point round trip.
					dew := k.tMin + 1 + frac*(td-k.tMin-1)
					st, err := AirSpec{DryBulb: td, Kind: DewPoint, Humidity: dew}.State(u, p)
					if err != nil {
						t.Fatal(err)
					}
					back, err := AirSpec{DryBulb: td, Kind: HumRatio, Humidity: st.HumRatio}.State(u, p)
					if err != nil {
						t.Fatal(err)
					}
					if st.HumRatio > 2*minHumRatio && math.Abs(back.DewPoint-dew) > 1e-5 {
						t.Errorf("dew point %.7f -> W %.6g -> %.7f", dew, st.HumRatio, back.DewPoint)
					}
					// Wet bulb round trip, between the lowest wet bulb and the dry bulb.
					lowest := back.WetBulb
					if dry, err := (AirSpec{DryBulb: td, Kind: HumRatio, Humidity: 0}).State(u, p); err == nil {
						lowest = dry.WetBulb
					}
					wb := lowest + frac*(td-lowest)
					if math.Abs(wb-k.freeze) < 1 {
						return
					}
					st, err = AirSpec{DryBulb: td, Kind: WetBulb, Humidity: wb}.State(u, p)
					if err != nil {
						t.Fatal(err)
					}
					back, err = AirSpec{DryBulb: td, Kind: HumRatio, Humidity: st.HumRatio}.State(u, p)
					if err != nil {
						t.Fatal(err)
					}
					if st.HumRatio > 2*minHumRatio && math.Abs(back.WetBulb-wb) > 1e-5 {
						t.Errorf("wet bulb %.7f -> W %.6g -> %.7f", wb, st.HumRatio, back.WetBulb)
					}
				})
			}
		}
	}
}

func TestPsychroStateErrors(t *testing.T) {
	cases := []struct {
		name  string
		u     UnitSystem
		p     float64
		spec  AirSpec
		input string
	}{
		{"ErrUnitsZero", 0, 14.696, AirSpec{70, RelHum, 50}, "units"},
		{"ErrPressureLow", IP, 4.9, AirSpec{70, RelHum, 50}, "pressure"},
		{"ErrPressureHighSI", SI, 111, AirSpec{20, RelHum, 50}, "pressure"},
		{"ErrPressurePaNotKPa", SI, 101325, AirSpec{20, RelHum, 50}, "pressure"},
		{"ErrPressureNaN", IP, math.NaN(), AirSpec{70, RelHum, 50}, "pressure"},
		{"ErrDryBulbHigh", SI, 101.325, AirSpec{201, RelHum, 50}, "dry_bulb"},
		{"ErrDryBulbLow", IP, 14.696, AirSpec{-100.1, RelHum, 50}, "dry_bulb"},
		{"ErrDryBulbLowSI", SI, 101.325, AirSpec{-73.1, RelHum, 50}, "dry_bulb"},
		{"ErrDryBulbInf", IP, 14.696, AirSpec{math.Inf(1), RelHum, 50}, "dry_bulb"},
		{"ErrDryBulbBoiling", IP, 14.696, AirSpec{215, HumRatio, 0.01}, "dry_bulb"},
		{"ErrRHAbove100", IP, 14.696, AirSpec{70, RelHum, 100.01}, "rel_hum"},
		{"ErrRHNegative", SI, 101.325, AirSpec{20, RelHum, -1}, "rel_hum"},
		{"ErrRHNaN", SI, 101.325, AirSpec{20, RelHum, math.NaN()}, "rel_hum"},
		{"ErrWetBulbAboveDryBulb", IP, 14.696, AirSpec{70, WetBulb, 70.5}, "wet_bulb"},
		{"ErrWetBulbTooLow", IP, 14.696, AirSpec{120, WetBulb, 50}, "wet_bulb"},
		{"ErrWetBulbNaN", SI, 101.325, AirSpec{20, WetBulb, math.NaN()}, "wet_bulb"},
		{"ErrDewPointAboveDryBulb", SI, 101.325, AirSpec{20, DewPoint, 20.1}, "dew_point"},
		{"ErrDewPointLow", IP, 14.696, AirSpec{70, DewPoint, -200}, "dew_point"},
		{"ErrHumRatioNegative", IP, 14.696, AirSpec{70, HumRatio, -0.001}, "hum_ratio"},
		{"ErrHumRatioAboveSaturation", SI, 101.325, AirSpec{20, HumRatio, 0.02}, "hum_ratio"},
		{"ErrKindZero", IP, 14.696, AirSpec{70, 0, 50}, "humidity_kind"},
		{"ErrKindUnknown", IP, 14.696, AirSpec{70, 9, 50}, "humidity_kind"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			st, err := c.spec.State(c.u, c.p)
			var ie *InputError
			if !errors.As(err, &ie) {
				t.Fatalf("State = %+v, %v; want *InputError", st, err)
			}
			if ie.Input != c.input {
				t.Errorf("Input = %q, want %q (%v)", ie.Input, c.input, err)
			}
			if err.Error() == "" {
				t.Error("empty message")
			}
			if st != (AirState{}) {
				t.Errorf("state %+v returned with error", st)
			}
		})
	}
}

// The boiling point reported for a dry bulb that is too hot is where pws = p:
// 212 °F at 14.696 psia (ASHRAE 2017 ch. 1 Table 3 gives 14.7094 psia at 212 °F).
func TestPsychroStateErrBoilingPointRange(t *testing.T) {
	_, err := AirSpec{DryBulb: 215, Kind: RelHum, Humidity: 10}.State(IP, 14.696)
	var ie *InputError
	if !errors.As(err, &ie) {
		t.Fatalf("err = %v", err)
	}
	if math.Abs(ie.Max-212) > 0.1 {
		t.Errorf("Max = %g °F, want the boiling point near 212 °F", ie.Max)
	}
}

// The lowest wet bulb reported for an impossible one is where W reaches
// PsychroLib's 1e-7 floor: a spec there is accepted and is bone dry.
func TestPsychroStateErrWetBulbTooLowRange(t *testing.T) {
	_, err := AirSpec{DryBulb: 120, Kind: WetBulb, Humidity: 50}.State(IP, 14.696)
	var ie *InputError
	if !errors.As(err, &ie) {
		t.Fatalf("err = %v", err)
	}
	st, err := AirSpec{DryBulb: 120, Kind: WetBulb, Humidity: ie.Min + 1e-4}.State(IP, 14.696)
	if err != nil {
		t.Fatalf("at the reported lowest wet bulb %g: %v", ie.Min, err)
	}
	if st.HumRatio > 1e-5 {
		t.Errorf("W at the lowest wet bulb = %g, want about 0", st.HumRatio)
	}
}

func TestPsychroSatVapPresErrors(t *testing.T) {
	for _, c := range []struct {
		name string
		u    UnitSystem
		t    float64
	}{
		{"ErrIPHigh", IP, 392.1},
		{"ErrSILow", SI, -100.1},
		{"ErrNaN", SI, math.NaN()},
	} {
		t.Run(c.name, func(t *testing.T) {
			_, err := SatVapPres(c.u, c.t)
			var ie *InputError
			if !errors.As(err, &ie) || ie.Input != "temperature" {
				t.Errorf("err = %v, want *InputError for temperature", err)
			}
		})
	}
	t.Run("ErrUnits", func(t *testing.T) {
		_, err := SatVapPres(0, 20)
		var ie *InputError
		if !errors.As(err, &ie) || ie.Input != "units" {
			t.Errorf("err = %v, want *InputError for units", err)
		}
	})
}

func TestPsychroStandardPressureErrors(t *testing.T) {
	for _, c := range []struct {
		name string
		u    UnitSystem
		z    float64
	}{
		{"ErrIPHigh", IP, 25001},
		{"ErrSILow", SI, -501},
		{"ErrInf", IP, math.Inf(-1)},
	} {
		t.Run(c.name, func(t *testing.T) {
			_, err := StandardPressure(c.u, c.z)
			var ie *InputError
			if !errors.As(err, &ie) || ie.Input != "elevation" {
				t.Errorf("err = %v, want *InputError for elevation", err)
			}
		})
	}
	// The accepted elevations give pressures State accepts.
	for _, u := range []UnitSystem{IP, SI} {
		k, _ := psyFor(u)
		for _, z := range []float64{k.zMin, k.zMax} {
			p, err := StandardPressure(u, z)
			if err != nil {
				t.Fatal(err)
			}
			if _, err := (AirSpec{DryBulb: 20, Kind: RelHum, Humidity: 50}).State(u, p); err != nil {
				t.Errorf("%s at %g: %v", u, z, err)
			}
		}
	}
}

func TestPsychroParseHumidityKind(t *testing.T) {
	for _, k := range []HumidityKind{RelHum, WetBulb, DewPoint, HumRatio} {
		got, err := ParseHumidityKind(" " + k.String() + " ")
		if err != nil || got != k {
			t.Errorf("ParseHumidityKind(%q) = %v, %v", k.String(), got, err)
		}
	}
	if _, err := ParseHumidityKind("rh"); err == nil {
		t.Error(`ParseHumidityKind("rh") accepted`)
	}
}
