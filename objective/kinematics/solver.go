package kinematics

import (
	"fmt"
	"math"
	"math/bits"
)

// solverTube holds what does not depend on the actuation.
type solverTube struct {
	L, Ls   float64 // total and straight length, m
	m, d, q float64 // bending parts (see bendingParts), N·m²
	bx, by  float64 // own-frame moment K_i u*_i of the curved part, N·m
	gj      float64 // N·m²
	rho     float64 // kg/m
}

// Solver evaluates the kinematics of one Robot many times without
// allocating: the per-tube constants (lengths, stiffness parts, the
// own-frame moments K_i u*_i, thread rates) are computed once by NewSolver.
// Its results equal those of the Robot methods (Links, Tip, Backbone) to
// rounding. Tubes carry no pre-twist (Tube.Precurvature is (u*_x, u*_y)), so
// every link curvature has u_z = 0 and the link poses are assembled in that
// planar-curvature form.
//
// A Solver keeps scratch space, so it is not safe for concurrent use; give
// each goroutine its own (Clone). Later changes to the Robot are not seen.
type Solver struct {
	n       int
	tol     float64 // merge and nesting slack 1e-12·max L_i
	iso     bool    // every tube has an isotropic bending tensor
	tubes   []solverTube
	rate    []float64 // thread advance per radian of each tube; nil if none
	L       []float64
	Ls      []float64
	invSumM float64 // 1/Σ m_i over all tubes (isotropic single-link fast path)

	// scratch
	beta []float64 // effective insertions
	c, s []float64 // cos θ_i, sin θ_i
	bp   []float64 // breakpoints

	// SweepTips: its angles and the table of the common rotations
	sweepTheta       []float64
	baseSin, baseCos []float64
}

// NewSolver validates r (see Validate) and precomputes its constants.
func NewSolver(r *Robot) (*Solver, error) {
	s := &Solver{}
	if err := s.Reset(r); err != nil {
		return nil, err
	}
	return s, nil
}

// Reset makes s the Solver of r, as NewSolver(r) gives it, reusing the
// storage of s (a caller that solves one robot after another allocates
// nothing per robot). On an error s is left without a robot.
func (s *Solver) Reset(r *Robot) error {
	n := len(r.Tubes)
	old := *s
	*s = Solver{}
	if err := r.Validate(); err != nil {
		return err
	}
	*s = Solver{
		n:          n,
		iso:        true,
		tubes:      resize(old.tubes, n),
		rate:       threadRatesInto(old.rate, r),
		L:          resize(old.L, n),
		Ls:         resize(old.Ls, n),
		beta:       resize(old.beta, n),
		c:          resize(old.c, n),
		s:          resize(old.s, n),
		bp:         old.bp[:0],
		sweepTheta: old.sweepTheta, // scratch
		baseSin:    old.baseSin,    // the table of the common rotations: no robot in it
		baseCos:    old.baseCos,
	}
	if cap(s.bp) < 2*n+1 {
		s.bp = make([]float64, 0, 2*n+1)
	}
	for i, t := range r.Tubes {
		m, d, q := bendingParts(t.Bending)
		ux, uy := t.Precurvature[0], t.Precurvature[1]
		s.tubes[i] = solverTube{
			L: t.Length(), Ls: t.StraightLength,
			m: m, d: d, q: q,
			bx: t.Bending[0][0]*ux + q*uy,
			by: q*ux + t.Bending[1][1]*uy,
			gj: t.Torsion, rho: t.LinearDensity,
		}
		if d != 0 || q != 0 {
			s.iso = false
		}
		s.L[i], s.Ls[i] = t.Length(), t.StraightLength
		s.invSumM += m
	}
	s.tol = lengthTol(s.L)
	s.invSumM = 1 / s.invSumM
	return nil
}

// resize returns x with length n, zeroed, reusing its storage when it can.
func resize[T any](x []T, n int) []T {
	if cap(x) < n {
		return make([]T, n)
	}
	x = x[:n]
	clear(x)
	return x
}

func (s *Solver) allocScratch() {
	s.beta = make([]float64, s.n)
	s.c = make([]float64, s.n)
	s.s = make([]float64, s.n)
	s.bp = make([]float64, 0, 2*s.n+1)
}

// Clone returns a Solver for the same robot with its own scratch space, for
// use in another goroutine.
func (s *Solver) Clone() *Solver {
	c := *s
	c.allocScratch()
	c.sweepTheta = nil // scratch; the base table is replaced, never written in place
	return &c
}

// N returns the number of tubes.
func (s *Solver) N() int { return s.n }

// prepare checks the actuation and returns the effective insertions
// (threads applied) and the tip arc length. The slow path builds the error
// message only when a check fails.
func (s *Solver) prepare(theta, beta []float64) ([]float64, float64, error) {
	n := s.n
	if len(theta) != n || len(beta) != n {
		return nil, 0, checkActuationValues(n, theta, beta)
	}
	b := beta
	if s.rate != nil {
		b = s.beta[:n]
		applyThreads(s.rate, theta, beta, b)
	}
	tol := s.tol
	ok := true
	prevB, prevEnd := math.Inf(-1), math.Inf(1)
	for i := range n {
		bi := b[i]
		end := bi + s.L[i]
		// All comparisons are false for NaN, so a NaN fails them.
		ok = ok && theta[i]-theta[i] == 0 && prevB <= bi+tol && end <= prevEnd+tol
		prevB, prevEnd = bi, end
	}
	ok = ok && prevB <= tol && prevEnd >= -tol && !math.IsInf(prevEnd, 0)
	if !ok {
		if err := checkActuationValues(n, theta, beta); err != nil {
			return nil, 0, err
		}
		if err := nestingError(b, s.L, s.rate, tol); err != nil {
			return nil, 0, err
		}
	}
	return b, b[0] + s.L[0], nil
}

// Tip returns the tip pose for angles theta (rad) and insertions beta (m),
// innermost first, as Robot.Tip does, without allocating. The common case of
// a single link (every tube ending at the tip and either straight or curved
// along the whole robot) is evaluated in one pass over the tubes that also
// checks the nesting inequalities; otherwise the links are chained.
func (s *Solver) Tip(theta, beta []float64) (Pose, error) {
	n := s.n
	if len(theta) != n || len(beta) != n {
		return Pose{}, checkActuationValues(n, theta, beta)
	}
	b := beta
	if s.rate != nil {
		b = s.beta[:n]
		applyThreads(s.rate, theta, beta, b)
	}
	tubes := s.tubes[:n]
	theta, b = theta[:n], b[:n]
	tol := s.tol
	tip := b[0] + tubes[0].L
	lo, hi := tol, tip-tol
	// Nesting (objective/kinematics/REFERENCE.md §3.2) as in prepare; comparisons fail for NaN.
	ok := theta[0]-theta[0] == 0
	single := true
	cs, sn := s.c[:n], s.s[:n]
	var curved uint64
	for i := range tubes {
		t := &tubes[i]
		bi := b[i]
		end := bi + t.L
		if i > 0 {
			ok = ok && theta[i]-theta[i] == 0 && b[i-1] <= bi+tol && end <= b[i-1]+tubes[i-1].L+tol
		}
		start := bi + t.Ls
		isCurved := start <= lo
		single = single && end >= hi && (isCurved || start >= hi)
		if !single {
			break
		}
		if isCurved {
			curved |= 1 << i
		}
	}
	var mx, my, kxx, kxy, kyy float64
	if single {
		// The calls come first and the sums after, so that no partial sum
		// is live (spilled) across a call; angles go in pairs.
		i := 0
		for ; i+1 < n; i += 2 {
			sn[i], cs[i], sn[i+1], cs[i+1] = sincos2(theta[i], theta[i+1])
		}
		if i < n {
			sn[i], cs[i] = sincos(theta[i])
		}
		for i := range tubes {
			t := &tubes[i]
			if !s.iso {
				xx, xy, yy := rotatedBending(t.m, t.d, t.q, cs[i], sn[i])
				kxx += xx
				kxy += xy
				kyy += yy
			}
			if curved&(1<<i) != 0 {
				mx += cs[i]*t.bx - sn[i]*t.by
				my += sn[i]*t.bx + cs[i]*t.by
			}
		}
	}
	if !single || !ok || !(b[n-1] <= tol && b[n-1]+tubes[n-1].L >= -tol) || tip <= tol {
		// Not a single link, an infeasible actuation, or no link at all.
		b, tip, err := s.prepare(theta, beta)
		if err != nil {
			return Pose{}, err
		}
		if tip <= tol {
			return Identity(), nil
		}
		return s.chain(theta, b)
	}
	var ux, uy float64
	if s.iso {
		ux, uy = mx*s.invSumM, my*s.invSumM
	} else {
		idet := 1 / (kxx*kyy - kxy*kxy)
		ux, uy = (mx*kyy-kxy*my)*idet, (kxx*my-kxy*mx)*idet
	}
	// linkPose for planar u = (ux, uy, 0), assembled here so that the
	// result is written once, in place.
	k2 := ux*ux + uy*uy
	var a, bb, c, cx float64
	if k := math.Sqrt(k2); k*tip >= seriesXC {
		// linkCoeffs' trigonometric branch, inline.
		x := k * tip
		sh, ch := sincos(0.5 * x)
		sx := 2 * sh * ch
		ik := 1 / k
		a, bb, c, cx = sx*ik, 2*sh*sh*ik*ik, (x-sx)*ik*ik*ik, 1-2*sh*sh
	} else {
		a, bb, c, cx = linkCoeffs(k2, tip)
	}
	bx, by := bb*ux, bb*uy
	return Pose{
		R: [3][3]float64{
			{cx + bx*ux, bx * uy, a * uy},
			{bx * uy, cx + by*uy, 0 - a*ux},
			{0 - a*uy, a * ux, cx},
		},
		// 0 − x rather than −x: no negative zeros when straight (as in
		// linkPose).
		P: [3]float64{by, 0 - bx, tip - c*k2},
	}, nil
}

// segment computes the breakpoints and each tube's cos θ, sin θ.
func (s *Solver) segment(theta, b []float64) []float64 {
	for i := range s.n {
		s.s[i], s.c[i] = sincos(theta[i])
	}
	s.bp = segmentBreakpoints(b, s.L, s.Ls, s.tol, s.bp)
	return s.bp
}

// linkSums accumulates, over the tubes present on [lo, hi] (objective/kinematics/REFERENCE.md §3.2,
// step 2), the composite stiffness, the moments Σ R_z(θ_i) K_i u*_i of the
// curved ones, the mass per length and the tube sets. It needs segment's
// cos θ_i, sin θ_i.
func (s *Solver) linkSums(b []float64, lo, hi float64) (kxx, kxy, kyy, gj, mx, my, mass float64, present, curved uint64) {
	tol := s.tol
	b = b[:len(s.tubes)]
	for i := range s.tubes {
		t := &s.tubes[i]
		if b[i]+t.L < hi-tol {
			continue
		}
		present |= 1 << i
		cn, sn := s.c[i], s.s[i]
		xx, xy, yy := s.bending(t, cn, sn)
		kxx += xx
		kxy += xy
		kyy += yy
		gj += t.gj
		mass += t.rho
		if lo >= b[i]+t.Ls-tol {
			curved |= 1 << i
			mx += cn*t.bx - sn*t.by
			my += sn*t.bx + cn*t.by
		}
	}
	return kxx, kxy, kyy, gj, mx, my, mass, present, curved
}

// bending is a tube's bending stiffness in the link frame, turned by its
// base angle (cn, sn): EI itself for an isotropic set (kxy then adds +0, the
// same bits as not adding), rotatedBending otherwise. linkSums and Relink
// sum it.
func (s *Solver) bending(t *solverTube, cn, sn float64) (xx, xy, yy float64) {
	if s.iso {
		return t.m, 0, t.m
	}
	return rotatedBending(t.m, t.d, t.q, cn, sn)
}

// linkCurvature solves the 2×2 system (3.1) by Cramer's rule.
func linkCurvature(j int, lo, hi, kxx, kxy, kyy, mx, my float64) (ux, uy float64, err error) {
	det := kxx*kyy - kxy*kxy
	if !(kxx > 0 && det > 0) {
		return 0, 0, fmt.Errorf("link %d (%s to %s): summed link stiffness is not positive definite "+
			"(EI_xx %g N·m², EI_xy %g N·m², EI_yy %g N·m²)", j+1, mm(lo), mm(hi), kxx, kxy, kyy)
	}
	idet := 1 / det
	return (mx*kyy - kxy*my) * idet, (kxx*my - kxy*mx) * idet, nil
}

// mulPlanarLink sets *dst = base·exp(ξ̂ s) for the planar curvature
// u = (ux, uy, 0) (the link pose of (3.2) with u_z = 0, as in Tip). dst may
// be base. Row i of the product depends only on row i of base, so the update
// is done row by row from scalars, without Pose temporaries.
func mulPlanarLink(dst, base *Pose, ux, uy, s float64) {
	k2 := ux*ux + uy*uy
	a, bb, c, cx := linkCoeffs(k2, s)
	bx, by := bb*ux, bb*uy
	l00, l01, l02 := cx+bx*ux, bx*uy, a*uy
	l10, l11, l12 := bx*uy, cx+by*uy, 0-a*ux
	l20, l21, l22 := 0-a*uy, a*ux, cx
	p0, p1, p2 := by, 0-bx, s-c*k2
	for i := range 3 {
		r0, r1, r2 := base.R[i][0], base.R[i][1], base.R[i][2]
		pi := base.P[i]
		dst.R[i][0] = r0*l00 + r1*l10 + r2*l20
		dst.R[i][1] = r0*l01 + r1*l11 + r2*l21
		dst.R[i][2] = r0*l02 + r1*l12 + r2*l22
		dst.P[i] = r0*p0 + r1*p1 + r2*p2 + pi
	}
}

// chain multiplies the link transforms of the general case.
func (s *Solver) chain(theta, b []float64) (Pose, error) {
	bp := s.segment(theta, b)
	t := Identity()
	for j := 0; j+1 < len(bp); j++ {
		lo, hi := bp[j], bp[j+1]
		kxx, kxy, kyy, _, mx, my, _, _, _ := s.linkSums(b, lo, hi)
		ux, uy, err := linkCurvature(j, lo, hi, kxx, kxy, kyy, mx, my)
		if err != nil {
			return Pose{}, err
		}
		mulPlanarLink(&t, &t, ux, uy, hi-lo)
	}
	return t, nil
}

// Links appends the links of the backbone to dst[:0], as Robot.Links does.
// It does not allocate when cap(dst) suffices (at most 2n links).
func (s *Solver) Links(theta, beta []float64, dst []Link) ([]Link, error) {
	dst = dst[:0]
	b, tip, err := s.prepare(theta, beta)
	if err != nil || tip <= s.tol {
		return dst, err
	}
	bp := s.segment(theta, b)
	for j := 0; j+1 < len(bp); j++ {
		lo, hi := bp[j], bp[j+1]
		kxx, kxy, kyy, gj, mx, my, mass, present, curved := s.linkSums(b, lo, hi)
		ux, uy, err := linkCurvature(j, lo, hi, kxx, kxy, kyy, mx, my)
		if err != nil {
			return dst, err
		}
		dst = append(dst, Link{
			Start: lo, End: hi,
			U:             [3]float64{ux, uy, 0},
			K:             [3][3]float64{{kxx, kxy, 0}, {kxy, kyy, 0}, {0, 0, gj}},
			MassPerLength: mass,
			Present:       present,
			Curved:        curved,
		})
	}
	return dst, nil
}

// Backbone appends backbone samples to ss[:0] and poses[:0], as
// Robot.Backbone does (s = 0 first, equal steps no longer than maxStep
// within each link, every link boundary and the tip included). It does not
// allocate when the capacities suffice.
func (s *Solver) Backbone(theta, beta []float64, maxStep float64, ss []float64, poses []Pose) ([]float64, []Pose, error) {
	ss, poses = ss[:0], poses[:0]
	if !(maxStep > 0) {
		return ss, poses, fmt.Errorf("backbone step %s (expected > 0)", mm(maxStep))
	}
	b, tip, err := s.prepare(theta, beta)
	if err != nil {
		return ss, poses, err
	}
	ss = append(ss, 0)
	poses = append(poses, Identity())
	if tip <= s.tol {
		return ss, poses, nil
	}
	bp := s.segment(theta, b)
	for j := 0; j+1 < len(bp); j++ {
		lo, hi := bp[j], bp[j+1]
		kxx, kxy, kyy, _, mx, my, _, _, _ := s.linkSums(b, lo, hi)
		ux, uy, err := linkCurvature(j, lo, hi, kxx, kxy, kyy, mx, my)
		if err != nil {
			return ss, poses, err
		}
		length := hi - lo
		k := linkSteps(length, maxStep)
		// Each sample is base·exp(ξ̂ ds) from the pose at the link start,
		// evaluated directly rather than accumulated.
		base := len(poses) - 1
		for i := 1; i <= k; i++ {
			ds := length * float64(i) / float64(k)
			sv := lo + ds
			if i == k {
				ds, sv = length, hi
			}
			ss = append(ss, sv)
			poses = append(poses, Pose{})
			mulPlanarLink(&poses[len(poses)-1], &poses[base], ux, uy, ds)
		}
	}
	return ss, poses, nil
}

// Threaded reports whether some tube is threaded, so that the effective
// insertions (and with them the link boundaries) depend on the angles.
func (s *Solver) Threaded() bool { return s.rate != nil }

// Relink sets the curvature U and stiffness K of link l, the j-th (0-based)
// of those Links gave (its K as Links gave it, or as Relink left it), to
// their values at other angles θ_i, given by
// sc[i] = SinCos(θ_i): for any angles with the same effective insertions
// (so the same boundaries and the same Present, Curved and MassPerLength),
// Links(theta, beta)[j] equals l after Relink bit for bit. It sums over the
// present tubes in the same order as Links and reads sc[i] only for the
// tubes that need it (every present tube when a bending tensor is
// anisotropic, the curved ones otherwise). The error is that of Links for
// a singular link stiffness.
func (s *Solver) Relink(sc [][2]float64, j int, l *Link) error {
	var kxx, kxy, kyy, gj, mx, my float64
	sc = sc[:len(s.tubes)]
	if s.iso {
		// The stiffness sums do not depend on the angles: l.K holds them
		// as Links summed them. Only the curved tubes' moments are summed
		// again, in tube order.
		kxx, kxy, kyy = l.K[0][0], l.K[0][1], l.K[1][1]
		for c := l.Curved & l.Present; c != 0; c &= c - 1 {
			i := bits.TrailingZeros64(c)
			t := &s.tubes[i]
			sn, cn := sc[i][0], sc[i][1]
			mx += cn*t.bx - sn*t.by
			my += sn*t.bx + cn*t.by
		}
		ux, uy, err := linkCurvature(j, l.Start, l.End, kxx, kxy, kyy, mx, my)
		if err != nil {
			return err
		}
		l.U = [3]float64{ux, uy, 0}
		return nil
	}
	for i := range s.tubes {
		bit := uint64(1) << i
		if l.Present&bit == 0 {
			continue
		}
		t := &s.tubes[i]
		curved := l.Curved&bit != 0
		var sn, cn float64
		if curved || !s.iso {
			sn, cn = sc[i][0], sc[i][1]
		}
		xx, xy, yy := s.bending(t, cn, sn)
		kxx += xx
		kxy += xy
		kyy += yy
		gj += t.gj
		if curved {
			mx += cn*t.bx - sn*t.by
			my += sn*t.bx + cn*t.by
		}
	}
	ux, uy, err := linkCurvature(j, l.Start, l.End, kxx, kxy, kyy, mx, my)
	if err != nil {
		return err
	}
	l.U = [3]float64{ux, uy, 0}
	l.K = [3][3]float64{{kxx, kxy, 0}, {kxy, kyy, 0}, {0, 0, gj}}
	return nil
}

// SinCos returns the sine and cosine of x as the Solver computes them
// (within 2.3e-16 of math.Sincos), for Relink.
func SinCos(x float64) (sin, cos float64) { return sincos(x) }

// Isotropic reports whether every tube's bending tensor is isotropic, so
// that a link's curvature depends only on the angles of its curved tubes
// (and its stiffness on none).
func (s *Solver) Isotropic() bool { return s.iso }
