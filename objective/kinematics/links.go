package kinematics

import (
	"fmt"
	"math"
)

// segmentBreakpoints fills dst with the link boundaries of objective/kinematics/REFERENCE.md §3.2,
// step 1: {0} ∪ {β_i + Ls_i, β_i + L_i}, values > 0 kept, sorted, and values
// within tol of their predecessor merged. A merged cluster keeps its largest
// value, except the cluster at 0, which stays 0, and the last, which is set
// to β_1 + L_1 (beta[0] + L[0]) exactly: the tip is where the innermost tube
// ends. The nesting inequalities must hold (within tol). It does not
// allocate if cap(dst) ≥ 2n+1.
func segmentBreakpoints(beta, L, Ls []float64, tol float64, dst []float64) []float64 {
	dst = append(dst[:0], 0)
	for i := range beta {
		if v := beta[i] + Ls[i]; v > 0 {
			dst = append(dst, v)
		}
		if v := beta[i] + L[i]; v > 0 {
			dst = append(dst, v)
		}
	}
	// Insertion sort: at most 2·MaxTubes values, usually a handful.
	for i := 2; i < len(dst); i++ {
		v := dst[i]
		j := i
		for ; j > 1 && dst[j-1] > v; j-- {
			dst[j] = dst[j-1]
		}
		dst[j] = v
	}
	m := 1
	for k := 1; k < len(dst); k++ {
		v := dst[k]
		if v-dst[m-1] <= tol {
			if m > 1 {
				dst[m-1] = v
			}
			continue
		}
		dst[m] = v
		m++
	}
	if m > 1 {
		// The tip is where the innermost tube ends; under nesting every
		// other end lies within tol below it.
		dst[m-1] = beta[0] + L[0]
	}
	return dst[:m]
}

// Links splits the backbone into constant-curvature links (objective/kinematics/REFERENCE.md §3.2) and
// appends them to dst[:0]:
//
//  1. breakpoints {0} ∪ {β_i + Ls_i, β_i + L_i} (threads applied), values > 0
//     kept, sorted, merged within 1e-12·max L_i;
//  2. on [s_j, s_j+1] tube i is present if β_i + L_i ≥ s_j+1, and curved if
//     also s_j ≥ β_i + Ls_i (both with the same slack);
//  3. the link curvature U and composite stiffness K follow from (3.1) with
//     the present tubes, straight ones entering with zero precurvature (see
//     EquilibriumCurvature).
//
// Every Link field is filled (Start, End, U, K, MassPerLength, Present,
// Curved). The result is empty when the innermost tube ends at the base
// plane. Errors come from Validate, CheckActuation (an *ActuationError) or a
// singular link stiffness.
func (r *Robot) Links(a Actuation, dst []Link) ([]Link, error) {
	dst = dst[:0]
	if err := r.Validate(); err != nil {
		return dst, err
	}
	if err := r.CheckActuation(a); err != nil {
		return dst, err
	}
	n := len(r.Tubes)
	beta := r.EffectiveInsertion(a)
	L := make([]float64, n)
	Ls := make([]float64, n)
	for i, t := range r.Tubes {
		L[i], Ls[i] = t.Length(), t.StraightLength
	}
	tol := lengthTol(L)
	bp := segmentBreakpoints(beta, L, Ls, tol, make([]float64, 0, 2*n+1))
	tubes := make([]LinkTube, 0, n)
	for j := 0; j+1 < len(bp); j++ {
		lo, hi := bp[j], bp[j+1]
		var present, curved uint64
		mass := 0.0
		tubes = tubes[:0]
		for i, t := range r.Tubes {
			if beta[i]+L[i] < hi-tol {
				continue
			}
			present |= 1 << i
			mass += t.LinearDensity
			lt := LinkTube{Theta: a.Theta[i], Bending: t.Bending, Torsion: t.Torsion}
			if lo >= beta[i]+Ls[i]-tol {
				curved |= 1 << i
				lt.Precurvature = [3]float64{t.Precurvature[0], t.Precurvature[1], 0}
			}
			tubes = append(tubes, lt)
		}
		u, K, err := EquilibriumCurvature(tubes)
		if err != nil {
			return dst, fmt.Errorf("link %d (%s to %s): %w", j+1, mm(lo), mm(hi), err)
		}
		dst = append(dst, Link{Start: lo, End: hi, U: u, K: K, MassPerLength: mass, Present: present, Curved: curved})
	}
	return dst, nil
}

// Tip returns the tip pose T(s_m) = Π_j exp(ξ̂_j l_j) in the base frame
// (objective/kinematics/REFERENCE.md §3.2, step 4), each factor from LinkTransform. With no links
// (innermost tube ending at the base plane) it is the identity.
func (r *Robot) Tip(a Actuation) (Pose, error) {
	links, err := r.Links(a, nil)
	if err != nil {
		return Pose{}, err
	}
	return chainLinks(links), nil
}

func chainLinks(links []Link) Pose {
	t := Identity()
	for _, l := range links {
		t = t.Mul(LinkTransform(l.U, l.End-l.Start))
	}
	return t
}

// linkSteps returns the number of equal steps no longer than maxStep that
// cover length l (at least 1). The factor 1 − 1e-12 keeps l = k·maxStep from
// rounding up to k+1 steps.
func linkSteps(l, maxStep float64) int {
	k := math.Ceil(l / maxStep * (1 - 1e-12))
	if !(k >= 1) {
		return 1
	}
	if k > math.MaxInt32 {
		return math.MaxInt32
	}
	return int(k)
}

// Backbone samples the backbone pose along arc length: s = 0 first, then
// within each link equal steps no longer than maxStep (m; +Inf gives link
// boundaries only), every link boundary and the tip included. Each pose is
// T(s_j)·exp(ξ̂_j (s − s_j)), evaluated directly rather than accumulated. It
// returns an error if maxStep is not > 0 or as Links does.
func (r *Robot) Backbone(a Actuation, maxStep float64) ([]float64, []Pose, error) {
	if !(maxStep > 0) {
		return nil, nil, fmt.Errorf("backbone step %s (expected > 0)", mm(maxStep))
	}
	links, err := r.Links(a, nil)
	if err != nil {
		return nil, nil, err
	}
	total := 1
	for _, l := range links {
		total += linkSteps(l.End-l.Start, maxStep)
	}
	ss := make([]float64, 0, total)
	poses := make([]Pose, 0, total)
	ss = append(ss, 0)
	poses = append(poses, Identity())
	base := Identity()
	for _, l := range links {
		length := l.End - l.Start
		k := linkSteps(length, maxStep)
		for i := 1; i <= k; i++ {
			ds := length * float64(i) / float64(k)
			s := l.Start + ds
			if i == k {
				ds, s = length, l.End
			}
			ss = append(ss, s)
			poses = append(poses, base.Mul(LinkTransform(l.U, ds)))
		}
		base = poses[len(poses)-1]
	}
	return ss, poses, nil
}
