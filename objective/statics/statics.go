package statics

import (
	"errors"
	"fmt"
	"math"

	"plica/objective/kinematics"
)

// PointForce is a dead force applied to the backbone at one arc length.
type PointForce struct {
	S     float64    // arc length, m; 0 < S ≤ L
	Force [3]float64 // N, base frame
}

// Load is the external loading of the backbone.
//
// All loads except the follower loads are dead loads: their direction is
// fixed in the base frame {B}. The follower loads are given in the tip's
// body frame and turn with the tip; they make the problem non-conservative
// in general and force the full six-unknown shooting.
type Load struct {
	TipForce  [3]float64 // N, base frame
	TipMoment [3]float64 // N·m, base frame
	// Gravity is the gravitational acceleration in the base frame, m/s²;
	// zero means no gravity. Each link carries the distributed weight
	// f = MassPerLength·Gravity, N/m.
	Gravity [3]float64
	// PointForces are optional dead forces at given arc lengths.
	PointForces []PointForce
	// FollowerForce and FollowerMoment act at the tip in the tip body frame,
	// N and N·m.
	FollowerForce  [3]float64
	FollowerMoment [3]float64
}

// Settings controls Solve. The zero value (or a nil pointer)
// gives the defaults of objective/statics/REFERENCE.md §2.
type Settings struct {
	// Resolution is the number of RK4 steps per backbone length L: a piece
	// of length l gets at least ceil(Resolution·l/L) steps.
	// Zero means 100.
	Resolution int
	// MinLinkSteps is the least number of RK4 steps per link.
	// Zero means 10.
	MinLinkSteps int
	// MaxStepAngle bounds h·|u| for every step, rad. The bound is applied to
	// the precurvature when the grid is built and checked against the
	// loaded curvature after convergence; if it is exceeded the grid is
	// refined and the solve repeated (at most 4 times).
	// Zero means 0.1; a negative value disables the bound.
	MaxStepAngle float64
	// Tolerance is the bound on the Euclidean norm of the scaled residual
	// [(n(L) − F_tip)/F_ref; (m(L) − M_tip)/(F_ref L)], with
	// F_ref = max(|F_tip| + Σ|F_k| + ∫|f| ds + |M_tip|/L, EI_min/L²)
	// (follower loads counted with the tip loads; the |M_tip|/L term, added
	// to objective/statics/REFERENCE.md §2's F_ref, scales moment-only loads).
	// Zero means 1e-10.
	Tolerance float64
	// MaxIterations caps the Newton (Jacobian) iterations of one solve.
	// Zero means 50.
	MaxIterations int
	// ContinuationSteps is the number of equal load steps used when the
	// direct solve fails; each solution seeds the next.
	// Zero means 8; a negative value disables continuation.
	ContinuationSteps int
	// Shooting forces the general six-unknown shooting on [n(0); m(0)] even
	// when every load is a dead load (by default such loads use the
	// three-unknown dead-load shortcut).
	Shooting bool
}

type solveConfig struct {
	resolution, minSteps, maxIter, contSteps int
	maxAngle, tol                            float64
	shooting                                 bool
}

func (s *Settings) config() solveConfig {
	c := solveConfig{resolution: 100, minSteps: 10, maxIter: 50, contSteps: 8, maxAngle: 0.1, tol: 1e-10}
	if s == nil {
		return c
	}
	if s.Resolution > 0 {
		c.resolution = s.Resolution
	}
	if s.MinLinkSteps > 0 {
		c.minSteps = s.MinLinkSteps
	}
	if s.MaxIterations > 0 {
		c.maxIter = s.MaxIterations
	}
	switch {
	case s.ContinuationSteps > 0:
		c.contSteps = s.ContinuationSteps
	case s.ContinuationSteps < 0:
		c.contSteps = 0
	}
	switch {
	case s.MaxStepAngle > 0:
		c.maxAngle = s.MaxStepAngle
	case s.MaxStepAngle < 0:
		c.maxAngle = math.Inf(1)
	}
	if s.Tolerance > 0 {
		c.tol = s.Tolerance
	}
	c.shooting = s.Shooting
	return c
}

// Status says how a statics solve ended.
type Status int

const (
	// Converged: the residual norm fell below the tolerance.
	Converged Status = iota
	// IterationLimit: MaxIterations was reached.
	IterationLimit
	// Stalled: the Levenberg–Marquardt damping grew past 1e10
	// without reducing the residual.
	Stalled
	// NonFinite: the integration overflowed (NaN or Inf) and no
	// finite trial point remained.
	NonFinite
)

func (s Status) String() string {
	switch s {
	case Converged:
		return "converged"
	case IterationLimit:
		return "iteration limit"
	case Stalled:
		return "stalled"
	case NonFinite:
		return "non-finite state"
	}
	return fmt.Sprintf("Status(%d)", int(s))
}

// ErrNotConverged is wrapped by every *Error.
var ErrNotConverged = errors.New("statics did not converge")

// Error reports a statics solve that did not converge. No shape is
// returned with it: an unconverged shape is never a result.
type Error struct {
	Status     Status
	Iterations int     // Newton iterations spent, continuation included
	Residual   float64 // scaled residual norm at the last load step tried
	LoadFactor float64 // fraction of the load at which the solve failed
}

func (e *Error) Error() string {
	return fmt.Sprintf("the rod statics did not converge: %v after %d iterations at %.3g of the load (residual %.3g)",
		e.Status, e.Iterations, e.LoadFactor, e.Residual)
}

// Unwrap returns ErrNotConverged.
func (e *Error) Unwrap() error { return ErrNotConverged }

// ShapeSample is the loaded backbone at one RK4 node.
type ShapeSample struct {
	S    float64         // arc length, m
	Pose kinematics.Pose // body frame → base frame
	U    [3]float64      // loaded body-frame curvature u = u* + K⁻¹Rᵀm, 1/m
}

// Shape is a converged loaded equilibrium.
type Shape struct {
	Tip kinematics.Pose
	// Samples holds every RK4 node from s = 0 to the tip. At a link (or
	// point-force) boundary two samples share the same S: the first carries
	// the curvature on the proximal side, the second on the distal side.
	Samples []ShapeSample
	// BaseForce and BaseMoment are n(0) and m(0): the force and moment
	// (about the base origin) that the rod exerts on the actuation unit,
	// base frame, N and N·m. The clamp reaction is their negative.
	BaseForce, BaseMoment [3]float64
	// Iterations counts Newton steps (each on a difference Jacobian or a
	// Broyden update of one), load continuation and grid refinement
	// included.
	Iterations int
	// Integrations counts RK4 integrations of the whole backbone.
	Integrations int
	// ContinuationSteps is the number of load steps used; 0 when the
	// direct solve converged.
	ContinuationSteps int
	// DeadLoad is true when the three-unknown dead-load shortcut was used,
	// false for the six-unknown shooting.
	DeadLoad bool
	// Residual is the final scaled residual norm.
	Residual float64
	// Status is Converged for every returned shape.
	Status Status
}

// Solve computes the loaded equilibrium of the rod made of links
// (contiguous from s = 0, as returned by Robot.Links) under load (1.1).
//
// Method (objective/statics/REFERENCE.md §2): RK4 with N_j = max(MinLinkSteps,
// ceil(Resolution·l_j/L)) steps per link and h|u| ≤ MaxStepAngle, never
// stepping across a link boundary or a point force, R re-orthonormalised
// after each step. When all loads are dead loads, n(s) is explicit and only
// m(0) is iterated; otherwise [n(0); m(0)] is. The initial guess is the
// rigid-body statics of the unloaded shape; the iteration is a damped
// Newton (Levenberg–Marquardt, forward-difference Jacobian kept current by
// Broyden updates, λ₀ = 1e-3, ×10 on rejection, ÷10 on acceptance) to
// ‖r‖ < Tolerance. If it fails, the load is ramped in ContinuationSteps
// steps. If that fails too the error is a *Error (wrapping
// ErrNotConverged) and the shape is nil. Invalid links or loads give a
// plain error. Solve keeps no state and is safe for concurrent use;
// the same input gives the same result.
func Solve(links []kinematics.Link, load Load, set *Settings) (*Shape, error) {
	cfg := set.config()
	rod, err := newRod(links, load, 1, cfg, nil)
	if err != nil {
		return nil, err
	}
	return rod.solve(cfg)
}

// TipSag returns the tip sag under gravity: the displacement of the tip
// along the unit gravity direction ĝ between the loaded shape and the shape
// under the same load without gravity, ĝ·(p_tip(load) − p_tip(load, g = 0)),
// m (positive when the tip moves down). Both shapes are integrated on the
// same grid. It also returns the loaded shape. With zero gravity the sag is
// zero.
func TipSag(links []kinematics.Link, load Load, set *Settings) (float64, *Shape, error) {
	cfg := set.config()
	rod, err := newRod(links, load, 1, cfg, nil)
	if err != nil {
		return 0, nil, err
	}
	loaded, err := rod.solve(cfg)
	if err != nil {
		return 0, nil, err
	}
	gn := norm3(load.Gravity)
	if gn == 0 {
		return 0, loaded, nil
	}
	ref := load
	ref.Gravity = [3]float64{}
	refRod, err := newRod(links, ref, 1, cfg, rod.steps())
	if err != nil {
		return 0, nil, err
	}
	free, err := refRod.solve(cfg)
	if err != nil {
		return 0, nil, err
	}
	var sag float64
	for i := range 3 {
		sag += load.Gravity[i] / gn * (loaded.Tip.P[i] - free.Tip.P[i])
	}
	loaded.Iterations += free.Iterations
	loaded.Integrations += free.Integrations
	return sag, loaded, nil
}

// LinearDeflectionLimit is the relative tip deflection |δp|/L above which
// the small-load linear estimate should be flagged: at PL²/EI = 0.5
// (|δp|/L ≈ 0.17) it is already about 3 % high (objective/statics/REFERENCE.md §3 [derived]).
const LinearDeflectionLimit = 0.05

// LinearTipDeflection returns the small-load linear estimate of the tip
// displacement dp (m) and rotation vector dphi (rad), base frame, for the
// unloaded shape of links under load (objective/statics/REFERENCE.md §3 [derived]):
//
//	M(s)  = (p(L) − p(s)) × F_tip + M_tip + ∫_s^L (p(σ) − p(s)) × f dσ + Σ_{s_k>s} (p(s_k) − p(s)) × F_k
//	Δu(s) = K⁻¹ Rᵀ M(s)
//	dphi  = ∫ R Δu ds,   dp = ∫ (R Δu) × (p(L) − p(s)) ds
//
// It is exact to first order in the load for any precurved, piecewise or
// anisotropic unloaded shape; follower loads enter at the unloaded tip
// orientation (the difference is second order). The integrals are carried
// by RK4 on a grid four times finer than Solve' default (400 steps
// per length, at least 20 per link, h|u*| ≤ 0.05). Flag the estimate when
// |dp|/L exceeds LinearDeflectionLimit.
func LinearTipDeflection(links []kinematics.Link, load Load) (dp, dphi [3]float64, err error) {
	cfg := (&Settings{Resolution: 400, MinLinkSteps: 20, MaxStepAngle: 0.05}).config()
	rod, err := newRod(links, load, 1, cfg, nil)
	if err != nil {
		return dp, dphi, err
	}
	dp, dphi = rod.linear()
	return dp, dphi, nil
}

// SolveRobot solves the loaded equilibrium of robot r at actuation a: the
// links of Robot.Links (composite stiffness, precurvature and mass per
// length of the tubes present) under load, by Solve.
func SolveRobot(r *kinematics.Robot, a kinematics.Actuation, load Load, set *Settings) (*Shape, error) {
	links, err := robotLinks(r, a)
	if err != nil {
		return nil, err
	}
	return Solve(links, load, set)
}

// RobotTipSag returns the tip sag of robot r at actuation a under load, and
// the loaded shape (see TipSag).
func RobotTipSag(r *kinematics.Robot, a kinematics.Actuation, load Load, set *Settings) (float64, *Shape, error) {
	links, err := robotLinks(r, a)
	if err != nil {
		return 0, nil, err
	}
	return TipSag(links, load, set)
}

func robotLinks(r *kinematics.Robot, a kinematics.Actuation) ([]kinematics.Link, error) {
	links, err := r.Links(a, nil)
	if err != nil {
		return nil, err
	}
	if len(links) == 0 {
		return nil, errors.New("rod statics: the innermost tube ends at the base plane (no backbone to load)")
	}
	return links, nil
}
