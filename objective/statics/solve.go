package statics

import (
	"math"
)

// Damped Newton shooting, continuation and grid refinement (objective/statics/REFERENCE.md
// §2), and small dense helpers.

type result struct {
	n, m    [3]float64
	iters   int
	resid   float64
	status  Status
	samples []ShapeSample // nodes of the integration at (n, m)
}

// newton runs the damped Newton iteration of objective/statics/REFERENCE.md §2 from the
// physical guess (n, m): Levenberg–Marquardt steps (JᵀJ + λ diag(JᵀJ)) Δx =
// −Jᵀr with λ₀ = 1e-3, ×10 on a rejected step and ÷10 on an accepted one,
// on a forward-difference Jacobian (h_j = 1e-7·max(1, |x_j|) in scaled
// units). Between difference Jacobians the Jacobian is carried by Broyden's
// rank-one update [published: Broyden, A class of methods for solving
// nonlinear simultaneous equations, Math. Comp. 19, 1965]; it is
// recomputed by differences after a rejected step or a step that does not
// halve the residual (as in MINPACK's hybrid method [from memory:
// Moré, Garbow & Hillstrom, User Guide for MINPACK-1, ANL-80-74, 1980]).
// The iteration also stops as stalled when five consecutive steps each
// reduce ‖r‖ by less than 10 %.
func (r *rod) newton(n, m [3]float64, dim int, cfg solveConfig) result {
	x := r.scale(n, m, dim)
	var rv, rt, rj [6]float64
	var J [6][6]float64
	res := result{status: Converged}
	// The nodes of the current point and of the trial point are recorded,
	// so the converged shape needs no extra pass.
	nodes := 0
	for _, sg := range r.segs {
		nodes += sg.steps + 1
	}
	cur, trial := make([]ShapeSample, 0, nodes), make([]ShapeSample, 0, nodes)
	if !r.residual(&x, dim, &rv, &cur) {
		res.status, res.resid = NonFinite, math.Inf(1)
		return res
	}
	nr := normN(rv[:dim])
	lambda := 1e-3
	fresh := false // J is a difference Jacobian at the current x
	haveJ := false
	if dim == 3 {
		// Warm start of the dead-load shortcut: the residual m(L) − M_tip
		// moves one for one with m(0) while the shape does not change
		// (the rigid-rod limit, ∂m(L)/∂m(0) = I in the scaled unknowns),
		// so the first steps are quasi-Newton from J = I, updated by
		// Broyden; a step that does not lower the residual falls back to
		// the difference Jacobian below.
		for i := range 3 {
			J[i][i] = 1
		}
		haveJ = true
	}
	slow := 0
	for nr >= cfg.tol {
		if res.iters >= cfg.maxIter {
			res.status = IterationLimit
			break
		}
		res.iters++
		if !haveJ {
			if !r.jacobian(&x, &rv, dim, &J, &rj) {
				res.status = NonFinite
				break
			}
			haveJ, fresh = true, true
		}
		var A [6][6]float64
		var g [6]float64
		for i := 0; i < dim; i++ {
			for j := i; j < dim; j++ {
				var a float64
				for k := 0; k < dim; k++ {
					a += J[k][i] * J[k][j]
				}
				A[i][j], A[j][i] = a, a
			}
			for k := 0; k < dim; k++ {
				g[i] -= J[k][i] * rv[k]
			}
		}
		var dmax float64
		for i := 0; i < dim; i++ {
			dmax = math.Max(dmax, A[i][i])
		}
		accepted := false
		var d [6]float64
		var nt float64
		for !accepted {
			M := A
			d = g
			for i := 0; i < dim; i++ {
				M[i][i] += lambda * math.Max(A[i][i], 1e-12*dmax)
			}
			if solveLinear(&M, &d, dim) {
				xt := x
				for i := 0; i < dim; i++ {
					xt[i] += d[i]
				}
				if r.residual(&xt, dim, &rt, &trial) {
					if nt = normN(rt[:dim]); nt < nr {
						accepted = true
						break
					}
				}
			}
			if !fresh {
				break // retry with a difference Jacobian
			}
			lambda *= 10
			if lambda > 1e10 {
				break
			}
		}
		if !accepted {
			if fresh {
				res.status = Stalled
				break
			}
			haveJ = false
			continue
		}
		// Broyden update J += (Δr − J d) dᵀ / (dᵀd).
		var dd float64
		for i := 0; i < dim; i++ {
			dd += d[i] * d[i]
		}
		for i := 0; i < dim; i++ {
			var jd float64
			for k := 0; k < dim; k++ {
				jd += J[i][k] * d[k]
			}
			c := (rt[i] - rv[i] - jd) / dd
			for k := 0; k < dim; k++ {
				J[i][k] += c * d[k]
			}
		}
		fresh = false
		if nt > 0.5*nr {
			haveJ = false
		}
		if nt > 0.9*nr {
			slow++
		} else {
			slow = 0
		}
		for i := 0; i < dim; i++ {
			x[i] += d[i]
		}
		rv, nr = rt, nt
		cur, trial = trial, cur
		lambda = math.Max(lambda/10, 1e-12)
		if slow >= 5 && nr >= cfg.tol {
			res.status = Stalled
			break
		}
	}
	res.n, res.m = r.unscale(&x, dim)
	res.resid = nr
	res.samples = cur
	if nr < cfg.tol {
		res.status = Converged
	}
	return res
}

// jacobian fills J with forward differences of the residual at x (rv is
// r(x)); a non-finite forward point is retried backward.
func (r *rod) jacobian(x, rv *[6]float64, dim int, J *[6][6]float64, rj *[6]float64) bool {
	for j := 0; j < dim; j++ {
		hj := 1e-7 * math.Max(1, math.Abs(x[j]))
		xj := *x
		xj[j] += hj
		if !r.residual(&xj, dim, rj, nil) {
			hj = -hj
			xj[j] = x[j] + hj
			if !r.residual(&xj, dim, rj, nil) {
				return false
			}
		}
		for i := 0; i < dim; i++ {
			J[i][j] = (rj[i] - rv[i]) / hj
		}
	}
	return true
}

// solve runs the direct solve, continuation when it fails, and grid
// refinement when the loaded curvature breaks the step-angle bound.
func (r *rod) solve(cfg solveConfig) (*Shape, error) {
	dim := 6
	if !r.follower && !cfg.shooting {
		dim = 3
	}
	shape := &Shape{DeadLoad: dim == 3}
	var n0, m0 [3]float64 // the exact solution when there is no load
	if !r.unloaded() {
		n0, m0 = r.quickGuess()
	}
	extra := 0 // integrations of the continuation's scaled rods
	for refine := 0; ; refine++ {
		res := r.newton(n0, m0, dim, cfg)
		shape.Iterations += res.iters
		if res.status != Converged {
			if cfg.contSteps == 0 {
				return nil, &Error{Status: res.status, Iterations: shape.Iterations, Residual: res.resid, LoadFactor: r.factor}
			}
			var steps, ni int
			var err error
			res, steps, ni, err = r.continuation(dim, cfg, shape.Iterations)
			if err != nil {
				return nil, err
			}
			extra += ni
			shape.Iterations = res.iters
			shape.ContinuationSteps = steps
		}
		shape.Samples = res.samples
		shape.Tip = res.samples[len(res.samples)-1].Pose
		shape.BaseForce, shape.BaseMoment = res.n, res.m
		shape.Residual = res.resid
		// Check h|u| ≤ MaxStepAngle at the nodes; refine and re-solve if not.
		refined := false
		k := 0
		for i := range r.segs {
			sg := &r.segs[i]
			var umax float64
			for _, smp := range res.samples[k : k+sg.steps+1] {
				umax = math.Max(umax, norm3(smp.U))
			}
			k += sg.steps + 1
			h := (sg.b - sg.a) / float64(sg.steps)
			if refine < 4 && h*umax > cfg.maxAngle*(1+1e-9) {
				sg.steps = int(math.Ceil((sg.b - sg.a) * umax * 1.05 / cfg.maxAngle))
				refined = true
			}
		}
		if !refined {
			break
		}
		n0, m0 = res.n, res.m
	}
	shape.Integrations = r.integrations + extra
	shape.Status = Converged
	return shape, nil
}

// unloaded reports whether the rod carries no load at all.
func (r *rod) unloaded() bool {
	if r.tipF != [3]float64{} || r.tipM != [3]float64{} || r.folF != [3]float64{} || r.folM != [3]float64{} {
		return false
	}
	for _, sg := range r.segs {
		if sg.f != [3]float64{} || sg.jump != [3]float64{} {
			return false
		}
	}
	return true
}

// continuation ramps the load in cfg.contSteps equal steps, each solution
// (extrapolated linearly from the two before it) seeding the next.
func (r *rod) continuation(dim int, cfg solveConfig, iters int) (result, int, int, error) {
	var prevN, prevM, prev2N, prev2M [3]float64 // the zero-load solution is n = m = 0
	var res result
	integrations := 0
	steps := r.steps()
	for k := 1; k <= cfg.contSteps; k++ {
		factor := r.factor * float64(k) / float64(cfg.contSteps)
		rk := r
		if k < cfg.contSteps {
			var err error
			rk, err = newRod(r.links, r.load, factor, cfg, steps)
			if err != nil {
				return res, 0, 0, err
			}
		}
		n := sub(scale3(prevN, 2), prev2N)
		m := sub(scale3(prevM, 2), prev2M)
		if k == 1 {
			n, m = rk.quickGuess()
		}
		res = rk.newton(n, m, dim, cfg)
		iters += res.iters
		if rk != r {
			integrations += rk.integrations
		}
		if res.status != Converged {
			return res, 0, 0, &Error{Status: res.status, Iterations: iters, Residual: res.resid, LoadFactor: factor}
		}
		prev2N, prev2M = prevN, prevM
		prevN, prevM = res.n, res.m
	}
	res.iters = iters
	return res, cfg.contSteps, integrations, nil
}

// ---------------------------------------------------------------------------
// Small vector and matrix helpers (prefixed to keep the package namespace
// clear).

func add(a, b [3]float64) [3]float64 { return [3]float64{a[0] + b[0], a[1] + b[1], a[2] + b[2]} }
func sub(a, b [3]float64) [3]float64 { return [3]float64{a[0] - b[0], a[1] - b[1], a[2] - b[2]} }
func scale3(a [3]float64, c float64) [3]float64 {
	return [3]float64{a[0] * c, a[1] * c, a[2] * c}
}
func cross(a, b [3]float64) [3]float64 {
	return [3]float64{a[1]*b[2] - a[2]*b[1], a[2]*b[0] - a[0]*b[2], a[0]*b[1] - a[1]*b[0]}
}
func norm3(a [3]float64) float64 { return math.Sqrt(a[0]*a[0] + a[1]*a[1] + a[2]*a[2]) }

func normN(a []float64) float64 {
	var s float64
	for _, v := range a {
		s += v * v
	}
	return math.Sqrt(s)
}

func finite3(a [3]float64) bool {
	for _, v := range a {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return false
		}
	}
	return true
}

func insertSorted(s []float64, v float64) []float64 {
	i := len(s)
	for i > 0 && s[i-1] > v {
		i--
	}
	s = append(s, 0)
	copy(s[i+1:], s[i:])
	s[i] = v
	return s
}

// InvertSPD inverts a symmetric positive definite 3×3 matrix (such as a
// link's composite stiffness K) by cofactors; it reports false if K is not
// symmetric (to 1e-9 relative) or not positive definite.
func InvertSPD(k [3][3]float64) ([3][3]float64, bool) { return invertSPD(k) }

// invertSPD inverts a symmetric positive definite 3×3 matrix by cofactors;
// it reports false if K is not symmetric (to 1e-9 relative) or not
// positive definite (leading minors).
func invertSPD(k [3][3]float64) ([3][3]float64, bool) {
	var inv [3][3]float64
	scale := math.Max(math.Abs(k[0][0]), math.Max(math.Abs(k[1][1]), math.Abs(k[2][2])))
	for i := range 3 {
		for j := range 3 {
			if math.IsNaN(k[i][j]) || math.IsInf(k[i][j], 0) || math.Abs(k[i][j]-k[j][i]) > 1e-9*scale {
				return inv, false
			}
		}
	}
	m2 := k[0][0]*k[1][1] - k[0][1]*k[1][0]
	c00 := k[1][1]*k[2][2] - k[1][2]*k[2][1]
	c01 := k[1][2]*k[2][0] - k[1][0]*k[2][2]
	c02 := k[1][0]*k[2][1] - k[1][1]*k[2][0]
	det := k[0][0]*c00 + k[0][1]*c01 + k[0][2]*c02
	if !(k[0][0] > 0) || !(m2 > 0) || !(det > 0) {
		return inv, false
	}
	inv[0][0] = c00 / det
	inv[1][0] = c01 / det
	inv[2][0] = c02 / det
	inv[0][1] = (k[0][2]*k[2][1] - k[0][1]*k[2][2]) / det
	inv[1][1] = (k[0][0]*k[2][2] - k[0][2]*k[2][0]) / det
	inv[2][1] = (k[0][1]*k[2][0] - k[0][0]*k[2][1]) / det
	inv[0][2] = (k[0][1]*k[1][2] - k[0][2]*k[1][1]) / det
	inv[1][2] = (k[0][2]*k[1][0] - k[0][0]*k[1][2]) / det
	inv[2][2] = m2 / det
	return inv, true
}

// solveLinear solves a·x = b in place (x returned in b) for the leading n×n
// block by Gaussian elimination with partial pivoting.
func solveLinear(a *[6][6]float64, b *[6]float64, n int) bool {
	for c := 0; c < n; c++ {
		p := c
		for i := c + 1; i < n; i++ {
			if math.Abs(a[i][c]) > math.Abs(a[p][c]) {
				p = i
			}
		}
		if a[p][c] == 0 || math.IsNaN(a[p][c]) {
			return false
		}
		a[c], a[p] = a[p], a[c]
		b[c], b[p] = b[p], b[c]
		for i := c + 1; i < n; i++ {
			f := a[i][c] / a[c][c]
			for j := c; j < n; j++ {
				a[i][j] -= f * a[c][j]
			}
			b[i] -= f * b[c]
		}
	}
	for c := n - 1; c >= 0; c-- {
		for j := c + 1; j < n; j++ {
			b[c] -= a[c][j] * b[j]
		}
		b[c] /= a[c][c]
	}
	return true
}
