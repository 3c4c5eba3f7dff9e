package measure

import (
	"bytes"
	"errors"
	"math"
	"os"
	"path/filepath"
	"sort"
	"strings"
	"testing"
)

// galPerFt3 is US gallons per cubic foot, 1728/231 by definition.
const galPerFt3 = 1728.0 / 231

func wantInputError(t *testing.T, err error, input string) *InputError {
	t.Helper()
	var ie *InputError
	if !errors.As(err, &ie) {
		t.Fatalf("err = %v, want *InputError for %q", err, input)
	}
	if ie.Input != input {
		t.Fatalf("Input = %q, want %q (%v)", ie.Input, input, err)
	}
	return ie
}

// TestWaterFluidPropsReference checks water at 1 atm against the python-iapws
// values in shared/REFERENCES.md, which are rounded to 5 significant digits:
// the tolerance is just over half a unit in the last place.
func TestWaterFluidPropsReference(t *testing.T) {
	cases := []struct {
		name  string
		tF    float64
		rho   float64 // lb/ft³
		cpBtu float64 // Btu/(lb·°F)
	}{
		{"40F", 40, 62.426, 1.0046},
		{"60F", 60, 62.367, 1.0004},
		{"100F", 100, 61.994, 0.9981},
		{"140F", 140, 61.380, 0.9990},
		{"180F", 180, 60.580, 1.0025},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			rho, cp, err := Fluid{Kind: Water}.Props(DegF(c.tF))
			if err != nil {
				t.Fatal(err)
			}
			if d := math.Abs(rho.LbFt3() - c.rho); d > 0.0006 {
				t.Errorf("density = %.5f lb/ft³, want %.3f", rho.LbFt3(), c.rho)
			}
			if d := math.Abs(cp.BtuLbF() - c.cpBtu); d > 0.00006 {
				t.Errorf("cp = %.5f Btu/(lb·°F), want %.4f", cp.BtuLbF(), c.cpBtu)
			}
		})
	}
}

// TestWaterFluidRange: Props accepts 0.5 to 121 °C, evaluating water above
// 100 °C just above saturation, where 1 atm would be steam (the values there are
// checked against python-iapws in TestIF97Fixture).
func TestWaterFluidRange(t *testing.T) {
	for _, tC := range []float64{0.5, 99.9, 100, 100.1, 121} {
		if _, _, err := (Fluid{Kind: Water}).Props(DegC(tC)); err != nil {
			t.Errorf("%g °C: %v", tC, err)
		}
	}
	for _, tC := range []float64{0.49, 121.01, math.Inf(-1)} {
		_, _, err := Fluid{Kind: Water}.Props(DegC(tC))
		ie := wantInputError(t, err, "temperature")
		if ie.Min != 0.5 || ie.Max != 121 || ie.Unit != "°C" {
			t.Errorf("%g °C: range %s", tC, ie.RangeText())
		}
	}
}

// TestWaterCapacityCommonPractice compares the exact method with the trade's
// shortcuts (shared/REFERENCES.md: 500 = 8.33 lb/gal × 60 min/h × 1.0
// Btu/(lb·°F); SI 4.2 kW per L/s·K = 1 kg/L × 4.2 kJ/(kg·K), common
// practice). Chilled water near 50 °F (10 °C) is within 1 % of both because
// there water weighs 8.34 lb/gal with cp 1.002, so ρ·cp is within 0.5 % of what
// the factors assume.
func TestWaterCapacityCommonPractice(t *testing.T) {
	water := Fluid{Kind: Water}
	t.Run("500RuleAt50F", func(t *testing.T) {
		r, err := WaterCapacity(GPM(100), DegF(45), DegF(55), water)
		if err != nil {
			t.Fatal(err)
		}
		shortcut := 500 * 100 * 10.0 // Btu/h
		if e := relErr(r.Capacity.BtuH(), shortcut); e > 0.01 {
			t.Errorf("capacity = %.0f Btu/h, 500·gpm·ΔT = %.0f (off %.2f %%)", r.Capacity.BtuH(), shortcut, 100*e)
		}
		if r.Process != "cooling" {
			t.Errorf("Process = %q, want cooling (water warms across a cooling coil)", r.Process)
		}
		if math.Abs(r.MeanTemp.F()-50) > 1e-9 {
			t.Errorf("MeanTemp = %g °F, want 50", r.MeanTemp.F())
		}
	})
	t.Run("SI4p2At10C", func(t *testing.T) {
		r, err := WaterCapacity(LitersPerSecond(2), DegC(7), DegC(13), water)
		if err != nil {
			t.Fatal(err)
		}
		shortcut := 4.2 * 2 * 6 // kW
		if e := relErr(r.Capacity.KW(), shortcut); e > 0.01 {
			t.Errorf("capacity = %.3f kW, 4.2·L/s·ΔT = %.1f (off %.2f %%)", r.Capacity.KW(), shortcut, 100*e)
		}
	})
}

// TestWaterCapacityFactorByTemperature: the exact factor (Btu/h per gpm·°F)
// is ρ(lb/gal)·60·cp, which with the python-iapws values of
// shared/REFERENCES.md is 503.0 at 40 °F and 487.1 at 180 °F. Hot water at
// 180 °F carries 2.6 % less heat than the 500 rule says, because it is 3 %
// less dense. Tolerance 0.05 %, the rounding of the 5-digit reference values.
func TestWaterCapacityFactorByTemperature(t *testing.T) {
	cases := []struct {
		name          string
		enter, leave  float64 // °F
		rhoRef, cpRef float64 // lb/ft³, Btu/(lb·°F) at the mean (REFERENCES.md)
		process       string
	}{
		{"ChilledWater40F", 35, 45, 62.426, 1.0046, "cooling"},
		{"HotWater180F", 190, 170, 60.580, 1.0025, "heating"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			const gpm = 100.0
			r, err := WaterCapacity(GPM(gpm), DegF(c.enter), DegF(c.leave), Fluid{Kind: Water})
			if err != nil {
				t.Fatal(err)
			}
			factor := r.Capacity.BtuH() / (gpm * math.Abs(c.leave-c.enter))
			want := c.rhoRef / galPerFt3 * 60 * c.cpRef
			if e := relErr(factor, want); e > 5e-4 {
				t.Errorf("factor = %.2f Btu/h per gpm·°F, want %.2f", factor, want)
			}
			if r.Process != c.process {
				t.Errorf("Process = %q, want %q", r.Process, c.process)
			}
			// Mass flow = gpm × lb/gal × 60, the same reference density.
			if e := relErr(r.MassFlow.LbH(), gpm*c.rhoRef/galPerFt3*60); e > 5e-4 {
				t.Errorf("mass flow = %.1f lb/h", r.MassFlow.LbH())
			}
		})
	}
	t.Run("HotWaterIs2p6PercentUnder500", func(t *testing.T) {
		r, err := WaterCapacity(GPM(1), DegF(190), DegF(170), Fluid{Kind: Water})
		if err != nil {
			t.Fatal(err)
		}
		// 487.1/500 = 0.9742 (REFERENCES.md values above).
		if ratio := r.Capacity.BtuH() / (500 * 20); math.Abs(ratio-0.9742) > 0.0005 {
			t.Errorf("exact/500-rule = %.4f, want 0.9742 (2.6 %% lower)", ratio)
		}
	})
}

func TestWaterCapacityCases(t *testing.T) {
	water := Fluid{Kind: Water}
	t.Run("OKEqualTemps", func(t *testing.T) {
		r, err := WaterCapacity(GPM(50), DegF(60), DegF(60), water)
		if err != nil {
			t.Fatal(err)
		}
		if r.Capacity != 0 || r.Process != "heating" || r.MassFlow <= 0 {
			t.Errorf("equal temps: %+v, want zero capacity", r)
		}
	})
	t.Run("OKSymmetric", func(t *testing.T) {
		a, err1 := WaterCapacity(GPM(50), DegF(140), DegF(120), water)
		b, err2 := WaterCapacity(GPM(50), DegF(120), DegF(140), water)
		if err1 != nil || err2 != nil {
			t.Fatal(err1, err2)
		}
		if a.Capacity != b.Capacity || a.Process != "heating" || b.Process != "cooling" {
			t.Errorf("a %+v, b %+v", a, b)
		}
	})
	t.Run("OKGlycolByHand", func(t *testing.T) {
		// 30 % PG from 15 to 25 °C: mean 20 °C, a table row; ρ 1028.35 kg/m³,
		// cp 3848 J/(kg·K) (ASHRAE table cells). 1 L/s × 10 K:
		// 0.001 × 1028.35 × 3848 × 10 = 39570.908 W.
		r, err := WaterCapacity(LitersPerSecond(1), DegC(15), DegC(25), Fluid{Kind: PropyleneGlycol, VolPct: 30})
		if err != nil {
			t.Fatal(err)
		}
		if e := relErr(r.Capacity.W(), 39570.908); e > 1e-9 {
			t.Errorf("capacity = %.3f W, want 39570.908", r.Capacity.W())
		}
	})
	errCases := []struct {
		name         string
		flow         VolumeFlow
		enter, leave Temperature
		f            Fluid
		input        string
	}{
		{"ErrFlowZero", 0, DegF(45), DegF(55), water, "flow"},
		{"ErrFlowNegative", GPM(-10), DegF(45), DegF(55), water, "flow"},
		{"ErrFlowNaN", VolumeFlow(math.NaN()), DegF(45), DegF(55), water, "flow"},
		{"ErrFlowHuge", VolumeFlow(1e300), DegF(45), DegF(55), water, "flow"},
		{"ErrEnterFrozen", GPM(10), DegF(31), DegF(45), water, "entering_temp"},
		{"ErrLeaveSteam", GPM(10), DegF(200), DegF(260), water, "leaving_temp"},
		{"ErrLeaveNaN", GPM(10), DegF(45), Temperature(math.NaN()), water, "leaving_temp"},
		{"ErrGlycolEnterBelowTable", GPM(10), DegC(-12), DegC(0), Fluid{Kind: PropyleneGlycol, VolPct: 30}, "entering_temp"},
		{"ErrGlycolConcentration", GPM(10), DegC(5), DegC(10), Fluid{Kind: EthyleneGlycol, VolPct: 5}, "concentration"},
		{"ErrNoFluid", GPM(10), DegC(5), DegC(10), Fluid{}, "fluid"},
		{"ErrWaterWithConcentration", GPM(10), DegC(5), DegC(10), Fluid{Kind: Water, VolPct: 30}, "concentration"},
	}
	for _, c := range errCases {
		t.Run(c.name, func(t *testing.T) {
			r, err := WaterCapacity(c.flow, c.enter, c.leave, c.f)
			wantInputError(t, err, c.input)
			if r != (WaterResult{}) {
				t.Errorf("result %+v alongside an error", r)
			}
		})
	}
}

func TestWaterParseFluidKind(t *testing.T) {
	for _, c := range []struct {
		in   string
		want FluidKind
	}{{"water", Water}, {"PG", PropyleneGlycol}, {" eg ", EthyleneGlycol}} {
		got, err := ParseFluidKind(c.in)
		if err != nil || got != c.want {
			t.Errorf("ParseFluidKind(%q) = %v, %v; want %v", c.in, got, err, c.want)
		}
		if back, _ := ParseFluidKind(got.String()); back != got {
			t.Errorf("round trip of %v gave %v", got, back)
		}
	}
	for _, bad := range []string{"", "glycol", "brine", "propylene"} {
		if _, err := ParseFluidKind(bad); err == nil {
			t.Errorf("ParseFluidKind(%q) accepted", bad)
		}
	}
}

// Glycol tables: ASHRAE Handbook—Fundamentals, secondary coolants chapter, via
// the SecCool tables in shared/references (shared/REFERENCES.md).

// TestGlycolTablesMatchShared checks that measure/glycol/*.tsv are byte-for-byte
// copies of shared/references/glycol/*.tsv, and that the embedded bytes are the
// files on disk.
func TestGlycolTablesMatchShared(t *testing.T) {
	shared := filepath.Join("..", "..", "shared", "references", "glycol")
	want, err := filepath.Glob(filepath.Join(shared, "*.tsv"))
	if err != nil {
		t.Fatal(err)
	}
	if len(want) == 0 {
		t.Skipf("%s not present", shared)
	}
	have, _ := filepath.Glob(filepath.Join("glycol", "*.tsv"))
	base := func(ps []string) []string {
		var out []string
		for _, p := range ps {
			out = append(out, filepath.Base(p))
		}
		sort.Strings(out)
		return out
	}
	if strings.Join(base(want), " ") != strings.Join(base(have), " ") {
		t.Fatalf("measure/glycol has %v, shared has %v", base(have), base(want))
	}
	for _, p := range want {
		name := filepath.Base(p)
		t.Run(name, func(t *testing.T) {
			ref, err := os.ReadFile(p)
			if err != nil {
				t.Fatal(err)
			}
			local, err := os.ReadFile(filepath.Join("glycol", name))
			if err != nil {
				t.Fatal(err)
			}
			emb, err := glycolFiles.ReadFile("glycol/" + name)
			if err != nil {
				t.Fatal(err)
			}
			if !bytes.Equal(ref, local) || !bytes.Equal(local, emb) {
				t.Errorf("%s differs from %s", filepath.Join("measure", "glycol", name), p)
			}
		})
	}
}

// TestGlycolProps spot-checks table cells and interpolated points by hand
// arithmetic from the table cells (ASHRAE Handbook—Fundamentals, secondary
// coolants chapter, via the SecCool tables in shared/references).
func TestGlycolProps(t *testing.T) {
	pg := func(pct float64) Fluid { return Fluid{Kind: PropyleneGlycol, VolPct: pct} }
	eg := func(pct float64) Fluid { return Fluid{Kind: EthyleneGlycol, VolPct: pct} }
	cases := []struct {
		name    string
		f       Fluid
		tC      float64
		rho, cp float64
	}{
		// Cells read straight from the tables.
		{"CellPG30At20C", pg(30), 20, 1028.35, 3848},
		{"CellEG10At0C", eg(10), 0, 1018.73, 3937},
		{"CellPG30AtMinus10C", pg(30), -10, 1039.42, 3765},
		{"CellEG60AtMinus35C", eg(60), -35, 1104.6, 2844},
		{"CellPG10At100C", pg(10), 100, 965.68, 4203},
		// PG 35 % at 22.5 °C, the midpoint of cells (20, 25 °C) × (30, 40 %):
		// ρ = (1028.35 + 1036.24 + 1026.06 + 1033.70)/4 = 1031.0875;
		// cp = (3848 + 3702 + 3862 + 3718)/4 = 3782.5.
		{"MidpointPG35At22p5C", pg(35), 22.5, 1031.0875, 3782.5},
		// EG 25 % at 12.5 °C: cells (10, 15 °C) × (20, 30 %):
		// ρ = (1032.94 + 1048.76 + 1031.39 + 1047.07)/4 = 1040.04;
		// cp = (3792 + 3617 + 3803 + 3631)/4 = 3710.75.
		{"MidpointEG25At12p5C", eg(25), 12.5, 1040.04, 3710.75},
		// PG 30 % at 21 °C: 1/5 of the way from 20 to 25 °C:
		// ρ = 1028.35 + 0.2·(1026.06 − 1028.35) = 1027.892;
		// cp = 3848 + 0.2·(3862 − 3848) = 3850.8.
		{"LinearPG30At21C", pg(30), 21, 1027.892, 3850.8},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			rho, cp, err := c.f.Props(DegC(c.tC))
			if err != nil {
				t.Fatal(err)
			}
			if relErr(rho.KgM3(), c.rho) > 1e-9 {
				t.Errorf("density = %.6f kg/m³, want %g", rho.KgM3(), c.rho)
			}
			if relErr(cp.JKgK(), c.cp) > 1e-9 {
				t.Errorf("cp = %.6f J/(kg·K), want %g", cp.JKgK(), c.cp)
			}
		})
	}
	t.Run("FromFahrenheit", func(t *testing.T) {
		// 68 °F = 20 °C lands on the table row despite the °F→K→°C round trip.
		rho, _, err := pg(30).Props(DegF(68))
		if err != nil || relErr(rho.KgM3(), 1028.35) > 1e-9 {
			t.Errorf("PG 30 %% at 68 °F: %v, %v", rho, err)
		}
	})
}

// TestGlycolRefusals: never extrapolate; each error names the input and gives
// the range valid for that concentration. Lower limits read from the tables:
// the lowest row where every cell the interpolation uses has data.
func TestGlycolRefusals(t *testing.T) {
	cases := []struct {
		name     string
		f        Fluid
		tC       float64
		input    string
		min, max float64
	}{
		{"ErrConcentrationBelow10", Fluid{PropyleneGlycol, 9.9}, 20, "concentration", 10, 60},
		{"ErrConcentrationAbove60", Fluid{EthyleneGlycol, 60.1}, 20, "concentration", 10, 60},
		{"ErrConcentrationNaN", Fluid{EthyleneGlycol, math.NaN()}, 20, "concentration", 10, 60},
		{"ErrTempAboveTable", Fluid{PropyleneGlycol, 30}, 100.1, "temperature", -10, 100},
		{"ErrTempNaN", Fluid{PropyleneGlycol, 30}, math.NaN(), "temperature", -10, 100},
		// PG 30 %: the -15 °C cell is -1 (frozen), so -12 °C would need it.
		{"ErrPG30BelowMinus10C", Fluid{PropyleneGlycol, 30}, -12, "temperature", -10, 100},
		// PG 10 %: no data at -5 °C.
		{"ErrPG10BelowZero", Fluid{PropyleneGlycol, 10}, -1, "temperature", 0, 100},
		// PG 25 % interpolates 20 % (data from -5 °C) and 30 % (from -10 °C).
		{"ErrPG25BelowMinus5C", Fluid{PropyleneGlycol, 25}, -6, "temperature", -5, 100},
		// EG 45 % interpolates 40 % (from -20 °C) and 50 % (from -35 °C).
		{"ErrEG45BelowMinus20C", Fluid{EthyleneGlycol, 45}, -21, "temperature", -20, 100},
		{"ErrEG60BelowTable", Fluid{EthyleneGlycol, 60}, -36, "temperature", -35, 100},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			rho, cp, err := c.f.Props(DegC(c.tC))
			ie := wantInputError(t, err, c.input)
			if ie.Min != c.min || ie.Max != c.max {
				t.Errorf("range %g to %g, want %g to %g (%v)", ie.Min, ie.Max, c.min, c.max, err)
			}
			if rho != 0 || cp != 0 {
				t.Errorf("values %v, %v alongside an error", rho, cp)
			}
		})
	}
	t.Run("OKAtLowerLimit", func(t *testing.T) {
		for _, f := range []Fluid{{PropyleneGlycol, 25}, {EthyleneGlycol, 45}, {EthyleneGlycol, 59}} {
			lo, hi, err := f.TemperatureRange()
			if err != nil {
				t.Fatal(err)
			}
			for _, tt := range []Temperature{lo, hi} {
				if _, _, err := f.Props(tt); err != nil {
					t.Errorf("%v %g %%: %v", f.Kind, f.VolPct, err)
				}
			}
		}
	})
}

// TestGlycolFreezeRefusal exercises the freezing-point limit with a made-up
// table whose cells all have data, so only the freeze curve can refuse: at
// 15 % the curve gives -3 + 0.5·(-8 + 3) = -5.5 °C. (In the ASHRAE tables the
// -1 cells already stop above the freezing point at every concentration.)
func TestGlycolFreezeRefusal(t *testing.T) {
	grid := glycolGrid{
		temps: []float64{-10, 0, 10},
		concs: []float64{10, 20},
		vals:  [][]float64{{1, 2}, {3, 4}, {5, 6}},
	}
	d := &glycolData{name: "test glycol", density: grid, cp: grid,
		freeze: glycolFreeze{conc: []float64{10, 20}, tf: []float64{-3, -8}}}
	_, _, err := d.props(15, -6)
	ie := wantInputError(t, err, "temperature")
	if ie.Min != -5.5 || !strings.Contains(ie.Reason, "freezing point") {
		t.Errorf("Min %g, Reason %q; want -5.5 and a freezing-point reason", ie.Min, ie.Reason)
	}
	if _, _, err := d.props(15, -5.5); err != nil {
		t.Errorf("at the freezing point: %v", err)
	}
}

func TestWaterTemperatureRange(t *testing.T) {
	lo, hi, err := Fluid{Kind: Water}.TemperatureRange()
	if err != nil || math.Abs(lo.C()-0.5) > 1e-9 || math.Abs(hi.C()-121) > 1e-9 {
		t.Errorf("water range %v..%v °C, %v", lo.C(), hi.C(), err)
	}
	if _, _, err := (Fluid{Kind: 9}).TemperatureRange(); err == nil {
		t.Error("FluidKind 9 accepted")
	}
}

func BenchmarkWaterCapacity(b *testing.B) {
	for _, c := range []struct {
		name string
		f    Fluid
	}{{"Water", Fluid{Kind: Water}}, {"PG30", Fluid{PropyleneGlycol, 30}}} {
		b.Run(c.name, func(b *testing.B) {
			for b.Loop() {
				if _, err := WaterCapacity(GPM(100), DegF(44), DegF(56), c.f); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

func finite(vs ...float64) bool {
	for _, v := range vs {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return false
		}
	}
	return true
}

// FuzzWaterCapacity: any inputs give a finite result or an *InputError, never
// a panic or NaN.
func FuzzWaterCapacity(f *testing.F) {
	f.Add(6.3, 7.0, 13.0, uint8(Water), 0.0)
	f.Add(1.0, 15.0, 25.0, uint8(PropyleneGlycol), 30.0)
	f.Add(1.0, -30.0, -20.0, uint8(EthyleneGlycol), 57.9)
	f.Add(0.0, math.NaN(), math.Inf(1), uint8(0), math.Inf(-1))
	f.Fuzz(func(t *testing.T, lps, enterC, leaveC float64, kind uint8, pct float64) {
		fl := Fluid{Kind: FluidKind(kind), VolPct: pct}
		r, err := WaterCapacity(LitersPerSecond(lps), DegC(enterC), DegC(leaveC), fl)
		if err != nil {
			var ie *InputError
			if !errors.As(err, &ie) {
				t.Fatalf("error %v is not *InputError", err)
			}
			_ = ie.Error()
		} else if !finite(r.Capacity.W(), r.MassFlow.KgS(), r.Density.KgM3(), r.SpecificHeat.JKgK(), r.MeanTemp.K()) ||
			r.Capacity < 0 || r.Density <= 0 || r.SpecificHeat <= 0 {
			t.Fatalf("bad result %+v", r)
		}
		rho, cp, err := fl.Props(DegC(enterC))
		if err != nil {
			var ie *InputError
			if !errors.As(err, &ie) {
				t.Fatalf("Props error %v is not *InputError", err)
			}
		} else if !finite(rho.KgM3(), cp.JKgK()) || rho <= 0 || cp <= 0 {
			t.Fatalf("Props = %v, %v", rho, cp)
		}
	})
}
