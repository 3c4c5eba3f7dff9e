package measure

import (
	"math"
	"testing"
)

func TestPitotVelocityUncertainty(t *testing.T) {
	rho := LbPerFt3(0.075)
	t.Run("OKMidRange", func(t *testing.T) {
		// 0.25 ± 0.005 in. w.g. (a manometer's ±1 % ± 0.0025 in. w.g. at
		// 0.25, figures invented): by hand with V = 1097.2·√(VP/ρ) fpm (the
		// 60 °F column of PitotVelocity's doc), V(0.255) − V(0.245) over 2 =
		// 1097.2·(√3.4 − √3.26667)/2 = 20.04 fpm, close to the first-order
		// V/2 · 0.005/0.25 = 2003.2 × 0.01 = 20.03 fpm.
		u, err := PitotVelocityUncertainty(InWG(0.25), InWG(0.005), rho)
		if err != nil {
			t.Fatal(err)
		}
		if got := u.FPM(); math.Abs(got-20.04) > 0.05 {
			t.Errorf("± = %.3f fpm, want 20.04", got)
		}
	})
	t.Run("OKNearZero", func(t *testing.T) {
		// 0.002 ± 0.003 in. w.g.: the span runs from 0 to V(0.005) =
		// 1097.2·√(0.005/0.075) = 283.3 fpm, so ± 141.6 fpm.
		u, err := PitotVelocityUncertainty(InWG(0.002), InWG(0.003), rho)
		if err != nil {
			t.Fatal(err)
		}
		if got := u.FPM(); math.Abs(got-141.6) > 0.5 {
			t.Errorf("± = %.2f fpm, want 141.6", got)
		}
	})
	t.Run("ErrDensity", func(t *testing.T) {
		if _, err := PitotVelocityUncertainty(InWG(0.25), InWG(0.005), KgPerM3(0.1)); err == nil {
			t.Error("want an error for a density of 0.1 kg/m³")
		}
	})
}
