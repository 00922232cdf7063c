package kinematics

import (
	"fmt"
	"math"
	"strings"
)

// MaxTubes is the largest number of tubes a Robot may have (Link.Present
// and Link.Curved are 64-bit sets).
const MaxTubes = 64

// symmetryTol is the relative tolerance on Bending[0][1] = Bending[1][0].
// Tensors computed numerically (e.g. by a fit) may differ in the last bits;
// the mean of the two entries is used.
const symmetryTol = 1e-9

// tubeName names tube i (0-based) of n for messages: 1-based, with
// "(innermost)" and "(outermost)" on the first and last.
func tubeName(i, n int) string {
	switch {
	case i == 0:
		return "tube 1 (innermost)"
	case i == n-1:
		return fmt.Sprintf("tube %d (outermost)", i+1)
	default:
		return fmt.Sprintf("tube %d", i+1)
	}
}

// mm formats a length in metres as millimetres for messages.
func mm(x float64) string { return fmt.Sprintf("%.6g mm", x*1e3) }

func finite(x float64) bool { return !math.IsNaN(x) && !math.IsInf(x, 0) }

// Validate checks the robot's data: 1 to MaxTubes tubes; every length finite
// and non-negative with a positive total; finite precurvature; a symmetric
// positive definite bending tensor; GJ > 0; a finite non-negative linear
// density; every thread between an existing tube and the one around it, with
// a finite non-zero lead, at most one per tube. It does not check nesting,
// which depends on the actuation (see CheckActuation).
func (r *Robot) Validate() error {
	n := len(r.Tubes)
	if n == 0 {
		return fmt.Errorf("robot has no tubes")
	}
	if n > MaxTubes {
		return fmt.Errorf("robot has %d tubes (expected at most %d)", n, MaxTubes)
	}
	for i, t := range r.Tubes {
		name := tubeName(i, n)
		switch {
		case !finite(t.StraightLength) || t.StraightLength < 0:
			return fmt.Errorf("%s: straight length %s (expected finite, ≥ 0)", name, mm(t.StraightLength))
		case !finite(t.CurvedLength) || t.CurvedLength < 0:
			return fmt.Errorf("%s: curved length %s (expected finite, ≥ 0)", name, mm(t.CurvedLength))
		case !(t.Length() > 0):
			return fmt.Errorf("%s: total length %s (expected > 0)", name, mm(t.Length()))
		case !finite(t.Precurvature[0]) || !finite(t.Precurvature[1]):
			return fmt.Errorf("%s: precurvature (%g, %g) /m is not finite", name, t.Precurvature[0], t.Precurvature[1])
		}
		b := t.Bending
		for _, v := range [4]float64{b[0][0], b[0][1], b[1][0], b[1][1]} {
			if !finite(v) {
				return fmt.Errorf("%s: bending stiffness %v N·m² is not finite", name, b)
			}
		}
		if math.Abs(b[0][1]-b[1][0]) > symmetryTol*(math.Abs(b[0][0])+math.Abs(b[1][1])) {
			return fmt.Errorf("%s: bending stiffness %v N·m² is not symmetric", name, b)
		}
		_, _, q := bendingParts(b)
		if !(b[0][0] > 0 && b[0][0]*b[1][1]-q*q > 0) {
			return fmt.Errorf("%s: bending stiffness %v N·m² is not positive definite (expected EI_x > 0 and EI_x·EI_y > EI_xy²)", name, b)
		}
		if !finite(t.Torsion) || !(t.Torsion > 0) {
			return fmt.Errorf("%s: torsional stiffness GJ %g N·m² (expected finite, > 0)", name, t.Torsion)
		}
		if !finite(t.LinearDensity) || t.LinearDensity < 0 {
			return fmt.Errorf("%s: linear density %g kg/m (expected finite, ≥ 0)", name, t.LinearDensity)
		}
	}
	var threaded uint64
	for k, th := range r.Threads {
		if th.Inner < 0 || th.Inner >= n-1 {
			return fmt.Errorf("thread %d: inner tube index %d (expected 0 to %d: a thread joins a tube to the one around it)", k+1, th.Inner, n-2)
		}
		if !finite(th.Lead) || th.Lead == 0 {
			return fmt.Errorf("thread %d between %s and tube %d: lead %s (expected finite, non-zero)", k+1, tubeName(th.Inner, n), th.Inner+2, mm(th.Lead))
		}
		if threaded&(1<<th.Inner) != 0 {
			return fmt.Errorf("thread %d: %s is threaded into tube %d twice", k+1, tubeName(th.Inner, n), th.Inner+2)
		}
		threaded |= 1 << th.Inner
	}
	return nil
}

// ActuationError reports an actuation that the robot cannot take: wrong
// number of values, non-finite values, or tubes that violate the nesting
// inequalities of objective/kinematics/REFERENCE.md §3.2. Callers that sweep actuations can treat it as
// an infeasible point rather than a failure (errors.As).
type ActuationError struct {
	Tube int    // 0-based index of the first offending tube, −1 if none applies
	Msg  string // one line, tubes 1-based, lengths in mm
}

func (e *ActuationError) Error() string { return e.Msg }

// threadRates returns, for each tube, its advance per radian, Lead/(2π), or 0
// for an unthreaded tube; the slice is nil if the robot has no threads.
func threadRates(r *Robot) []float64 { return threadRatesInto(nil, r) }

// threadRatesInto is threadRates in the storage of dst when it has room.
func threadRatesInto(dst []float64, r *Robot) []float64 {
	if len(r.Threads) == 0 {
		return nil
	}
	rate := resize(dst, len(r.Tubes))
	for _, th := range r.Threads {
		rate[th.Inner] = th.Lead / (2 * math.Pi)
	}
	return rate
}

// applyThreads writes the effective insertions of all tubes into dst.
//
// A Thread{Inner: i, Lead} locks the axial position of tube i relative to
// tube i+1 to their relative rotation: tube i is advanced distally (toward
// +z) by Lead·(θ_i − θ_{i+1})/(2π), i.e. a positive rotation of the inner
// tube relative to the outer one, by the right-hand rule about +z, screws it
// forward (a right-handed thread; a negative Lead models a left-handed one).
// β_i is the insertion the tube has at zero relative rotation. A threaded
// tube rides along with the tube it is threaded into, so along a chain of
// threads the advances add up from the outside in:
//
//	δ_n = 0,  δ_i = rate_i·(θ_i − θ_{i+1}) + δ_{i+1} if tube i is threaded (else 0),
//	β_i,eff = β_i + δ_i.
//
// With a single thread, or a thread into an unthreaded tube, this is exactly
// β_i + Lead·(θ_i − θ_{i+1})/(2π).
func applyThreads(rate, theta, beta, dst []float64) {
	n := len(beta)
	delta := 0.0
	for i := n - 1; i >= 0; i-- {
		if i < n-1 && rate != nil && rate[i] != 0 {
			delta = rate[i]*(theta[i]-theta[i+1]) + delta
		} else {
			delta = 0
		}
		dst[i] = beta[i] + delta
	}
}

// checkActuationValues checks the number and finiteness of the actuation values.
func checkActuationValues(n int, theta, beta []float64) error {
	if len(theta) != n || len(beta) != n {
		return &ActuationError{Tube: -1, Msg: fmt.Sprintf("actuation has %d angles and %d insertions for %d tubes (expected one of each per tube, innermost first)", len(theta), len(beta), n)}
	}
	for i := range n {
		if !finite(theta[i]) {
			return &ActuationError{Tube: i, Msg: fmt.Sprintf("%s: angle %g rad is not finite", tubeName(i, n), theta[i])}
		}
		if !finite(beta[i]) {
			return &ActuationError{Tube: i, Msg: fmt.Sprintf("%s: insertion %g m is not finite", tubeName(i, n), beta[i])}
		}
	}
	return nil
}

// nestingError checks the nesting inequalities of objective/kinematics/REFERENCE.md §3.2 on the
// effective insertions beta (threads applied) and the tube lengths L, with
// slack tol for rounding, and describes the first violation:
//
//	β_1 ≤ β_2 ≤ … ≤ β_n ≤ 0,  0 ≤ β_n + L_n ≤ … ≤ β_1 + L_1.
//
// threaded marks tubes whose insertion includes a thread advance.
func nestingError(beta, L []float64, threaded []float64, tol float64) error {
	n := len(beta)
	note := func(i int) string {
		if threaded != nil && threaded[i] != 0 {
			return ", thread included,"
		}
		return ""
	}
	for i := range n - 1 {
		if !(beta[i] <= beta[i+1]+tol) {
			return &ActuationError{Tube: i, Msg: fmt.Sprintf(
				"%s starts at %s%s but %s around it at %s (inner tubes must start at least as far back)",
				tubeName(i, n), mm(beta[i]), note(i), tubeName(i+1, n), mm(beta[i+1]))}
		}
	}
	if !(beta[n-1] <= tol) {
		return &ActuationError{Tube: n - 1, Msg: fmt.Sprintf(
			"%s starts %s in front of the base plane%s (insertion must be ≤ 0: every tube starts at or behind the base plane)",
			tubeName(n-1, n), mm(beta[n-1]), strings.TrimSuffix(note(n-1), ","))}
	}
	if e := beta[n-1] + L[n-1]; !(e >= -tol) {
		return &ActuationError{Tube: n - 1, Msg: fmt.Sprintf(
			"%s ends %s behind the base plane%s (every tube must reach at least the base plane)",
			tubeName(n-1, n), mm(-e), strings.TrimSuffix(note(n-1), ","))}
	}
	for i := n - 1; i > 0; i-- {
		outer, inner := beta[i]+L[i], beta[i-1]+L[i-1]
		if !(outer <= inner+tol) {
			return &ActuationError{Tube: i - 1, Msg: fmt.Sprintf(
				"%s reaches %s beyond the base%s but %s inside it only %s%s (inner tubes must reach at least as far)",
				tubeName(i, n), mm(outer), note(i), tubeName(i-1, n), mm(inner), strings.TrimSuffix(note(i-1), ","))}
		}
	}
	return nil
}

// lengthTol returns the merge and nesting slack 1e-12·max L_i (objective/kinematics/REFERENCE.md §3.2).
func lengthTol(L []float64) float64 {
	m := 0.0
	for _, l := range L {
		m = math.Max(m, l)
	}
	return 1e-12 * m
}

// CheckActuation checks that a fits the robot: one finite angle and
// insertion per tube, and the nesting inequalities of objective/kinematics/REFERENCE.md §3.2 (tube 1
// innermost) on the effective insertions, threads applied (see Thread):
//
//	β_1 ≤ β_2 ≤ … ≤ β_n ≤ 0,  0 ≤ β_n + L_n ≤ … ≤ β_1 + L_1,
//
// each with a slack of 1e-12·max L_i for rounding. A violation is an
// *ActuationError naming the tubes (1-based) and the lengths in mm. The
// robot itself is assumed valid (see Validate).
func (r *Robot) CheckActuation(a Actuation) error {
	n := len(r.Tubes)
	if err := checkActuationValues(n, a.Theta, a.Beta); err != nil {
		return err
	}
	L := make([]float64, n)
	for i, t := range r.Tubes {
		L[i] = t.Length()
	}
	rate := threadRates(r)
	beta := make([]float64, n)
	applyThreads(rate, a.Theta, a.Beta, beta)
	return nestingError(beta, L, rate, lengthTol(L))
}

// EffectiveInsertion returns the insertions β_i with the thread advances
// applied (see applyThreads for the convention), innermost first. It panics
// if a has the wrong number of values.
func (r *Robot) EffectiveInsertion(a Actuation) []float64 {
	n := len(r.Tubes)
	if len(a.Theta) != n || len(a.Beta) != n {
		panic(fmt.Sprintf("kinematics: EffectiveInsertion: %d angles and %d insertions for %d tubes", len(a.Theta), len(a.Beta), n))
	}
	beta := make([]float64, n)
	applyThreads(threadRates(r), a.Theta, a.Beta, beta)
	return beta
}
