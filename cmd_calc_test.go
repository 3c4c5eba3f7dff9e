package main

import (
	"bytes"
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// runMain runs one command line in-process and returns stdout, stderr and the
// exit status main would use.
func runMain(tb testing.TB, stdin string, args ...string) (string, string, int) {
	tb.Helper()
	var out, errb bytes.Buffer
	m := NewMain(strings.NewReader(stdin), &out, &errb)
	err := m.Run(context.Background(), args)
	code := exitCode(err, &errb)
	return out.String(), errb.String(), code
}

func mustJSON(tb testing.TB, s string) map[string]any {
	tb.Helper()
	var v map[string]any
	if err := json.Unmarshal([]byte(s), &v); err != nil {
		tb.Fatalf("output is not one JSON object: %v\n%s", err, s)
	}
	return v
}

func num64(tb testing.TB, m map[string]any, key string) float64 {
	tb.Helper()
	v, ok := m[key].(float64)
	if !ok {
		tb.Fatalf("key %q missing or not a number in %v", key, m)
	}
	return v
}

func near(got, want, relTol float64) bool {
	return math.Abs(got-want) <= relTol*math.Abs(want)
}

func TestCalcPsychro(t *testing.T) {
	t.Run("OKSaturatedIP", func(t *testing.T) {
		// Saturated air at 77 °F, 14.696 psia: Ws = 0.020173 lb/lb, hs = 40.576 Btu/lb
		// (ASHRAE Handbook—Fundamentals 2017 ch. 1 Table 2).
		out, stderr, code := runMain(t, "", "calc", "psychro", "--db", "77", "--rh", "100")
		if code != 0 {
			t.Fatalf("exit %d: %s", code, stderr)
		}
		m := mustJSON(t, out)
		if m["units"] != "ip" {
			t.Errorf("units = %v, want ip", m["units"])
		}
		if w := num64(t, m, "hum_ratio"); !near(w, 0.020173, 0.005) {
			t.Errorf("hum_ratio = %v, want 0.020173 ±0.5 %%", w)
		}
		if h := num64(t, m, "enthalpy"); !near(h, 40.576, 0.01) {
			t.Errorf("enthalpy = %v, want 40.576 ±1 %%", h)
		}
		if wb := num64(t, m, "wet_bulb"); math.Abs(wb-77) > 0.01 {
			t.Errorf("wet_bulb at saturation = %v, want 77", wb)
		}
		if p := num64(t, m, "pressure"); !near(p, 14.696, 1e-4) {
			t.Errorf("pressure at sea level = %v, want 14.696 psia", p)
		}
		for _, k := range []string{"dry_bulb", "wet_bulb", "dew_point", "rel_hum", "hum_ratio", "enthalpy",
			"spec_volume", "density", "vap_pres"} {
			num64(t, m, k)
		}
	})
	t.Run("OKKeyOrder", func(t *testing.T) {
		out, _, _ := runMain(t, "", "calc", "psychro", "--units", "si", "--db", "25", "--wb", "18")
		order := []string{"units", "dry_bulb", "wet_bulb", "dew_point", "rel_hum", "hum_ratio", "enthalpy",
			"spec_volume", "density", "pressure", "vap_pres"}
		last := -1
		for _, k := range order {
			i := strings.Index(out, `"`+k+`"`)
			if i <= last {
				t.Fatalf("key %q out of order in\n%s", k, out)
			}
			last = i
		}
	})
	t.Run("OKElevationSI", func(t *testing.T) {
		// Standard atmosphere at 1000 m: 89.875 kPa (ASHRAE 2017 ch. 1 Table 1).
		out, _, code := runMain(t, "", "calc", "psychro", "--units", "si", "--db", "20", "--rh", "50", "--elevation", "1000")
		if code != 0 {
			t.Fatal(out)
		}
		if p := num64(t, mustJSON(t, out), "pressure"); !near(p, 89.875, 0.002) {
			t.Errorf("pressure = %v kPa, want 89.875", p)
		}
	})
	for _, tc := range []struct {
		name, flag string
		args       []string
	}{
		{"ErrRHAbove100", "--rh", []string{"--db", "75", "--rh", "120"}},
		{"ErrWetBulbAboveDryBulb", "--wb", []string{"--db", "75", "--wb", "80"}},
		{"ErrNoHumidity", "--rh", []string{"--db", "75"}},
		{"ErrTwoHumidities", "--wb", []string{"--db", "75", "--rh", "50", "--wb", "60"}},
		{"ErrNotANumber", "--db", []string{"--db", "warm", "--rh", "50"}},
		{"ErrElevationAndPressure", "--pressure", []string{"--db", "75", "--rh", "50", "--elevation", "10", "--pressure", "14.6"}},
		{"ErrUnknownFlag", "--humidity", []string{"--db", "75", "--humidity", "50"}},
	} {
		t.Run(tc.name, func(t *testing.T) {
			out, stderr, code := runMain(t, "", append([]string{"calc", "psychro"}, tc.args...)...)
			if code == 0 {
				t.Fatalf("exit 0, want an error; stdout %s", out)
			}
			if out != "" {
				t.Errorf("stdout on error = %q, want empty", out)
			}
			if !strings.Contains(stderr, tc.flag) {
				t.Errorf("stderr %q does not name %s", stderr, tc.flag)
			}
		})
	}
}

func TestCalcAir(t *testing.T) {
	// A cooling coil near standard conditions; the exact method and the trade's
	// 4.5·cfm·Δh shortcut (common practice, no source) agree within about 2 %
	// at sea level because 4.5 assumes 0.075 lb/ft³, the basis given here.
	args := []string{"calc", "air", "--flow", "4000", "--enter-db", "80", "--enter-wb", "67",
		"--leave-db", "55", "--leave-wb", "54", "--flow-acc-pct", "5", "--temp-acc", "0.5"}
	out, stderr, code := runMain(t, "", args...)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	m := mustJSON(t, out)
	if m["process"] != "cooling" {
		t.Errorf("process = %v, want cooling", m["process"])
	}
	enter, leave := m["enter"].(map[string]any), m["leave"].(map[string]any)
	dh := num64(t, enter, "enthalpy") - num64(t, leave, "enthalpy")
	total := num64(t, m, "total")
	if shortcut := 4.5 * 4000 * dh; !near(total, shortcut, 0.02) {
		t.Errorf("total = %v Btu/h, 4.5·cfm·Δh = %v: want within 2 %%", total, shortcut)
	}
	if s := num64(t, m, "sensible"); !near(s, 1.08*4000*25, 0.03) {
		t.Errorf("sensible = %v Btu/h, 1.08·cfm·ΔT = %v: want within 3 %%", s, 1.08*4000*25)
	}
	if got := num64(t, m, "sensible") + num64(t, m, "latent"); !near(got, total, 1e-5) {
		t.Errorf("sensible + latent = %v, total %v", got, total)
	}
	u := m["uncertainty"].(map[string]any)
	if ut := num64(t, u, "total"); ut < 0.05*total || ut > 0.5*total {
		t.Errorf("uncertainty on total = %v, want at least the 5 %% flow term (%v) and well under the total", ut, 0.05*total)
	}

	t.Run("ErrLeaveFlagNamed", func(t *testing.T) {
		_, stderr, code := runMain(t, "", "calc", "air", "--flow", "4000", "--enter-db", "80", "--enter-wb", "67",
			"--leave-db", "55", "--leave-wb", "60")
		if code == 0 || !strings.Contains(stderr, "--leave-wb") {
			t.Errorf("exit %d, stderr %q: want an error naming --leave-wb", code, stderr)
		}
	})
}

func TestCalcBatch(t *testing.T) {
	in := strings.Join([]string{
		`{"db":80,"rh":50}`,
		`{"db":80,"rh":150}`,
		`not json`,
		``,
		`{"db":70,"wb":60,"elevation":5000}`,
		`{"db":70,"nonsense":1}`,
	}, "\n")
	out, stderr, code := runMain(t, in, "calc", "psychro", "--batch", "--units", "ip")
	if code != 1 {
		t.Errorf("exit %d, want 1 when a line fails; stderr %s", code, stderr)
	}
	lines := strings.Split(strings.TrimSpace(out), "\n")
	if len(lines) != 6 {
		t.Fatalf("%d output lines, want 6 (one per input line, blank included):\n%s", len(lines), out)
	}
	wantErr := []string{"", "--rh", "(line)", "(line)", "", "--nonsense"}
	for i, l := range lines {
		m := mustJSON(t, l)
		if wantErr[i] == "" {
			if _, ok := m["error"]; ok {
				t.Errorf("line %d: unexpected error %v", i+1, m["error"])
			}
			continue
		}
		if m["flag"] != wantErr[i] {
			t.Errorf("line %d: flag = %v, want %s (%v)", i+1, m["flag"], wantErr[i], m["error"])
		}
	}
	// 5000 ft: 14.696·(1 − 6.8754e−6·5000)^5.2559 = 12.228 psia (ASHRAE 2017 ch. 1 eq. 3, worked by hand).
	if p := num64(t, mustJSON(t, lines[4]), "pressure"); !near(p, 12.228, 0.002) {
		t.Errorf("pressure at 5000 ft = %v psia, want 12.228", p)
	}

	t.Run("OKCommandLineFlagsApplyToEveryLine", func(t *testing.T) {
		out, _, code := runMain(t, "{\"rh\":50}\n{\"rh\":60,\"db\":90}\n", "calc", "psychro", "--batch", "--db", "75")
		if code != 0 {
			t.Fatal(out)
		}
		ls := strings.Split(strings.TrimSpace(out), "\n")
		if db := num64(t, mustJSON(t, ls[0]), "dry_bulb"); db != 75 {
			t.Errorf("line 1 dry_bulb = %v, want 75 from the command line", db)
		}
		if db := num64(t, mustJSON(t, ls[1]), "dry_bulb"); db != 90 {
			t.Errorf("line 2 dry_bulb = %v, want the line's own 90", db)
		}
	})
	t.Run("OKLineSwitchesHumidityKind", func(t *testing.T) {
		// The command line gives --rh; a line giving wb replaces it rather than clashing.
		out, stderr, code := runMain(t, "{\"db\":75}\n{\"db\":75,\"wb\":60}\n", "calc", "psychro", "--batch", "--rh", "40")
		if code != 0 {
			t.Fatalf("exit %d: %s\n%s", code, stderr, out)
		}
		ls := strings.Split(strings.TrimSpace(out), "\n")
		if wb := num64(t, mustJSON(t, ls[1]), "wet_bulb"); wb != 60 {
			t.Errorf("line 2 wet_bulb = %v, want 60", wb)
		}
	})
	t.Run("ErrLongLineKeepsTheRest", func(t *testing.T) {
		in := "{\"db\":70,\"rh\":50}\n" + strings.Repeat(" ", maxBatchLine+10) + "\n{\"db\":71,\"rh\":50}"
		out, _, code := runMain(t, in, "calc", "psychro", "--batch")
		ls := strings.Split(strings.TrimSpace(out), "\n")
		if code != 1 || len(ls) != 3 {
			t.Fatalf("exit %d, %d lines; want exit 1 and 3 lines", code, len(ls))
		}
		if m := mustJSON(t, ls[1]); m["line"] != 2.0 || !strings.Contains(m["error"].(string), "longer than") {
			t.Errorf("line 2 = %v, want a too-long error for line 2", m)
		}
		if db := num64(t, mustJSON(t, ls[2]), "dry_bulb"); db != 71 {
			t.Errorf("line 3 (no trailing newline) dry_bulb = %v, want 71", db)
		}
	})
	t.Run("OKListValue", func(t *testing.T) {
		out, stderr, code := runMain(t, `{"vp":[0.1,0.1,0.1,0.1,0.1,0.1,0.1,0.1,0.1,0.1,0.1,0.1,0.1,0.1,0.1,0.1,0.1,0.1,0.1,0.1,0.1,0.1,0.1,0.1,0.1]}`+"\n",
			"calc", "traverse", "--batch", "--shape", "rect", "--width", "24", "--height", "24", "--points-w", "5", "--points-h", "5")
		if code != 0 {
			t.Fatalf("exit %d: %s %s", code, stderr, out)
		}
		// 0.1 in. w.g. at 0.075 lb/ft³: 4005·√0.1 ≈ 1266 fpm (common practice), over 4 ft².
		m := mustJSON(t, strings.TrimSpace(out))
		if f := num64(t, m, "flow"); !near(f, 4*1266.5, 0.003) {
			t.Errorf("flow = %v, want about %v cfm", f, 4*1266.5)
		}
	})
}

func TestCalcWaterValveOutletFanExpected(t *testing.T) {
	cases := []struct {
		name string
		args []string
		key  string
		want float64
		tol  float64
		src  string
	}{
		// 500·gpm·ΔT near 50 °F water (common practice): 500·100·10 = 500,000 Btu/h, within 1 %.
		{"WaterChilled", []string{"water", "--flow", "100", "--enter", "45", "--leave", "55"}, "capacity", 500000, 0.01, "common practice"},
		// Q = Cv·√(ΔP/SG) = 10·√4 = 20 gpm (valve sizing relation, exact).
		{"ValveCv", []string{"valve", "--cv", "10", "--dp", "4"}, "flow", 20, 1e-9, "Cv definition"},
		// 2.31 ft of water per psi (common practice): 9.24 ft ≈ 4 psi → 20 gpm.
		{"ValveFeet", []string{"valve", "--cv", "10", "--dp", "9.236", "--dp-unit", "ft"}, "flow", 20, 0.001, "common practice"},
		// 450 cfm hood reading × 0.95 correction = 427.5 cfm.
		{"OutletHood", []string{"outlet", "--reading", "450", "--factor", "0.95", "--design", "400"}, "flow", 427.5, 1e-9, "arithmetic"},
		// 500 fpm × 0.8 ft² Ak = 400 cfm.
		{"OutletAk", []string{"outlet", "--velocity", "500", "--ak", "0.8", "--design", "400"}, "percent_of_design", 100, 1e-9, "arithmetic"},
		// Fan law: flow ∝ rpm, so 900 rpm × 5000/4500.
		{"FanRPM", []string{"fan", "--flow", "4500", "--rpm", "900", "--sp", "1.5", "--bhp", "3", "--target-flow", "5000"}, "rpm", 1000, 1e-9, "fan laws"},
		// Power ∝ rpm³: 3 hp × (10/9)³.
		{"FanBHP", []string{"fan", "--flow", "4500", "--rpm", "900", "--sp", "1.5", "--bhp", "3", "--target-flow", "5000"}, "bhp", 3 * 1000.0 / 729, 1e-5, "fan laws"},
		// Pitch diameter ∝ rpm at a fixed fan sheave: 4.5 in × 1000/900.
		{"FanSheave", []string{"fan", "--flow", "4500", "--rpm", "900", "--target-flow", "5000", "--motor-rpm", "1750", "--motor-sheave", "4.5"}, "motor_sheave", 5.0, 1e-5, "drive ratio"},
	}
	for _, tc := range cases {
		t.Run("OK"+tc.name, func(t *testing.T) {
			out, stderr, code := runMain(t, "", append([]string{"calc"}, tc.args...)...)
			if code != 0 {
				t.Fatalf("exit %d: %s", code, stderr)
			}
			if got := num64(t, mustJSON(t, out), tc.key); !near(got, tc.want, tc.tol) {
				t.Errorf("%s = %v, want %v ±%v (%s)", tc.key, got, tc.want, tc.tol, tc.src)
			}
		})
	}
	t.Run("OKFanSheaves", func(t *testing.T) {
		// 1750 rpm motor, 5 in sheave, fan at 1000 rpm: fan sheave 5·1750/1000 = 8.75 in now;
		// for 10000/9000·1000 = 1111.1 rpm with the motor sheave kept, 5·1750/1111.1 = 7.875 in.
		out, _, _ := runMain(t, "", "calc", "fan", "--flow", "9000", "--rpm", "1000", "--target-flow", "10000",
			"--motor-sheave", "5", "--motor-rpm", "1750")
		m := mustJSON(t, out)
		if got := num64(t, m, "present_fan_sheave"); !near(got, 8.75, 1e-6) {
			t.Errorf("present_fan_sheave = %v, want 8.75", got)
		}
		if got := num64(t, m, "fan_sheave"); !near(got, 7.875, 1e-6) {
			t.Errorf("fan_sheave = %v, want 7.875", got)
		}
	})
	t.Run("OKOutletOnTheLimit", func(t *testing.T) {
		// +10 % exactly is inside a closed ±10 % band, after cfm → m³/s → cfm.
		for _, args := range [][]string{{"--reading", "275", "--design", "250"}, {"--reading", "81", "--design", "90"},
			{"--reading", "200", "--factor", "1.1", "--design", "200"}} {
			out, _, _ := runMain(t, "", append([]string{"calc", "outlet"}, args...)...)
			if s := mustJSON(t, out)["status"]; s != "within" {
				t.Errorf("%v: status %v, want within", args, s)
			}
		}
	})
	t.Run("OKOutletStatus", func(t *testing.T) {
		out, _, _ := runMain(t, "", "calc", "outlet", "--reading", "330", "--design", "400")
		if s := mustJSON(t, out)["status"]; s != "low" {
			t.Errorf("330 of 400 cfm at ±10 %%: status %v, want low", s)
		}
	})
	t.Run("OKExpected", func(t *testing.T) {
		csv := "ewb_f,odb_f,flow_cfm,total_mbh,sensible_mbh\n" +
			"62,85,3000,100,80\n62,85,4000,110,90\n62,95,3000,90,76\n62,95,4000,100,86\n" +
			"67,85,3000,120,70\n67,85,4000,130,80\n67,95,3000,110,66\n67,95,4000,120,76\n"
		path := filepath.Join(t.TempDir(), "perf.csv")
		if err := os.WriteFile(path, []byte(csv), 0o600); err != nil {
			t.Fatal(err)
		}
		out, stderr, code := runMain(t, "", "calc", "expected", "--table", path, "--ewb", "64.5", "--odb", "90", "--flow", "3500")
		if code != 0 {
			t.Fatalf("exit %d: %s", code, stderr)
		}
		// Centre of the grid: the mean of the eight corners (trilinear interpolation), in Btu/h.
		m := mustJSON(t, out)
		if got := num64(t, m, "total"); !near(got, 110000, 1e-9) {
			t.Errorf("total = %v, want 110000", got)
		}
		if got := num64(t, m, "sensible"); !near(got, 78000, 1e-9) {
			t.Errorf("sensible = %v, want 78000", got)
		}
		_, stderr, code = runMain(t, "", "calc", "expected", "--table", path, "--ewb", "64", "--odb", "100", "--flow", "3500")
		if code == 0 || !strings.Contains(stderr, "--odb") {
			t.Errorf("odb outside the table: exit %d, stderr %q; want a refusal naming --odb", code, stderr)
		}
	})
}

func TestCalcErrorsInUserUnits(t *testing.T) {
	for _, tc := range []struct {
		name string
		args []string
		want []string
	}{
		// measure reports these in Pa, mm and L/s; the user typed in. w.g., inches and gpm.
		{"FanSP", []string{"fan", "--flow", "4000", "--rpm", "900", "--sp", "500", "--target-flow", "5000"}, []string{"--sp", "500 in. w.g.", "in. w.g."}},
		{"TraverseWidth", []string{"traverse", "--shape", "rect", "--width", "0.5", "--height", "12"}, []string{"--width", "0.5 in", "0.984252 to"}},
		{"WaterFlow", []string{"water", "--flow", "2e6", "--enter", "45", "--leave", "55"}, []string{"--flow", "gpm"}},
		// 30 % propylene glycol: table from -10 °C = 14 °F (ASHRAE table via shared/references).
		{"GlycolReasonInF", []string{"water", "--flow", "50", "--enter", "0", "--leave", "10", "--fluid", "pg", "--concentration", "30"}, []string{"--enter", "0 °F", "14 to 212 °F"}},
		{"ValveDPInFeet", []string{"valve", "--cv", "10", "--dp", "-3", "--dp-unit", "ft"}, []string{"--dp", "-3 ft", "reversed"}},
		{"RHAccuracyWithoutRH", []string{"air", "--flow", "2000", "--enter-db", "80", "--enter-wb", "67", "--leave-db", "55", "--leave-wb", "54", "--rh-acc", "2"}, []string{"--rh-acc"}},
	} {
		t.Run("Err"+tc.name, func(t *testing.T) {
			_, stderr, code := runMain(t, "", append([]string{"calc"}, tc.args...)...)
			if code == 0 {
				t.Fatal("exit 0, want an error")
			}
			for _, w := range tc.want {
				if !strings.Contains(stderr, w) {
					t.Errorf("stderr %q lacks %q", stderr, w)
				}
			}
		})
	}
}

func TestCalcWarnings(t *testing.T) {
	t.Run("OKStandardBasisAtAltitude", func(t *testing.T) {
		out, _, _ := runMain(t, "", "calc", "air", "--flow", "2000", "--enter-db", "80", "--enter-wb", "67",
			"--leave-db", "55", "--leave-wb", "54", "--elevation", "5000")
		m := mustJSON(t, out)
		if m["flow_basis"] != "standard" {
			t.Errorf("flow_basis = %v", m["flow_basis"])
		}
		if w, _ := m["warnings"].([]any); len(w) != 1 || !strings.Contains(w[0].(string), "--flow-at enter") {
			t.Errorf("warnings = %v, want the standard-density caution", m["warnings"])
		}
		out, _, _ = runMain(t, "", "calc", "air", "--flow", "2000", "--enter-db", "80", "--enter-wb", "67",
			"--leave-db", "55", "--leave-wb", "54", "--elevation", "5000", "--flow-at", "enter")
		if w, _ := mustJSON(t, out)["warnings"].([]any); len(w) != 0 {
			t.Errorf("flow at entering state: warnings %v, want none", w)
		}
	})
	t.Run("OKLayoutWarningsWithoutReadings", func(t *testing.T) {
		out, _, _ := runMain(t, "", "calc", "traverse", "--shape", "round", "--diameter", "12", "--method", "equal-area", "--points", "10")
		if w, _ := mustJSON(t, out)["warnings"].([]any); len(w) == 0 {
			t.Error("10 equal-area points in a 12 in duct: no wall-clearance warning before readings")
		}
	})
}

func TestAppendNum(t *testing.T) {
	for _, tc := range []struct {
		in   float64
		want string
	}{
		{0, "0"}, {1, "1"}, {-2.5, "-2.5"}, {118234.567, "118235"}, {1234567, "1234570"},
		{0.0112345678, "0.0112346"}, {0.000015, "0.000015"}, {99.99999, "100"}, {-0.0000001, "-0.0000001"},
		{math.NaN(), "null"}, {1000, "1000"}, {999999.5, "1000000"}, {0.001, "0.001"},
		{123456789012, "123457000000"}, {9.999995, "10"},
	} {
		if got := string(appendNum(nil, tc.in)); got != tc.want {
			t.Errorf("appendNum(%v) = %s, want %s", tc.in, got, tc.want)
		}
	}
}

func TestExitCodes(t *testing.T) {
	if _, _, code := runMain(t, ""); code != 2 {
		t.Errorf("no command: exit %d, want 2", code)
	}
	if _, _, code := runMain(t, "", "calc", "nosuch"); code != 2 {
		t.Errorf("unknown calc: exit %d, want 2", code)
	}
	if got := exitCode(errors.New("x"), &bytes.Buffer{}); got != 1 {
		t.Errorf("plain error: exit %d, want 1", got)
	}
}

// BenchmarkCalcPsychroBatch is the `calc psychro --batch` path over 100,000 lines
// (target: under 1 s on one core).
func BenchmarkCalcPsychroBatch(b *testing.B) {
	var in strings.Builder
	for i := range 100000 {
		fmt.Fprintf(&in, `{"db":%d,"rh":%d}`+"\n", 40+i%60, 10+i%85)
	}
	input := in.String()
	b.ResetTimer()
	for b.Loop() {
		var out bytes.Buffer
		m := NewMain(strings.NewReader(input), &out, &bytes.Buffer{})
		if err := m.Run(context.Background(), []string{"calc", "psychro", "--batch", "--elevation", "1200"}); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkCalcAir is one full `calc air` evaluation from flag values to the
// JSON bytes, without process start-up (target: under 5 µs), and the same with
// the uncertainty propagation that accuracies add.
func BenchmarkCalcAir(b *testing.B) {
	cmd := airCommand()
	base := map[string]string{"flow": "4000", "enter-db": "80", "enter-wb": "67", "leave-db": "55",
		"leave-wb": "54", "elevation": "1200"}
	withAcc := map[string]string{"flow-acc-pct": "3", "temp-acc": "0.3"}
	for k, v := range base {
		withAcc[k] = v
	}
	for _, bc := range []struct {
		name string
		vals map[string]string
	}{{"Capacity", base}, {"WithUncertainty", withAcc}} {
		b.Run(bc.name, func(b *testing.B) {
			var buf []byte
			for b.Loop() {
				out, err := evalCalc(cmd, bc.vals)
				if err != nil {
					b.Fatal(err)
				}
				buf = appendJSON(buf[:0], out)
			}
		})
	}
}

func TestCalcMotor(t *testing.T) {
	// NEMA MG 1 unbalance example (from memory): 460, 467, 450 V → 1.96 %; input power
	// √3·V·I·PF with the average volts (459) and amps (10.1667).
	out, stderr, code := runMain(t, "", "calc", "motor", "--volts", "460,467,450", "--amps", "10,11,9.5",
		"--pf", "0.85", "--fla", "10.5")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	m := mustJSON(t, out)
	for key, want := range map[string]float64{
		"voltage_imbalance": 1.96078,
		"current_imbalance": 8.19672,                                     // max dev 0.8333 of 10.1667 A, by hand
		"input_kw":          math.Sqrt(3) * 459 * 10.16667 * 0.85 / 1000, // 6.870 kW
		"percent_fla":       11.0 / 10.5 * 100,                           // highest leg against FLA
	} {
		if got := num64(t, m, key); !near(got, want, 2e-5) {
			t.Errorf("%s = %v, want %v", key, got, want)
		}
	}
	if w, _ := m["warnings"].([]any); len(w) != 2 {
		t.Errorf("warnings = %v, want imbalance above 1 %% and amps above FLA", m["warnings"])
	}
	if c, _ := m["caution"].(string); !strings.Contains(c, "qualified person") {
		t.Errorf("caution = %q", c)
	}
	if _, stderr, code := runMain(t, "", "calc", "motor", "--volts", "460,467", "--amps", "10"); code == 0 || !strings.Contains(stderr, "--volts") {
		t.Errorf("two voltage readings: exit %d, %q", code, stderr)
	}
}
