package measure

import (
	"fmt"
	"math"
	"strings"
)

// DuctShape is the cross-section of a duct being traversed.
type DuctShape uint8

// The duct shapes. The zero value is not a valid shape, so a forgotten field is
// caught rather than read as rectangular.
const (
	Rectangular DuctShape = iota + 1
	Round
)

// ParseDuctShape accepts "rect" or "round" in any case.
func ParseDuctShape(s string) (DuctShape, error) {
	switch strings.ToLower(strings.TrimSpace(s)) {
	case "rect":
		return Rectangular, nil
	case "round":
		return Round, nil
	}
	return 0, fmt.Errorf("duct shape %q: accepted values are rect and round", s)
}

// String returns "rect" or "round", the names ParseDuctShape accepts.
func (s DuctShape) String() string {
	switch s {
	case Rectangular:
		return "rect"
	case Round:
		return "round"
	}
	return fmt.Sprintf("DuctShape(%d)", uint8(s))
}

// TraverseMethod is the rule that places the points of a pitot traverse. Every
// method here places points so that each carries equal weight: the mean
// velocity is the arithmetic mean of the point velocities.
type TraverseMethod uint8

// The traverse methods. The zero value is not a valid method.
const (
	// LogTchebycheff places points by the log-Tchebycheff rule of ISO 3966 and
	// ASHRAE Standard 111 (rectangular) and ISO 5802:2001 (round).
	LogTchebycheff TraverseMethod = iota + 1
	// LogLinear places points by the log-linear rule of ISO 5802:2001 (round
	// ducts only).
	LogLinear
	// EqualArea places one point at the centre of each of a set of equal areas:
	// equal sub-rectangles, or the centroids of equal annuli (US EPA Method 1).
	EqualArea
)

// ParseTraverseMethod accepts "log-tchebycheff", "log-linear" or "equal-area" in
// any case.
func ParseTraverseMethod(s string) (TraverseMethod, error) {
	switch strings.ToLower(strings.TrimSpace(s)) {
	case "log-tchebycheff":
		return LogTchebycheff, nil
	case "log-linear":
		return LogLinear, nil
	case "equal-area":
		return EqualArea, nil
	}
	return 0, fmt.Errorf("traverse method %q: accepted values are log-tchebycheff, log-linear and equal-area", s)
}

// String returns "log-tchebycheff", "log-linear" or "equal-area", the names
// ParseTraverseMethod accepts.
func (m TraverseMethod) String() string {
	switch m {
	case LogTchebycheff:
		return "log-tchebycheff"
	case LogLinear:
		return "log-linear"
	case EqualArea:
		return "equal-area"
	}
	return fmt.Sprintf("TraverseMethod(%d)", uint8(m))
}

// Point-position tables, as fractions of the side or diameter measured from the
// wall the probe enters through.
var (
	// ISO 3966 and ASHRAE Standard 111, rectangular log-Tchebycheff (secondary
	// copies in instrument manuals).
	rectLogTchebycheff = map[int][]float64{
		5: {0.074, 0.288, 0.500, 0.712, 0.926},
		6: {0.061, 0.235, 0.437, 0.563, 0.765, 0.939},
		7: {0.053, 0.203, 0.366, 0.500, 0.634, 0.797, 0.947},
	}
	// ISO 5802:2001 Tables 2–3, round log-Tchebycheff (secondary copy).
	roundLogTchebycheff = map[int][]float64{
		6: {0.032, 0.137, 0.312, 0.688, 0.863, 0.968},
		8: {0.024, 0.100, 0.194, 0.334, 0.666, 0.806, 0.900, 0.976},
	}
	// ISO 5802:2001 Tables 2–3, round log-linear (secondary copy). Some
	// instrument manuals print this set under the name log-Tchebycheff.
	roundLogLinear = map[int][]float64{
		6: {0.032, 0.135, 0.321, 0.679, 0.865, 0.968},
		8: {0.021, 0.117, 0.184, 0.345, 0.655, 0.816, 0.883, 0.979},
	}
)

// Limits of a traverse layout. The side and diameter limits are sanity bounds of
// fieldtab's, not of a standard: a duct under 25 mm (1 in) cannot take a pitot
// tube traverse and none over 10 m is traversed from its walls. The point-count
// limits keep a mistyped count from building a huge grid; no standard asks for
// more.
const (
	minDuctSideMm       = 25
	maxDuctSideMm       = 10000
	maxEqualAreaRect    = 30 // points per side
	maxEqualAreaRound   = 24 // points per diameter, the largest row of EPA Method 1 Table 1-2
	maxTraverseDiameter = 4  // diameters, equally spaced in angle
	minRectTotalPoints  = 25 // common practice
)

// Reading limits. Pitot readings above 5000 Pa (about 20 in. w.g., about 90 m/s
// in standard air) are beyond HVAC ducts and near where air stops behaving as
// incompressible, which √(2·VP/ρ) assumes. Velocities are bounded to match.
const (
	maxVelocityPressurePa = 5000
	maxVelocityMps        = 150
	minAirDensity         = 0.5 // kg/m³
	maxAirDensity         = 1.5 // kg/m³
)

// TraverseLayout describes a pitot traverse of one duct cross-section. Fields
// that do not apply to the shape are ignored.
type TraverseLayout struct {
	Shape  DuctShape
	Method TraverseMethod

	// Rectangular ducts: inside dimensions, and the number of points along the
	// width (per height line) and along the height (the number of lines).
	Width, Height    Length
	PointsW, PointsH int

	// Round ducts: inside diameter, points along each diameter, and the number
	// of diameters traversed (usually 2, at 90° to each other; n diameters are
	// spaced 180°/n apart).
	Diameter          Length
	PointsPerDiameter int
	Diameters         int
}

// TraversePoint is one reading position of a traverse.
type TraversePoint struct {
	// Rectangular: centre of the point, measured from one corner along the
	// width (X) and along the height (Y). Zero for round ducts.
	X, Y Length
	// Rectangular: 1-based height line the point lies on. Zero for round ducts.
	Line int
	// 1-based position of the point along its line (rectangular, from X = 0) or
	// its diameter (round, from the entry wall).
	Point int
	// Round: 1-based diameter the point lies on. Zero for rectangular ducts.
	Diameter int
	// Round: insertion depth of the probe tip from the inside of the duct wall.
	// Zero for rectangular ducts.
	Depth Length
}

// Label names the point the way a technician reads it off the grid:
// "line 2 point 3" (rectangular) or "diameter 1 point 4" (round).
func (p TraversePoint) Label() string {
	if p.Diameter > 0 {
		return fmt.Sprintf("diameter %d point %d", p.Diameter, p.Point)
	}
	return fmt.Sprintf("line %d point %d", p.Line, p.Point)
}

// Points returns the reading positions of the layout, in the order readings are
// given to FromVelocityPressures and FromVelocities:
//   - rectangular: line by line along the height (line 1 is the smallest Y), and
//     along each line the points across the width from X = 0;
//   - round: the points of diameter 1 in order of insertion depth, then those of
//     diameter 2, and so on.
//
// Positions, as fractions of the side or diameter from the wall:
//   - rectangular log-Tchebycheff: ISO 3966 / ASHRAE Standard 111 table, 5, 6 or
//     7 points per side;
//   - rectangular equal area: centres of equal sub-rectangles, (i − 0.5)/n, 1 to
//     30 points per side;
//   - round log-Tchebycheff and log-linear: ISO 5802:2001 Tables 2–3 (the
//     log-Tchebycheff set is 0.032, 0.137, 0.312, …; the log-linear set 0.032,
//     0.135, 0.321, …, which some manuals also call log-Tchebycheff), 6 or 8
//     points per diameter;
//   - round equal area: centroids of equal annuli, US EPA Method 1 (40 CFR 60
//     App. A-1) Table 1-2: point j of n, counted from the centre out, at
//     50·(1 − √((2j − 1)/n)) % of the diameter from the wall, mirrored across
//     the centre; any even n from 2 to 24. EPA Method 1 also relocates points
//     that fall too near the wall; fieldtab does not, as that rule could not
//     be confirmed from the sources at hand.
//
// Diameters may be 1 to 4. Errors are *InputError naming "shape", "method",
// "width", "height", "diameter", "points_w", "points_h",
// "points_per_diameter" or "diameters".
func (l TraverseLayout) Points() ([]TraversePoint, error) {
	switch l.Shape {
	case Rectangular:
		return l.rectPoints()
	case Round:
		return l.roundPoints()
	}
	return nil, &InputError{Input: "shape", Value: float64(l.Shape), Min: float64(Rectangular), Max: float64(Round),
		Reason: "duct shape must be rect or round"}
}

func (l TraverseLayout) rectPoints() ([]TraversePoint, error) {
	if err := checkDuctSide("width", l.Width); err != nil {
		return nil, err
	}
	if err := checkDuctSide("height", l.Height); err != nil {
		return nil, err
	}
	fw, err := rectFractions(l.Method, l.PointsW, "points_w")
	if err != nil {
		return nil, err
	}
	fh, err := rectFractions(l.Method, l.PointsH, "points_h")
	if err != nil {
		return nil, err
	}
	pts := make([]TraversePoint, 0, len(fw)*len(fh))
	for j, y := range fh {
		for i, x := range fw {
			pts = append(pts, TraversePoint{
				X: Length(x * l.Width.M()), Y: Length(y * l.Height.M()),
				Line: j + 1, Point: i + 1,
			})
		}
	}
	return pts, nil
}

func rectFractions(m TraverseMethod, n int, input string) ([]float64, error) {
	switch m {
	case LogTchebycheff:
		fr, ok := rectLogTchebycheff[n]
		if !ok {
			return nil, &InputError{Input: input, Value: float64(n), Min: 5, Max: 7,
				Reason: "a log-Tchebycheff traverse of a rectangular duct takes 5, 6 or 7 points per side (ISO 3966, ASHRAE Standard 111)"}
		}
		return fr, nil
	case EqualArea:
		if n < 1 || n > maxEqualAreaRect {
			return nil, &InputError{Input: input, Value: float64(n), Min: 1, Max: maxEqualAreaRect}
		}
		fr := make([]float64, n)
		for i := range fr {
			fr[i] = (float64(i) + 0.5) / float64(n)
		}
		return fr, nil
	case LogLinear:
		return nil, &InputError{Input: "method", Value: float64(m), Min: float64(LogTchebycheff), Max: float64(EqualArea),
			Reason: "log-linear positions are given here for round ducts only; use log-tchebycheff or equal-area for a rectangular duct"}
	}
	return nil, methodError(m)
}

func (l TraverseLayout) roundPoints() ([]TraversePoint, error) {
	if err := checkDuctSide("diameter", l.Diameter); err != nil {
		return nil, err
	}
	fr, err := roundFractions(l.Method, l.PointsPerDiameter)
	if err != nil {
		return nil, err
	}
	if l.Diameters < 1 || l.Diameters > maxTraverseDiameter {
		return nil, &InputError{Input: "diameters", Value: float64(l.Diameters), Min: 1, Max: maxTraverseDiameter}
	}
	pts := make([]TraversePoint, 0, len(fr)*l.Diameters)
	for d := 1; d <= l.Diameters; d++ {
		for i, f := range fr {
			pts = append(pts, TraversePoint{Diameter: d, Point: i + 1, Depth: Length(f * l.Diameter.M())})
		}
	}
	return pts, nil
}

func roundFractions(m TraverseMethod, n int) ([]float64, error) {
	var table map[int][]float64
	switch m {
	case LogTchebycheff:
		table = roundLogTchebycheff
	case LogLinear:
		table = roundLogLinear
	case EqualArea:
		if n < 2 || n > maxEqualAreaRound || n%2 != 0 {
			return nil, &InputError{Input: "points_per_diameter", Value: float64(n), Min: 2, Max: maxEqualAreaRound,
				Reason: "an equal-area traverse of a round duct takes an even number of points per diameter, 2 to 24 (US EPA Method 1)"}
		}
		return equalAreaRoundFractions(n), nil
	default:
		return nil, methodError(m)
	}
	fr, ok := table[n]
	if !ok {
		return nil, &InputError{Input: "points_per_diameter", Value: float64(n), Min: 6, Max: 8,
			Reason: "a " + m.String() + " traverse of a round duct takes 6 or 8 points per diameter (ISO 5802:2001)"}
	}
	return fr, nil
}

// equalAreaRoundFractions returns the n positions of EPA Method 1 Table 1-2 in
// depth order. Annulus j = 1 is the innermost, so the first half runs j = n/2
// down to 1.
func equalAreaRoundFractions(n int) []float64 {
	h := n / 2
	fr := make([]float64, n)
	for j := 1; j <= h; j++ {
		x := 0.5 * (1 - math.Sqrt(float64(2*j-1)/float64(n)))
		fr[h-j] = x
		fr[h+j-1] = 1 - x
	}
	return fr
}

func methodError(m TraverseMethod) error {
	return &InputError{Input: "method", Value: float64(m), Min: float64(LogTchebycheff), Max: float64(EqualArea),
		Reason: "traverse method must be log-tchebycheff, log-linear or equal-area"}
}

func checkDuctSide(input string, v Length) error {
	return checkRange(input, v.Mm(), minDuctSideMm, maxDuctSideMm, "mm")
}

// Area returns the duct's inside cross-section: Width × Height (rectangular) or
// π·Diameter²/4 (round). Errors are *InputError naming "shape", "width",
// "height" or "diameter".
func (l TraverseLayout) Area() (Area, error) {
	switch l.Shape {
	case Rectangular:
		if err := checkDuctSide("width", l.Width); err != nil {
			return 0, err
		}
		if err := checkDuctSide("height", l.Height); err != nil {
			return 0, err
		}
		return Area(l.Width.M() * l.Height.M()), nil
	case Round:
		if err := checkDuctSide("diameter", l.Diameter); err != nil {
			return 0, err
		}
		d := l.Diameter.M()
		return Area(math.Pi * d * d / 4), nil
	}
	return 0, &InputError{Input: "shape", Value: float64(l.Shape), Min: float64(Rectangular), Max: float64(Round),
		Reason: "duct shape must be rect or round"}
}

// RecommendedRectPoints returns the number of points to take along one side of
// a rectangular duct (common practice, with ASHRAE Standard 111
// log-Tchebycheff traverses): 5 for a side under 30 in (762 mm), 6 for 30 to
// 36 in, 7 over 36 in. A side that is not a positive finite length returns 0.
func RecommendedRectPoints(side Length) int {
	in := side.Inch()
	switch {
	case math.IsNaN(in) || math.IsInf(in, 0) || in <= 0:
		return 0
	case in < 30:
		return 5
	case in <= 36:
		return 6
	}
	return 7
}

// Warnings returns plain-English cautions about the layout itself (common
// practice): a rectangular traverse with fewer points on a side than
// RecommendedRectPoints, or fewer than 25 points in all; a round traverse on a
// single diameter. It returns nil for a layout that Points rejects.
func (l TraverseLayout) Warnings() []string {
	if _, err := l.Points(); err != nil {
		return nil
	}
	if l.Shape == Round {
		var w []string
		if l.Diameters < 2 {
			w = append(w, "one diameter only: traverse two diameters at 90° to each other to catch an uneven profile")
		}
		if msg := l.wallClearanceWarning(); msg != "" {
			w = append(w, msg)
		}
		return w
	}
	var w []string
	for _, s := range []struct {
		name string
		side Length
		n    int
	}{{"width", l.Width, l.PointsW}, {"height", l.Height, l.PointsH}} {
		if rec := RecommendedRectPoints(s.side); s.n < rec {
			w = append(w, fmt.Sprintf("a %s of %.4g in (%.0f mm) calls for at least %d points along it; this layout has %d",
				s.name, s.side.Inch(), s.side.Mm(), rec, s.n))
		}
	}
	if n := l.PointsW * l.PointsH; n < minRectTotalPoints {
		w = append(w, fmt.Sprintf("this layout has %d points; a rectangular traverse should have at least %d", n, minRectTotalPoints))
	}
	return w
}

// wallClearanceWarning flags round-duct points too near the wall for a pitot
// tube to read in the main flow: US EPA Method 1 (40 CFR 60 App. A-1) keeps
// points at least 0.5 in from the wall in ducts of 24 in or less and 1.0 in in
// larger ones (from memory, not confirmed against the text). The points are not
// moved; the technician decides.
func (l TraverseLayout) wallClearanceWarning() string {
	minGap := Inches(0.5)
	if l.Diameter > Inches(24) {
		minGap = Inches(1)
	}
	pts, err := l.Points()
	if err != nil {
		return ""
	}
	near := 0
	for _, p := range pts {
		if p.Depth < minGap || l.Diameter-p.Depth < minGap {
			near++
		}
	}
	if near == 0 {
		return ""
	}
	return fmt.Sprintf("%d of %d points lie within %.1f in (%.0f mm) of the duct wall; "+
		"set them at that distance or choose fewer points per diameter", near, len(pts), minGap.Inch(), minGap.Mm())
}

// TraverseResult is a computed pitot traverse. Velocities are the point
// velocities as counted (a negative reading counts as zero), in the order of
// Points; MeanVelocity is their arithmetic mean and Flow = MeanVelocity × Area.
// Warnings are plain-English cautions for the technician, empty when none.
type TraverseResult struct {
	Area         Area
	Points       []TraversePoint
	Velocities   []Velocity
	MeanVelocity Velocity
	Flow         VolumeFlow
	Warnings     []string
}

// PitotVelocity returns the air velocity for a pitot-tube velocity pressure vp
// at air density rho: V = √(2·VP/ρ) (SI). The IP form V = 1096.2·√(VP/ρ) fpm
// (VP in in. w.g., ρ in lb/ft³) is the same relation; with the 60 °F water
// column of this package (1 in. w.g. = 248.84 Pa) the constant works out to
// 1097.2. vp must be 0 to 5000 Pa and rho 0.5 to 1.5 kg/m³; errors are
// *InputError naming "velocity_pressure" or "density".
func PitotVelocity(vp Pressure, rho Density) (Velocity, error) {
	if err := checkRange("velocity_pressure", vp.Pa(), 0, maxVelocityPressurePa, "Pa"); err != nil {
		return 0, err
	}
	if err := checkDensity(rho); err != nil {
		return 0, err
	}
	return pitotVelocity(vp.Pa(), rho.KgM3()), nil
}

func pitotVelocity(vpPa, rho float64) Velocity {
	if vpPa <= 0 {
		return 0
	}
	return Velocity(math.Sqrt(2 * vpPa / rho))
}

func checkDensity(rho Density) error {
	return checkRange("density", rho.KgM3(), minAirDensity, maxAirDensity, "kg/m³")
}

// FromVelocityPressures computes the traverse from one velocity-pressure
// reading per point, in the order of Points, at air density rho (the actual
// density at the traverse plane, 0.5 to 1.5 kg/m³). Each point's velocity is
// √(2·VP/ρ) and the mean velocity is the arithmetic mean of the point
// velocities: velocities are averaged, never the pressures (averaging the
// pressures overstates the flow wherever the profile is uneven).
//
// A negative reading (reverse or turbulent flow) counts as zero velocity and is
// warned about by point, as are zero readings. The result also warns (common
// practice) when more than 10 % of the points read zero or less, and when the
// plane fails the uniformity test of AMCA Publication 203 / ASHRAE Standard
// 111 as recalled from memory: more than 75 % of the readings must be greater
// than 1/10 of the largest.
//
// Readings must be finite and within ±5000 Pa. Errors are *InputError naming a
// layout input (see Points), "density", or "readings" (a wrong count, which
// says how many points the layout has, or a reading out of range, which says
// which point).
func (l TraverseLayout) FromVelocityPressures(vps []Pressure, rho Density) (TraverseResult, error) {
	pts, err := l.readingsLayout(len(vps))
	if err != nil {
		return TraverseResult{}, err
	}
	if err := checkDensity(rho); err != nil {
		return TraverseResult{}, err
	}
	vel := make([]Velocity, len(vps))
	weight := make([]float64, len(vps))
	for i, vp := range vps {
		p := vp.Pa()
		if err := checkRange("readings", p, -maxVelocityPressurePa, maxVelocityPressurePa, "Pa"); err != nil {
			return TraverseResult{}, readingError(err, pts[i], "velocity pressure")
		}
		vel[i] = pitotVelocity(p, rho.KgM3())
		weight[i] = p
	}
	return l.summarize(pts, vel, weight, "velocity pressure")
}

// FromVelocities computes the traverse from one velocity reading per point (a
// pitot traverse already converted, or a thermal or vane anemometer traverse),
// in the order of Points. The mean velocity is the arithmetic mean of the
// point velocities. A negative reading counts as zero and is warned about,
// and the same plane-quality warnings as FromVelocityPressures are given, with
// the uniformity test applied to V², which is proportional to the velocity
// pressure.
//
// Readings must be finite and within ±150 m/s. Errors are *InputError naming a
// layout input (see Points) or "readings".
func (l TraverseLayout) FromVelocities(v []Velocity) (TraverseResult, error) {
	pts, err := l.readingsLayout(len(v))
	if err != nil {
		return TraverseResult{}, err
	}
	vel := make([]Velocity, len(v))
	weight := make([]float64, len(v))
	for i, vi := range v {
		s := vi.MPS()
		if err := checkRange("readings", s, -maxVelocityMps, maxVelocityMps, "m/s"); err != nil {
			return TraverseResult{}, readingError(err, pts[i], "velocity")
		}
		if s > 0 {
			vel[i] = Velocity(s)
			weight[i] = s * s
		} else {
			weight[i] = s // keeps the sign for the negative/zero warnings
		}
	}
	return l.summarize(pts, vel, weight, "velocity")
}

// readingsLayout returns the points of the layout and checks the reading count.
func (l TraverseLayout) readingsLayout(n int) ([]TraversePoint, error) {
	pts, err := l.Points()
	if err != nil {
		return nil, err
	}
	if n != len(pts) {
		return nil, &InputError{Input: "readings", Value: float64(n), Min: float64(len(pts)), Max: float64(len(pts)),
			Reason: fmt.Sprintf("this layout has %d points and needs one reading per point; %d readings were given", len(pts), n)}
	}
	return pts, nil
}

func readingError(err error, p TraversePoint, kind string) error {
	e, ok := err.(*InputError)
	if !ok {
		return err
	}
	e.Reason = fmt.Sprintf("the %s at %s is outside the accepted range %s", kind, p.Label(), e.RangeText())
	return e
}

// summarize averages the counted velocities and collects the warnings. vp holds
// each point's velocity pressure, or a value proportional to it with the sign
// of the reading.
func (l TraverseLayout) summarize(pts []TraversePoint, vel []Velocity, vp []float64, kind string) (TraverseResult, error) {
	area, err := l.Area()
	if err != nil {
		return TraverseResult{}, err
	}
	n := len(vel)
	var sum float64
	for _, v := range vel {
		sum += v.MPS()
	}
	mean := Velocity(sum / float64(n))
	res := TraverseResult{
		Area: area, Points: pts, Velocities: vel, MeanVelocity: mean,
		Flow:     VolumeFlow(mean.MPS() * area.M2()),
		Warnings: l.Warnings(),
	}

	var neg, zero []string
	maxVP := 0.0
	for i, p := range vp {
		switch {
		case p < 0:
			neg = append(neg, pts[i].Label())
		case p == 0:
			zero = append(zero, pts[i].Label())
		}
		maxVP = math.Max(maxVP, p)
	}
	if len(neg) > 0 {
		res.Warnings = append(res.Warnings, fmt.Sprintf("negative %s at %s: counted as zero velocity (reverse or turbulent flow there)",
			kind, strings.Join(neg, ", ")))
	}
	if len(zero) > 0 {
		res.Warnings = append(res.Warnings, fmt.Sprintf("zero %s at %s: counted as zero velocity; check that the probe faces into the airflow and its tubing is clear",
			kind, strings.Join(zero, ", ")))
	}
	if bad := len(neg) + len(zero); bad*10 > n {
		res.Warnings = append(res.Warnings, fmt.Sprintf("%d of %d points (%.0f %%) read zero or negative, more than 10 %% of the plane: choose a traverse plane farther from fittings",
			bad, n, 100*float64(bad)/float64(n)))
	}
	if maxVP <= 0 {
		res.Warnings = append(res.Warnings, "no point read a positive "+kind+": no flow was measured")
		return res, nil
	}
	// Uniformity test, AMCA Publication 203 / ASHRAE Standard 111 (from memory):
	// the plane is suitable when more than 75 % of the velocity-pressure readings
	// are greater than 1/10 of the largest.
	var low int
	for _, p := range vp {
		if p <= maxVP/10 {
			low++
		}
	}
	if (n-low)*4 <= 3*n {
		msg := fmt.Sprintf("%d of %d points are at or below 10 %% of the highest velocity pressure", low, n)
		if kind == "velocity" {
			msg = fmt.Sprintf("%d of %d points are at or below 32 %% of the highest velocity (10 %% of the highest velocity pressure)", low, n)
		}
		res.Warnings = append(res.Warnings, msg+": the profile is too uneven; choose a traverse plane farther from fittings")
	}
	return res, nil
}
