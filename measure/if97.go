package measure

import (
	"math"
	"strconv"
)

// IAPWS-IF97, the IAPWS Industrial Formulation 1997 for the Thermodynamic
// Properties of Water and Steam (revised release, 2007). Only what liquid water in
// HVAC needs is here: the region 1 Gibbs free energy equation (eq. 7, Table 2)
// and the region 4 saturation-pressure equation (eq. 30, Table 34).

// Region 1 limits: 273.15 K ≤ T ≤ 623.15 K, psat(T) ≤ p ≤ 100 MPa.
const (
	if97TMinK    = 273.15
	if97TMaxK    = 623.15
	if97PMaxMPa  = 100
	if97R        = 461.526 // J/(kg·K), specific gas constant of IF97
	if97R1PStar  = 16.53   // MPa, region 1 reducing pressure
	if97R1TStar  = 1386    // K, region 1 reducing temperature
	if97R1IMax   = 32      // highest I exponent in Table 2
	if97R1JMin   = -41     // lowest J exponent in Table 2
	if97R1JMax   = 17      // highest J exponent in Table 2
	if97R1JShift = -if97R1JMin + 2
)

// Table 2 of the release: exponents I, J and coefficients n of eq. 7.
// Checked against the release's verification values (Table 5) in if97_test.go:
// n28 and n33 are the terms that only the 500 K point exercises to 9 digits.
var if97R1 = [34]struct {
	i, j int
	n    float64
}{
	{0, -2, 0.14632971213167},
	{0, -1, -0.84548187169114},
	{0, 0, -0.37563603672040e1},
	{0, 1, 0.33855169168385e1},
	{0, 2, -0.95791963387872},
	{0, 3, 0.15772038513228},
	{0, 4, -0.16616417199501e-1},
	{0, 5, 0.81214629983568e-3},
	{1, -9, 0.28319080123804e-3},
	{1, -7, -0.60706301565874e-3},
	{1, -1, -0.18990068218419e-1},
	{1, 0, -0.32529748770505e-1},
	{1, 1, -0.21841717175414e-1},
	{1, 3, -0.52838357969930e-4},
	{2, -3, -0.47184321073267e-3},
	{2, 0, -0.30001780793026e-3},
	{2, 1, 0.47661393906987e-4},
	{2, 3, -0.44141845330846e-5},
	{2, 17, -0.72694996297594e-15},
	{3, -4, -0.31679644845054e-4},
	{3, 0, -0.28270797985312e-5},
	{3, 6, -0.85205128120103e-9},
	{4, -5, -0.22425281908000e-5},
	{4, -2, -0.65171222895601e-6},
	{4, 10, -0.14341729937924e-12},
	{5, -8, -0.40516996860117e-6},
	{8, -11, -0.12734301741641e-8},
	{8, -6, -0.17424871230634e-9},
	{21, -29, -0.68762131295531e-18},
	{23, -31, 0.14478307828521e-19},
	{29, -38, 0.26335781662795e-22},
	{30, -39, -0.11947622640071e-22},
	{31, -40, 0.18228094581404e-23},
	{32, -41, -0.93537087292458e-25},
}

// if97Region1 evaluates region 1 at tK (K) and pMPa (MPa), returning specific
// volume v (m³/kg), specific enthalpy h (J/kg) and isobaric specific heat cp
// (J/(kg·K)). The caller checks the range.
func if97Region1(tK, pMPa float64) (v, h, cp float64) {
	pi := pMPa / if97R1PStar
	tau := if97R1TStar / tK
	a := 7.1 - pi
	b := tau - 1.222

	// Integer powers by table rather than math.Pow: exact exponents, and fast.
	var aPow [if97R1IMax + 1]float64
	aPow[0] = 1
	for k := 1; k <= if97R1IMax; k++ {
		aPow[k] = aPow[k-1] * a
	}
	// bPow[j+if97R1JShift] = b^j for j from JMin-2 to JMax.
	var bPow [if97R1JMax + if97R1JShift + 1]float64
	bPow[if97R1JShift] = 1
	for k := if97R1JShift + 1; k < len(bPow); k++ {
		bPow[k] = bPow[k-1] * b
	}
	for k := if97R1JShift - 1; k >= 0; k-- {
		bPow[k] = bPow[k+1] / b
	}

	var gPi, gTau, gTauTau float64 // γπ, γτ, γττ
	for _, c := range if97R1 {
		fi, fj := float64(c.i), float64(c.j)
		jb := c.j + if97R1JShift
		if c.i > 0 {
			gPi -= c.n * fi * aPow[c.i-1] * bPow[jb]
		}
		gTau += c.n * aPow[c.i] * fj * bPow[jb-1]
		gTauTau += c.n * aPow[c.i] * fj * (fj - 1) * bPow[jb-2]
	}
	rt := if97R * tK
	v = pi * gPi * rt / (pMPa * 1e6)
	h = tau * gTau * rt
	cp = -tau * tau * gTauTau * if97R
	return v, h, cp
}

// if97Psat is the region 4 saturation pressure (MPa) at tK (K), eq. 30, valid
// from 273.15 K to the critical temperature 647.096 K.
func if97Psat(tK float64) float64 {
	const (
		n1  = 0.11670521452767e4
		n2  = -0.72421316703206e6
		n3  = -0.17073846940092e2
		n4  = 0.12020824702470e5
		n5  = -0.32325550322333e7
		n6  = 0.14915108613530e2
		n7  = -0.48232657361591e4
		n8  = 0.40511340542057e6
		n9  = -0.23855557567849
		n10 = 0.65017534844798e3
	)
	th := tK + n9/(tK-n10)
	A := th*th + n1*th + n2
	B := n3*th*th + n4*th + n5
	C := n6*th*th + n7*th + n8
	x := 2 * C / (-B + math.Sqrt(B*B-4*A*C))
	x *= x
	return x * x
}

// WaterProps returns the density and isobaric specific heat of liquid water at
// temperature t and absolute pressure p, from IAPWS-IF97 region 1 (eq. 7). The
// valid range is that of region 1: 273.15 K to 623.15 K, and from the saturation
// pressure at t (region 4, eq. 30) to 100 MPa. Outside it the error is an
// *InputError for "temperature" (K) or "pressure" (MPa).
func WaterProps(t Temperature, p Pressure) (Density, SpecificHeat, error) {
	tK := t.K()
	if err := checkRange("temperature", tK, if97TMinK, if97TMaxK, "K"); err != nil {
		return 0, 0, err
	}
	pMPa := p.Pa() / 1e6
	ps := if97Psat(tK)
	if math.IsNaN(pMPa) || math.IsInf(pMPa, 0) || pMPa > if97PMaxMPa {
		return 0, 0, checkRange("pressure", pMPa, ps, if97PMaxMPa, "MPa")
	}
	if pMPa < ps {
		e := &InputError{Input: "pressure", Value: pMPa, Unit: "MPa", Min: ps, Max: if97PMaxMPa}
		e.Reason = "below the saturation pressure at " + strconv.FormatFloat(tK, 'g', 6, 64) +
			" K, where water boils; liquid needs " + e.RangeText()
		return 0, 0, e
	}
	v, _, cp := if97Region1(tK, pMPa)
	return Density(1 / v), SpecificHeat(cp), nil
}
