package measure

import (
	"encoding/binary"
	"errors"
	"math"
	"strconv"
	"strings"
	"testing"
)

// traverseInputError asserts err is an *InputError naming input.
func traverseInputError(t *testing.T, err error, input string) *InputError {
	t.Helper()
	var ie *InputError
	if !errors.As(err, &ie) {
		t.Fatalf("error %v (%T) is not an *InputError", err, err)
	}
	if ie.Input != input {
		t.Fatalf("InputError.Input = %q, want %q (%v)", ie.Input, input, err)
	}
	return ie
}

func traverseRelErr(got, want float64) float64 { return math.Abs(got-want) / math.Abs(want) }

func TestTraverseParse(t *testing.T) {
	for _, tc := range []struct {
		in   string
		want DuctShape
	}{{"rect", Rectangular}, {" ROUND ", Round}} {
		t.Run("Shape_"+strings.TrimSpace(tc.in), func(t *testing.T) {
			got, err := ParseDuctShape(tc.in)
			if err != nil || got != tc.want {
				t.Fatalf("ParseDuctShape(%q) = %v, %v; want %v", tc.in, got, err, tc.want)
			}
			if back, _ := ParseDuctShape(got.String()); back != got {
				t.Errorf("String %q does not parse back", got.String())
			}
		})
	}
	for _, tc := range []struct {
		in   string
		want TraverseMethod
	}{{"log-tchebycheff", LogTchebycheff}, {"Log-Linear", LogLinear}, {"equal-area", EqualArea}} {
		t.Run("Method_"+tc.in, func(t *testing.T) {
			got, err := ParseTraverseMethod(tc.in)
			if err != nil || got != tc.want {
				t.Fatalf("ParseTraverseMethod(%q) = %v, %v; want %v", tc.in, got, err, tc.want)
			}
			if got.String() != strings.ToLower(tc.in) {
				t.Errorf("String() = %q, want %q", got.String(), strings.ToLower(tc.in))
			}
		})
	}
	t.Run("ErrShape", func(t *testing.T) {
		if _, err := ParseDuctShape("oval"); err == nil || !strings.Contains(err.Error(), "rect and round") {
			t.Errorf("ParseDuctShape(oval) error = %v, want the accepted values", err)
		}
	})
	t.Run("ErrMethod", func(t *testing.T) {
		if _, err := ParseTraverseMethod("tchebycheff"); err == nil || !strings.Contains(err.Error(), "equal-area") {
			t.Errorf("ParseTraverseMethod error = %v, want the accepted values", err)
		}
	})
}

// TestTraverseEqualAreaRoundEPA checks every point, the mirrored half included,
// against US EPA Method 1 (40 CFR 60 App. A-1) Table 1-2, percent of diameter
// from the inside wall, as copied in REFERENCES.md. The table is rounded to
// 0.1 %, so the tolerance is 0.05 % of the diameter.
func TestTraverseEqualAreaRoundEPA(t *testing.T) {
	firstHalf := map[int][]float64{ // EPA Method 1 Table 1-2
		2:  {14.6},
		4:  {6.7, 25.0},
		6:  {4.4, 14.6, 29.6},
		8:  {3.2, 10.5, 19.4, 32.3},
		10: {2.6, 8.2, 14.6, 22.6, 34.2},
		12: {2.1, 6.7, 11.8, 17.7, 25.0, 35.6},
	}
	for _, n := range []int{2, 4, 6, 8, 10, 12} {
		t.Run(strconv.Itoa(n)+"Points", func(t *testing.T) {
			want := append([]float64(nil), firstHalf[n]...)
			for i := len(firstHalf[n]) - 1; i >= 0; i-- {
				want = append(want, 100-firstHalf[n][i]) // the table's second half mirrors the first
			}
			l := TraverseLayout{Shape: Round, Method: EqualArea, Diameter: Inches(36), PointsPerDiameter: n, Diameters: 2}
			pts, err := l.Points()
			if err != nil {
				t.Fatal(err)
			}
			if len(pts) != 2*n {
				t.Fatalf("got %d points, want %d", len(pts), 2*n)
			}
			for i, p := range pts {
				wantDia, k := 1+i/n, i%n
				if p.Diameter != wantDia || p.Point != k+1 {
					t.Errorf("point %d is diameter %d point %d, want diameter %d point %d", i, p.Diameter, p.Point, wantDia, k+1)
				}
				pct := 100 * p.Depth.M() / l.Diameter.M()
				if math.Abs(pct-want[k]) > 0.05+1e-9 {
					t.Errorf("%s at %.3f %% of diameter, EPA Table 1-2 gives %.1f %%", p.Label(), pct, want[k])
				}
			}
		})
	}
}

// TestTraverseRectLogTchebycheff checks positions against the ISO 3966 / ASHRAE
// Standard 111 log-Tchebycheff table (secondary copies, REFERENCES.md), fraction
// of the side, to the table's 0.0005 rounding.
func TestTraverseRectLogTchebycheff(t *testing.T) {
	table := map[int][]float64{ // ISO 3966 / ASHRAE Std 111
		5: {0.074, 0.288, 0.500, 0.712, 0.926},
		6: {0.061, 0.235, 0.437, 0.563, 0.765, 0.939},
		7: {0.053, 0.203, 0.366, 0.500, 0.634, 0.797, 0.947},
	}
	for _, tc := range []struct{ nw, nh int }{{5, 5}, {6, 6}, {7, 7}, {7, 5}, {5, 6}} {
		t.Run(strconv.Itoa(tc.nw)+"x"+strconv.Itoa(tc.nh), func(t *testing.T) {
			l := TraverseLayout{Shape: Rectangular, Method: LogTchebycheff, Width: Inches(48), Height: Inches(20),
				PointsW: tc.nw, PointsH: tc.nh}
			pts, err := l.Points()
			if err != nil {
				t.Fatal(err)
			}
			if len(pts) != tc.nw*tc.nh {
				t.Fatalf("got %d points, want %d", len(pts), tc.nw*tc.nh)
			}
			for i, p := range pts {
				line, k := i/tc.nw, i%tc.nw // row by row along the height, across the width
				if p.Line != line+1 || p.Point != k+1 {
					t.Errorf("point %d labelled %s, want line %d point %d", i, p.Label(), line+1, k+1)
				}
				if fx := p.X.M() / l.Width.M(); math.Abs(fx-table[tc.nw][k]) > 0.0005 {
					t.Errorf("%s X = %.4f of width, table %.3f", p.Label(), fx, table[tc.nw][k])
				}
				if fy := p.Y.M() / l.Height.M(); math.Abs(fy-table[tc.nh][line]) > 0.0005 {
					t.Errorf("%s Y = %.4f of height, table %.3f", p.Label(), fy, table[tc.nh][line])
				}
			}
		})
	}
	t.Run("Inches", func(t *testing.T) {
		// 0.074 × 24 in = 1.776 in (table value × side, hand arithmetic).
		l := TraverseLayout{Shape: Rectangular, Method: LogTchebycheff, Width: Inches(24), Height: Inches(24), PointsW: 5, PointsH: 5}
		pts, _ := l.Points()
		if got := pts[0].X.Inch(); math.Abs(got-1.776) > 1e-9 {
			t.Errorf("first point %.4f in from the corner, want 1.776 in", got)
		}
	})
}

// TestTraverseRectEqualArea checks the centres of equal sub-rectangles,
// (i − 0.5)/n of the side (geometry): a 24 in side in 4 parts puts points at 3,
// 9, 15 and 21 in.
func TestTraverseRectEqualArea(t *testing.T) {
	l := TraverseLayout{Shape: Rectangular, Method: EqualArea, Width: Inches(24), Height: Inches(10), PointsW: 4, PointsH: 2}
	pts, err := l.Points()
	if err != nil {
		t.Fatal(err)
	}
	wantX := []float64{3, 9, 15, 21}
	wantY := []float64{2.5, 7.5}
	for i, p := range pts {
		if x, y := p.X.Inch(), p.Y.Inch(); math.Abs(x-wantX[i%4]) > 1e-9 || math.Abs(y-wantY[i/4]) > 1e-9 {
			t.Errorf("%s at (%.4f, %.4f) in, want (%g, %g)", p.Label(), x, y, wantX[i%4], wantY[i/4])
		}
	}
}

// TestTraverseRoundISO5802 checks the round log-Tchebycheff and log-linear sets
// against ISO 5802:2001 Tables 2–3 (secondary copy, REFERENCES.md), fraction of
// the diameter from the wall, to the table's 0.0005 rounding.
func TestTraverseRoundISO5802(t *testing.T) {
	for _, tc := range []struct {
		name   string
		method TraverseMethod
		want   []float64
	}{
		{"LogTchebycheff6", LogTchebycheff, []float64{0.032, 0.137, 0.312, 0.688, 0.863, 0.968}},
		{"LogTchebycheff8", LogTchebycheff, []float64{0.024, 0.100, 0.194, 0.334, 0.666, 0.806, 0.900, 0.976}},
		{"LogLinear6", LogLinear, []float64{0.032, 0.135, 0.321, 0.679, 0.865, 0.968}},
		{"LogLinear8", LogLinear, []float64{0.021, 0.117, 0.184, 0.345, 0.655, 0.816, 0.883, 0.979}},
	} {
		t.Run(tc.name, func(t *testing.T) {
			n := len(tc.want)
			l := TraverseLayout{Shape: Round, Method: tc.method, Diameter: Millimeters(800), PointsPerDiameter: n, Diameters: 2}
			pts, err := l.Points()
			if err != nil {
				t.Fatal(err)
			}
			if len(pts) != 2*n {
				t.Fatalf("got %d points, want %d", len(pts), 2*n)
			}
			for i, p := range pts {
				if p.Diameter != 1+i/n || p.Point != 1+i%n || p.X != 0 || p.Y != 0 {
					t.Errorf("point %d = %+v, want diameter %d point %d", i, p, 1+i/n, 1+i%n)
				}
				if f := p.Depth.M() / l.Diameter.M(); math.Abs(f-tc.want[i%n]) > 0.0005 {
					t.Errorf("%s at %.4f of diameter, ISO 5802 gives %.3f", p.Label(), f, tc.want[i%n])
				}
			}
		})
	}
}

func TestTraverseLayoutErrors(t *testing.T) {
	rect := TraverseLayout{Shape: Rectangular, Method: LogTchebycheff, Width: Inches(24), Height: Inches(24), PointsW: 5, PointsH: 5}
	round := TraverseLayout{Shape: Round, Method: EqualArea, Diameter: Inches(24), PointsPerDiameter: 10, Diameters: 2}
	mod := func(l TraverseLayout, f func(*TraverseLayout)) TraverseLayout { f(&l); return l }
	for _, tc := range []struct {
		name   string
		l      TraverseLayout
		input  string
		reason string
	}{
		{"ErrShapeZero", mod(rect, func(l *TraverseLayout) { l.Shape = 0 }), "shape", "rect or round"},
		{"ErrMethodZero", mod(rect, func(l *TraverseLayout) { l.Method = 0 }), "method", "equal-area"},
		{"ErrRoundMethodZero", mod(round, func(l *TraverseLayout) { l.Method = 9 }), "method", ""},
		{"ErrRectLogLinear", mod(rect, func(l *TraverseLayout) { l.Method = LogLinear }), "method", "round ducts only"},
		{"ErrRectLogTcheb4", mod(rect, func(l *TraverseLayout) { l.PointsW = 4 }), "points_w", "5, 6 or 7"},
		{"ErrRectLogTcheb8H", mod(rect, func(l *TraverseLayout) { l.PointsH = 8 }), "points_h", "5, 6 or 7"},
		{"ErrRectEqualArea0", mod(rect, func(l *TraverseLayout) { l.Method = EqualArea; l.PointsH = 0 }), "points_h", ""},
		{"ErrRectEqualArea31", mod(rect, func(l *TraverseLayout) { l.Method = EqualArea; l.PointsW = 31 }), "points_w", ""},
		{"ErrWidthZero", mod(rect, func(l *TraverseLayout) { l.Width = 0 }), "width", ""},
		{"ErrHeightNaN", mod(rect, func(l *TraverseLayout) { l.Height = Length(math.NaN()) }), "height", ""},
		{"ErrWidthInf", mod(rect, func(l *TraverseLayout) { l.Width = Length(math.Inf(1)) }), "width", ""},
		{"ErrDiameterNegative", mod(round, func(l *TraverseLayout) { l.Diameter = Inches(-12) }), "diameter", ""},
		{"ErrEqualAreaOdd", mod(round, func(l *TraverseLayout) { l.PointsPerDiameter = 7 }), "points_per_diameter", "even"},
		{"ErrEqualArea26", mod(round, func(l *TraverseLayout) { l.PointsPerDiameter = 26 }), "points_per_diameter", "2 to 24"},
		{"ErrLogTcheb10", mod(round, func(l *TraverseLayout) { l.Method = LogTchebycheff }), "points_per_diameter", "6 or 8"},
		{"ErrLogLinear10", mod(round, func(l *TraverseLayout) { l.Method = LogLinear }), "points_per_diameter", "6 or 8"},
		{"ErrDiameters0", mod(round, func(l *TraverseLayout) { l.Diameters = 0 }), "diameters", ""},
		{"ErrDiameters5", mod(round, func(l *TraverseLayout) { l.Diameters = 5 }), "diameters", ""},
	} {
		t.Run(tc.name, func(t *testing.T) {
			_, err := tc.l.Points()
			ie := traverseInputError(t, err, tc.input)
			if !strings.Contains(ie.Error(), tc.reason) {
				t.Errorf("error %q does not mention %q", ie.Error(), tc.reason)
			}
			if w := tc.l.Warnings(); w != nil {
				t.Errorf("Warnings() on a rejected layout = %q, want nil", w)
			}
		})
	}
	t.Run("ErrWidthRangeText", func(t *testing.T) {
		_, err := mod(rect, func(l *TraverseLayout) { l.Width = Millimeters(10) }).Points()
		if ie := traverseInputError(t, err, "width"); ie.RangeText() != "25 to 10000 mm" {
			t.Errorf("range %q, want 25 to 10000 mm", ie.RangeText())
		}
	})
}

func TestTraverseArea(t *testing.T) {
	for _, tc := range []struct {
		name string
		l    TraverseLayout
		want float64 // in the unit read back by get
		get  func(Area) float64
	}{
		// Geometry: 24 in × 12 in = 288 in² = 2 ft².
		{"Rect24x12in", TraverseLayout{Shape: Rectangular, Width: Inches(24), Height: Inches(12)}, 2, Area.Ft2},
		// Geometry: π(1 ft)²/4 = 0.785398 ft².
		{"Round12in", TraverseLayout{Shape: Round, Diameter: Inches(12)}, math.Pi / 4, Area.Ft2},
		// Geometry: π(1 m)²/4 = 0.785398 m².
		{"Round1000mm", TraverseLayout{Shape: Round, Diameter: Millimeters(1000)}, 0.785398, Area.M2},
		// Geometry: 0.5 m × 0.4 m = 0.2 m².
		{"Rect500x400mm", TraverseLayout{Shape: Rectangular, Width: Millimeters(500), Height: Millimeters(400)}, 0.2, Area.M2},
	} {
		t.Run(tc.name, func(t *testing.T) {
			a, err := tc.l.Area()
			if err != nil {
				t.Fatal(err)
			}
			if got := tc.get(a); traverseRelErr(got, tc.want) > 1e-6 {
				t.Errorf("area = %.7g, want %.7g", got, tc.want)
			}
		})
	}
	t.Run("ErrShape", func(t *testing.T) {
		_, err := TraverseLayout{Width: Inches(10), Height: Inches(10)}.Area()
		traverseInputError(t, err, "shape")
	})
	t.Run("ErrDiameter", func(t *testing.T) {
		_, err := TraverseLayout{Shape: Round}.Area()
		traverseInputError(t, err, "diameter")
	})
}

func TestTraversePitotVelocity(t *testing.T) {
	t.Run("StandardAir1InWG", func(t *testing.T) {
		// Common practice: 4005·√VP fpm at 0.075 lb/ft³; agree within 0.1 %.
		v, err := PitotVelocity(InWG(1), LbPerFt3(0.075))
		if err != nil {
			t.Fatal(err)
		}
		if traverseRelErr(v.FPM(), 4005) > 0.001 {
			t.Errorf("V = %.2f fpm, want 4005 fpm ± 0.1 %%", v.FPM())
		}
	})
	for _, tc := range []struct {
		name      string
		vpIn, rho float64 // in. w.g., lb/ft³
	}{
		{"VP0.05Rho0.075", 0.05, 0.075},
		{"VP0.5Rho0.065", 0.5, 0.065},
		{"VP1.5Rho0.080", 1.5, 0.080},
		{"VP3.0Rho0.060", 3.0, 0.060},
	} {
		t.Run(tc.name, func(t *testing.T) {
			v, err := PitotVelocity(InWG(tc.vpIn), LbPerFt3(tc.rho))
			if err != nil {
				t.Fatal(err)
			}
			// REFERENCES.md: V = 1096.2·√(VP/ρ) fpm; the constant differs by the water
			// temperature the gauge refers to, so agree within 0.1 %.
			if want := 1096.2 * math.Sqrt(tc.vpIn/tc.rho); traverseRelErr(v.FPM(), want) > 0.001 {
				t.Errorf("V = %.2f fpm, 1096.2·√(VP/ρ) = %.2f", v.FPM(), want)
			}
			// REFERENCES.md: 1097.2 for a gauge referred to 60 °F water, the water
			// column this package uses; agree within 0.01 %.
			if want := 1097.2 * math.Sqrt(tc.vpIn/tc.rho); traverseRelErr(v.FPM(), want) > 1e-4 {
				t.Errorf("V = %.2f fpm, 1097.2·√(VP/ρ) = %.2f", v.FPM(), want)
			}
			// Common practice: 4005·√VP assumes standard air, so scale by √(0.075/ρ).
			if want := 4005 * math.Sqrt(tc.vpIn) * math.Sqrt(0.075/tc.rho); traverseRelErr(v.FPM(), want) > 0.001 {
				t.Errorf("V = %.2f fpm, 4005·√VP·√(0.075/ρ) = %.2f", v.FPM(), want)
			}
		})
	}
	t.Run("SI", func(t *testing.T) {
		// V = √(2·60 Pa / 1.2 kg/m³) = √100 = 10 m/s (hand arithmetic).
		v, err := PitotVelocity(Pascals(60), KgPerM3(1.2))
		if err != nil || math.Abs(v.MPS()-10) > 1e-12 {
			t.Errorf("V = %v m/s, %v; want 10 m/s", v.MPS(), err)
		}
	})
	t.Run("Zero", func(t *testing.T) {
		if v, err := PitotVelocity(0, KgPerM3(1.2)); err != nil || v != 0 {
			t.Errorf("V(0) = %v, %v; want 0", v, err)
		}
	})
	for _, tc := range []struct {
		name  string
		vp    Pressure
		rho   Density
		input string
	}{
		{"ErrNegativeVP", Pascals(-1), KgPerM3(1.2), "velocity_pressure"},
		{"ErrNaNVP", Pressure(math.NaN()), KgPerM3(1.2), "velocity_pressure"},
		{"ErrHugeVP", Pascals(6000), KgPerM3(1.2), "velocity_pressure"},
		{"ErrDensityLow", Pascals(60), KgPerM3(0.3), "density"},
		{"ErrDensityHigh", Pascals(60), KgPerM3(1.6), "density"},
		{"ErrDensityInf", Pascals(60), Density(math.Inf(1)), "density"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			_, err := PitotVelocity(tc.vp, tc.rho)
			traverseInputError(t, err, tc.input)
		})
	}
}

func TestTraverseRecommendedRectPoints(t *testing.T) {
	// Common practice (REFERENCES.md): under 30 in → 5, 30–36 in → 6, over 36 in → 7.
	for _, tc := range []struct {
		name string
		side Length
		want int
	}{
		{"12in", Inches(12), 5},
		{"29.9in", Inches(29.9), 5},
		{"30in", Inches(30), 6},
		{"36in", Inches(36), 6},
		{"36.1in", Inches(36.1), 7},
		{"2000mm", Millimeters(2000), 7},
		{"Zero", 0, 0},
		{"Negative", Inches(-40), 0},
		{"NaN", Length(math.NaN()), 0},
		{"Inf", Length(math.Inf(1)), 0},
	} {
		t.Run(tc.name, func(t *testing.T) {
			if got := RecommendedRectPoints(tc.side); got != tc.want {
				t.Errorf("RecommendedRectPoints(%v m) = %d, want %d", tc.side.M(), got, tc.want)
			}
		})
	}
}

func TestTraverseLayoutWarnings(t *testing.T) {
	for _, tc := range []struct {
		name string
		l    TraverseLayout
		want []string // substrings, one per expected warning
	}{
		{"OK24x24", TraverseLayout{Shape: Rectangular, Method: LogTchebycheff, Width: Inches(24), Height: Inches(24), PointsW: 5, PointsH: 5}, nil},
		{"OK48x33", TraverseLayout{Shape: Rectangular, Method: LogTchebycheff, Width: Inches(48), Height: Inches(33), PointsW: 7, PointsH: 6}, nil},
		{"WideDuct", TraverseLayout{Shape: Rectangular, Method: LogTchebycheff, Width: Inches(40), Height: Inches(20), PointsW: 5, PointsH: 5},
			[]string{"width of 40 in (1016 mm) calls for at least 7 points"}},
		{"TallDuct", TraverseLayout{Shape: Rectangular, Method: EqualArea, Width: Inches(20), Height: Inches(32), PointsW: 5, PointsH: 5},
			[]string{"height of 32 in (813 mm) calls for at least 6 points"}},
		{"FewPoints", TraverseLayout{Shape: Rectangular, Method: EqualArea, Width: Inches(20), Height: Inches(10), PointsW: 6, PointsH: 4},
			[]string{"height of 10 in", "this layout has 24 points; a rectangular traverse should have at least 25"}},
		{"RoundTwoDiameters", TraverseLayout{Shape: Round, Method: LogTchebycheff, Diameter: Inches(20), PointsPerDiameter: 6, Diameters: 2}, nil},
		{"RoundOneDiameter", TraverseLayout{Shape: Round, Method: LogTchebycheff, Diameter: Inches(20), PointsPerDiameter: 6, Diameters: 1},
			[]string{"one diameter only"}},
	} {
		t.Run(tc.name, func(t *testing.T) {
			got := tc.l.Warnings()
			if len(got) != len(tc.want) {
				t.Fatalf("warnings %q, want %d matching %q", got, len(tc.want), tc.want)
			}
			for i, w := range tc.want {
				if !strings.Contains(got[i], w) {
					t.Errorf("warning %q does not contain %q", got[i], w)
				}
			}
		})
	}
}

// traverseGrid5 repeats one line of five readings on five lines.
func traverseGrid5(line ...float64) []Pressure {
	vps := make([]Pressure, 0, 25)
	for range 5 {
		for _, p := range line {
			vps = append(vps, Pascals(p))
		}
	}
	return vps
}

var traverseRect500x400 = TraverseLayout{Shape: Rectangular, Method: EqualArea, Width: Millimeters(500), Height: Millimeters(400), PointsW: 5, PointsH: 5}

func TestTraverseFlow(t *testing.T) {
	t.Run("HandComputedSI", func(t *testing.T) {
		// Hand arithmetic: at 1.2 kg/m³, VP = 0.6·V², so 15, 38.4 and 60 Pa are 5, 8
		// and 10 m/s. Each line reads 5, 8, 10, 8, 5: mean 7.2 m/s; area 0.5 × 0.4 =
		// 0.2 m²; flow 1.44 m³/s = 1440 L/s.
		r, err := traverseRect500x400.FromVelocityPressures(traverseGrid5(15, 38.4, 60, 38.4, 15), KgPerM3(1.2))
		if err != nil {
			t.Fatal(err)
		}
		if math.Abs(r.MeanVelocity.MPS()-7.2) > 1e-9 {
			t.Errorf("mean velocity %.6f m/s, want 7.2", r.MeanVelocity.MPS())
		}
		if math.Abs(r.Flow.Lps()-1440) > 1e-6 {
			t.Errorf("flow %.4f L/s, want 1440", r.Flow.Lps())
		}
		if math.Abs(r.Area.M2()-0.2) > 1e-12 || len(r.Points) != 25 || len(r.Velocities) != 25 {
			t.Errorf("area %v, %d points, %d velocities", r.Area.M2(), len(r.Points), len(r.Velocities))
		}
		if math.Abs(r.Velocities[7].MPS()-10) > 1e-9 { // line 2 point 3
			t.Errorf("line 2 point 3 velocity %v m/s, want 10", r.Velocities[7].MPS())
		}
		if len(r.Warnings) != 0 {
			t.Errorf("unexpected warnings %q", r.Warnings)
		}
	})
	t.Run("HandComputedIP", func(t *testing.T) {
		// 24 × 12 in = 2 ft², every point 1 in. w.g. at 0.075 lb/ft³: 4005 fpm
		// (common practice) × 2 ft² = 8010 cfm, within 0.1 %.
		l := TraverseLayout{Shape: Rectangular, Method: LogTchebycheff, Width: Inches(24), Height: Inches(12), PointsW: 5, PointsH: 5}
		vps := make([]Pressure, 25)
		for i := range vps {
			vps[i] = InWG(1)
		}
		r, err := l.FromVelocityPressures(vps, LbPerFt3(0.075))
		if err != nil {
			t.Fatal(err)
		}
		if traverseRelErr(r.Flow.CFM(), 8010) > 0.001 {
			t.Errorf("flow %.1f cfm, want 8010 ± 0.1 %%", r.Flow.CFM())
		}
	})
	t.Run("FromVelocities", func(t *testing.T) {
		// Same profile as HandComputedSI given as velocities: 1440 L/s.
		v := make([]Velocity, 0, 25)
		for _, p := range traverseGrid5(5, 8, 10, 8, 5) {
			v = append(v, MetersPerSecond(p.Pa()))
		}
		r, err := traverseRect500x400.FromVelocities(v)
		if err != nil {
			t.Fatal(err)
		}
		if math.Abs(r.Flow.Lps()-1440) > 1e-6 || len(r.Warnings) != 0 {
			t.Errorf("flow %.4f L/s warnings %q, want 1440 and none", r.Flow.Lps(), r.Warnings)
		}
	})
}

// TestTraverseAveragesVelocities fails if pressures were averaged: the readings
// 10 and 90 Pa at 1.2 kg/m³ are 4.082 and 12.247 m/s, mean 8.165 m/s (hand
// arithmetic), while the velocity of the mean pressure (50 Pa) is 9.129 m/s.
func TestTraverseAveragesVelocities(t *testing.T) {
	l := TraverseLayout{Shape: Round, Method: LogTchebycheff, Diameter: Millimeters(630), PointsPerDiameter: 6, Diameters: 2}
	vps := make([]Pressure, 12)
	for i := range vps {
		vps[i] = Pascals(10)
		if i%2 == 1 {
			vps[i] = Pascals(90)
		}
	}
	r, err := l.FromVelocityPressures(vps, KgPerM3(1.2))
	if err != nil {
		t.Fatal(err)
	}
	want := (math.Sqrt(2*10/1.2) + math.Sqrt(2*90/1.2)) / 2 // 8.1650 m/s
	if math.Abs(want-8.1650) > 1e-4 {
		t.Fatalf("hand value %v", want)
	}
	if math.Abs(r.MeanVelocity.MPS()-want) > 1e-9 {
		t.Errorf("mean velocity %.5f m/s, want the mean of point velocities %.5f", r.MeanVelocity.MPS(), want)
	}
	ofMeanVP := math.Sqrt(2 * 50 / 1.2) // 9.1287 m/s
	if traverseRelErr(r.MeanVelocity.MPS(), ofMeanVP) < 0.05 {
		t.Errorf("mean velocity %.5f m/s is the velocity of the averaged pressure %.5f", r.MeanVelocity.MPS(), ofMeanVP)
	}
	// π·0.63²/4 = 0.311725 m² (geometry) × 8.1650 m/s = 2545.2 L/s.
	if math.Abs(r.Flow.Lps()-2545.2) > 0.1 {
		t.Errorf("flow %.2f L/s, want 2545.2", r.Flow.Lps())
	}
}

func TestTraverseReadingWarnings(t *testing.T) {
	v50 := math.Sqrt(2 * 50 / 1.2)
	t.Run("NegativeAndZero", func(t *testing.T) {
		vps := traverseGrid5(50, 50, 50, 50, 50)
		vps[7] = Pascals(-5) // line 2 point 3
		vps[15] = 0          // line 4 point 1
		r, err := traverseRect500x400.FromVelocityPressures(vps, KgPerM3(1.2))
		if err != nil {
			t.Fatal(err)
		}
		if r.Velocities[7] != 0 || r.Velocities[15] != 0 {
			t.Errorf("velocities at the negative and zero points = %v, %v; want 0", r.Velocities[7], r.Velocities[15])
		}
		if want := 23 * v50 / 25; math.Abs(r.MeanVelocity.MPS()-want) > 1e-9 {
			t.Errorf("mean %.6f m/s, want %.6f (23 of 25 points at %.4f)", r.MeanVelocity.MPS(), want, v50)
		}
		if len(r.Warnings) != 2 {
			t.Fatalf("warnings %q, want 2 (2 of 25 is under 10 %%)", r.Warnings)
		}
		if w := r.Warnings[0]; !strings.Contains(w, "negative velocity pressure at line 2 point 3:") {
			t.Errorf("warning %q, want the negative point named", w)
		}
		if w := r.Warnings[1]; !strings.Contains(w, "zero velocity pressure at line 4 point 1:") {
			t.Errorf("warning %q, want the zero point named", w)
		}
	})
	t.Run("MoreThanTenPercentZero", func(t *testing.T) {
		vps := traverseGrid5(50, 50, 50, 50, 50)
		vps[0], vps[1], vps[24] = 0, Pascals(-1), 0
		r, err := traverseRect500x400.FromVelocityPressures(vps, KgPerM3(1.2))
		if err != nil {
			t.Fatal(err)
		}
		if !traverseHasWarning(r.Warnings, "3 of 25 points (12 %) read zero or negative") {
			t.Errorf("warnings %q, want the 10 %% warning", r.Warnings)
		}
		if !traverseHasWarning(r.Warnings, "zero velocity pressure at line 1 point 1, line 5 point 5:") {
			t.Errorf("warnings %q, want both zero points named", r.Warnings)
		}
	})
	t.Run("UnevenProfile", func(t *testing.T) {
		// 14 of 25 readings at 0.5 Pa, under 1/10 of the largest (100 Pa).
		vps := make([]Pressure, 25)
		for i := range vps {
			vps[i] = Pascals(100)
			if i < 14 {
				vps[i] = Pascals(0.5)
			}
		}
		r, err := traverseRect500x400.FromVelocityPressures(vps, KgPerM3(1.2))
		if err != nil {
			t.Fatal(err)
		}
		if len(r.Warnings) != 1 || !strings.Contains(r.Warnings[0], "14 of 25 points are at or below 10 % of the highest velocity pressure") {
			t.Errorf("warnings %q, want one uneven-profile warning", r.Warnings)
		}
	})
	t.Run("AllZero", func(t *testing.T) {
		r, err := traverseRect500x400.FromVelocityPressures(traverseGrid5(0, 0, 0, 0, 0), KgPerM3(1.2))
		if err != nil {
			t.Fatal(err)
		}
		if r.Flow != 0 || !traverseHasWarning(r.Warnings, "no flow was measured") {
			t.Errorf("flow %v warnings %q", r.Flow, r.Warnings)
		}
	})
	t.Run("NegativeVelocity", func(t *testing.T) {
		v := make([]Velocity, 25)
		for i := range v {
			v[i] = MetersPerSecond(6)
		}
		v[24] = MetersPerSecond(-2)
		r, err := traverseRect500x400.FromVelocities(v)
		if err != nil {
			t.Fatal(err)
		}
		if r.Velocities[24] != 0 || math.Abs(r.MeanVelocity.MPS()-24*6.0/25) > 1e-12 {
			t.Errorf("negative point counted as %v, mean %v; want 0 and 5.76", r.Velocities[24], r.MeanVelocity)
		}
		if len(r.Warnings) != 1 || !strings.Contains(r.Warnings[0], "negative velocity at line 5 point 5:") {
			t.Errorf("warnings %q", r.Warnings)
		}
	})
}

func traverseHasWarning(ws []string, sub string) bool {
	for _, w := range ws {
		if strings.Contains(w, sub) {
			return true
		}
	}
	return false
}

// TestTraverseUniformityBoundary checks the edges of the uniformity test
// (AMCA Publication 203 / ASHRAE Standard 111, from memory): more than 75 % of
// readings must exceed 1/10 of the largest, so exactly 75 % warns, and a
// reading of exactly 1/10 does not count as above it.
func TestTraverseUniformityBoundary(t *testing.T) {
	l := TraverseLayout{Shape: Round, Method: EqualArea, Diameter: Inches(30), PointsPerDiameter: 10, Diameters: 2} // 20 points
	for _, tc := range []struct {
		name     string
		low      int
		lowVP    float64 // Pa, against a largest of 100 Pa
		wantWarn bool
	}{
		{"16Of20Above", 4, 5, false},
		{"15Of20Above", 5, 5, true},
		{"ExactlyOneTenth", 5, 10, true},
		{"JustAboveOneTenth", 5, 10.001, false},
	} {
		t.Run(tc.name, func(t *testing.T) {
			vps := make([]Pressure, 20)
			v := make([]Velocity, 20)
			for i := range vps {
				p := 100.0
				if i < tc.low {
					p = tc.lowVP
				}
				vps[i] = Pascals(p)
				v[i] = MetersPerSecond(math.Sqrt(p)) // V² ∝ VP
			}
			r, err := l.FromVelocityPressures(vps, KgPerM3(1.2))
			if err != nil {
				t.Fatal(err)
			}
			if got := traverseHasWarning(r.Warnings, "too uneven"); got != tc.wantWarn {
				t.Errorf("pressures: uneven warning %v, want %v (%q)", got, tc.wantWarn, r.Warnings)
			}
			rv, err := l.FromVelocities(v)
			if err != nil {
				t.Fatal(err)
			}
			if got := traverseHasWarning(rv.Warnings, "too uneven"); got != tc.wantWarn && tc.lowVP != 10 {
				// √10 squared is not exactly 10 in floating point, so the exact
				// boundary is checked on pressures only.
				t.Errorf("velocities: uneven warning %v, want %v (%q)", got, tc.wantWarn, rv.Warnings)
			}
		})
	}
}

func TestTraverseReadingErrors(t *testing.T) {
	t.Run("ErrReadingCount", func(t *testing.T) {
		_, err := traverseRect500x400.FromVelocityPressures(make([]Pressure, 24), KgPerM3(1.2))
		ie := traverseInputError(t, err, "readings")
		if !strings.Contains(ie.Error(), "this layout has 25 points") || ie.Value != 24 {
			t.Errorf("error %q, want the layout's 25 points and the 24 given", ie.Error())
		}
	})
	t.Run("ErrVelocityCount", func(t *testing.T) {
		_, err := traverseRect500x400.FromVelocities(make([]Velocity, 26))
		traverseInputError(t, err, "readings")
	})
	t.Run("ErrNaNReading", func(t *testing.T) {
		vps := traverseGrid5(50, 50, 50, 50, 50)
		vps[3] = Pressure(math.NaN())
		_, err := traverseRect500x400.FromVelocityPressures(vps, KgPerM3(1.2))
		if ie := traverseInputError(t, err, "readings"); !strings.Contains(ie.Error(), "line 1 point 4") {
			t.Errorf("error %q does not name the point", ie.Error())
		}
	})
	t.Run("ErrHugeVelocity", func(t *testing.T) {
		v := make([]Velocity, 12)
		v[11] = MetersPerSecond(200)
		l := TraverseLayout{Shape: Round, Method: LogLinear, Diameter: Inches(20), PointsPerDiameter: 6, Diameters: 2}
		_, err := l.FromVelocities(v)
		if ie := traverseInputError(t, err, "readings"); !strings.Contains(ie.Error(), "diameter 2 point 6") {
			t.Errorf("error %q does not name the point", ie.Error())
		}
	})
	t.Run("ErrDensity", func(t *testing.T) {
		_, err := traverseRect500x400.FromVelocityPressures(traverseGrid5(50, 50, 50, 50, 50), KgPerM3(0.3))
		traverseInputError(t, err, "density")
	})
	t.Run("ErrLayout", func(t *testing.T) {
		l := traverseRect500x400
		l.PointsW = 0
		_, err := l.FromVelocityPressures(nil, KgPerM3(1.2))
		traverseInputError(t, err, "points_w")
	})
}

// BenchmarkTraverse49 computes a 7 × 7 log-Tchebycheff traverse from velocity
// pressures.
func BenchmarkTraverse49(b *testing.B) {
	l := TraverseLayout{Shape: Rectangular, Method: LogTchebycheff, Width: Inches(48), Height: Inches(40), PointsW: 7, PointsH: 7}
	vps := make([]Pressure, 49)
	for i := range vps {
		vps[i] = InWG(0.3 + 0.01*float64(i%7))
	}
	rho := LbPerFt3(0.075)
	b.ReportAllocs()
	for b.Loop() {
		if _, err := l.FromVelocityPressures(vps, rho); err != nil {
			b.Fatal(err)
		}
	}
}

// FuzzTraverse builds layouts and readings from arbitrary input: no panic, no
// NaN or Inf in any result, and every error an *InputError naming its input.
func FuzzTraverse(f *testing.F) {
	f.Add(uint8(1), uint8(1), 24.0, 12.0, 0.0, 5, 5, 0, 0, 1.2, false, []byte{1, 0, 2, 0, 255, 255})
	f.Add(uint8(1), uint8(3), 300.0, 200.0, 0.0, 30, 30, 0, 0, 0.5, false, []byte{0, 0})
	f.Add(uint8(2), uint8(3), 0.0, 0.0, 300.0, 0, 0, 24, 4, 1.5, false, []byte{9, 9, 200, 1})
	f.Add(uint8(2), uint8(2), 0.0, 0.0, 36.0, 0, 0, 8, 2, 1.1, true, []byte{0, 0, 0, 0, 0, 0, 248, 127})
	f.Add(uint8(2), uint8(1), 0.0, 0.0, 20.0, 0, 0, 6, 1, 1.2, false, []byte{})
	f.Fuzz(func(t *testing.T, shape, method uint8, w, h, d float64, pw, ph, ppd, nd int, rho float64, raw bool, data []byte) {
		l := TraverseLayout{Shape: DuctShape(shape), Method: TraverseMethod(method),
			Width: Inches(w), Height: Inches(h), Diameter: Inches(d),
			PointsW: pw, PointsH: ph, PointsPerDiameter: ppd, Diameters: nd}
		checkErr := func(what string, err error) bool {
			if err == nil {
				return false
			}
			var ie *InputError
			if !errors.As(err, &ie) || ie.Input == "" {
				t.Fatalf("%s: error %v (%T) is not an *InputError with an input name", what, err, err)
			}
			return true
		}
		finite := func(what string, v float64) {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				t.Fatalf("%s is %v", what, v)
			}
		}
		pts, err := l.Points()
		a, aerr := l.Area()
		checkErr("Area", aerr)
		if aerr == nil {
			finite("area", a.M2())
		}
		_ = l.Warnings()
		if checkErr("Points", err) {
			return
		}
		for _, p := range pts {
			finite("X", p.X.M())
			finite("Y", p.Y.M())
			finite("Depth", p.Depth.M())
		}
		// Readings: one per point by default, taken cyclically from data as int16
		// tenths of a pascal; raw reads data as float64s (count and values free).
		var vps []Pressure
		if raw {
			for i := 0; i+8 <= len(data); i += 8 {
				vps = append(vps, Pressure(math.Float64frombits(binary.LittleEndian.Uint64(data[i:]))))
			}
		} else {
			vps = make([]Pressure, len(pts))
			for i := range vps {
				if len(data) >= 2 {
					j := (2 * i) % (len(data) - len(data)%2)
					vps[i] = Pascals(float64(int16(binary.LittleEndian.Uint16(data[j:]))) / 10)
				}
			}
		}
		check := func(what string, r TraverseResult, err error) {
			if checkErr(what, err) {
				return
			}
			finite(what+" mean velocity", r.MeanVelocity.MPS())
			finite(what+" flow", r.Flow.M3s())
			finite(what+" area", r.Area.M2())
			if len(r.Velocities) != len(pts) {
				t.Fatalf("%s: %d velocities for %d points", what, len(r.Velocities), len(pts))
			}
			for _, v := range r.Velocities {
				finite(what+" velocity", v.MPS())
				if v < 0 {
					t.Fatalf("%s: negative counted velocity %v", what, v)
				}
			}
		}
		r, err := l.FromVelocityPressures(vps, KgPerM3(rho))
		check("FromVelocityPressures", r, err)
		vs := make([]Velocity, len(vps))
		for i, p := range vps {
			vs[i] = Velocity(p.Pa() / 10)
		}
		r, err = l.FromVelocities(vs)
		check("FromVelocities", r, err)
	})
}

// Points too near the wall of a round duct are flagged (US EPA Method 1: 0.5 in
// for ducts up to 24 in, 1.0 in above; from memory).
func TestTraverseWallClearanceWarning(t *testing.T) {
	for _, tc := range []struct {
		name   string
		layout TraverseLayout
		warn   bool
	}{
		// Equal area, 10 points: the first at 2.6 % of D (EPA Table 1-2) = 0.31 in of 12 in.
		{"EqualArea10In12", TraverseLayout{Shape: Round, Method: EqualArea, Diameter: Inches(12), PointsPerDiameter: 10, Diameters: 2}, true},
		// Log-Tchebycheff 8: 0.024·24 in = 0.576 in, clear of 0.5 in.
		{"LogT8In24", TraverseLayout{Shape: Round, Method: LogTchebycheff, Diameter: Inches(24), PointsPerDiameter: 8, Diameters: 2}, false},
		// 0.024·36 in = 0.864 in, inside the 1.0 in clearance of a duct over 24 in.
		{"LogT8In36", TraverseLayout{Shape: Round, Method: LogTchebycheff, Diameter: Inches(36), PointsPerDiameter: 8, Diameters: 2}, true},
	} {
		t.Run(tc.name, func(t *testing.T) {
			found := false
			for _, w := range tc.layout.Warnings() {
				if strings.Contains(w, "of the duct wall") {
					found = true
				}
			}
			if found != tc.warn {
				t.Errorf("wall-clearance warning = %v, want %v (%q)", found, tc.warn, tc.layout.Warnings())
			}
		})
	}
}
