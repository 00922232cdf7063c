package objective

import (
	"fmt"
	"math"

	"plica/objective/kinematics"
	"plica/objective/statics"
)

// TaskMiss is how close the workspace comes to one task point.
type TaskMiss struct {
	Reached bool
	// Distance is from the task point to the closest tip position found, m.
	Distance float64
	// Miss is max(0, Distance − tolerance), m.
	Miss float64
	// AngleMiss is max(0, angle to the wanted direction − its tolerance) at
	// the closest configuration, rad (0 without a direction).
	AngleMiss float64
	// ClosestTip is the tip position at the closest configuration, base
	// frame, m.
	ClosestTip [3]float64
	// Actuation is the closest configuration, common rotation included.
	Actuation kinematics.Actuation
	// Loaded is true when the tip is the loaded one (self-weight and
	// payload, exact rod model).
	Loaded bool
}

// taskTolerances returns a task point's position and direction tolerances
// with their defaults (1 mm, 5°).
func taskTolerances(t TaskPoint) (tol, dirTol float64) {
	tol, dirTol = t.Tolerance, t.DirectionTolerance
	if tol == 0 {
		tol = 1e-3
	}
	if dirTol == 0 {
		dirTol = 5 * math.Pi / 180
	}
	return tol, dirTol
}

// taskCandidate is a tip pose in the frame of the unrotated shape and the
// common rotation that brings it closest to a task point.
type taskCandidate struct {
	act  kinematics.Actuation // without the common rotation
	phi  float64
	cost float64
}

// turnTo returns the common rotation that brings p to the azimuth of q
// (0 when either lies on the base axis).
func turnTo(p, q [3]float64) float64 {
	if math.Hypot(p[0], p[1]) == 0 || math.Hypot(q[0], q[1]) == 0 {
		return 0
	}
	return math.Atan2(q[1], q[0]) - math.Atan2(p[1], p[0])
}

func rotZ(p [3]float64, phi float64) [3]float64 {
	s, c := math.Sincos(phi)
	return [3]float64{c*p[0] - s*p[1], s*p[0] + c*p[1], p[2]}
}

// screenedTip is a shape's tip turned by the common rotation phi, moved by
// the linear compliance under gravity when loaded (objective/statics/REFERENCE.md §3),
// with its tangent.
func (e *evaluator) screenedTip(tip kinematics.Pose, comp *[3][3]float64, phi float64, loaded bool) (p, tan [3]float64) {
	p = tip.P
	if loaded && comp != nil {
		g := rotZ(e.sc.Load.GravityVector(), -phi) // gravity in the unrotated frame
		for i := range 3 {
			p[i] += comp[i][0]*g[0] + comp[i][1]*g[1] + comp[i][2]*g[2]
		}
	}
	return rotZ(p, phi), rotZ([3]float64{tip.R[0][2], tip.R[1][2], tip.R[2][2]}, phi)
}

// taskCost scores a tip against a task point: the distance plus the
// angular excess over the direction tolerance counted as an arc of the arm
// length, so that the search sees a continuous margin for both.
func taskCost(p, tan [3]float64, t TaskPoint, dirTol, arm float64) (dist, angMiss, cost float64) {
	dist = math.Sqrt(sq(p[0]-t.Position[0]) + sq(p[1]-t.Position[1]) + sq(p[2]-t.Position[2]))
	if t.Direction != ([3]float64{}) {
		c := tan[0]*t.Direction[0] + tan[1]*t.Direction[1] + tan[2]*t.Direction[2]
		angMiss = math.Max(0, math.Acos(clamp(c, -1, 1))-dirTol)
	}
	return dist, angMiss, dist + arm*angMiss
}

func sq(x float64) float64 { return x * x }

// bestTurn finds the common rotation for a tip: exact for the unloaded tip
// (the azimuth of the task point), two fixed-point corrections for the
// loaded one, whose sag turns with gravity.
func (e *evaluator) bestTurn(tip kinematics.Pose, comp *[3][3]float64, t TaskPoint, loaded bool) float64 {
	phi := turnTo(tip.P, t.Position)
	if !loaded {
		return phi
	}
	for range 2 {
		p, _ := e.screenedTip(tip, comp, phi, true)
		phi += turnTo(p, t.Position)
	}
	return phi
}

// taskMisses computes the miss of every task point over the sampled
// shapes: the closest sample (common rotation solved exactly), refined by
// golden-section search on the relative rotation of a pair, screened with
// the linear compliance when loaded, then solved at the closest
// configuration with the geometrically exact rod model (objective/REFERENCE.md §2.4).
func (e *evaluator) taskMisses(shapes []*shape) ([]TaskMiss, error) {
	arm := e.armLength()
	out := make([]TaskMiss, len(e.sc.Tasks))
	for ti, t := range e.sc.Tasks {
		if err := e.tick(ti*batch, len(e.sc.Tasks)*batch); err != nil {
			return nil, err
		}
		tol, dirTol := taskTolerances(t)
		loaded := !t.Unloaded && e.sc.Load.GravityVector() != ([3]float64{})
		best := taskCandidate{cost: math.Inf(1)}
		bestK := -1
		for k, sh := range shapes {
			if loaded {
				// the sag scan computes compliances only where the worst
				// sag can lie (sagscreen.go); a loaded task point needs
				// every shape's
				if err := e.shapeCompliance(sh); err != nil {
					return nil, err
				}
			}
			phi := e.bestTurn(sh.tip, &sh.comp, t, loaded)
			p, tan := e.screenedTip(sh.tip, &sh.comp, phi, loaded)
			if _, _, c := taskCost(p, tan, t, dirTol, arm); c < best.cost {
				best, bestK = taskCandidate{act: sh.act, phi: phi, cost: c}, k
			}
		}
		if bestK < 0 {
			return nil, fmt.Errorf("task point %d: no sampled shape", ti+1)
		}
		if len(e.robot.Tubes) == 2 && len(shapes) > 2 {
			best = e.refinePair(best, t, dirTol, arm, loaded, 2*math.Pi/float64(len(shapes)))
		}
		act := kinematics.Actuation{Theta: make([]float64, len(best.act.Theta)), Beta: best.act.Beta}
		for i, th := range best.act.Theta {
			act.Theta[i] = th + best.phi
		}
		p, tan, err := e.exactTip(act, loaded)
		if err != nil {
			return nil, fmt.Errorf("task point %d: %w", ti+1, err)
		}
		d, am, _ := taskCost(p, tan, t, dirTol, arm)
		m := TaskMiss{Distance: d, Miss: math.Max(0, d-tol), AngleMiss: am, ClosestTip: p, Actuation: act, Loaded: loaded}
		m.Reached = d <= tol && am == 0
		out[ti] = m
	}
	return out, nil
}

// refinePair runs a golden-section search on the relative rotation of a
// pair within one sample step either side of the best sample.
func (e *evaluator) refinePair(c taskCandidate, t TaskPoint, dirTol, arm float64, loaded bool, step float64) taskCandidate {
	eval := func(delta float64) taskCandidate {
		a := kinematics.Actuation{Theta: append([]float64(nil), c.act.Theta...), Beta: c.act.Beta}
		a.Theta[0] = delta
		links, err := e.robot.Links(a, nil)
		if err != nil {
			return taskCandidate{cost: math.Inf(1)}
		}
		tip := kinematics.Identity()
		for _, l := range links {
			tip = tip.Mul(kinematics.LinkTransform(l.U, l.End-l.Start))
		}
		var comp [3][3]float64
		if loaded {
			comp = e.compliance(links, e.rule())
		}
		phi := e.bestTurn(tip, &comp, t, loaded)
		p, tan := e.screenedTip(tip, &comp, phi, loaded)
		_, _, cost := taskCost(p, tan, t, dirTol, arm)
		return taskCandidate{act: a, phi: phi, cost: cost}
	}
	lo, hi := c.act.Theta[0]-step, c.act.Theta[0]+step
	g := (math.Sqrt(5) - 1) / 2
	x1, x2 := hi-g*(hi-lo), lo+g*(hi-lo)
	f1, f2 := eval(x1), eval(x2)
	for range 40 {
		if f1.cost < f2.cost {
			hi, x2, f2 = x2, x1, f1
			x1 = hi - g*(hi-lo)
			f1 = eval(x1)
		} else {
			lo, x1, f1 = x1, x2, f2
			x2 = lo + g*(hi-lo)
			f2 = eval(x2)
		}
	}
	for _, f := range []taskCandidate{f1, f2} {
		if f.cost < c.cost {
			c = f
		}
	}
	return c
}

// exactTip is the tip position and tangent at an actuation, loaded by
// self-weight, payload and the tip loads with the exact rod model when
// loaded, otherwise from the closed-form link transforms.
func (e *evaluator) exactTip(act kinematics.Actuation, loaded bool) (p, tan [3]float64, err error) {
	links, err := e.robot.Links(act, nil)
	if err != nil {
		return p, tan, err
	}
	tip := kinematics.Identity()
	if loaded {
		g := e.sc.Load.GravityVector()
		ld := e.sc.Load
		load := statics.Load{Gravity: g, TipMoment: ld.TipMoment}
		for i := range 3 {
			load.TipForce[i] = ld.PayloadMass*g[i] + ld.TipForce[i]
		}
		s, err := statics.Solve(links, load, nil)
		if err != nil {
			return p, tan, fmt.Errorf("loaded tip at angles %s: %w", degList(act.Theta), err)
		}
		tip = s.Tip
	} else {
		for _, l := range links {
			tip = tip.Mul(kinematics.LinkTransform(l.U, l.End-l.Start))
		}
	}
	p = tip.P
	tan = [3]float64{tip.R[0][2], tip.R[1][2], tip.R[2][2]}
	for i := range 3 {
		if !isFinite(p[i]) {
			return p, tan, nonFinite("the task tip at angles " + degList(act.Theta))
		}
	}
	return p, tan, nil
}

// armLength is the length of the longest bellows, m.
func (e *evaluator) armLength() float64 {
	L := 0.0
	for _, t := range e.robot.Tubes {
		L = math.Max(L, t.StraightLength+t.CurvedLength)
	}
	return L
}
