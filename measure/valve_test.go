package measure

import (
	"errors"
	"math"
	"strings"
	"testing"
)

// TestValveKvCv: Kv = 0.865·Cv, exactly 0.86498 (shared/REFERENCES.md).
func TestValveKvCv(t *testing.T) {
	if got := KvFromCv(1); math.Abs(got-0.86498) > 5e-6 {
		t.Errorf("KvFromCv(1) = %.6f, want 0.86498", got)
	}
	if got := KvFromCv(10); math.Abs(got-8.65) > 0.005 {
		t.Errorf("KvFromCv(10) = %.4f, want 8.65 (0.865·Cv)", got)
	}
	if got := CvFromKv(KvFromCv(37.5)); relErr(got, 37.5) > 1e-15 {
		t.Errorf("round trip 37.5 → %.17g", got)
	}
	// The two forms of the square-root law agree for the same valve: Cv 10 is
	// Kv 8.6498, and 1 bar = 14.5038 psi.
	qCv, err1 := ValveFlowCv(10, Kilopascals(100), 1)
	qKv, err2 := ValveFlowKv(KvFromCv(10), Kilopascals(100), 1)
	if err1 != nil || err2 != nil || relErr(qCv.M3s(), qKv.M3s()) > 1e-12 {
		t.Errorf("Cv form %v, Kv form %v (%v, %v)", qCv.GPM(), qKv.GPM(), err1, err2)
	}
}

// TestValveFlow: Q = Cv·√(ΔP/SG) (shared/REFERENCES.md).
func TestValveFlow(t *testing.T) {
	cases := []struct {
		name string
		cv   float64
		dp   Pressure
		sg   float64
		gpm  float64
		tol  float64 // relative
	}{
		// 10·√(4/1) = 20 gpm, exact arithmetic.
		{"Cv10At4Psi", 10, Psi(4), 1, 20, 1e-12},
		{"Cv10At1Psi", 10, Psi(1), 1, 10, 1e-12},
		// 25·√(9/1.0) = 75; with SG 1.04 (a glycol): 25·√(9/1.04) = 73.5436.
		{"Cv25At9PsiSG1p04", 25, Psi(9), 1.04, 73.54355, 1e-6},
		// 4 psi read as feet of head: 2.31 ft per psi (common practice), so
		// 9.24 ft; units.go's 60 °F water gives 2.3090 ft/psi, 0.04 % apart.
		{"Cv10At9p24Ft", 10, FtWater(9.24), 1, 20, 1e-3},
		// 4 psi = 27.579 kPa (6.894757 kPa per psi).
		{"Cv10At27p579KPa", 10, Kilopascals(27.579), 1, 20, 1e-5},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			q, err := ValveFlowCv(c.cv, c.dp, c.sg)
			if err != nil {
				t.Fatal(err)
			}
			if e := relErr(q.GPM(), c.gpm); e > c.tol {
				t.Errorf("Q = %.6f gpm, want %g (rel %.1e)", q.GPM(), c.gpm, e)
			}
		})
	}
	t.Run("Kv8At0p25Bar", func(t *testing.T) {
		// 8·√(0.25/1) = 4 m³/h.
		q, err := ValveFlowKv(8, Kilopascals(25), 1)
		if err != nil || relErr(q.M3h(), 4) > 1e-12 {
			t.Errorf("Q = %v m³/h, %v; want 4", q.M3h(), err)
		}
	})
	t.Run("FtPerPsi", func(t *testing.T) {
		// 2.31 ft per psi at 60 °F (common practice); 2.3089 from IAPWS density.
		if got := Psi(1).FtWater(); math.Abs(got-2.3089) > 0.0002 {
			t.Errorf("1 psi = %.5f ft of water, want 2.3089", got)
		}
	})
}

func TestValveSpecificGravity(t *testing.T) {
	// Water at 60 °F is the reference (units.go, 999.01 kg/m³).
	if got := SpecificGravity(KgPerM3(999.01)); got != 1 {
		t.Errorf("SG of 60 °F water = %.17g, want 1", got)
	}
	// 30 % PG at 20 °C, 1028.35 kg/m³ (ASHRAE table cell): 1028.35/999.01 = 1.02937.
	if got := SpecificGravity(KgPerM3(1028.35)); math.Abs(got-1.02937) > 1e-5 {
		t.Errorf("SG = %.6f, want 1.02937", got)
	}
	for _, bad := range []float64{0, -5, math.NaN(), math.Inf(1)} {
		if got := SpecificGravity(KgPerM3(bad)); got != 0 {
			t.Errorf("SpecificGravity(%v) = %v, want 0", bad, got)
		}
	}
	if _, err := ValveFlowCv(10, Psi(4), SpecificGravity(KgPerM3(math.NaN()))); err == nil {
		t.Error("NaN density accepted through SpecificGravity")
	}
}

func TestValveErrors(t *testing.T) {
	cases := []struct {
		name   string
		kv     bool
		coef   float64
		dp     Pressure
		sg     float64
		input  string
		reason string // substring of Reason, "" for a plain range
	}{
		{"ErrCvZero", false, 0, Psi(4), 1, "cv", "above 0"},
		{"ErrCvNaN", false, math.NaN(), Psi(4), 1, "cv", "above 0"},
		{"ErrCvHuge", false, 1e300, Psi(4), 1, "cv", ""},
		{"ErrKvNegative", true, -1, Kilopascals(10), 1, "kv", "above 0"},
		{"ErrDpZero", false, 10, 0, 1, "dp", "no flow"},
		{"ErrDpNegative", false, 10, Psi(-2), 1, "dp", "reversed"},
		{"ErrDpNegativeKv", true, 10, Kilopascals(-2), 1, "dp", "reversed"},
		{"ErrDpInf", false, 10, Pressure(math.Inf(1)), 1, "dp", ""},
		{"ErrDpNaN", true, 10, Pressure(math.NaN()), 1, "dp", ""},
		{"ErrSGZero", false, 10, Psi(4), 0, "sg", "above 0"},
		{"ErrSGHuge", true, 10, Kilopascals(10), 1e300, "sg", ""},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			var q VolumeFlow
			var err error
			if c.kv {
				q, err = ValveFlowKv(c.coef, c.dp, c.sg)
			} else {
				q, err = ValveFlowCv(c.coef, c.dp, c.sg)
			}
			ie := wantInputError(t, err, c.input)
			if !strings.Contains(ie.Reason, c.reason) {
				t.Errorf("Reason %q, want it to mention %q", ie.Reason, c.reason)
			}
			if q != 0 {
				t.Errorf("Q = %v alongside an error", q)
			}
		})
	}
	t.Run("UnitsInMessage", func(t *testing.T) {
		_, err := ValveFlowKv(10, Kilopascals(-20), 1)
		if err == nil || !strings.Contains(err.Error(), "-0.2 bar") {
			t.Errorf("err = %v, want ΔP reported as -0.2 bar", err)
		}
	})
}

// FuzzValveFlow: any inputs give a finite flow or an *InputError.
func FuzzValveFlow(f *testing.F) {
	f.Add(10.0, 27579.0, 1.0)
	f.Add(0.0, -1.0, math.NaN())
	f.Fuzz(func(t *testing.T, coef, dpPa, sg float64) {
		for _, fn := range []func(float64, Pressure, float64) (VolumeFlow, error){ValveFlowCv, ValveFlowKv} {
			q, err := fn(coef, Pascals(dpPa), sg)
			if err != nil {
				var ie *InputError
				if !errors.As(err, &ie) {
					t.Fatalf("error %v is not *InputError", err)
				}
				continue
			}
			if !finite(q.M3s()) || q <= 0 {
				t.Fatalf("Q = %v for %v, %v, %v", q, coef, dpPa, sg)
			}
		}
	})
}
