package objective

import (
	"encoding/binary"
	"fmt"
	"math"
	"slices"

	"plica/objective/kinematics"
	"plica/surrogate"

	"plica/objective/statics"
)

// sag finds the worst tip sag over the sampled workspace. The linear
// compliance of every sampled shape gives the sag at every common rotation
// φ in closed form, ĝᵀ R_z(φ) C R_z(φ)ᵀ g; the worst configuration is then
// solved with the geometrically exact rod model (objective/statics/REFERENCE.md §1), which is the
// reported value; the linear estimate at the same configuration is
// reported beside it.
func (e *evaluator) sag(res *Result) error {
	sc := &res.Scores
	g := e.sc.Load.GravityVector()
	gn := math.Sqrt(g[0]*g[0] + g[1]*g[1] + g[2]*g[2])
	if gn == 0 {
		a := e.shapes[0].act
		sc.SagActuation = kinematics.Actuation{Theta: append([]float64(nil), a.Theta...), Beta: append([]float64(nil), a.Beta...)}
		return nil
	}
	gh := [3]float64{g[0] / gn, g[1] / gn, g[2] / gn}
	w := defaults(e.sc.Workspace)
	// v(φ) = ĝᵀ R_z(φ) C R_z(φ)ᵀ g = |g| hᵀ C h with h = R_z(−φ) ĝ: only
	// the symmetric part of C counts, and the six products of h are the
	// same for every shape.
	hh := growTo(e.hh, w.BaseSteps)
	e.hh = hh
	for j := range hh {
		s, c := math.Sincos(2 * math.Pi * float64(j) / float64(w.BaseSteps))
		h := [3]float64{c*gh[0] + s*gh[1], -s*gh[0] + c*gh[1], gh[2]}
		hh[j] = [6]float64{gn * h[0] * h[0], gn * h[1] * h[1], gn * h[2] * h[2], gn * h[0] * h[1], gn * h[0] * h[2], gn * h[1] * h[2]}
	}
	worst, wj, err := e.worstSag(hh)
	if err != nil {
		return err
	}
	worstPhi := 2 * math.Pi * float64(wj) / float64(w.BaseSteps)
	// the angles and insertions in one allocation
	nt := len(worst.act.Theta)
	buf := make([]float64, nt+len(worst.act.Beta))
	act := kinematics.Actuation{Theta: buf[:nt:nt], Beta: buf[nt:]}
	copy(act.Beta, worst.act.Beta)
	for i, th := range worst.act.Theta {
		act.Theta[i] = th + worstPhi
	}
	sc.SagActuation = act
	links, err := e.robot.Links(act, nil)
	if err != nil {
		return err
	}
	ld := e.sc.Load
	load := statics.Load{Gravity: g, TipMoment: ld.TipMoment}
	for i := range 3 {
		load.TipForce[i] = ld.PayloadMass*g[i] + ld.TipForce[i]
	}
	// The reference shape keeps only the loads that are not weight.
	ref := statics.Load{TipForce: ld.TipForce, TipMoment: ld.TipMoment}
	loaded, err := statics.Solve(links, load, nil)
	if err != nil {
		return fmt.Errorf("tip sag at angles %s: %w", degList(act.Theta), err)
	}
	// Without extra tip loads the reference is the unloaded shape, whose
	// tip the closed-form link transforms give exactly.
	var free *statics.Shape
	if ref.TipForce == ([3]float64{}) && ref.TipMoment == ([3]float64{}) {
		tip := kinematics.Identity()
		for _, l := range links {
			tip = tip.Mul(kinematics.LinkTransform(l.U, l.End-l.Start))
		}
		free = &statics.Shape{Tip: tip}
	} else {
		free, err = statics.Solve(links, ref, nil)
		if err != nil {
			return fmt.Errorf("tip sag at angles %s (no gravity): %w", degList(act.Theta), err)
		}
	}
	if e.ctx != nil {
		if err := e.ctx.Err(); err != nil {
			return err
		}
	}
	sag := 0.0
	for i := range 3 {
		sag += gh[i] * (loaded.Tip.P[i] - free.Tip.P[i])
	}
	if !isFinite(sag) {
		return nonFinite("the tip sag at angles " + degList(act.Theta))
	}
	sc.TipSag = sag
	sc.SagIterations = loaded.Iterations + free.Iterations
	// Linear estimate at the same configuration: the compliance with the
	// fine rule (objective/statics/REFERENCE.md §3).
	C := e.compliance(links, &fineRule)
	var dp [3]float64
	for i := range 3 {
		dp[i] = C[i][0]*g[0] + C[i][1]*g[1] + C[i][2]*g[2]
	}
	sc.TipSagLinear = dp[0]*gh[0] + dp[1]*gh[1] + dp[2]*gh[2]
	if !isFinite(sc.TipSagLinear) {
		return nonFinite("the linear tip sag estimate at angles " + degList(act.Theta))
	}
	L := links[len(links)-1].End
	if math.Sqrt(dp[0]*dp[0]+dp[1]*dp[1]+dp[2]*dp[2])/L > statics.LinearDeflectionLimit {
		res.Warnings = append(res.Warnings, fmt.Sprintf("tip deflection under load exceeds %.0f %% of the length: the linear sag estimate is unreliable; the reported sag is from the geometrically exact model",
			100*statics.LinearDeflectionLimit))
	}
	return nil
}

func degList(th []float64) string {
	s := ""
	for i, t := range th {
		if i > 0 {
			s += ","
		}
		s += fmt.Sprintf("%.1f", t*180/math.Pi)
	}
	return s + " deg"
}

// margins fills mass, clearance and stability.
func (e *evaluator) margins(res *Result) error {
	sc := &res.Scores
	for i, b := range e.d.Bellows {
		sc.Mass += e.st[i].LinearDensity * (b.StraightLength + b.CurvedLength)
	}
	if !isFinite(sc.Mass) {
		return nonFinite("the bellows mass")
	}
	if sc.Mass > 0 {
		sc.PayloadToWeight = e.sc.Load.PayloadMass / sc.Mass
	}
	sc.MinClearance = math.Inf(1)
	for i := 0; i+1 < len(e.d.Bellows); i++ {
		c := e.clearance(i)
		if math.IsNaN(c) {
			sc.MinClearance = math.NaN()
			break
		}
		sc.MinClearance = math.Min(sc.MinClearance, c)
	}
	if len(e.d.Bellows) < 2 {
		sc.MinClearance = math.NaN()
	}
	return e.stability(res)
}

// clearance is the radial gap between bellows i and i+1, m; NaN when a
// diameter is unknown (measured stiffness without outer_diameter_mm, or
// the outer bellows has no geometry).
func (e *evaluator) clearance(i int) float64 {
	in, out := e.d.Bellows[i], e.d.Bellows[i+1]
	if out.Model == nil {
		return math.NaN()
	}
	og := out.Model.Geometry
	outerRootInner := og.OuterDiameter/2 - og.Depth - og.Wall
	var innerOD float64
	switch {
	case in.Model != nil:
		innerOD = in.Model.OuterDiameter
	case in.Measured != nil && in.Measured.OuterDiameter > 0:
		innerOD = in.Measured.OuterDiameter
	default:
		return math.NaN()
	}
	if in.ThreadLead > 0 && in.Model != nil {
		// Threaded: the inner crowns run in the outer bellows' crowns.
		ig := in.Model.Geometry
		crest := (og.OuterDiameter/2 - og.Wall) - ig.OuterDiameter/2
		root := outerRootInner - (ig.OuterDiameter/2 - ig.Depth)
		return math.Min(crest, root)
	}
	return outerRootInner - innerOD/2
}

// stability applies the two-tube snap test to every neighbouring pair
// whose curved parts overlap, at the insertions of the sampled workspace
// (the longest overlap is the worst).
func (e *evaluator) stability(res *Result) error {
	sc := &res.Scores
	sc.StabilityMargin = 1
	// The test depends on the insertions only (threads included), so each
	// distinct set of effective insertions is tested once.
	seen := map[string]bool{}
	acts := e.stabActs[:0]
	defer func() { clear(acts); e.stabActs = acts[:0] }()
	kb := e.stabKey[:0]
	// Without threads the effective insertions are the sampled ones, and
	// a shape with the insertions of the one before it adds nothing.
	threaded := len(e.robot.Threads) > 0
	var prev []float64
	for k, sh := range e.shapes {
		if err := e.tick(k, len(e.shapes)); err != nil {
			return err
		}
		if !threaded {
			if prev != nil && slices.Equal(prev, sh.act.Beta) {
				continue
			}
			prev = sh.act.Beta
		}
		beta := e.robot.EffectiveInsertion(sh.act)
		kb = kb[:0]
		for _, b := range beta {
			kb = binary.LittleEndian.AppendUint64(kb, math.Float64bits(b))
		}
		if !seen[string(kb)] {
			seen[string(kb)] = true
			acts = append(acts, sh.act)
		}
	}
	e.stabKey = kb
	if pairs := len(e.robot.Tubes) - 1; pairs > 0 {
		sc.Stability = make([]PairMargin, 0, pairs)
	}
	for i := 0; i+1 < len(e.robot.Tubes); i++ {
		var worst PairMargin
		found := false
		for k, a := range acts {
			if err := e.tick(k, len(acts)); err != nil {
				return err
			}
			pm, ok := e.pairMargin(i, a)
			if !ok {
				continue
			}
			if !isFinite(pm.Margin) || math.IsNaN(pm.LCrit) || !isFinite(pm.Lambda) { // LCrit is +Inf when the pair cannot snap
				return nonFinite(fmt.Sprintf("the snap-stability margin of bellows %d and %d", i+1, i+2))
			}
			if !found || pm.Margin < worst.Margin {
				worst, found = pm, true
			}
		}
		if found {
			sc.Stability = append(sc.Stability, worst)
			sc.StabilityMargin = math.Min(sc.StabilityMargin, worst.Margin)
		}
	}
	return nil
}

// pairMargin runs the two-tube snap test for bellows i and i+1 at one
// actuation (objective/kinematics/REFERENCE.md §4); false when their curved parts do not overlap.
func (e *evaluator) pairMargin(i int, a kinematics.Actuation) (PairMargin, bool) {
	ps, err := e.robot.SnapStability(a, i)
	if err != nil || ps.Overlap <= 0 {
		return PairMargin{}, false
	}
	return PairMargin{Inner: i, Overlap: ps.Overlap, Lambda: ps.Lambda, LCrit: ps.LCrit, Margin: ps.Margin}, true
}

// overhang returns the steepest wall angle from the print (vertical) axis
// of a bellows profile, rad (surrogate/REFERENCE.md §3.1: sinusoid atan(πw/q); trapezoid and
// U flanks from their geometry).
func overhang(g surrogate.Geometry) float64 {
	switch g.Profile {
	case surrogate.UShape:
		return math.Pi / 2
	case surrogate.Trapezoid:
		flank := g.Pitch * (1 - g.FlatFraction) / 2
		return math.Atan2(g.Depth, flank)
	}
	return math.Atan(math.Pi * g.Depth / g.Pitch)
}
