package measure

import (
	"errors"
	"math"
	"testing"
)

func TestPsychroChart(t *testing.T) {
	curves, err := PsychroChart(IP, 14.696, 40, 100)
	if err != nil {
		t.Fatal(err)
	}
	if len(curves) != 10 || curves[0].RelHum != 10 || curves[9].RelHum != 100 {
		t.Fatalf("%d curves from %v to %v %%", len(curves), curves[0].RelHum, curves[len(curves)-1].RelHum)
	}
	sat := curves[9]
	if len(sat.DryBulb) != 61 || sat.DryBulb[0] != 40 || sat.DryBulb[60] != 100 {
		t.Fatalf("saturation curve: %d points from %v to %v", len(sat.DryBulb), sat.DryBulb[0], sat.DryBulb[len(sat.DryBulb)-1])
	}
	// Saturation humidity ratio at 14.696 psia: 41 °F 0.005425 and 77 °F
	// 0.020173 lb/lb, ASHRAE 2017 ch. 1 Table 2 via REFERENCES.md (rel 0.5 %).
	for _, c := range []struct{ db, ws float64 }{{41, 0.005425}, {77, 0.020173}} {
		got := sat.HumRatio[int(c.db-40)]
		if math.Abs(got-c.ws)/c.ws > 5e-3 {
			t.Errorf("Ws(%v °F) = %.6f, want %.6f (Table 2)", c.db, got, c.ws)
		}
	}
	// The 50 % curve is the state function's own answer at each point.
	half := curves[4]
	for i, db := range half.DryBulb {
		st, err := (AirSpec{DryBulb: db, Kind: RelHum, Humidity: 50}).State(IP, 14.696)
		if err != nil || st.HumRatio != half.HumRatio[i] {
			t.Fatalf("50 %% at %v °F: %v, state gives %v (%v)", db, half.HumRatio[i], st.HumRatio, err)
		}
	}
	// At altitude the same RH holds more water per pound of dry air.
	high, err := PsychroChart(IP, 12.0, 40, 100)
	if err != nil {
		t.Fatal(err)
	}
	if high[9].HumRatio[40] <= sat.HumRatio[40] {
		t.Errorf("Ws(80 °F) at 12 psia %v not above sea level %v", high[9].HumRatio[40], sat.HumRatio[40])
	}
	// SI: half-degree points.
	si, err := PsychroChart(SI, 101.325, 0, 40)
	if err != nil || len(si[0].DryBulb) != 81 {
		t.Fatalf("SI chart: %v points, %v", len(si[0].DryBulb), err)
	}
}

func TestPsychroChartErrors(t *testing.T) {
	for _, c := range []struct {
		name      string
		low, high float64
		input     string
	}{
		{"ErrNarrow", 70, 72, "high"},
		{"ErrReversed", 90, 40, "high"},
		{"ErrTooWide", -100, 300, "high"},
		{"ErrNaN", math.NaN(), 80, "low"},
	} {
		t.Run(c.name, func(t *testing.T) {
			_, err := PsychroChart(IP, 14.696, c.low, c.high)
			var ie *InputError
			if !errors.As(err, &ie) || ie.Input != c.input {
				t.Fatalf("error %v; want an InputError on %s", err, c.input)
			}
		})
	}
}
