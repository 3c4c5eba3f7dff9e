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
