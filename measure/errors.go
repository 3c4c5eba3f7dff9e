package measure

import (
	"fmt"
	"math"
	"strconv"
)

// InputError reports an input that a method cannot accept: a value outside the
// method's valid range, or a combination of inputs that is impossible (a wet bulb
// above the dry bulb, say). Input names the input the way callers know it, in
// snake case ("dry_bulb", "velocity_pressure").
type InputError struct {
	Input  string  // name of the offending input
	Value  float64 // the value given, in Unit
	Unit   string  // unit of Value, Min and Max ("" when dimensionless)
	Min    float64 // lowest accepted value (may be -Inf)
	Max    float64 // highest accepted value (may be +Inf)
	Reason string  // set when the problem is not a plain range
}

func (e *InputError) Error() string {
	v := formatNum(e.Value) + unitSuffix(e.Unit)
	if e.Reason != "" {
		return fmt.Sprintf("%s = %s: %s", e.Input, v, e.Reason)
	}
	return fmt.Sprintf("%s = %s is outside the accepted range %s", e.Input, v, e.RangeText())
}

// RangeText renders the accepted range, e.g. "-148 to 392 °F" or "above 0 cfm".
func (e *InputError) RangeText() string {
	u := unitSuffix(e.Unit)
	switch {
	case math.IsInf(e.Min, -1) && math.IsInf(e.Max, 1):
		return "any finite value"
	case math.IsInf(e.Max, 1):
		return "at least " + formatNum(e.Min) + u
	case math.IsInf(e.Min, -1):
		return "at most " + formatNum(e.Max) + u
	}
	return formatNum(e.Min) + " to " + formatNum(e.Max) + u
}

func unitSuffix(u string) string {
	switch u {
	case "":
		return ""
	case "%":
		return " %"
	}
	return " " + u
}

func formatNum(v float64) string {
	if math.IsNaN(v) {
		return "NaN"
	}
	return strconv.FormatFloat(v, 'g', 6, 64)
}

// checkRange returns an *InputError when v is NaN, infinite or outside [lo, hi].
func checkRange(input string, v, lo, hi float64, unit string) error {
	if math.IsNaN(v) || math.IsInf(v, 0) || v < lo || v > hi {
		return &InputError{Input: input, Value: v, Unit: unit, Min: lo, Max: hi}
	}
	return nil
}

// checkPositive returns an *InputError unless v is finite and strictly above zero.
func checkPositive(input string, v float64, unit string) error {
	if math.IsNaN(v) || math.IsInf(v, 0) || v <= 0 {
		return &InputError{Input: input, Value: v, Unit: unit, Min: 0, Max: math.Inf(1),
			Reason: "must be a finite value above 0" + unitSuffix(unit)}
	}
	return nil
}

// invalid builds an *InputError for a value that is in range but not acceptable.
func invalid(input string, v float64, unit, reason string) error {
	return &InputError{Input: input, Value: v, Unit: unit, Min: math.Inf(-1), Max: math.Inf(1), Reason: reason}
}
