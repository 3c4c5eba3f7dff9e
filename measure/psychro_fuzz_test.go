package measure

import (
	"errors"
	"math"
	"testing"
)

func psyFinite(vs ...float64) bool {
	for _, v := range vs {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return false
		}
	}
	return true
}

// psyCheckErr fails unless err is an *InputError with an input name.
func psyCheckErr(t *testing.T, err error) {
	t.Helper()
	var ie *InputError
	if !errors.As(err, &ie) {
		t.Fatalf("error %v (%T) is not an *InputError", err, err)
	}
	if ie.Input == "" || err.Error() == "" {
		t.Fatalf("InputError without input name or message: %#v", ie)
	}
}

// FuzzAirSpecState: any input gives either an *InputError or a finite, physically
// ordered state (dew point ≤ wet bulb ≤ dry bulb, 0 ≤ RH, W > 0, v > 0).
func FuzzAirSpecState(f *testing.F) {
	f.Add(uint8(IP), 75.0, uint8(RelHum), 50.0, 14.696)
	f.Add(uint8(SI), 24.0, uint8(WetBulb), 17.0, 101.325)
	f.Add(uint8(IP), 40.0, uint8(HumRatio), 0.00209, 14.696)
	f.Add(uint8(SI), -20.0, uint8(DewPoint), -25.0, 70.0)
	f.Add(uint8(IP), 211.0, uint8(RelHum), 100.0, 14.696)
	f.Add(uint8(IP), -100.0, uint8(RelHum), 0.0, 16.0)
	f.Add(uint8(SI), 0.01, uint8(WetBulb), 0.0, 35.0)
	f.Add(uint8(3), math.NaN(), uint8(0), math.Inf(1), -1.0)
	f.Fuzz(func(t *testing.T, u uint8, db float64, kind uint8, hum, p float64) {
		st, err := AirSpec{DryBulb: db, Kind: HumidityKind(kind), Humidity: hum}.State(UnitSystem(u), p)
		if err != nil {
			psyCheckErr(t, err)
			return
		}
		if !psyFinite(st.DryBulb, st.WetBulb, st.DewPoint, st.RelHum, st.HumRatio, st.Enthalpy,
			st.SpecVolume, st.Density, st.Pressure, st.VapPres) {
			t.Fatalf("non-finite state %+v", st)
		}
		// Solver tolerance, plus PsychroLib's floor W ≥ 1e-7 which can lift the
		// dew point of very dry air above a dew point given as input.
		const slack = 1e-4
		if st.WetBulb > st.DryBulb+slack || (HumidityKind(kind) != DewPoint && st.DewPoint > st.WetBulb+slack) {
			t.Fatalf("temperatures out of order: %+v", st)
		}
		if st.HumRatio < minHumRatio || st.SpecVolume <= 0 || st.Density <= 0 || st.RelHum < 0 || st.RelHum > 100.1 {
			t.Fatalf("implausible state %+v", st)
		}
	})
}

// FuzzCoilCapacity: any pair of readings, flow and basis gives either an
// *InputError or finite capacity and uncertainty, with Total ≥ 0.
func FuzzCoilCapacity(f *testing.F) {
	f.Add(uint8(IP), 14.696, 2000.0, uint8(FlowAtEnter), 80.0, uint8(WetBulb), 67.0, 55.0, uint8(WetBulb), 54.0, 5.0, 0.5, 3.0)
	f.Add(uint8(SI), 101.325, 1000.0, uint8(FlowStandard), 15.0, uint8(RelHum), 40.0, 35.0, uint8(RelHum), 12.0, 3.0, 0.2, 2.0)
	f.Add(uint8(IP), 5.0, 1e-9, uint8(FlowAtLeave), 32.0, uint8(RelHum), 100.0, 32.0, uint8(RelHum), 100.0, 100.0, 18.0, 50.0)
	f.Add(uint8(SI), 35.0, 1e6, uint8(4), -73.0, uint8(HumRatio), 0.0, 72.0, uint8(DewPoint), 72.0, 0.0, 0.0, 0.0)
	f.Fuzz(func(t *testing.T, u uint8, p, flow float64, basis uint8, te float64, ke uint8, he, tl float64, kl uint8, hl, flowPct, tAcc, rhAcc float64) {
		us := UnitSystem(u)
		q := AirFlowIn(us, flow)
		b := FlowBasis(basis)
		es, le := AirSpec{te, HumidityKind(ke), he}, AirSpec{tl, HumidityKind(kl), hl}
		acc := AirAccuracy{FlowPct: flowPct, Temp: TempDiffIn(us, tAcc), RHPoints: rhAcc}
		ur, err := CoilUncertainty(us, p, q, b, es, le, acc)
		if err != nil {
			psyCheckErr(t, err)
		} else if !psyFinite(float64(ur.Total), float64(ur.Sensible)) || ur.Total < 0 || ur.Sensible < 0 {
			t.Fatalf("uncertainty %+v", ur)
		}
		e, err := es.State(us, p)
		if err != nil {
			return
		}
		l, err := le.State(us, p)
		if err != nil {
			return
		}
		r, err := CoilCapacity(q, b, e, l)
		if err != nil {
			psyCheckErr(t, err)
			return
		}
		if !psyFinite(float64(r.Total), float64(r.Sensible), float64(r.Latent), r.SHR, float64(r.MassFlow)) {
			t.Fatalf("non-finite result %+v", r)
		}
		if r.Total < 0 || r.MassFlow <= 0 || (r.Process != "cooling" && r.Process != "heating") {
			t.Fatalf("implausible result %+v", r)
		}
	})
}
