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

func TestWetBulbLine(t *testing.T) {
	fx := loadPsychroFixture(t)
	// PsychroLib 2.5.0 states given by dry and wet bulb at sea level
	// (testdata/psychrolib_states.json): each lies on its wet-bulb line.
	checked := 0
	for _, s := range fx.States {
		if s.Input != "wet_bulb" || s.Elevation != 0 || s.DryBulb < 30 || s.DryBulb > 100 {
			continue
		}
		u := psyMustUnits(t, s.Units)
		ln, err := WetBulbLine(u, s.Pressure, s.Humidity, s.DryBulb)
		if err != nil {
			t.Fatalf("%s wb %v: %v", s.Units, s.Humidity, err)
		}
		last := len(ln.DryBulb) - 1
		if math.Abs(ln.DryBulb[last]-s.DryBulb) > 1e-9 {
			t.Fatalf("%s wb %v: line ends at %v, want %v", s.Units, s.Humidity, ln.DryBulb[last], s.DryBulb)
		}
		if got := ln.HumRatio[last]; math.Abs(got-s.HumRatio)/s.HumRatio > 1e-4 {
			t.Errorf("%s wb %v db %v: W %.7f, PsychroLib %.7f", s.Units, s.Humidity, s.DryBulb, got, s.HumRatio)
		}
		checked++
	}
	if checked < 8 {
		t.Fatalf("only %d fixture states checked", checked)
	}
	// A line starts on saturation: Ws(41 °F) = 0.005425 lb/lb at 14.696
	// psia, ASHRAE 2017 ch. 1 Table 2 (rel 0.5 %), and humidity ratio falls
	// as the dry bulb rises along it.
	ln, err := WetBulbLine(IP, 14.696, 41, 120)
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(ln.HumRatio[0]-0.005425)/0.005425 > 5e-3 {
		t.Errorf("wb 41 °F starts at W %v, want Ws 0.005425", ln.HumRatio[0])
	}
	for i := 1; i < len(ln.HumRatio); i++ {
		if ln.HumRatio[i] >= ln.HumRatio[i-1] {
			t.Fatalf("W rises along the wet-bulb line at %v °F", ln.DryBulb[i])
		}
	}
	// It stops before the air would be drier than dry: 41 °F wet bulb is
	// reached by dry air near 60 °F (from memory; the bound below is loose).
	if end := ln.DryBulb[len(ln.DryBulb)-1]; end < 55 || end > 70 {
		t.Errorf("wb 41 °F line ends at %v °F", end)
	}
	if _, err := WetBulbLine(IP, 14.696, 70, 60); err == nil {
		t.Error("a line ending below its wet bulb was accepted")
	}
}

func TestPsychroWetBulbLines(t *testing.T) {
	lines, err := PsychroWetBulbLines(IP, 14.696, 40, 100)
	if err != nil {
		t.Fatal(err)
	}
	if len(lines) != 12 || lines[0].WetBulb != 40 || lines[11].WetBulb != 95 {
		t.Fatalf("%d lines, first %v", len(lines), lines[0].WetBulb)
	}
	si, err := PsychroWetBulbLines(SI, 101.325, 5, 35)
	if err != nil || len(si) != 15 || si[0].WetBulb != 6 {
		t.Fatalf("SI: %d lines from %v, %v", len(si), si[0].WetBulb, err)
	}
	if _, err := PsychroWetBulbLines(IP, 14.696, 70, 72); err == nil {
		t.Error("a 2 °F span was accepted")
	}
}
