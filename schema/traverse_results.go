package schema

import (
	"fmt"
	"math"
	"slices"
	"strings"
	"time"

	"fieldtab/measure"
)

// TraverseStageResult is one stage of a traverse computed on its own: the
// as-found figures beside the final ones, like an outlet's.
type TraverseStageResult struct {
	Stage           string          `json:"stage"`  // "as_found"
	Status          string          `json:"status"` // "computed", "incomplete", "conflict" or "error"
	PointsTotal     int             `json:"points_total"`
	PointsRead      int             `json:"points_read"`
	MeanVelocity    *float64        `json:"mean_velocity,omitempty"`
	Flow            *float64        `json:"flow,omitempty"`
	FlowUncertainty *float64        `json:"flow_uncertainty,omitempty"` // ± on Flow
	Tolerance       *ToleranceCheck `json:"tolerance,omitempty"`        // vs the system's design airflow, job fan band
	Errors          []string        `json:"errors,omitempty"`
}

// TraverseConflict is a traverse point with two or more current readings of
// one stage, none superseding another (two devices, a script): results do not
// pick one.
type TraverseConflict struct {
	Point    int               `json:"point"` // 1-based
	Label    string            `json:"label"`
	Stage    string            `json:"stage"`
	Readings []ConflictReading `json:"readings"` // in the order taken
}

// ConflictReading is one of the readings in a conflict.
type ConflictReading struct {
	ReadingID  string    `json:"reading_id"`
	Quantity   string    `json:"quantity"` // "vp" or "velocity"
	Value      *float64  `json:"value,omitempty"`
	Unit       string    `json:"unit"` // the job's unit of Value
	Technician string    `json:"technician"`
	DeviceID   string    `json:"device_id"`
	TakenAt    time.Time `json:"taken_at"`
}

// traverseStage is one stage's point readings worked through.
type traverseStage struct {
	status    string
	points    []TraversePointValue
	read      int
	conflicts []TraverseConflict
	errors    []string
	warnings  []string
	tr        measure.TraverseResult
	computed  bool
	unc       float64 // ± flow, job air-flow units: instruments and method
	instUnc   float64 // the instruments' part of unc, which the status is judged with
	instKnown bool    // every point's instrument accuracy is on record
}

// traverseUncertaintyNote says what a traverse's ± is made of.
func traverseUncertaintyNote(instKnown bool) string {
	note := fmt.Sprintf("± is the instruments' stated accuracy carried through each point's velocity and the mean, "+
		"combined root-sum-square with the traverse method's own ±%s %% (common practice for a field traverse; the same figure a trade "+
		"certifying body requires of pitot-velocity instruments). The status is judged with the instruments' accuracy alone, as an "+
		"outlet's is: the tolerance band itself allows for the method",
		FormatNumber(measure.TraverseMethodUncertaintyPct, 0, false))
	if !instKnown {
		note += "; some points have no instrument accuracy on record, so the ± leaves them out"
	}
	return note
}

// traverseConflicts finds, for each stage, the points with more than one
// current vp or velocity reading.
func (c *resultsCalc) traverseConflicts(rs []*Reading, pts []measure.TraversePoint) map[string]map[int][]*Reading {
	by := map[string]map[int][]*Reading{}
	for _, r := range rs {
		if (r.Quantity != "vp" && r.Quantity != "velocity") || r.Point < 1 || r.Point > len(pts) {
			continue
		}
		if by[r.Stage] == nil {
			by[r.Stage] = map[int][]*Reading{}
		}
		by[r.Stage][r.Point] = append(by[r.Stage][r.Point], r)
	}
	return by
}

func (c *resultsCalc) conflictOf(stage string, p measure.TraversePoint, point int, rs []*Reading) TraverseConflict {
	sorted := slices.Clone(rs)
	slices.SortFunc(sorted, func(a, b *Reading) int {
		if resLater(a, b) {
			return 1
		}
		return -1
	})
	tc := TraverseConflict{Point: point, Label: p.Label(), Stage: stage}
	for _, r := range sorted {
		cr := ConflictReading{ReadingID: r.ID, Quantity: r.Quantity, Technician: r.Technician, DeviceID: r.DeviceID,
			TakenAt: r.TakenAt}
		if r.Quantity == "vp" {
			if vp, err := r.Pressure(); err == nil {
				cr.Value, cr.Unit = resPtr(vp.DuctIn(c.u)), c.units.DuctPressure
			}
		} else if v, err := r.Velocity(); err == nil {
			cr.Value, cr.Unit = resPtr(v.In(c.u)), c.units.Velocity
		}
		tc.Readings = append(tc.Readings, cr)
	}
	return tc
}

// traverseStage computes one stage of a traverse from its point readings at
// the plane's density.
func (c *resultsCalc) traverseStage(layout measure.TraverseLayout, pts []measure.TraversePoint, byPoint map[int][]*Reading,
	stage string, rho measure.Density) traverseStage {
	n := len(pts)
	st := traverseStage{status: ResultError, points: make([]TraversePointValue, n), instKnown: true}
	vps := make([]measure.Pressure, n)
	vels := make([]measure.Velocity, n)
	isVP := make([]bool, n)
	nVP, nVel, bad := 0, 0, false
	sumDV := 0.0 // Σ ± velocity, m/s
	for i, p := range pts {
		pv := TraversePointValue{Point: i + 1, Label: p.Label(), Depth: p.Depth.DuctSizeIn(c.u)}
		if p.Diameter == 0 {
			pv.Depth, pv.PortOffset = p.X.DuctSizeIn(c.u), resPtr(p.Y.DuctSizeIn(c.u))
		}
		rs := byPoint[i+1]
		st.points[i] = pv
		if len(rs) == 0 {
			continue
		}
		st.read++
		if len(rs) > 1 {
			st.conflicts = append(st.conflicts, c.conflictOf(stage, p, i+1, rs))
			st.points[i].Conflict = true
			continue
		}
		r := rs[0]
		pv.ReadingID, pv.Quantity = r.ID, r.Quantity
		a := c.accuracy(r.InstrumentID)
		if !a.known {
			st.instKnown = false
		}
		if r.Quantity == "vp" {
			vp, err := r.Pressure()
			if err != nil {
				st.errors = append(st.errors, resErr(p.Label(), err))
				bad = true
			} else {
				pv.Value = resPtr(vp.DuctIn(c.u))
				vps[i], isVP[i] = vp, true
				nVP++
				u := a.pct / 100 * math.Abs(float64(vp))
				if a.dim == DimPressure {
					u += a.abs
				}
				if dv, err := measure.PitotVelocityUncertainty(vp, measure.Pressure(u), rho); err == nil {
					sumDV += float64(dv)
				}
			}
		} else {
			v, err := r.Velocity()
			if err != nil {
				st.errors = append(st.errors, resErr(p.Label(), err))
				bad = true
			} else {
				pv.Value = resPtr(v.In(c.u))
				vels[i] = v
				nVel++
				u := a.pct / 100 * math.Abs(float64(v))
				if a.dim == DimVelocity {
					u += a.abs
				}
				sumDV += u
			}
		}
		st.points[i] = pv
	}
	switch {
	case len(st.conflicts) > 0:
		st.status = ResultConflict
		return st
	case bad:
		return st
	case st.read < n:
		st.status = ResultIncomplete
		return st
	}

	var tr measure.TraverseResult
	var err error
	switch {
	case nVP == n:
		tr, err = layout.FromVelocityPressures(vps, rho)
	case nVel == n:
		tr, err = layout.FromVelocities(vels)
	default:
		// Mixed readings: turn each VP into a velocity at the plane's density,
		// keeping a negative reading's sign so FromVelocities counts it as zero.
		for i := range pts {
			if !isVP[i] {
				continue
			}
			v, perr := measure.PitotVelocity(measure.Pressure(math.Abs(float64(vps[i]))), rho)
			if perr != nil {
				err = fmt.Errorf("%s: %w", pts[i].Label(), perr)
				break
			}
			if vps[i] < 0 {
				v = -v
			}
			vels[i] = v
		}
		if err == nil {
			tr, err = layout.FromVelocities(vels)
		}
	}
	if err != nil {
		st.errors = append(st.errors, resErr("traverse", err))
		return st
	}
	st.status, st.tr, st.computed = ResultComputed, tr, true
	for i := range st.points {
		if i < len(tr.Velocities) {
			st.points[i].Velocity = resPtr(tr.Velocities[i].In(c.u))
		}
	}
	// One instrument's error runs the same way at every point, so the
	// points' ± add linearly into the mean; the method's ± is independent of
	// it, so the two combine root-sum-square.
	inst := measure.VolumeFlow(sumDV / float64(n) * float64(tr.Area)).AirIn(c.u)
	method := tr.Flow.AirIn(c.u) * measure.TraverseMethodUncertaintyPct / 100
	st.unc, st.instUnc = math.Hypot(inst, method), inst
	return st
}

// traverseTolerance checks a stage's flow against its system's design.
func (c *resultsCalc) traverseTolerance(systemID string, flow, unc float64, instKnown bool) (*ToleranceCheck, error) {
	design := c.systemDesignAirflow(systemID)
	if design <= 0 {
		return nil, nil
	}
	tol, err := c.tolerance(flow, design, c.fanBand(), measure.Accuracy{Abs: unc})
	if err != nil {
		return nil, err
	}
	tol.UncertaintyUnknown = !instKnown
	return tol, nil
}

// traverseAsFound computes the as-found stage on its own.
func (c *resultsCalc) traverseAsFound(t *Traverse, layout measure.TraverseLayout, pts []measure.TraversePoint,
	byPoint map[int][]*Reading, rho measure.Density) *TraverseStageResult {
	st := c.traverseStage(layout, pts, byPoint, StageAsFound, rho)
	out := &TraverseStageResult{Stage: StageAsFound, Status: st.status, PointsTotal: len(pts), PointsRead: st.read,
		Errors: st.errors}
	if !st.computed {
		return out
	}
	out.MeanVelocity = resPtr(st.tr.MeanVelocity.In(c.u))
	out.Flow = resPtr(st.tr.Flow.AirIn(c.u))
	out.FlowUncertainty = resPtr(st.unc)
	tol, err := c.traverseTolerance(t.SystemID, *out.Flow, st.instUnc, st.instKnown)
	if err != nil {
		out.Errors = append(out.Errors, resErr("tolerance", err))
	}
	out.Tolerance = tol
	return out
}

// traverseReadings computes both stages of a traverse into res once its
// layout and density are known.
func (c *resultsCalc) traverseReadings(t *Traverse, layout measure.TraverseLayout, pts []measure.TraversePoint,
	rs []*Reading, dens resDensity, res *TraverseResult, tf *resTraverse) {
	n := len(pts)
	byStage := c.traverseConflicts(rs, pts)
	if len(byStage[StageFinal]) > 0 {
		res.Stage = StageFinal
	}
	if res.Stage == StageFinal && len(byStage[StageAsFound]) > 0 {
		res.AsFound = c.traverseAsFound(t, layout, pts, byStage[StageAsFound], dens.rho)
	}
	st := c.traverseStage(layout, pts, byStage[res.Stage], res.Stage, dens.rho)
	if res.Stage == StageAsFound && len(byStage[StageAsFound]) > 0 {
		// The governing stage is the as-found one: the same figures.
		res.AsFound = &TraverseStageResult{Stage: StageAsFound, Status: st.status, PointsTotal: n, PointsRead: st.read}
	}
	for _, stg := range []string{StageAsFound, StageFinal} {
		if stg == res.Stage {
			res.Conflicts = append(res.Conflicts, st.conflicts...)
			continue
		}
		for p := 1; p <= n; p++ {
			if rs := byStage[stg][p]; len(rs) > 1 {
				res.Conflicts = append(res.Conflicts, c.conflictOf(stg, pts[p-1], p, rs))
			}
		}
	}
	res.Points, res.PointsRead, res.Status = st.points, st.read, st.status
	res.Errors = append(res.Errors, st.errors...)
	tf.read = st.read
	if !st.computed {
		return
	}
	tr := st.tr
	res.Area = resPtr(tr.Area.In(c.u))
	res.MeanVelocity = resPtr(tr.MeanVelocity.In(c.u))
	res.Flow = resPtr(tr.Flow.AirIn(c.u))
	res.FlowUncertainty = resPtr(st.unc)
	res.UncertaintyNote = traverseUncertaintyNote(st.instKnown)
	for _, w := range tr.Warnings {
		// measure repeats the layout's warnings, which are already listed.
		if !slices.Contains(res.Warnings, w) {
			res.Warnings = append(res.Warnings, w)
		}
	}
	// What the traverse's flow carries into statuses elsewhere (the system's
	// airflow, a capacity test) is the instruments' part, as for its own.
	pct := st.instUnc / *res.Flow * 100
	if *res.Flow <= 0 {
		pct = 0
	}
	tf.computed, tf.flow, tf.stdFactor, tf.accPct, tf.accKnown = true, tr.Flow, dens.stdFactor, pct, st.instKnown
	if _, ok := c.sysTrav[t.SystemID]; !ok {
		c.sysTrav[t.SystemID] = tf
	}
	tol, err := c.traverseTolerance(t.SystemID, *res.Flow, st.instUnc, st.instKnown)
	if err != nil {
		res.Errors = append(res.Errors, resErr("tolerance", err))
	}
	res.Tolerance = tol
	if res.AsFound != nil && res.Stage == StageAsFound {
		a := res.AsFound
		a.MeanVelocity, a.Flow, a.FlowUncertainty, a.Tolerance = res.MeanVelocity, res.Flow, res.FlowUncertainty, res.Tolerance
	}
}

// FindingTraverseConflict is a traverse point with two current readings of
// one stage, for the lead to resolve.
const FindingTraverseConflict = "traverse_conflict"

// traverseFindings adds a finding per conflicting point.
func (c *resultsCalc) traverseFindings(t *TraverseResult, add func(kind string, subj SubjectRef, text string)) {
	subj := SubjectRef{SubjectTraverse, t.ID, t.Tag}
	for _, cf := range t.Conflicts {
		var parts []string
		for _, r := range cf.Readings {
			v := "no value"
			if r.Value != nil {
				d := 0
				switch {
				case r.Quantity == "vp" && c.u == measure.IP:
					d = 3
				case r.Quantity == "vp" || c.u == measure.SI:
					d = 1
				}
				v = c.numU(*r.Value, d, r.Unit)
			}
			who := r.Technician
			if who == "" {
				who = "unknown"
			}
			if r.DeviceID != "" {
				who += " on device " + shortID(r.DeviceID)
			}
			parts = append(parts, fmt.Sprintf("%s by %s at %s", v, who, r.TakenAt.In(c.loc).Format("2006-01-02 15:04")))
		}
		add(FindingTraverseConflict, subj, fmt.Sprintf("%s: %s (%s) has %d readings that each count: %s. "+
			"No %s flow is computed until the lead corrects or voids all but one.",
			t.Tag, cf.Label, strings.ReplaceAll(cf.Stage, "_", " "), len(cf.Readings), strings.Join(parts, "; "),
			strings.ReplaceAll(cf.Stage, "_", "-")))
	}
}

// shortID is the first 8 characters of an ID, enough to tell devices apart.
func shortID(id string) string {
	if len(id) > 8 {
		return id[:8]
	}
	return id
}
