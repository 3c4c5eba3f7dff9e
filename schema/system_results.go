package schema

import (
	"fmt"
	"math"

	"fieldtab/measure"
)

// FanDesignDeviationPct is how far, in percent of design, a fan's speed or
// external static pressure may be from its design figure before it is a
// finding. Common practice, not from a standard: the specification governs.
const FanDesignDeviationPct = 10.0

// FanLawReachPct is the largest speed change, in percent of the speed read,
// for which the results give a fan-law prediction. Past it the fan's curve,
// its maximum safe speed and the motor's power govern, and a figure from the
// laws alone (a fan at six times its speed) would mislead. Common practice,
// not from a standard.
const FanLawReachPct = 30.0

// Motor statuses: the checks of `fieldtab calc motor` on the system's readings.
const (
	MotorOK      = "ok"      // every check that the readings allow passes
	MotorWarning = "warning" // see MotorWarnings
)

// Finding kinds of systems.
const (
	FindingMotorCheck         = "motor_check"                // imbalance or % FLA beyond its limit
	FindingFanSpeedOffDesign  = "fan_speed_off_design"       // fan_rpm beyond FanDesignDeviationPct of design
	FindingStaticOffDesign    = "external_static_off_design" // static_external beyond FanDesignDeviationPct of design
	FindingOutletsVsTraverse  = "outlets_traverse_disagree"  // outlet sum and traverse differ beyond the fan band
	outletsVsTraverseDisagree = "disagree"
)

// FlowAgreement compares a system's outlet sum with its traverse:
// DifferencePct = (outlets − traverse)/traverse × 100, judged by the job's fan
// band with both figures' ± (Tolerance, with the traverse as reference).
type FlowAgreement struct {
	Outlets       string          `json:"outlets"` // "supply" or "exhaust"
	OutletSum     float64         `json:"outlet_sum"`
	TraverseID    string          `json:"traverse_id"`
	TraverseFlow  float64         `json:"traverse_flow"`
	DifferencePct float64         `json:"difference_pct"`
	Status        string          `json:"status"` // "agree", "disagree" or "undetermined"
	Tolerance     *ToleranceCheck `json:"tolerance,omitempty"`
}

// systemChecks adds the motor checks, the fan's speed and external static
// against design, and the outlet sum against the traverse.
func (c *resultsCalc) systemChecks(sys *System, res *SystemResult) {
	d := sys.Design
	// The same measure functions and thresholds as `fieldtab calc motor`.
	checked := false
	if v := res.VoltageImbalance; v != nil {
		checked = true
		if *v > measure.VoltageUnbalanceDeratePct {
			res.MotorWarnings = append(res.MotorWarnings, fmt.Sprintf(
				"voltage imbalance %s %% is above %s %%: NEMA MG 1 calls for derating the motor; report it to the electrical contractor",
				c.num(*v, 1), c.num(measure.VoltageUnbalanceDeratePct, 0)))
		}
	}
	if v := res.CurrentImbalance; v != nil {
		checked = true
		if *v > measure.CurrentUnbalanceNotePct {
			res.MotorWarnings = append(res.MotorWarnings, fmt.Sprintf(
				"current imbalance %s %% is above %s %% (common practice): check the supply, the connections and the windings",
				c.num(*v, 1), c.num(measure.CurrentUnbalanceNotePct, 0)))
		}
	}
	if v := res.PercentFLA; v != nil {
		checked = true
		if *v > measure.FullLoadPct {
			res.MotorWarnings = append(res.MotorWarnings, fmt.Sprintf(
				"the highest leg draws %s %% of nameplate FLA (%s A): check the service factor, the load and the drive before leaving it running",
				c.num(*v, 0), c.num(d.FLA, 1)))
		}
	}
	if checked {
		res.MotorStatus = MotorOK
		if len(res.MotorWarnings) > 0 {
			res.MotorStatus = MotorWarning
		}
	}
	if res.FanRPM != nil && d.FanRPM > 0 {
		res.FanRPMPercentOfDesign = resPtr(*res.FanRPM / d.FanRPM * 100)
	}
	if v, ok := res.Statics["static_external"]; ok && d.ExternalStatic > 0 {
		res.ExternalStaticPercentOfDesign = resPtr(v / d.ExternalStatic * 100)
	}
	c.outletsVsTraverse(sys, res)
}

// outletsVsTraverse compares the fully read supply (or exhaust) outlets of a
// system with its traverse.
func (c *resultsCalc) outletsVsTraverse(sys *System, res *SystemResult) {
	tf := c.sysTrav[sys.ID]
	if tf == nil || tf.flow <= 0 {
		return
	}
	kind, sum := "supply", c.supply[sys.ID]
	if sum == nil || sum.read == 0 {
		kind, sum = "exhaust", c.exhaust[sys.ID]
	}
	if sum == nil || sum.read == 0 || sum.read < sum.total {
		return // a partial sum says nothing about leakage
	}
	trav := tf.flow.AirIn(c.u)
	unc := sum.unc + trav*tf.accPct/100
	tol, err := c.tolerance(sum.flow, trav, c.fanBand(), measure.Accuracy{Abs: unc})
	if err != nil {
		res.Errors = append(res.Errors, resErr("outlets against traverse", err))
		return
	}
	a := &FlowAgreement{Outlets: kind, OutletSum: sum.flow, TraverseID: tf.id, TraverseFlow: trav,
		DifferencePct: (sum.flow - trav) / trav * 100, Tolerance: tol}
	switch tol.Status {
	case string(measure.StatusWithin):
		a.Status = "agree"
	case string(measure.StatusUndetermined):
		a.Status = string(measure.StatusUndetermined)
	default:
		a.Status = outletsVsTraverseDisagree
	}
	res.OutletsVsTraverse = a
}

// offDesign says whether pct (of design) is beyond FanDesignDeviationPct,
// with a slack so a figure exactly on the line stays on it.
func offDesign(pct float64) bool { return math.Abs(pct-100) > FanDesignDeviationPct+1e-9 }

// systemFindings adds the findings of systemChecks.
func (c *resultsCalc) systemFindings(s *SystemResult, add func(kind string, subj SubjectRef, text string)) {
	subj := SubjectRef{SubjectSystem, s.ID, s.Tag}
	for _, w := range s.MotorWarnings {
		add(FindingMotorCheck, subj, s.Tag+": motor: "+w+".")
	}
	sys := c.sysByID[s.ID]
	if sys == nil {
		return
	}
	if p := s.FanRPMPercentOfDesign; p != nil && offDesign(*p) {
		add(FindingFanSpeedOffDesign, subj, fmt.Sprintf("%s: fan speed %s is %s %% of design %s, more than %s %% from it (common practice).",
			s.Tag, c.numU(*s.FanRPM, 0, "rpm"), c.num(*p, 0), c.numU(sys.Design.FanRPM, 0, "rpm"), c.num(FanDesignDeviationPct, 0)))
	}
	if p := s.ExternalStaticPercentOfDesign; p != nil && offDesign(*p) {
		d := 2
		if c.u == measure.SI {
			d = 0
		}
		add(FindingStaticOffDesign, subj, fmt.Sprintf("%s: external static pressure %s is %s %% of design %s, more than %s %% from it (common practice).",
			s.Tag, c.numU(s.Statics["static_external"], d, c.units.DuctPressure), c.num(*p, 0),
			c.numU(sys.Design.ExternalStatic, d, c.units.DuctPressure), c.num(FanDesignDeviationPct, 0)))
	}
	if a := s.OutletsVsTraverse; a != nil && a.Status == outletsVsTraverseDisagree {
		tag := a.TraverseID
		if tf := c.travFlow[a.TraverseID]; tf != nil {
			tag = tf.tag
		}
		ad := 0
		if c.u == measure.SI {
			ad = 1
		}
		t := c.s.Job.Tolerances
		add(FindingOutletsVsTraverse, subj, fmt.Sprintf("%s: the %s outlets sum to %s, %s %% of traverse %s's %s, outside the fan tolerance −%s %%/+%s %%: "+
			"look for duct leakage between the traverse and the outlets, and check both sets of readings.",
			s.Tag, a.Outlets, c.numU(a.OutletSum, ad, c.units.AirFlow), c.num(a.OutletSum/a.TraverseFlow*100, 0), tag,
			c.numU(a.TraverseFlow, ad, c.units.AirFlow), c.num(t.FanLowPct, 0), c.num(t.FanHighPct, 0)))
	}
}
