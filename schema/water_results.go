package schema

import (
	"fmt"
	"math"

	"fieldtab/measure"
)

// DefaultValveAccuracyPct is the ± flow accuracy, in percent of flow, taken
// for a balancing valve's Cv (or Kv) when its maker's figure is not entered.
// Common practice, from memory: makers commonly state about ±5 % at a
// setting, worse when nearly closed.
const DefaultValveAccuracyPct = 5.0

// Water processes: what the water's temperatures show.
const (
	WaterCooling      = "cooling"          // the water warms: it takes heat from the air (a cooling coil)
	WaterHeating      = "heating"          // the water cools: it gives heat to the air (a heating coil)
	WaterNoTransfer   = "no heat transfer" // equal temperatures, within the thermometers' accuracy
	WaterModeNotGiven = "heating or cooling not stated"
)

// Finding kinds of water tests.
const (
	FindingWaterModeMismatch = "water_mode_mismatch" // the water does the opposite of the test's mode, or nothing
	FindingWaterModeNotGiven = "water_mode_not_stated"
)

// waterProcess says what the water shows and notes where that contradicts
// the test's stated mode. ΔT within the two thermometers' stated accuracies
// is no heat transfer.
func (c *resultsCalc) waterProcess(wt *WaterTest, rs []*Reading, enter, leave measure.Temperature, res *WaterTestResult) {
	band := 0.0 // K
	for _, q := range []string{"enter_temp", "leave_temp"} {
		if r := resCurrent(rs, q, 0); r != nil {
			if a := c.accuracy(r.InstrumentID); a.dim == DimTemperature {
				band += a.abs
			}
		}
	}
	dt := float64(leave - enter)
	switch {
	case math.Abs(dt) <= band || dt == 0:
		res.Process = WaterNoTransfer
	case dt > 0:
		res.Process = WaterCooling
	default:
		res.Process = WaterHeating
	}
	if wt.Mode != "" && res.Process != wt.Mode {
		what := map[string]string{WaterCooling: "warms", WaterHeating: "cools"}[res.Process]
		if res.Process == WaterNoTransfer {
			res.ModeNote = fmt.Sprintf("the water shows no heat transfer (%s to %s, within the thermometers' accuracy), but the test is stated as %s",
				c.numU(enter.In(c.u), 1, c.units.Temperature), c.numU(leave.In(c.u), 1, c.units.Temperature), wt.Mode)
		} else {
			res.ModeNote = fmt.Sprintf("the water %s from %s to %s, which is %s, but the test is stated as %s: "+
				"check the coil's valve and controls, and which thermometer is on which pipe",
				what, c.numU(enter.In(c.u), 1, c.units.Temperature), c.numU(leave.In(c.u), 1, c.units.Temperature), res.Process, wt.Mode)
		}
	}
}

// waterMode sets the stated mode, with a note when the record has none.
func (c *resultsCalc) waterMode(wt *WaterTest, res *WaterTestResult) {
	res.Mode = wt.Mode
	if wt.Mode == "" {
		res.ModeNote = WaterModeNotGiven + ": the record was made before the mode was asked for; edit the water test to state it"
	}
}

// valveAccuracy is the valve's stated flow accuracy, else the default.
func valveAccuracy(wt *WaterTest) (pct float64, source string) {
	if wt.ValveAccuracyPct > 0 {
		return wt.ValveAccuracyPct, "stated"
	}
	return DefaultValveAccuracyPct, "default"
}

// waterFindings adds the mode findings of one water test.
func (c *resultsCalc) waterFindings(w *WaterTestResult, add func(kind string, subj SubjectRef, text string)) {
	subj := SubjectRef{SubjectWaterTest, w.ID, w.Tag}
	switch {
	case w.Mode == "":
		add(FindingWaterModeNotGiven, subj, w.Tag+": "+w.ModeNote+".")
	case w.ModeNote != "":
		add(FindingWaterModeMismatch, subj, w.Tag+": "+w.ModeNote+".")
	}
}
