package measure

import (
	"fmt"
	"math"
	"strings"
)

// Moist-air psychrometrics after ASHRAE Handbook—Fundamentals (2017) ch. 1, with the
// separate IP and SI equations of that chapter, and the solver choices, bounds and
// humidity-ratio floor of PsychroLib 2.5 so that results agree with that library.
//
// IP: °F, psia, lb/lb, Btu/lb dry air, ft³/lb dry air, lb/ft³.
// SI: °C, kPa, kg/kg, kJ/kg dry air, m³/kg dry air, kg/m³.

const (
	// mwRatio is the ratio of the molar masses of water and dry air (eq. 20).
	mwRatio = 0.621945
	// vapVolume is the factor on W in the specific-volume equation (eq. 26).
	vapVolume = 1.607858
	// minHumRatio is the floor PsychroLib applies to every humidity ratio, so that
	// bone-dry air still has a finite dew point.
	minHumRatio = 1e-7
	// ln1000 converts the SI Hyland–Wexler constants from ln(Pa) to ln(kPa).
	ln1000 = 6.907755278982137
)

// psyConst holds one unit system's constants. The equations are the same shape in
// both systems; only the coefficients and datums differ.
type psyConst struct {
	tUnit, pUnit, wUnit, zUnit, qUnit string

	zero           float64 // °F→°R or °C→K offset
	tMin, tMax     float64 // validity of the saturation-pressure correlation
	dbMin          float64 // lowest dry bulb for a state: below it the 1e-7 floor on W exceeds saturation
	triple, freeze float64 // ice/water switch: saturation pressure, psychrometric equation
	pMin, pMax     float64 // accepted barometric pressure
	zMin, zMax     float64 // accepted elevation for the standard atmosphere
	p0, zK         float64 // standard atmosphere, eq. 3
	lnPwsMin       float64 // ln pws at tMin

	ice   [7]float64 // eq. 5: c1/T + c2 + c3 T + c4 T² + c5 T³ + c6 T⁴ + c7 ln T
	water [6]float64 // eq. 6: c8/T + c9 + c10 T + c11 T² + c12 T³ + c13 ln T

	cpa, hg0, cpv float64    // enthalpy h = cpa t + W (hg0 + cpv t), eq. 30
	wbWater       [3]float64 // eq. 33: W = ((a − b tw) Ws* − cpa (t − tw)) / (a + cpv t − d tw)
	wbIce         [3]float64 // eq. 35, same form
	ra            float64    // v = ra (t + zero)(1 + 1.607858 W) / p, eq. 26

	wbTol, dewTol float64 // solver stopping widths, in degrees
	stdAir        float64 // standard-air dry-air density: lb/ft³ (IP) or kg/m³ (SI)
	flowMax       float64 // largest accepted air flow: cfm (IP) or L/s (SI)
	tempAccMax    float64 // largest accepted temperature accuracy, in degrees
}

var ipConst = newPsyConst(psyConst{
	tUnit: "°F", pUnit: "psia", wUnit: "lb/lb", zUnit: "ft", qUnit: "cfm",
	zero: fahrenheitZeroR, tMin: -148, tMax: 392, dbMin: -100, triple: 32.018, freeze: 32,
	// 5–16 psia spans every inhabited site and weather; the elevation range keeps
	// each standard pressure inside it (25,000 ft gives 5.45 psia).
	pMin: 5, pMax: 16, zMin: -1500, zMax: 25000,
	p0: 14.696, zK: 6.8754e-6,
	ice:   [7]float64{-1.0214165e4, -4.8932428, -5.3765794e-3, 1.9202377e-7, 3.5575832e-10, -9.0344688e-14, 4.1635019},
	water: [6]float64{-1.0440397e4, -1.1294650e1, -2.7022355e-2, 1.2890360e-5, -2.4780681e-9, 6.5459673},
	cpa:   0.240, hg0: 1061, cpv: 0.444,
	wbWater: [3]float64{1093, 0.556, 1},
	wbIce:   [3]float64{1220, 0.04, 0.48},
	ra:      53.350 / 144, // R_da in ft·lbf/(lb·°R) over 144 in²/ft²: 0.370486
	wbTol:   1e-6, dewTol: 1e-6,
	stdAir: 0.075, flowMax: 2e6, tempAccMax: 18,
})

var siConst = newPsyConst(psyConst{
	tUnit: "°C", pUnit: "kPa", wUnit: "kg/kg", zUnit: "m", qUnit: "L/s",
	zero: celsiusZeroK, tMin: -100, tMax: 200, dbMin: -73, triple: 0.01, freeze: 0,
	// 35–110 kPa; 7,500 m gives 38.2 kPa.
	pMin: 35, pMax: 110, zMin: -500, zMax: 7500,
	p0: 101.325, zK: 2.25577e-5,
	ice:   [7]float64{-5.6745359e3, 6.3925247 - ln1000, -9.677843e-3, 6.2215701e-7, 2.0747825e-9, -9.484024e-13, 4.1635019},
	water: [6]float64{-5.8002206e3, 1.3914993 - ln1000, -4.8640239e-2, 4.1764768e-5, -1.4452093e-8, 6.5459673},
	cpa:   1.006, hg0: 2501, cpv: 1.86,
	wbWater: [3]float64{2501, 2.326, 4.186},
	wbIce:   [3]float64{2830, 0.24, 2.1},
	ra:      0.287042, // R_da in kJ/(kg·K), so that p is in kPa
	wbTol:   1e-6, dewTol: 1e-6,
	stdAir: 1.2, flowMax: 1e6, tempAccMax: 10,
})

func newPsyConst(c psyConst) *psyConst {
	c.lnPwsMin = c.lnPws(c.tMin)
	return &c
}

func psyFor(u UnitSystem) (*psyConst, error) {
	switch u {
	case IP:
		return ipConst, nil
	case SI:
		return siConst, nil
	}
	return nil, u.valid()
}

// lnPws is ln of the saturation pressure (psia or kPa) at t (°F or °C): over ice
// at and below the triple point, over liquid water above it.
func (c *psyConst) lnPws(t float64) float64 {
	T := t + c.zero
	if t <= c.triple {
		k := &c.ice
		return k[0]/T + k[1] + T*(k[2]+T*(k[3]+T*(k[4]+T*k[5]))) + k[6]*math.Log(T)
	}
	k := &c.water
	return k[0]/T + k[1] + T*(k[2]+T*(k[3]+T*k[4])) + k[5]*math.Log(T)
}

// lnPwsSlope is d(ln pws)/dt at t, per degree.
func (c *psyConst) lnPwsSlope(t float64) float64 {
	T := t + c.zero
	if t <= c.triple {
		k := &c.ice
		return -k[0]/(T*T) + k[2] + T*(2*k[3]+T*(3*k[4]+T*4*k[5])) + k[6]/T
	}
	k := &c.water
	return -k[0]/(T*T) + k[2] + T*(2*k[3]+T*3*k[4]) + k[5]/T
}

func (c *psyConst) pws(t float64) float64 { return math.Exp(c.lnPws(t)) }

// satHumRatio is Ws at t and p (eq. 23), floored like PsychroLib.
func (c *psyConst) satHumRatio(t, p float64) float64 {
	pws := c.pws(t)
	return math.Max(mwRatio*pws/(p-pws), minHumRatio)
}

// wetBulbHumRatio is the humidity ratio of air at dry bulb t whose thermodynamic
// wet bulb is tw (eq. 33 with a water film at or above freezing, eq. 35 with ice
// below). It is not floored and may be negative.
func (c *psyConst) wetBulbHumRatio(t, tw, p float64) float64 {
	ws := c.satHumRatio(tw, p)
	k := &c.wbWater
	if tw < c.freeze {
		k = &c.wbIce
	}
	return ((k[0]-k[1]*tw)*ws - c.cpa*(t-tw)) / (k[0] + c.cpv*t - k[2]*tw)
}

func (c *psyConst) enthalpy(t, w float64) float64 { return c.cpa*t + w*(c.hg0+c.cpv*t) }

func (c *psyConst) specVolume(t, w, p float64) float64 {
	return c.ra * (t + c.zero) * (1 + vapVolume*w) / p
}

// dewPoint solves pws(T) = pw for T ≤ t by Newton's method on ln pws, as PsychroLib
// does, but with a bracket so the small step in pws at the triple point cannot make
// it cycle. Result in [tMin, t].
func (c *psyConst) dewPoint(t, pw float64) float64 {
	target := math.Log(pw)
	if target <= c.lnPwsMin {
		return c.tMin
	}
	lo, hi := c.tMin, t
	x := t
	for range 100 {
		f := c.lnPws(x) - target
		switch {
		case f > 0:
			hi = x
		case f < 0:
			lo = x
		default:
			return x
		}
		next := x - f/c.lnPwsSlope(x)
		if !(next > lo && next < hi) {
			next = 0.5 * (lo + hi)
		}
		done := math.Abs(next-x) <= c.dewTol
		x = next
		if done {
			break
		}
	}
	return math.Min(x, t)
}

// wetBulb solves eq. 33/35 for the wet bulb of air at dry bulb t, humidity ratio w
// (floored) and dew point tdew, within [tdew, t].
//
// The psychrometric equation jumps at freezing (ice film below, water film above),
// so a humidity ratio can have one root on each side. While the bracket still holds
// the freezing point the solver bisects exactly as PsychroLib does, so it settles on
// the same root; once freezing is outside the bracket the function is continuous and
// increasing there and an Illinois (modified regula falsi) step finishes in a few
// evaluations.
func (c *psyConst) wetBulb(t, w, tdew, p float64) float64 {
	lo, hi := tdew, t
	tol := c.wbTol
	fLo, fHi := math.NaN(), math.NaN() // NaN: not yet evaluated
	for hi-lo > tol && lo <= c.freeze && c.freeze <= hi {
		m := 0.5 * (lo + hi)
		if f := c.wetBulbHumRatio(t, m, p) - w; f > 0 {
			hi, fHi = m, f
		} else {
			lo, fLo = m, f
		}
	}
	if hi-lo <= tol {
		return 0.5 * (lo + hi)
	}
	if math.IsNaN(fLo) {
		fLo = c.wetBulbHumRatio(t, lo, p) - w
	}
	if fLo >= 0 {
		return lo
	}
	if math.IsNaN(fHi) {
		fHi = c.wetBulbHumRatio(t, hi, p) - w
	}
	if fHi <= 0 {
		return hi
	}
	side := 0
	for i := 0; i < 100 && hi-lo > tol; i++ {
		x := lo - fLo*(hi-lo)/(fHi-fLo)
		if !(x > lo && x < hi) {
			x = 0.5 * (lo + hi)
		}
		f := c.wetBulbHumRatio(t, x, p) - w
		switch {
		case f > 0:
			hi, fHi = x, f
			if side > 0 {
				fLo *= 0.5
			}
			side = 1
		case f < 0:
			lo, fLo = x, f
			if side < 0 {
				fHi *= 0.5
			}
			side = -1
		default:
			return x
		}
	}
	return 0.5 * (lo + hi)
}

// boilingPoint is the temperature at which pws equals p.
func (c *psyConst) boilingPoint(p float64) float64 { return c.dewPoint(c.tMax, p) }

// SatVapPres returns the saturation pressure of water vapour at temperature t, in
// psia for t in °F (IP) or kPa for t in °C (SI): Hyland–Wexler, ASHRAE
// Handbook—Fundamentals (2017) ch. 1 eq. 5 over ice at and below the triple point
// (32.018 °F, 0.01 °C) and eq. 6 over water above it. t must lie in -148 to 392 °F
// (-100 to 200 °C), the range of the correlation; outside it the error is an
// *InputError for "temperature".
func SatVapPres(u UnitSystem, t float64) (float64, error) {
	c, err := psyFor(u)
	if err != nil {
		return 0, err
	}
	if err := checkRange("temperature", t, c.tMin, c.tMax, c.tUnit); err != nil {
		return 0, err
	}
	return c.pws(t), nil
}

// StandardPressure returns the standard-atmosphere barometric pressure at an
// elevation, in psia for feet (IP) or kPa for metres (SI): ASHRAE
// Handbook—Fundamentals (2017) ch. 1 eq. 3, p = 14.696 (1 − 6.8754e−6 Z)^5.2559 psia
// or 101.325 (1 − 2.25577e−5 Z)^5.2559 kPa. Elevation must lie in -1,500 to 25,000 ft
// (-500 to 7,500 m), which keeps the pressure inside the range AirSpec.State
// accepts; outside it the error is an *InputError for "elevation".
func StandardPressure(u UnitSystem, elevation float64) (float64, error) {
	c, err := psyFor(u)
	if err != nil {
		return 0, err
	}
	if err := checkRange("elevation", elevation, c.zMin, c.zMax, c.zUnit); err != nil {
		return 0, err
	}
	return c.p0 * math.Pow(1-c.zK*elevation, 5.2559), nil
}

// HumidityKind says which humidity reading an AirSpec carries.
type HumidityKind uint8

// The humidity readings a technician takes. The zero value is not valid.
const (
	RelHum   HumidityKind = iota + 1 // relative humidity, percent 0–100
	WetBulb                          // thermodynamic wet bulb, °F (IP) or °C (SI)
	DewPoint                         // dew point, °F (IP) or °C (SI)
	HumRatio                         // humidity ratio, lb/lb (IP) or kg/kg (SI) of dry air
)

// String returns the kind's input name: "rel_hum", "wet_bulb", "dew_point" or "hum_ratio".
func (k HumidityKind) String() string {
	switch k {
	case RelHum:
		return "rel_hum"
	case WetBulb:
		return "wet_bulb"
	case DewPoint:
		return "dew_point"
	case HumRatio:
		return "hum_ratio"
	}
	return fmt.Sprintf("HumidityKind(%d)", uint8(k))
}

// ParseHumidityKind accepts the names String returns, in any case.
func ParseHumidityKind(s string) (HumidityKind, error) {
	switch strings.ToLower(strings.TrimSpace(s)) {
	case "rel_hum":
		return RelHum, nil
	case "wet_bulb":
		return WetBulb, nil
	case "dew_point":
		return DewPoint, nil
	case "hum_ratio":
		return HumRatio, nil
	}
	return 0, fmt.Errorf("humidity kind %q: accepted values are rel_hum, wet_bulb, dew_point and hum_ratio", s)
}

// AirSpec is a moist-air reading as taken: a dry bulb and one humidity reading, in
// the units of the UnitSystem it is later evaluated in. DryBulb is °F (IP) or °C
// (SI); Humidity is percent 0–100 for RelHum, °F or °C for WetBulb and DewPoint,
// and lb/lb or kg/kg of dry air for HumRatio.
type AirSpec struct {
	DryBulb  float64
	Kind     HumidityKind
	Humidity float64
}

// AirState is a moist-air state at a barometric pressure, every value in the units
// of Units:
//
//	              IP                  SI
//	DryBulb,
//	WetBulb,
//	DewPoint      °F                  °C
//	RelHum        percent 0–100       percent 0–100
//	HumRatio      lb/lb dry air       kg/kg dry air
//	Enthalpy      Btu/lb dry air,     kJ/kg dry air,
//	              zero at 0 °F        zero at 0 °C
//	SpecVolume    ft³/lb dry air      m³/kg dry air
//	Density       lb/ft³ moist air    kg/m³ moist air
//	Pressure,
//	VapPres       psia                kPa
//
// Density is (1 + W)/v (ASHRAE 2017 ch. 1 eq. 11); VapPres is the partial pressure
// of the water vapour.
type AirState struct {
	Units      UnitSystem
	DryBulb    float64
	WetBulb    float64
	DewPoint   float64
	RelHum     float64
	HumRatio   float64
	Enthalpy   float64
	SpecVolume float64
	Density    float64
	Pressure   float64
	VapPres    float64
}

// State computes the moist-air state of s at barometric pressure (psia in IP, kPa
// in SI), by ASHRAE Handbook—Fundamentals (2017) ch. 1: humidity ratio eq. 20–23,
// wet bulb eq. 33 (water film) and eq. 35 (ice film, wet bulb below freezing),
// enthalpy eq. 30, specific volume eq. 26, with the IP or SI constants of that
// chapter. It follows PsychroLib 2.5: the humidity ratio is floored at 1e-7, the dew
// point comes from Newton's method on ln pws, and the wet bulb from a bracketing
// solver that picks the same root as PsychroLib's bisection where the ice and water
// equations overlap. Both solvers converge to 1e-6 degree (PsychroLib stops at
// 0.001 °C). The input reading is returned unchanged in its own field.
//
// Errors are *InputError values naming the input: "pressure" outside 5–16 psia
// (35–110 kPa); "dry_bulb" below -100 °F (-73 °C), where PsychroLib's 1e-7 floor
// on W would exceed saturation, or at or above the boiling point at that pressure
// (212 °F at 14.696 psia); "rel_hum" outside 0–100 %; "wet_bulb" or
// "dew_point" out of range or above the dry bulb, or a wet bulb so far below the dry
// bulb that the humidity ratio would be negative; "hum_ratio" negative or above
// saturation; "humidity_kind" not one of the four kinds; "units" not IP or SI.
func (s AirSpec) State(u UnitSystem, pressure float64) (AirState, error) {
	c, err := psyFor(u)
	if err != nil {
		return AirState{}, err
	}
	w, pwsT, err := c.humRatio(s, pressure)
	if err != nil {
		return AirState{}, err
	}
	t := s.DryBulb
	pw := pressure * w / (mwRatio + w)
	st := AirState{
		Units:      u,
		DryBulb:    t,
		RelHum:     100 * pw / pwsT,
		HumRatio:   w,
		Enthalpy:   c.enthalpy(t, w),
		SpecVolume: c.specVolume(t, w, pressure),
		Pressure:   pressure,
		VapPres:    pw,
	}
	st.Density = (1 + w) / st.SpecVolume
	switch s.Kind {
	case RelHum:
		st.RelHum = s.Humidity
		st.DewPoint = c.dewPoint(t, pw)
		st.WetBulb = c.wetBulb(t, w, st.DewPoint, pressure)
	case WetBulb:
		st.WetBulb = s.Humidity
		st.DewPoint = c.dewPoint(t, pw)
	case DewPoint:
		st.DewPoint = s.Humidity
		st.WetBulb = c.wetBulb(t, w, s.Humidity, pressure)
	default:
		st.DewPoint = c.dewPoint(t, pw)
		st.WetBulb = c.wetBulb(t, w, st.DewPoint, pressure)
	}
	return st, nil
}

// humRatio validates s at pressure p and returns its floored humidity ratio and the
// saturation pressure at its dry bulb.
func (c *psyConst) humRatio(s AirSpec, p float64) (w, pwsT float64, err error) {
	if err := checkRange("pressure", p, c.pMin, c.pMax, c.pUnit); err != nil {
		return 0, 0, err
	}
	t := s.DryBulb
	if err := checkRange("dry_bulb", t, c.dbMin, c.tMax, c.tUnit); err != nil {
		return 0, 0, err
	}
	pwsT = c.pws(t)
	if pwsT >= p {
		return 0, 0, &InputError{Input: "dry_bulb", Value: t, Unit: c.tUnit, Min: c.dbMin, Max: c.boilingPoint(p),
			Reason: fmt.Sprintf("at or above the boiling point of water at %s %s (%s %s)",
				formatNum(p), c.pUnit, formatNum(c.boilingPoint(p)), c.tUnit)}
	}
	h := s.Humidity
	switch s.Kind {
	case RelHum:
		if err := checkRange("rel_hum", h, 0, 100, "%"); err != nil {
			return 0, 0, err
		}
		pw := h / 100 * pwsT
		w = mwRatio * pw / (p - pw)
	case WetBulb:
		if err := c.checkBelowDryBulb("wet_bulb", h, t); err != nil {
			return 0, 0, err
		}
		w = c.wetBulbHumRatio(t, h, p)
		if w < 0 {
			wMin := minHumRatio
			lowest := c.wetBulb(t, wMin, c.dewPoint(t, p*wMin/(mwRatio+wMin)), p)
			return 0, 0, &InputError{Input: "wet_bulb", Value: h, Unit: c.tUnit, Min: lowest, Max: t,
				Reason: fmt.Sprintf("too far below the dry bulb: the lowest wet bulb possible at %s %s is %s %s",
					formatNum(t), c.tUnit, formatNum(lowest), c.tUnit)}
		}
	case DewPoint:
		if err := c.checkBelowDryBulb("dew_point", h, t); err != nil {
			return 0, 0, err
		}
		pw := c.pws(h)
		w = mwRatio * pw / (p - pw)
	case HumRatio:
		if err := checkRange("hum_ratio", h, 0, mwRatio*pwsT/(p-pwsT), c.wUnit); err != nil {
			return 0, 0, err
		}
		w = h
	default:
		return 0, 0, &InputError{Input: "humidity_kind", Value: float64(s.Kind), Min: float64(RelHum), Max: float64(HumRatio),
			Reason: "humidity kind must be rel_hum, wet_bulb, dew_point or hum_ratio"}
	}
	return math.Max(w, minHumRatio), pwsT, nil
}

// checkBelowDryBulb checks a wet bulb or dew point against the correlation's range
// and the dry bulb t.
func (c *psyConst) checkBelowDryBulb(input string, v, t float64) error {
	if err := checkRange(input, v, c.tMin, c.tMax, c.tUnit); err != nil {
		return err
	}
	if v > t {
		return &InputError{Input: input, Value: v, Unit: c.tUnit, Min: c.tMin, Max: t,
			Reason: fmt.Sprintf("above the dry bulb (%s %s)", formatNum(t), c.tUnit)}
	}
	return nil
}
