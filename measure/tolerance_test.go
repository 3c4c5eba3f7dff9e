package measure

import (
	"errors"
	"math"
	"testing"
)

// balRel fails unless got is within rel (relative) of want.
func balRel(t *testing.T, name string, got, want, rel float64) {
	t.Helper()
	if math.IsNaN(got) || math.Abs(got-want) > rel*math.Abs(want) {
		t.Errorf("%s = %.10g, want %.10g (rel %g)", name, got, want, rel)
	}
}

// balInputErr fails unless err is an *InputError naming input.
func balInputErr(t *testing.T, err error, input string) {
	t.Helper()
	var ie *InputError
	if !errors.As(err, &ie) {
		t.Fatalf("error = %v, want *InputError for %q", err, input)
	}
	if ie.Input != input {
		t.Errorf("InputError.Input = %q, want %q (%v)", ie.Input, input, err)
	}
}

func TestToleranceStatus(t *testing.T) {
	// Hand computation of the definition in CheckTolerance's doc: band
	// [design − design·low%, design + design·high%], uncertainty u = pct·measured + abs
	// (additive, as instrument makers state "±3 % of reading ± 7 cfm").
	acc := Accuracy{Pct: 3, Abs: 7}
	tests := []struct {
		name             string
		measured, design float64
		band             Band
		acc              Accuracy
		want             Status
		pct, lo, hi, u   float64
	}{
		// 200 cfm design, ±10 % → 180–220; 178 ± (5.34 + 7) = 165.66–190.34 straddles 180.
		{"UndeterminedLowEdge", 178, 200, Band{10, 10}, acc, StatusUndetermined, 89, 180, 220, 12.34},
		// 200 ± 13 = 187–213, inside 180–220.
		{"Within", 200, 200, Band{10, 10}, acc, StatusWithin, 100, 180, 220, 13},
		// 150 ± 11.5 = 138.5–161.5, wholly below 180.
		{"Low", 150, 200, Band{10, 10}, acc, StatusLow, 75, 180, 220, 11.5},
		// 250 ± 14.5 = 235.5–264.5, wholly above 220.
		{"High", 250, 200, Band{10, 10}, acc, StatusHigh, 125, 180, 220, 14.5},
		// 215 ± 13.45 = 201.55–228.45 straddles 220.
		{"UndeterminedHighEdge", 215, 200, Band{10, 10}, acc, StatusUndetermined, 107.5, 180, 220, 13.45},
		// ± 30 is wider than the band: 170–230 straddles both limits.
		{"UndeterminedWiderThanBand", 200, 200, Band{10, 10}, Accuracy{Abs: 30}, StatusUndetermined, 100, 180, 220, 30},
		// A perfect instrument: the limits themselves are within (closed band).
		{"ExactOnLowLimit", 180, 200, Band{10, 10}, Accuracy{}, StatusWithin, 90, 180, 220, 0},
		{"ExactOnHighLimit", 220, 200, Band{10, 10}, Accuracy{}, StatusWithin, 110, 180, 220, 0},
		{"JustBelowLowLimit", 179.9, 200, Band{10, 10}, Accuracy{}, StatusLow, 89.95, 180, 220, 0},
		// Interval 170–180 touches the low limit from outside: the true value may be 180.
		{"TouchingLowLimit", 175, 200, Band{10, 10}, Accuracy{Abs: 5}, StatusUndetermined, 87.5, 180, 220, 5},
		// Fan band −5/+10 on 10 000 cfm: 9500–11 000; 9400 ± 282 = 9118–9682 straddles 9500.
		{"FanBandUndetermined", 9400, 10000, DefaultFanBand, Accuracy{Pct: 3}, StatusUndetermined, 94, 9500, 11000, 282},
		// 9600 ± 96 = 9504–9696, inside 9500–11 000.
		{"FanBandWithin", 9600, 10000, DefaultFanBand, Accuracy{Pct: 1}, StatusWithin, 96, 9500, 11000, 96},
		// Zero measured flow with ± 7: −7 to 7, wholly below 180.
		{"ZeroMeasured", 0, 200, DefaultOutletBand, acc, StatusLow, 0, 180, 220, 7},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			r, err := CheckTolerance(tc.measured, tc.design, tc.band, tc.acc)
			if err != nil {
				t.Fatal(err)
			}
			if r.Status != tc.want {
				t.Errorf("Status = %q, want %q (%+v)", r.Status, tc.want, r)
			}
			balRel(t, "PercentOfDesign", r.PercentOfDesign, tc.pct, 1e-12)
			balRel(t, "Low", r.Low, tc.lo, 1e-12)
			balRel(t, "High", r.High, tc.hi, 1e-12)
			if tc.u == 0 {
				if r.Uncertainty != 0 {
					t.Errorf("Uncertainty = %g, want 0", r.Uncertainty)
				}
			} else {
				balRel(t, "Uncertainty", r.Uncertainty, tc.u, 1e-12)
			}
		})
	}
}

func TestToleranceDefaults(t *testing.T) {
	// shared/REFERENCES.md "Balancing tolerances" (common practice, from memory).
	for _, tc := range []struct {
		name      string
		got, want Band
	}{
		{"Outlet", DefaultOutletBand, Band{10, 10}},
		{"Fan", DefaultFanBand, Band{5, 10}},
		{"Hydronic", DefaultHydronicBand, Band{10, 10}},
	} {
		t.Run(tc.name, func(t *testing.T) {
			if tc.got != tc.want {
				t.Errorf("got %+v, want %+v", tc.got, tc.want)
			}
		})
	}
}

func TestToleranceErrors(t *testing.T) {
	ok := Accuracy{Pct: 3, Abs: 7}
	tests := []struct {
		name             string
		measured, design float64
		band             Band
		acc              Accuracy
		input            string
	}{
		{"ErrMeasuredNegative", -1, 200, DefaultOutletBand, ok, "measured"},
		{"ErrMeasuredNaN", math.NaN(), 200, DefaultOutletBand, ok, "measured"},
		{"ErrMeasuredInf", math.Inf(1), 200, DefaultOutletBand, ok, "measured"},
		{"ErrDesignZero", 100, 0, DefaultOutletBand, ok, "design"},
		{"ErrDesignTiny", 100, 1e-300, DefaultOutletBand, ok, "design"},
		{"ErrDesignNaN", 100, math.NaN(), DefaultOutletBand, ok, "design"},
		{"ErrBandLowNegative", 100, 200, Band{-10, 10}, ok, "band_low_pct"},
		{"ErrBandLowAbove100", 100, 200, Band{101, 10}, ok, "band_low_pct"},
		{"ErrBandHighNaN", 100, 200, Band{10, math.NaN()}, ok, "band_high_pct"},
		{"ErrAccuracyPctNegative", 100, 200, DefaultOutletBand, Accuracy{Pct: -3}, "accuracy_pct"},
		{"ErrAccuracyAbsNegative", 100, 200, DefaultOutletBand, Accuracy{Abs: -7}, "accuracy_abs"},
		{"ErrAccuracyAbsInf", 100, 200, DefaultOutletBand, Accuracy{Abs: math.Inf(1)}, "accuracy_abs"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			_, err := CheckTolerance(tc.measured, tc.design, tc.band, tc.acc)
			balInputErr(t, err, tc.input)
		})
	}
}

func FuzzCheckTolerance(f *testing.F) {
	f.Add(178.0, 200.0, 10.0, 10.0, 3.0, 7.0)
	f.Add(0.0, 1e-9, 0.0, 100.0, 100.0, 1e12)
	f.Add(1e12, 1e-9, 100.0, 100.0, 100.0, 1e12)
	f.Add(math.NaN(), math.Inf(1), -0.0, 5.0, 0.0, 0.0)
	f.Fuzz(func(t *testing.T, measured, design, low, high, pct, abs float64) {
		r, err := CheckTolerance(measured, design, Band{low, high}, Accuracy{pct, abs})
		if err != nil {
			var ie *InputError
			if !errors.As(err, &ie) {
				t.Fatalf("error %v is not an *InputError", err)
			}
			return
		}
		for _, v := range []float64{r.PercentOfDesign, r.Low, r.High, r.Uncertainty} {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				t.Fatalf("non-finite result %+v", r)
			}
		}
		switch r.Status {
		case StatusWithin, StatusLow, StatusHigh, StatusUndetermined:
		default:
			t.Fatalf("unknown status %q", r.Status)
		}
		if r.Low > r.High || r.Uncertainty < 0 {
			t.Fatalf("inconsistent result %+v", r)
		}
	})
}

// A reading exactly on a limit must stay on it after the unit round trip every
// caller makes (cfm in, m³/s stored, cfm out): 275 of 250 cfm is +10 %, within a
// ±10 % band (the band is closed).
func TestToleranceLimitAfterUnitRoundTrip(t *testing.T) {
	for _, tc := range []struct {
		name             string
		measured, design float64
	}{
		{"High275of250", CFM(275).CFM(), 250},
		{"Low81of90", CFM(81).CFM(), 90},
		{"HighFactor", mustOutletFlowHood(t, CFM(200), 1.1).CFM(), 200},
		{"LowSI", LitersPerSecond(45).Lps(), 50},
	} {
		t.Run(tc.name, func(t *testing.T) {
			r, err := CheckTolerance(tc.measured, tc.design, Band{10, 10}, Accuracy{})
			if err != nil {
				t.Fatal(err)
			}
			if r.Status != StatusWithin {
				t.Errorf("%v of %v at ±10 %%: %s, want within (on the limit)", tc.measured, tc.design, r.Status)
			}
		})
	}
	// Just outside the slack is still out.
	if r, _ := CheckTolerance(275.001, 250, Band{10, 10}, Accuracy{}); r.Status != StatusHigh {
		t.Errorf("275.001 of 250: %s, want high", r.Status)
	}
}

func mustOutletFlowHood(t *testing.T, q VolumeFlow, factor float64) VolumeFlow {
	t.Helper()
	f, err := OutletFlowHood(q, factor)
	if err != nil {
		t.Fatal(err)
	}
	return f
}

// TestToleranceSide checks which side of the band an undetermined reading is
// on. Figures by hand: design 100, band ±10 % = 90–110.
func TestToleranceSide(t *testing.T) {
	cases := []struct {
		name     string
		measured float64
		acc      Accuracy
		status   Status
		side     Status
	}{
		{"HighWithinAccuracy", 112, Accuracy{Pct: 5}, StatusUndetermined, StatusHigh}, // 112 ± 5.6 straddles 110
		{"LowWithinAccuracy", 88, Accuracy{Abs: 3}, StatusUndetermined, StatusLow},    // 88 ± 3 straddles 90
		{"InsideNearLimit", 108, Accuracy{Abs: 3}, StatusUndetermined, StatusWithin},  // 108 ± 3 straddles 110
		{"HighDecided", 120, Accuracy{Abs: 3}, StatusHigh, ""},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			r, err := CheckTolerance(c.measured, 100, Band{LowPct: 10, HighPct: 10}, c.acc)
			if err != nil {
				t.Fatal(err)
			}
			if r.Status != c.status || r.Side != c.side {
				t.Errorf("status %q side %q, want %q %q", r.Status, r.Side, c.status, c.side)
			}
		})
	}
}
