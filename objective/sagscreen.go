package objective

import (
	"cmp"
	"math"
	"slices"

	"plica/objective/kinematics"
)

// screenSag makes Evaluate screen the worst-sag scan with sagBound
// (objective/REFERENCE.md §4.4); tests turn it off to compare with the
// straightforward scan that computes every shape's compliance.
var screenSag = true

// sagBound returns an upper bound on the linear sag |g| hᵀ C h of a shape
// over every common rotation, where C is its compliance from either Gauss
// rule and h = R_z(−φ) ĝ (objective/REFERENCE.md §4.4, derived). It needs
// only the links and their start positions: with a(s) and c(s) as in
// compliance, every quadrature node contributes w (c×h)ᵀ R K⁻¹ Rᵀ (a×h),
// at most w |c×h| |a×h| / λmin(K); on each link |c×h| and |a×h| are at most
// a linear and a quadratic polynomial of the arc length to the link's end,
// from the distances between link ends (a chord is never longer than its
// arc: |p(σ) − p(s)| ≤ σ − s), and the Gauss rules integrate their cubic
// product exactly. +Inf when a link stiffness is not of the form Links gives
// (bending block and torsion) or not positive definite.
func (e *evaluator) sagBound(links []kinematics.Link, starts [][3]float64, tip [3]float64) float64 {
	gz, hs := e.gravityZ, e.gravityXY
	n := len(links)
	// d[i] bounds |(p_L − p_i) × h|, p_i the start of link i (d[n] = 0).
	var dbuf [17]float64
	d := dbuf[:]
	if n+1 > len(dbuf) {
		d = make([]float64, n+1)
	}
	d = d[:n+1]
	for i := 1; i < n; i++ { // d[0] is never read
		d[i] = perpBound(sub(tip, starts[i]), gz, hs)
	}
	mp := e.payload
	sum := 0.0
	for i := range links {
		l := &links[i]
		li := l.End - l.Start
		if !(li > 0) {
			continue
		}
		lam, ok := linkLambdaOK(&l.K)
		if !ok {
			return math.Inf(1)
		}
		// At arc length u before the end of link i: |c × h| ≤ D + u with
		// D = d[i+1]; |a × h| ≤ m_p (D + u) + ∫_s^L m'(σ) |(p(σ) − p(s)) × h| dσ,
		// where within the link |p(σ) − p(s)| ≤ σ − s (m u²/2) and on a
		// later link j it is at most (σ − s_j) + E + u, E = s_j − s_i+1
		// the arc from the end of link i to the start of link j, or
		// (d[j+1] + s_j+1 − σ) + (D + u) through the tip.
		D := d[i+1]
		alpha, beta := 0.0, 0.0
		for j := i + 1; j < n; j++ {
			lj := links[j].End - links[j].Start
			if !(lj > 0) {
				continue
			}
			mj := links[j].MassPerLength * lj
			E := links[j].Start - l.End // chord ≤ arc
			via := d[j+1] + D
			if E < via {
				via = E
			}
			alpha += mj * (lj/2 + via)
			beta += mj
		}
		// (D + u)(A + B u + C u²) integrated over u in [0, l]: the 2- and
		// 5-node Gauss rules of the scan sum this cubic exactly.
		A, B, C := alpha+mp*D, beta+mp, l.MassPerLength/2
		sum += (D*A*li + (D*B+A)*li*li/2 + (D*C+B)*li*li*li/3 + C*li*li*li*li/4) / lam
	}
	// margin for rounding: the scan's products are within 1e-14 of the
	// sum of their magnitudes, which the bound exceeds
	return e.gravityNorm * sum * (1 + 1e-12)
}

// perpBound bounds |x × h| for every unit h with |h_z| = gz and horizontal
// part of length hs: |x × h| ≤ min(|x|, gz ρ(x) + hs |x|), ρ(x) the
// distance of x from the z axis.
func perpBound(x [3]float64, gz, hs float64) float64 {
	r := math.Sqrt(x[0]*x[0] + x[1]*x[1] + x[2]*x[2])
	if gz != 0 {
		if v := gz*math.Sqrt(x[0]*x[0]+x[1]*x[1]) + hs*r; v < r {
			return v
		}
	}
	return r
}

func sub(a, b [3]float64) [3]float64 { return [3]float64{a[0] - b[0], a[1] - b[1], a[2] - b[2]} }

// worstSag returns the shape and common-rotation index of the worst linear
// sag, as the straightforward scan over every shape in sample order finds
// it (scanShapes with every compliance computed): the first (shape, φ)
// whose sag exceeds the running worst by more than 1e-9 relative.
//
// Screened (e.screen), it computes compliances in decreasing order of
// sagBound until the next bound falls below T = M/(1 + 1e-6)·…, M the
// largest sag found: every shape left out has all its sags below T, so the
// straightforward scan would never pick it, and it only raises the running
// worst to below T. Both scans therefore pick the same first element at
// or above T(1 + 1e-9), after which they agree; an element in [T,
// T(1 + 1e-9)) could be taken by one and not the other, so when one
// exists T is lowered and more shapes are computed (objective/REFERENCE.md
// §4.4).
func (e *evaluator) worstSag(hh [][6]float64) (*shape, int, error) {
	if !e.screen {
		worst, j, _ := scanShapes(e.shapes, hh, math.Inf(1))
		return worst, j, nil
	}
	// Candidates: the shapes whose bound reaches the largest sag of the
	// shape with the largest bound (a lower bound on the worst), or all of
	// them; then in decreasing bound, NaN first (never screened out),
	// ties in sample order.
	first, top0 := 0, math.Inf(-1)
	for k, sh := range e.shapes {
		if !(sh.bound <= e.shapes[first].bound) {
			first = k
		}
	}
	if b := e.shapes[first].bound; isFinite(b) {
		if err := e.shapeCompliance(e.shapes[first]); err != nil {
			return nil, 0, err
		}
		top0 = shapeMaxSag(e.shapes[first], hh)
	}
	order := e.order[:0]
	collect := func(T float64) {
		order = order[:0]
		for k, sh := range e.shapes {
			if !(sh.bound < T) {
				e.refineBound(sh)
				if !(sh.bound < T) {
					order = append(order, k)
				}
			}
		}
		slices.SortFunc(order, func(a, b int) int {
			ba, bb := e.shapes[a].bound, e.shapes[b].bound
			if na, nb := math.IsNaN(ba), math.IsNaN(bb); na || nb {
				if na && nb {
					return cmp.Compare(a, b)
				}
				return cmp.Compare(boolInt(!na), boolInt(!nb))
			}
			if c := cmp.Compare(bb, ba); c != 0 {
				return c
			}
			return cmp.Compare(a, b)
		})
	}
	factor := 1 / (1 + 1e-6)
	all := !(top0 > 0)
	if all {
		collect(math.Inf(-1))
	} else {
		collect(threshold(top0, factor))
	}
	top := top0       // largest sag found
	T := math.Inf(-1) // until the first shape is computed
	next := 0
	for {
		for ; next < len(order); next++ {
			sh := e.shapes[order[next]]
			if sh.bound < T {
				break
			}
			if err := e.tick(next, len(order)); err != nil {
				return nil, 0, err
			}
			if err := e.shapeCompliance(sh); err != nil {
				return nil, 0, err
			}
			top = math.Max(top, shapeMaxSag(sh, hh))
			T = threshold(top, factor)
		}
		worst, j, band := scanShapes(e.shapes, hh, T)
		if !band || next == len(order) && all {
			e.order = order
			return worst, j, nil
		}
		// lower T: take every shape again (those computed are kept)
		factor /= 1 + 1e-6
		T = threshold(top, factor)
		collect(math.Inf(-1))
		all, next = true, 0
	}
}

// threshold is the screening threshold for the largest sag found; −Inf
// (compute every shape) while that is not positive.
func threshold(top, factor float64) float64 {
	if top > 0 {
		return top * factor
	}
	return math.Inf(-1)
}

func boolInt(b bool) int {
	if b {
		return 1
	}
	return 0
}

// shapeCompliance computes the compliance of a shape the sag scan needs.
func (e *evaluator) shapeCompliance(sh *shape) error {
	if sh.hasComp {
		return nil
	}
	links, err := e.solver.Links(sh.act.Theta, sh.act.Beta, e.linkBuf[:0])
	e.linkBuf = links
	if err != nil {
		return err
	}
	sh.comp = e.compliance(links, e.rule())
	sh.hasComp = true
	for i := range 3 {
		for j := range 3 {
			if !isFinite(sh.comp[i][j]) {
				return nonFinite("the tip compliance under gravity at angles " + degList(sh.act.Theta))
			}
		}
	}
	return nil
}

// sagAt is the linear sag of compliance C for the products q of one
// common rotation.
func sagAt(sym, q *[6]float64) float64 {
	return (q[0]*sym[0] + q[1]*sym[1]) + (q[2]*sym[2] + q[3]*sym[3]) + (q[4]*sym[4] + q[5]*sym[5])
}

func symPart(C *[3][3]float64) [6]float64 {
	return [6]float64{C[0][0], C[1][1], C[2][2], C[0][1] + C[1][0], C[0][2] + C[2][0], C[1][2] + C[2][1]}
}

// shapeMaxSag is the largest linear sag of a shape over the common rotations.
func shapeMaxSag(sh *shape, hh [][6]float64) float64 {
	sym := symPart(&sh.comp)
	m := math.Inf(-1)
	for j := range hh {
		if v := sagAt(&sym, &hh[j]); v > m {
			m = v
		}
	}
	return m
}

// scanShapes is the straightforward worst-sag scan over the shapes with a
// compliance, in sample order, common rotation innermost: it keeps the
// first (shape, φ) whose sag exceeds the running worst by more than 1e-9
// relative (ties of symmetric shapes keep the first). band reports a sag
// in [T, T(1 + 1e-9)) (see worstSag).
func scanShapes(shapes []*shape, hh [][6]float64, T float64) (worst *shape, worstJ int, band bool) {
	worstSag := math.Inf(-1)
	hi := T + 1e-9*math.Abs(T)
	for _, sh := range shapes {
		if !sh.hasComp {
			continue
		}
		sym := symPart(&sh.comp)
		for j := range hh {
			v := sagAt(&sym, &hh[j])
			if v >= T && v < hi {
				band = true
			}
			if worst == nil || v > worstSag+1e-9*math.Abs(worstSag) {
				worst, worstJ, worstSag = sh, j, v
			}
		}
	}
	return worst, worstJ, band
}
