package measure

import (
	"fmt"
	"math"
)

// ChartCurve is a line of constant relative humidity on a psychrometric chart:
// dry bulb (°F or °C) against humidity ratio (lb/lb or kg/kg of dry air).
type ChartCurve struct {
	RelHum   float64   // percent
	DryBulb  []float64 // °F (IP) or °C (SI)
	HumRatio []float64 // lb/lb (IP) or kg/kg (SI)
}

// PsychroChart returns the curves of 10, 20 … 100 % relative humidity from dry
// bulb low to high (°F or °C, 5 to 200 °F or 5 to 100 °C apart) at barometric pressure
// p (psia or kPa), one point per degree F (half degree C), for drawing the
// chart of a coil process at the site's pressure rather than at sea level.
func PsychroChart(u UnitSystem, p, low, high float64) ([]ChartCurve, error) {
	c, err := psyFor(u)
	if err != nil {
		return nil, err
	}
	step := 1.0
	if u == SI {
		step = 0.5
	}
	span := 200.0
	if u == SI {
		span = 100
	}
	if err := checkRange("low", low, c.dbMin, c.tMax-5, c.tUnit); err != nil {
		return nil, err
	}
	if err := checkRange("high", high, low+5, math.Min(low+span, c.tMax), c.tUnit); err != nil {
		return nil, err
	}
	var curves []ChartCurve
	for rh := 10.0; rh <= 100; rh += 10 {
		cv := ChartCurve{RelHum: rh}
		for t := low; t <= high+1e-9; t += step {
			st, err := (AirSpec{DryBulb: t, Kind: RelHum, Humidity: rh}).State(u, p)
			if err != nil {
				return nil, fmt.Errorf("chart at %g %s, %g %%: %w", t, c.tUnit, rh, err)
			}
			cv.DryBulb = append(cv.DryBulb, t)
			cv.HumRatio = append(cv.HumRatio, st.HumRatio)
		}
		curves = append(curves, cv)
	}
	return curves, nil
}

// ChartLine is a line of constant wet bulb on a psychrometric chart: dry bulb
// (°F or °C) against humidity ratio (lb/lb or kg/kg of dry air), from
// saturation (dry bulb = wet bulb) towards drier, warmer air.
type ChartLine struct {
	WetBulb  float64   // °F (IP) or °C (SI)
	DryBulb  []float64 // °F (IP) or °C (SI)
	HumRatio []float64 // lb/lb (IP) or kg/kg (SI)
}

// WetBulbLine returns the line of thermodynamic wet bulb wb (°F or °C) at
// barometric pressure p (psia or kPa), one point per degree F (half degree
// C) from the dry bulb wb up to high, ending where the air would be drier
// than dry air can be. Each point is AirSpec{Kind: WetBulb}'s own state
// (ASHRAE Handbook—Fundamentals 2017, ch. 1, eq. 33 and 35).
func WetBulbLine(u UnitSystem, p, wb, high float64) (ChartLine, error) {
	c, err := psyFor(u)
	if err != nil {
		return ChartLine{}, err
	}
	if err := checkRange("pressure", p, c.pMin, c.pMax, c.pUnit); err != nil {
		return ChartLine{}, err
	}
	if err := checkRange("wet_bulb", wb, c.dbMin, c.tMax-5, c.tUnit); err != nil {
		return ChartLine{}, err
	}
	if err := checkRange("high", high, wb, c.tMax, c.tUnit); err != nil {
		return ChartLine{}, err
	}
	step := 1.0
	if u == SI {
		step = 0.5
	}
	ln := ChartLine{WetBulb: wb}
	for i := 0; ; i++ {
		t := wb + float64(i)*step
		if t > high+1e-9 || c.wetBulbHumRatio(t, wb, p) < 0 {
			break
		}
		st, err := (AirSpec{DryBulb: t, Kind: WetBulb, Humidity: wb}).State(u, p)
		if err != nil {
			return ChartLine{}, fmt.Errorf("wet-bulb line %g %s at %g %s: %w", wb, c.tUnit, t, c.tUnit, err)
		}
		ln.DryBulb = append(ln.DryBulb, t)
		ln.HumRatio = append(ln.HumRatio, st.HumRatio)
	}
	return ln, nil
}

// PsychroWetBulbLines returns the wet-bulb lines every 5 °F (IP) or 2 °C (SI)
// that start between low and high (°F or °C, as for PsychroChart) at
// barometric pressure p (psia or kPa), each drawn up to high.
func PsychroWetBulbLines(u UnitSystem, p, low, high float64) ([]ChartLine, error) {
	c, err := psyFor(u)
	if err != nil {
		return nil, err
	}
	if err := checkRange("low", low, c.dbMin, c.tMax-5, c.tUnit); err != nil {
		return nil, err
	}
	span := 200.0
	if u == SI {
		span = 100
	}
	if err := checkRange("high", high, low+5, math.Min(low+span, c.tMax), c.tUnit); err != nil {
		return nil, err
	}
	every := 5.0
	if u == SI {
		every = 2
	}
	var lines []ChartLine
	for wb := math.Ceil(low/every) * every; wb < high-1e-9; wb += every {
		ln, err := WetBulbLine(u, p, wb, high)
		if err != nil {
			return nil, err
		}
		if len(ln.DryBulb) >= 2 {
			lines = append(lines, ln)
		}
	}
	return lines, nil
}
