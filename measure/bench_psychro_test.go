package measure

import "testing"

// Speed targets (DESIGN.md §7): a state from dry bulb, RH and pressure with wet
// bulb and dew point solved under 2 µs; a coil capacity from two readings (two
// states plus the capacity) under 5 µs; no allocations on either path.

var (
	psyBenchState AirState
	psyBenchCoil  CoilResult
	psyBenchUnc   CoilUncertaintyResult
)

// psyBenchSpecs are field readings across the range: cold and dry, mild, hot and
// humid, and one whose wet bulb sits near freezing.
var psyBenchSpecs = []AirSpec{
	{75, RelHum, 50}, {95, RelHum, 40}, {55, RelHum, 92}, {20, RelHum, 60},
	{40, RelHum, 30}, {105, RelHum, 15}, {68, RelHum, 35}, {85, RelHum, 70},
}

func BenchmarkPsychroStateRelHumIP(b *testing.B) {
	b.ReportAllocs()
	for i := 0; b.Loop(); i++ {
		st, err := psyBenchSpecs[i%len(psyBenchSpecs)].State(IP, 14.696)
		if err != nil {
			b.Fatal(err)
		}
		psyBenchState = st
	}
}

func BenchmarkPsychroStateRelHumSI(b *testing.B) {
	specs := []AirSpec{{24, RelHum, 50}, {35, RelHum, 40}, {13, RelHum, 92}, {-7, RelHum, 60}}
	b.ReportAllocs()
	for i := 0; b.Loop(); i++ {
		st, err := specs[i%len(specs)].State(SI, 101.325)
		if err != nil {
			b.Fatal(err)
		}
		psyBenchState = st
	}
}

func BenchmarkPsychroStateWetBulbIP(b *testing.B) {
	specs := []AirSpec{{80, WetBulb, 67}, {55, WetBulb, 54}, {95, WetBulb, 75}, {30, WetBulb, 27}}
	b.ReportAllocs()
	for i := 0; b.Loop(); i++ {
		st, err := specs[i%len(specs)].State(IP, 12.23)
		if err != nil {
			b.Fatal(err)
		}
		psyBenchState = st
	}
}

func BenchmarkAirCoilCapacity(b *testing.B) {
	pairs := [][2]AirSpec{
		{{80, RelHum, 50}, {55, RelHum, 95}},
		{{78, WetBulb, 65}, {57, WetBulb, 56}},
		{{60, RelHum, 40}, {95, RelHum, 12}},
	}
	b.ReportAllocs()
	for i := 0; b.Loop(); i++ {
		pr := pairs[i%len(pairs)]
		e, err := pr[0].State(IP, 12.23)
		if err != nil {
			b.Fatal(err)
		}
		l, err := pr[1].State(IP, 12.23)
		if err != nil {
			b.Fatal(err)
		}
		r, err := CoilCapacity(CFM(4000), FlowAtEnter, e, l)
		if err != nil {
			b.Fatal(err)
		}
		psyBenchCoil = r
	}
}

func BenchmarkAirCoilUncertainty(b *testing.B) {
	acc := AirAccuracy{FlowPct: 5, Temp: DeltaF(0.5), RHPoints: 3}
	e, l := AirSpec{80, RelHum, 50}, AirSpec{55, RelHum, 95}
	b.ReportAllocs()
	for b.Loop() {
		r, err := CoilUncertainty(IP, 14.696, CFM(4000), FlowAtEnter, e, l, acc)
		if err != nil {
			b.Fatal(err)
		}
		psyBenchUnc = r
	}
}
