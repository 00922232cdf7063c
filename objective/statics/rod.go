package statics

import (
	"errors"
	"fmt"
	"math"

	"plica/objective/kinematics"
)

// Prepared rod, RK4 integration of (1.1), and the unloaded-shape passes
// behind the initial guess and the linear estimate (objective/statics/REFERENCE.md §1).

// segment is one integration piece: a link, or part of a link between point
// forces. Loads and stiffness are constant on it.
type segment struct {
	a, b  float64       // arc-length interval, m
	steps int           // RK4 steps
	us    [3]float64    // precurvature u* (the link's U), 1/m
	kinv  [3][3]float64 // K⁻¹, 1/(N·m²)
	f     [3]float64    // distributed force, N/m
	nEnd  [3]float64    // dead-load n(b−), N
	jump  [3]float64    // Σ point forces applied at b (interior), N
}

// rod is a validated rod with its (possibly scaled) load.
type rod struct {
	links        []kinematics.Link
	load         Load
	factor       float64 // load factor (continuation)
	segs         []segment
	length       float64
	tipF, tipM   [3]float64 // dead tip loads incl. point forces at s = L, base frame
	folF, folM   [3]float64 // follower tip loads, tip body frame
	follower     bool
	fRef         float64 // force scale of the residual, N
	integrations int
}

// newRod validates links and load, scales the load by factor, and builds
// the integration grid (steps, when non-nil, overrides the step counts).
func newRod(links []kinematics.Link, load Load, factor float64, cfg solveConfig, steps []int) (*rod, error) {
	if len(links) == 0 {
		return nil, errors.New("rod statics: no links")
	}
	L := links[len(links)-1].End
	if !(L > 0) || math.IsInf(L, 0) {
		return nil, fmt.Errorf("rod statics: backbone length %g m (expected > 0)", L)
	}
	tol := 1e-12 * L
	if math.Abs(links[0].Start) > tol {
		return nil, fmt.Errorf("rod statics: first link starts at %g m (expected 0)", links[0].Start)
	}
	r := &rod{links: links, load: load, factor: factor, length: L}
	vecs := [][3]float64{load.TipForce, load.TipMoment, load.Gravity, load.FollowerForce, load.FollowerMoment}
	for _, v := range vecs {
		if !finite3(v) {
			return nil, fmt.Errorf("rod statics: load %v is not finite", v)
		}
	}
	for k, pf := range load.PointForces {
		if !finite3(pf.Force) || math.IsNaN(pf.S) {
			return nil, fmt.Errorf("rod statics: point force %d is not finite", k+1)
		}
		if pf.S <= tol || pf.S > L+tol {
			return nil, fmt.Errorf("rod statics: point force %d at s = %g m (expected 0 < s ≤ %g m)", k+1, pf.S, L)
		}
	}
	r.tipF = scale3(load.TipForce, factor)
	r.tipM = scale3(load.TipMoment, factor)
	r.folF = scale3(load.FollowerForce, factor)
	r.folM = scale3(load.FollowerMoment, factor)
	r.follower = load.FollowerForce != [3]float64{} || load.FollowerMoment != [3]float64{}

	// a point force is inside at most one link: at most one more segment each
	r.segs = make([]segment, 0, len(links)+len(load.PointForces))
	eiMin := math.Inf(1)
	total := norm3(r.tipF) + norm3(r.folF) + (norm3(r.tipM)+norm3(r.folM))/L
	for j, lk := range links {
		if j > 0 && math.Abs(lk.Start-links[j-1].End) > tol {
			return nil, fmt.Errorf("rod statics: link %d starts at %g m but link %d ends at %g m (expected contiguous links)", j+1, lk.Start, j, links[j-1].End)
		}
		l := lk.End - lk.Start
		if !(l > 0) {
			return nil, fmt.Errorf("rod statics: link %d has length %g m (expected > 0)", j+1, l)
		}
		kinv, ok := invertSPD(lk.K)
		if !ok || !finite3(lk.U) || !(lk.MassPerLength >= 0) {
			return nil, fmt.Errorf("rod statics: link %d: stiffness %v N·m² must be symmetric positive definite, U finite and MassPerLength ≥ 0", j+1, lk.K)
		}
		eiMin = math.Min(eiMin, math.Min(lk.K[0][0], lk.K[1][1]))
		f := scale3(load.Gravity, lk.MassPerLength*factor)
		total += norm3(f) * l
		// Split the link at interior point forces.
		var cutBuf [8]float64 // on the stack unless more point forces fall inside
		cuts := append(cutBuf[:0], lk.Start)
		for _, pf := range load.PointForces {
			if pf.S > lk.Start+tol && pf.S < lk.End-tol {
				cuts = insertSorted(cuts, pf.S)
			}
		}
		cuts = append(cuts, lk.End)
		for c := 0; c+1 < len(cuts); c++ {
			sg := segment{a: cuts[c], b: cuts[c+1], us: lk.U, kinv: kinv, f: f}
			ls := sg.b - sg.a
			n := math.Max(math.Ceil(float64(cfg.minSteps)*ls/l), math.Ceil(float64(cfg.resolution)*ls/L))
			n = math.Max(n, math.Ceil(ls*norm3(lk.U)/cfg.maxAngle))
			sg.steps = max(int(n), 1)
			r.segs = append(r.segs, sg)
		}
	}
	if steps != nil {
		if len(steps) != len(r.segs) {
			panic("statics: grid mismatch")
		}
		for i := range r.segs {
			r.segs[i].steps = steps[i]
		}
	}
	// Point forces: at s = L they join the tip force; inside they are jumps
	// of n at the end of the segment they close.
	for _, pf := range load.PointForces {
		F := scale3(pf.Force, factor)
		total += norm3(F)
		if pf.S >= L-tol {
			r.tipF = add(r.tipF, F)
			continue
		}
		best, bestD := 0, math.Inf(1)
		for i, sg := range r.segs {
			if d := math.Abs(sg.b - pf.S); d < bestD {
				best, bestD = i, d
			}
		}
		r.segs[best].jump = add(r.segs[best].jump, F)
	}
	// Dead-load internal force: n(s) = F_tip + Σ_{s_k > s} F_k + ∫_s^L f.
	n := r.tipF
	for i := len(r.segs) - 1; i >= 0; i-- {
		sg := &r.segs[i]
		n = add(n, sg.jump)
		sg.nEnd = n
		n = add(n, scale3(sg.f, sg.b-sg.a))
	}
	r.fRef = math.Max(total, eiMin/(L*L))
	return r, nil
}

func (r *rod) steps() []int {
	s := make([]int, len(r.segs))
	for i, sg := range r.segs {
		s[i] = sg.steps
	}
	return s
}

// ---------------------------------------------------------------------------
// Integration.

// state is y = [p(3), R(9, row-major), n(3), m(3)].
type state [18]float64

// deriv evaluates (1.1) on segment sg at arc length s. With dead set, n is
// the explicit dead-load force and is not integrated.
func (sg *segment) deriv(y, dy *state, s float64, dead bool) {
	var n0, n1, n2 float64
	if dead {
		t := sg.b - s
		n0 = sg.nEnd[0] + sg.f[0]*t
		n1 = sg.nEnd[1] + sg.f[1]*t
		n2 = sg.nEnd[2] + sg.f[2]*t
		dy[12], dy[13], dy[14] = 0, 0, 0
	} else {
		n0, n1, n2 = y[12], y[13], y[14]
		dy[12], dy[13], dy[14] = -sg.f[0], -sg.f[1], -sg.f[2]
	}
	m0, m1, m2 := y[15], y[16], y[17]
	// Body-frame moment Rᵀm, then u = u* + K⁻¹Rᵀm.
	b0 := y[3]*m0 + y[6]*m1 + y[9]*m2
	b1 := y[4]*m0 + y[7]*m1 + y[10]*m2
	b2 := y[5]*m0 + y[8]*m1 + y[11]*m2
	k := &sg.kinv
	u0 := sg.us[0] + k[0][0]*b0 + k[0][1]*b1 + k[0][2]*b2
	u1 := sg.us[1] + k[1][0]*b0 + k[1][1]*b1 + k[1][2]*b2
	u2 := sg.us[2] + k[2][0]*b0 + k[2][1]*b1 + k[2][2]*b2
	// p' = R e3.
	t0, t1, t2 := y[5], y[8], y[11]
	dy[0], dy[1], dy[2] = t0, t1, t2
	// R' = R û: row i of R' is (row i of R) × u.
	for i := 3; i < 12; i += 3 {
		r0, r1, r2 := y[i], y[i+1], y[i+2]
		dy[i] = r1*u2 - r2*u1
		dy[i+1] = r2*u0 - r0*u2
		dy[i+2] = r0*u1 - r1*u0
	}
	// m' = −p' × n.
	dy[15] = t2*n1 - t1*n2
	dy[16] = t0*n2 - t2*n0
	dy[17] = t1*n0 - t0*n1
}

// orthonormalize replaces R by the nearest rotation to second order in
// its departure from orthogonality: R ← R (3I − RᵀR)/2 (one Newton step of
// the polar decomposition [derived; common practice]).
func orthonormalize(y *state) {
	var a [3][3]float64 // RᵀR
	for i := range 3 {
		for j := i; j < 3; j++ {
			a[i][j] = y[3+i]*y[3+j] + y[6+i]*y[6+j] + y[9+i]*y[9+j]
			a[j][i] = a[i][j]
		}
	}
	for i := range 3 {
		for j := range 3 {
			a[i][j] = -0.5 * a[i][j]
		}
		a[i][i] += 1.5
	}
	for r := 3; r < 12; r += 3 {
		x0, x1, x2 := y[r], y[r+1], y[r+2]
		y[r] = x0*a[0][0] + x1*a[1][0] + x2*a[2][0]
		y[r+1] = x0*a[0][1] + x1*a[1][1] + x2*a[2][1]
		y[r+2] = x0*a[0][2] + x1*a[1][2] + x2*a[2][2]
	}
}

// integrate carries y from s = 0 to the tip. With rec set it appends every
// node to *rec. It returns false if the state became non-finite.
func (r *rod) integrate(y *state, dead bool, rec *[]ShapeSample) bool {
	r.integrations++
	var k1, k2, k3, k4, yt state
	for si := range r.segs {
		sg := &r.segs[si]
		h := (sg.b - sg.a) / float64(sg.steps)
		s := sg.a
		if rec != nil {
			*rec = append(*rec, sg.sample(y, s))
		}
		for k := 0; k < sg.steps; k++ {
			sg.deriv(y, &k1, s, dead)
			for i := range yt {
				yt[i] = y[i] + 0.5*h*k1[i]
			}
			sg.deriv(&yt, &k2, s+0.5*h, dead)
			for i := range yt {
				yt[i] = y[i] + 0.5*h*k2[i]
			}
			sg.deriv(&yt, &k3, s+0.5*h, dead)
			for i := range yt {
				yt[i] = y[i] + h*k3[i]
			}
			sg.deriv(&yt, &k4, s+h, dead)
			for i := range y {
				y[i] += h / 6 * (k1[i] + 2*(k2[i]+k3[i]) + k4[i])
			}
			orthonormalize(y)
			s = sg.a + float64(k+1)*h
			if rec != nil {
				*rec = append(*rec, sg.sample(y, s))
			}
		}
		if !dead {
			y[12] -= sg.jump[0]
			y[13] -= sg.jump[1]
			y[14] -= sg.jump[2]
		}
		for _, v := range y {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				return false
			}
		}
	}
	return true
}

func (sg *segment) sample(y *state, s float64) ShapeSample {
	smp := ShapeSample{S: s, Pose: poseOf(y)}
	m := [3]float64{y[15], y[16], y[17]}
	for i := range 3 {
		var bi float64
		for j := range 3 {
			bi += smp.Pose.R[j][i] * m[j]
		}
		for j := range 3 {
			smp.U[j] += sg.kinv[j][i] * bi
		}
	}
	smp.U = add(smp.U, sg.us)
	return smp
}

func poseOf(y *state) kinematics.Pose {
	var p kinematics.Pose
	p.P = [3]float64{y[0], y[1], y[2]}
	for i := range 3 {
		for j := range 3 {
			p.R[i][j] = y[3+3*i+j]
		}
	}
	return p
}

func initialState(n, m [3]float64) state {
	var y state
	y[3], y[7], y[11] = 1, 1, 1
	copy(y[12:15], n[:])
	copy(y[15:18], m[:])
	return y
}

// tipLoads returns the total tip force and moment, base frame, for tip
// rotation R (row-major in y).
func (r *rod) tipLoads(y *state) (F, M [3]float64) {
	F, M = r.tipF, r.tipM
	if r.follower {
		for i := range 3 {
			for j := range 3 {
				F[i] += y[3+3*i+j] * r.folF[j]
				M[i] += y[3+3*i+j] * r.folM[j]
			}
		}
	}
	return F, M
}

// deadBaseForce is the explicit n(0) of the dead-load shortcut.
func (r *rod) deadBaseForce() [3]float64 {
	sg := &r.segs[0]
	return add(sg.nEnd, scale3(sg.f, sg.b-sg.a))
}

// residual integrates from the scaled unknowns x (dim 3: m(0)/(F_ref L);
// dim 6: n(0)/F_ref and m(0)/(F_ref L)) and writes the scaled tip residual.
// With rec set the nodes are recorded into *rec (reset first).
func (r *rod) residual(x *[6]float64, dim int, out *[6]float64, rec *[]ShapeSample) bool {
	n, m := r.unscale(x, dim)
	y := initialState(n, m)
	dead := dim == 3
	if rec != nil {
		*rec = (*rec)[:0]
	}
	if !r.integrate(&y, dead, rec) {
		return false
	}
	F, M := r.tipLoads(&y)
	fs, ms := 1/r.fRef, 1/(r.fRef*r.length)
	if dead {
		for i := range 3 {
			out[i] = (y[15+i] - M[i]) * ms
		}
		return true
	}
	for i := range 3 {
		out[i] = (y[12+i] - F[i]) * fs
		out[3+i] = (y[15+i] - M[i]) * ms
	}
	return true
}

func (r *rod) unscale(x *[6]float64, dim int) (n, m [3]float64) {
	ms := r.fRef * r.length
	if dim == 3 {
		return r.deadBaseForce(), [3]float64{x[0] * ms, x[1] * ms, x[2] * ms}
	}
	for i := range 3 {
		n[i] = x[i] * r.fRef
		m[i] = x[3+i] * ms
	}
	return n, m
}

func (r *rod) scale(n, m [3]float64, dim int) (x [6]float64) {
	ms := 1 / (r.fRef * r.length)
	if dim == 3 {
		for i := range 3 {
			x[i] = m[i] * ms
		}
		return x
	}
	for i := range 3 {
		x[i] = n[i] / r.fRef
		x[3+i] = m[i] * ms
	}
	return x
}

// ---------------------------------------------------------------------------
// Unloaded shape: rigid-body initial guess and linear estimate.

// linDeriv integrates the unloaded shape (u = u*) with extra states:
// z[12:15] m(s) along the unloaded shape (m' = −p' × n, n dead and
// explicit, plus nx), z[15:18] ∫ RΔu, z[18:21] ∫ (RΔu) × p, and
// z[21:24] ∫ p × f. Δu = K⁻¹Rᵀm.
func (sg *segment) linDeriv(z, dz *[24]float64, s float64, nx [3]float64) {
	t := sg.b - s
	n0 := sg.nEnd[0] + sg.f[0]*t + nx[0]
	n1 := sg.nEnd[1] + sg.f[1]*t + nx[1]
	n2 := sg.nEnd[2] + sg.f[2]*t + nx[2]
	u0, u1, u2 := sg.us[0], sg.us[1], sg.us[2]
	t0, t1, t2 := z[5], z[8], z[11]
	dz[0], dz[1], dz[2] = t0, t1, t2
	for i := 3; i < 12; i += 3 {
		r0, r1, r2 := z[i], z[i+1], z[i+2]
		dz[i] = r1*u2 - r2*u1
		dz[i+1] = r2*u0 - r0*u2
		dz[i+2] = r0*u1 - r1*u0
	}
	dz[12] = t2*n1 - t1*n2
	dz[13] = t0*n2 - t2*n0
	dz[14] = t1*n0 - t0*n1
	m0, m1, m2 := z[12], z[13], z[14]
	b0 := z[3]*m0 + z[6]*m1 + z[9]*m2
	b1 := z[4]*m0 + z[7]*m1 + z[10]*m2
	b2 := z[5]*m0 + z[8]*m1 + z[11]*m2
	k := &sg.kinv
	d0 := k[0][0]*b0 + k[0][1]*b1 + k[0][2]*b2
	d1 := k[1][0]*b0 + k[1][1]*b1 + k[1][2]*b2
	d2 := k[2][0]*b0 + k[2][1]*b1 + k[2][2]*b2
	w0 := z[3]*d0 + z[4]*d1 + z[5]*d2
	w1 := z[6]*d0 + z[7]*d1 + z[8]*d2
	w2 := z[9]*d0 + z[10]*d1 + z[11]*d2
	dz[15], dz[16], dz[17] = w0, w1, w2
	p0, p1, p2 := z[0], z[1], z[2]
	dz[18] = w1*p2 - w2*p1
	dz[19] = w2*p0 - w0*p2
	dz[20] = w0*p1 - w1*p0
	f0, f1, f2 := sg.f[0], sg.f[1], sg.f[2]
	dz[21] = p1*f2 - p2*f1
	dz[22] = p2*f0 - p0*f2
	dz[23] = p0*f1 - p1*f0
}

// unloadedPass integrates the unloaded shape from m(0) = m0 with extra
// dead force nx and returns the final extended state; point-force moments
// Σ p(s_k) × F_k are added to z[21:24].
func (r *rod) unloadedPass(m0, nx [3]float64) [24]float64 {
	r.integrations++
	var z, k1, k2, k3, k4, zt [24]float64
	z[3], z[7], z[11] = 1, 1, 1
	copy(z[12:15], m0[:])
	for si := range r.segs {
		sg := &r.segs[si]
		h := (sg.b - sg.a) / float64(sg.steps)
		s := sg.a
		for k := 0; k < sg.steps; k++ {
			sg.linDeriv(&z, &k1, s, nx)
			for i := range zt {
				zt[i] = z[i] + 0.5*h*k1[i]
			}
			sg.linDeriv(&zt, &k2, s+0.5*h, nx)
			for i := range zt {
				zt[i] = z[i] + 0.5*h*k2[i]
			}
			sg.linDeriv(&zt, &k3, s+0.5*h, nx)
			for i := range zt {
				zt[i] = z[i] + h*k3[i]
			}
			sg.linDeriv(&zt, &k4, s+h, nx)
			for i := range z {
				z[i] += h / 6 * (k1[i] + 2*(k2[i]+k3[i]) + k4[i])
			}
			var y state
			copy(y[:12], z[:12])
			orthonormalize(&y)
			copy(z[:12], y[:12])
			s = sg.a + float64(k+1)*h
		}
		c := cross([3]float64{z[0], z[1], z[2]}, sg.jump)
		z[21] += c[0]
		z[22] += c[1]
		z[23] += c[2]
	}
	return z
}

// rigidGuess returns the rigid-body statics of the unloaded shape: the base
// loads n(0), m(0) that balance every load applied to it (objective/statics/REFERENCE.md
// §2), and the extra dead force standing for the follower force at the
// unloaded tip orientation.
func (r *rod) rigidGuess() (n0, m0, nx [3]float64) {
	z := r.unloadedPass([3]float64{}, [3]float64{})
	var y state
	copy(y[:12], z[:12])
	F, M := r.tipLoads(&y)
	nx = sub(F, r.tipF)
	pL := [3]float64{z[0], z[1], z[2]}
	m0 = add(add(M, cross(pL, F)), [3]float64{z[21], z[22], z[23]})
	n0 = add(r.deadBaseForce(), nx)
	return n0, m0, nx
}

// quickGuess is rigidGuess on the closed-form unloaded shape (the link
// transforms of objective/kinematics/REFERENCE.md §3.3), with ∫ p × f by Simpson's rule on each
// piece: cheaper than an RK4 pass and accurate enough for a starting point.
func (r *rod) quickGuess() (n0, m0 [3]float64) {
	T := kinematics.Identity()
	var a [3]float64 // ∫ p × f ds + Σ p(s_k) × F_k
	for i := range r.segs {
		sg := &r.segs[i]
		l := sg.b - sg.a
		mid := T.Mul(kinematics.LinkTransform(sg.us, l/2)).P
		end := T.Mul(kinematics.LinkTransform(sg.us, l))
		if sg.f != [3]float64{} {
			var ps [3]float64
			for j := range 3 {
				ps[j] = l / 6 * (T.P[j] + 4*mid[j] + end.P[j])
			}
			a = add(a, cross(ps, sg.f))
		}
		a = add(a, cross(end.P, sg.jump))
		T = end
	}
	var y state
	for i := range 3 {
		for j := range 3 {
			y[3+3*i+j] = T.R[i][j]
		}
	}
	F, M := r.tipLoads(&y)
	m0 = add(add(M, cross(T.P, F)), a)
	n0 = add(r.deadBaseForce(), sub(F, r.tipF))
	return n0, m0
}

func (r *rod) linear() (dp, dphi [3]float64) {
	_, m0, nx := r.rigidGuess()
	z := r.unloadedPass(m0, nx)
	dphi = [3]float64{z[15], z[16], z[17]}
	pL := [3]float64{z[0], z[1], z[2]}
	dp = sub(cross(dphi, pL), [3]float64{z[18], z[19], z[20]})
	return dp, dphi
}
