package measure

import (
	"math"
	"testing"
)

func TestOutletFlowHood(t *testing.T) {
	// Hand computation: corrected flow = reading × factor.
	tests := []struct {
		name    string
		reading VolumeFlow
		factor  float64
		wantCFM float64
	}{
		{"FactorBelowOne", CFM(250), 0.95, 237.5},
		{"FactorOne", CFM(180), 1, 180},
		{"FactorAboveOne", CFM(120), 1.25, 150},
		{"ZeroReading", 0, 1.1, 0},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			q, err := OutletFlowHood(tc.reading, tc.factor)
			if err != nil {
				t.Fatal(err)
			}
			if tc.wantCFM == 0 {
				if q != 0 {
					t.Errorf("flow = %g cfm, want 0", q.CFM())
				}
				return
			}
			balRel(t, "cfm", q.CFM(), tc.wantCFM, 1e-12)
		})
	}
}

func TestOutletFlowAk(t *testing.T) {
	// Hand computation: Q = V·Ak; 500 fpm × 0.5 ft² = 250 cfm; 2.5 m/s × 0.1 m² = 0.25 m³/s.
	t.Run("IP", func(t *testing.T) {
		q, err := OutletFlowAk(FPM(500), SquareFeet(0.5))
		if err != nil {
			t.Fatal(err)
		}
		balRel(t, "cfm", q.CFM(), 250, 1e-12)
	})
	t.Run("SI", func(t *testing.T) {
		q, err := OutletFlowAk(MetersPerSecond(2.5), SquareMeters(0.1))
		if err != nil {
			t.Fatal(err)
		}
		balRel(t, "L/s", q.Lps(), 250, 1e-12)
	})
}

func TestOutletPercentOfDesign(t *testing.T) {
	// Hand computation: 178 ÷ 200 × 100 = 89 %; 440 ÷ 400 = 110 %.
	for _, tc := range []struct {
		name             string
		measured, design VolumeFlow
		want             float64
	}{
		{"Air", CFM(178), CFM(200), 89},
		{"Water", GPM(44), GPM(40), 110},
	} {
		t.Run(tc.name, func(t *testing.T) {
			p, err := PercentOfDesign(tc.measured, tc.design)
			if err != nil {
				t.Fatal(err)
			}
			balRel(t, "percent", p, tc.want, 1e-12)
		})
	}
}

func TestOutletErrors(t *testing.T) {
	nan := math.NaN()
	tests := []struct {
		name  string
		call  func() error
		input string
	}{
		{"ErrReadingNegative", func() error { _, err := OutletFlowHood(CFM(-1), 1); return err }, "reading"},
		{"ErrReadingNaN", func() error { _, err := OutletFlowHood(VolumeFlow(nan), 1); return err }, "reading"},
		{"ErrReadingHuge", func() error { _, err := OutletFlowHood(VolumeFlow(math.MaxFloat64), 2); return err }, "reading"},
		{"ErrFactorZero", func() error { _, err := OutletFlowHood(CFM(100), 0); return err }, "factor"},
		{"ErrFactorInf", func() error { _, err := OutletFlowHood(CFM(100), math.Inf(1)); return err }, "factor"},
		{"ErrVelocityNegative", func() error { _, err := OutletFlowAk(FPM(-5), SquareFeet(1)); return err }, "velocity"},
		{"ErrAkZero", func() error { _, err := OutletFlowAk(FPM(500), 0); return err }, "ak"},
		{"ErrAkNaN", func() error { _, err := OutletFlowAk(FPM(500), Area(nan)); return err }, "ak"},
		{"ErrMeasuredNegative", func() error { _, err := PercentOfDesign(CFM(-1), CFM(200)); return err }, "measured"},
		{"ErrDesignZero", func() error { _, err := PercentOfDesign(CFM(100), 0); return err }, "design"},
		{"ErrDesignDenormal", func() error { _, err := PercentOfDesign(CFM(100), VolumeFlow(5e-324)); return err }, "design"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			balInputErr(t, tc.call(), tc.input)
		})
	}
}
