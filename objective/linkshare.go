package objective

import (
	"math"
	"slices"

	"plica/objective/kinematics"
)

// shareLinks makes Evaluate share link solutions across the samples of a
// workspace (objective/REFERENCE.md §2.5); tests turn it off to compare
// with the straightforward path that solves every sample's links from
// scratch.
var shareLinks = true

// maxShareSlots bounds the table of one link or prefix: the number of
// distinct angle combinations it may be keyed on.
const maxShareSlots = 4096

// linkShare shares the link solutions of a workspace's samples. While the
// insertions stay the same, the link boundaries and the tube sets of every
// link are those of the first sample (a robot without threads); a link's
// curvature, stiffness and transform then depend only on the angles of
// some of its bellows (the curved ones when every bending tensor is
// isotropic, the present ones otherwise), and the product of the first
// links only on the union of theirs. On a grid of angles those repeat
// across samples, so each is computed once per distinct combination and
// looked up by its grid indices. Every value is computed by the same
// operations in the same order as the straightforward path, so the shapes
// are the same bit for bit (TestLinkShareEqualsFull).
type linkShare struct {
	ready bool
	beta  []float64         // insertions of the structure
	links []kinematics.Link // the structure; U and K of the sample last assembled
	// per link: nested (curvature counted in kmax), key multipliers by
	// tube (−1: not a dependency), number of slots (0: not shared)
	nested []bool
	mult   [][]keyTerm
	pres   [][]int // per link: the present bellows
	slots  []int
	vals   [][]linkVal
	strain [][]float64 // per link: slots × n strains
	stamp  [][]uint32
	epoch  uint32
	// prefix: links 0..J share one table keyed on the union of their
	// dependencies (J = −1: none).
	J       int
	pmult   []keyTerm
	pvals   []prefixVal
	pstarts [][3]float64 // slots × (J+1) link start positions
	plam    []float64
	pstrain []float64
	pstamp  []uint32
	scratch linkVal
	sstrain []float64
	// iso: every bending tensor isotropic, so link stiffnesses (and lam0,
	// their eigenvalues for the sag bound) do not depend on the angles
	iso  bool
	lam0 []float64
	// noWall: no bellows has a wall model (a strain per curvature) and
	// every pre-curvature is below 1e300 in magnitude
	noWall bool
	// sag bound constants of the structure (sagBoundShared): link
	// lengths, half lengths, masses, the mass beyond each link, arcs
	// between link ends and starts (m × m), and per sample the smallest
	// eigenvalue of each link's stiffness
	sl, shl, smj, sbeta []float64
	sE                  []float64
	// sag bound pairs: per link i with a length (bterm), the later links j
	// with a length (bpair[bterm.first:bterm.end])
	bterms []boundTerm
	bpairs []boundPair
	ktmp   []keyTerm // scratch of build
	lam    []float64
	d      []float64
}

// linkVal is one link at one combination of its bellows' angles.
type linkVal struct {
	T    kinematics.Pose
	K    [3][3]float64
	kmax float64 // curvature magnitude of a nested link, else 0
	lam  float64 // smallest eigenvalue of K as sagBound takes it (+Inf: no bound)
}

// prefixVal is the product of links 0..J at one combination of angles,
// with the largest curvature and strains over them.
type prefixVal struct {
	T    kinematics.Pose
	kmax float64
}

// linkLambda is the smallest eigenvalue of a link stiffness as sagBound
// computes it, +Inf when K is not of the form Links gives or not positive
// definite (sagBound then returns +Inf).
func linkLambda(K *[3][3]float64) float64 {
	lam, ok := linkLambdaOK(K)
	if !ok {
		return math.Inf(1)
	}
	return lam
}

// linkLambdaOK is the smallest eigenvalue of a link stiffness as sagBound
// computes it, with ok false when K is not of the form Links gives or not
// positive definite.
func linkLambdaOK(K *[3][3]float64) (lam float64, ok bool) {
	if K[0][2] != 0 || K[1][2] != 0 || K[2][0] != 0 || K[2][1] != 0 || K[0][1] != K[1][0] {
		return 0, false
	}
	dk := 0.5 * (K[0][0] - K[1][1])
	lam = 0.5*(K[0][0]+K[1][1]) - math.Sqrt(dk*dk+K[0][1]*K[0][1])
	if K[2][2] < lam {
		lam = K[2][2]
	}
	if !(lam > 0) {
		return 0, false
	}
	return lam, true
}

// usable reports whether link sharing applies to the evaluator's robot.
func (e *evaluator) shareUsable() bool {
	return shareLinks && !e.solver.Threaded()
}

// build sets the structure from the links of one sample at insertions
// beta, for plan p.
func (ls *linkShare) build(links []kinematics.Link, beta []float64, p *samplePlan, iso bool, tubes []kinematics.Tube, spc []float64) {
	n := len(spc)
	ls.ready = true
	ls.beta = append(ls.beta[:0], beta...)
	ls.links = append(ls.links[:0], links...)
	m := len(links)
	ls.epoch++
	if ls.epoch == 0 { // wrapped: clear every stamp
		for j := range ls.stamp {
			clear(ls.stamp[j][:cap(ls.stamp[j])])
		}
		clear(ls.pstamp[:cap(ls.pstamp)])
		ls.epoch = 1
	}
	ls.nested = ls.nested[:0]
	ls.slots = ls.slots[:0]
	for len(ls.mult) < m {
		ls.mult = append(ls.mult, nil)
		ls.pres = append(ls.pres, nil)
		ls.vals = append(ls.vals, nil)
		ls.strain = append(ls.strain, nil)
		ls.stamp = append(ls.stamp, nil)
	}
	deps := func(l *kinematics.Link) uint64 {
		if iso {
			return l.Curved
		}
		return l.Present
	}
	// keyed returns the key multipliers and slot count of a dependency set
	// (0 slots when an angle is off the grid or there are too many).
	keyed := func(d uint64, mult []keyTerm) ([]keyTerm, int) {
		mult = mult[:0]
		size := 1
		for i := range n {
			if d&(1<<uint(i)) == 0 {
				continue
			}
			st := p.angleSteps[i]
			if st == 0 || size*st > maxShareSlots {
				return mult, 0
			}
			mult = append(mult, keyTerm{tube: i, mult: size})
			size *= st
		}
		return mult, size
	}
	var all uint64
	for j := range links {
		all |= deps(&links[j])
	}
	var full int
	ls.ktmp, full = keyed(all, ls.ktmp)
	ls.iso = iso
	ls.noWall = true
	for i, v := range spc {
		pre := tubes[i].Precurvature
		ls.noWall = ls.noWall && v == 0 && math.Abs(pre[0]) < 1e300 && math.Abs(pre[1]) < 1e300
	}
	ls.lam0 = growTo(ls.lam0, m)
	for j := range links {
		l := &links[j]
		ls.nested = append(ls.nested, l.Present&(l.Present-1) != 0 || n == 1)
		ls.lam0[j] = linkLambda(&l.K) // the same at every sample when isotropic
		var size int
		ls.mult[j], size = keyed(deps(l), ls.mult[j])
		ls.pres[j] = ls.pres[j][:0]
		for i := range n {
			if l.Present&(1<<uint(i)) != 0 {
				ls.pres[j] = append(ls.pres[j], i)
			}
		}
		if full != 0 && size >= full {
			size = 0 // every sample has its own: nothing to share
		}
		ls.slots = append(ls.slots, size)
		if size > 0 {
			ls.vals[j] = growTo(ls.vals[j], size)
			ls.strain[j] = growTo(ls.strain[j], size*n)
			ls.stamp[j] = growTo(ls.stamp[j], size)
		}
	}
	// the prefix: the longest one (short of the last link) keyed on fewer
	// combinations than the whole sample
	ls.J = -1
	var pd uint64
	for j := 0; j+1 < m; j++ {
		pd |= deps(&links[j])
		var size int
		ls.ktmp, size = keyed(pd, ls.ktmp)
		mult := ls.ktmp
		if size == 0 || full != 0 && size >= full {
			break
		}
		ls.J = j
		ls.pmult = append(ls.pmult[:0], mult...)
		ls.pvals = growTo(ls.pvals, size)
		ls.pstamp = growTo(ls.pstamp, size)
		ls.pstarts = growTo(ls.pstarts, size*(j+1))
		ls.plam = growTo(ls.plam, size*(j+1))
		ls.pstrain = growTo(ls.pstrain, size*n)
	}
	ls.sstrain = growTo(ls.sstrain, n)
	ls.sl, ls.shl = growTo(ls.sl, m), growTo(ls.shl, m)
	ls.smj, ls.sbeta = growTo(ls.smj, m), growTo(ls.sbeta, m)
	ls.sE, ls.lam, ls.d = growTo(ls.sE, m*m), growTo(ls.lam, m), growTo(ls.d, m+1)
	for j := range links {
		l := &links[j]
		lj := l.End - l.Start
		ls.sl[j], ls.shl[j], ls.smj[j] = lj, lj/2, l.MassPerLength*lj
	}
	for i := range links {
		beta := 0.0
		for j := i + 1; j < m; j++ {
			ls.sE[i*m+j] = links[j].Start - links[i].End
			if ls.sl[j] > 0 {
				beta += ls.smj[j]
			}
		}
		ls.sbeta[i] = beta
	}
	ls.bterms, ls.bpairs = ls.bterms[:0], ls.bpairs[:0]
	for i := range links {
		if !(ls.sl[i] > 0) {
			continue
		}
		t := boundTerm{i: i, li: ls.sl[i], beta: ls.sbeta[i], c: links[i].MassPerLength / 2, first: len(ls.bpairs)}
		for j := i + 1; j < m; j++ {
			if ls.sl[j] > 0 {
				ls.bpairs = append(ls.bpairs, boundPair{d: j + 1, E: ls.sE[i*m+j], mj: ls.smj[j], hl: ls.shl[j]})
			}
		}
		t.end = len(ls.bpairs)
		// the arc E_ij in place of min(E_ij, D_j + D): the same sum with
		// every term at least as large, so at least the bound's alpha
		for _, q := range ls.bpairs[t.first:t.end] {
			t.alphaArc += q.mj * (q.hl + q.E)
		}
		ls.bterms = append(ls.bterms, t)
	}
}

// boundTerm is link i of the sag bound with its length, the mass of the
// later links and half its own mass per length; boundPair is a later link
// j: its d index j+1, the arc E_ij, its mass and half length.
type boundTerm struct {
	i          int
	li, beta   float64
	c          float64
	first, end int
	alphaArc   float64 // alpha with the arcs E_ij (sagBoundArc)
}

type boundPair struct {
	d         int
	E, mj, hl float64
}

// sagArms fills ls.d[1:m] with perpBound of the tip relative to the
// start of each link and sets d[m] = 0 (d[0] is never read);
// it returns ls.d[:m+1].
func (e *evaluator) sagArms(ls *linkShare, starts [][3]float64, tip [3]float64) []float64 {
	gz, hs := e.gravityZ, e.gravityXY
	m := len(ls.links)
	d := ls.d[:m+1]
	for i := 1; i < m; i++ {
		d[i] = perpBound(sub(tip, starts[i]), gz, hs)
	}
	d[m] = 0
	return d
}

// sagBoundShared is sagBound for the structure of ls with the link
// stiffness eigenvalues ls.lam of the sample: the same operations on the
// same values, with what depends only on the structure computed once
// (TestLinkShareEqualsFull compares the two bit for bit).
func (e *evaluator) sagBoundShared(ls *linkShare, starts [][3]float64, lam []float64, tip [3]float64) float64 {
	m := len(ls.links)
	d := e.sagArms(ls, starts, tip)
	mp := e.payload
	sum := 0.0
	lam = lam[:m]
	for ti := range ls.bterms {
		t := &ls.bterms[ti]
		lm := lam[t.i]
		if math.IsInf(lm, 1) {
			return lm
		}
		D := d[t.i+1]
		alpha := 0.0
		pairs := ls.bpairs[t.first:t.end]
		for k := range pairs {
			q := &pairs[k]
			via := d[q.d] + D
			if q.E < via {
				via = q.E
			}
			alpha += q.mj * (q.hl + via)
		}
		li := t.li
		A, B, C := alpha+mp*D, t.beta+mp, t.c
		sum += (D*A*li + (D*B+A)*li*li/2 + (D*C+B)*li*li*li/3 + C*li*li*li*li/4) / lm
	}
	return e.gravityNorm * sum * (1 + 1e-12)
}

// sagBoundArc is sagBoundShared with the arc E_ij in place of
// min(E_ij, D_j + D) for every pair of links: each term of the sum is at
// least that of sagBoundShared (the same operations on larger operands,
// all non-negative, and rounding is monotone), so it is an upper bound on
// the same sags, at or above sagBoundShared, and costs no pair loop. The
// sample loop computes it for every shape; the sag scan replaces it by
// sagBoundShared for the shapes it may compute (refineBound).
func (e *evaluator) sagBoundArc(ls *linkShare, starts [][3]float64, lam []float64, tip [3]float64) float64 {
	m := len(ls.links)
	d := e.sagArms(ls, starts, tip)
	mp := e.payload
	sum := 0.0
	lam = lam[:m]
	for ti := range ls.bterms {
		t := &ls.bterms[ti]
		lm := lam[t.i]
		if math.IsInf(lm, 1) {
			return lm
		}
		D := d[t.i+1]
		li := t.li
		A, B, C := t.alphaArc+mp*D, t.beta+mp, t.c
		sum += (D*A*li + (D*B+A)*li*li/2 + (D*C+B)*li*li*li/3 + C*li*li*li*li/4) / lm
	}
	return e.gravityNorm * sum * (1 + 1e-12)
}

// refineBound replaces a shape's arc bound by the bound of sagBoundShared
// from the link starts and eigenvalues kept for it, once, while the link
// structure it was sampled with is the current one (otherwise the arc
// bound, also an upper bound, stays).
func (e *evaluator) refineBound(sh *shape) {
	if sh.refined {
		return
	}
	sh.refined = true
	ls := &e.share
	if sh.ref < 0 || !ls.ready || sh.epoch != ls.epoch {
		return
	}
	m := len(ls.links)
	r := int(sh.ref)
	sh.bound = e.sagBoundShared(ls, e.boundStarts[r:r+m], e.boundLam[r:r+m], sh.tip.P)
}

// mulPose sets *dst = a·b with the operations of kinematics.Pose.Mul; dst
// may not be a or b.
func mulPose(dst, a, b *kinematics.Pose) {
	for i := range 3 {
		ai := &a.R[i]
		a0, a1, a2 := ai[0], ai[1], ai[2]
		dst.R[i][0] = a0*b.R[0][0] + a1*b.R[1][0] + a2*b.R[2][0]
		dst.R[i][1] = a0*b.R[0][1] + a1*b.R[1][1] + a2*b.R[2][1]
		dst.R[i][2] = a0*b.R[0][2] + a1*b.R[1][2] + a2*b.R[2][2]
		dst.P[i] = a0*b.P[0] + a1*b.P[1] + a2*b.P[2] + a.P[i]
	}
}

// growTo returns s with length size, reusing its storage when it can.
func growTo[T any](s []T, size int) []T {
	if cap(s) < size {
		return make([]T, size)
	}
	return s[:size]
}

// keyTerm is one bellows' part of a table key: its grid index times mult.
type keyTerm struct{ tube, mult int }

// key is the slot of the angles idx (grid indices, one per bellows) for
// the key terms mult.
func key(mult []keyTerm, idx []int32) int {
	k := 0
	for _, t := range mult {
		k += t.mult * int(idx[t.tube])
	}
	return k
}

// evalShared is evalShape for sample k of plan p with link sharing. It
// returns (nil, nil) for an actuation outside the nesting rules, as
// evalShape does.
func (e *evaluator) evalShared(p *samplePlan, k int) (*shape, error) {
	a := p.acts[k]
	ls := &e.share
	n := len(e.robot.Tubes)
	if !ls.ready || !slices.Equal(ls.beta, a.Beta) {
		links, err := e.solver.Links(a.Theta, a.Beta, e.linkBuf[:0])
		e.linkBuf = links
		if err != nil || len(links) == 0 {
			// outside the nesting rules, an error or no link: the
			// straightforward path decides; the structure stays
			return e.evalShape(a)
		}
		ls.build(links, a.Beta, p, e.solver.Isotropic(), e.robot.Tubes, e.strainPerCurvature)
	}
	s := sample{idx: p.angleIdx[k*n : (k+1)*n], ksc: p.ksc[k*n : (k+1)*n], msc: p.msc[k*n : (k+1)*n]}
	sh := e.newShape(a)
	screen := e.screen && !e.tipsOnly
	// the link starts and eigenvalues of a screened shape are kept for
	// refineBound: written straight into its slabs
	ref := len(e.boundStarts)
	starts := e.linkStarts[:0]
	if screen {
		starts = e.boundStarts
	}
	links := ls.links
	m := len(links)
	lam := ls.lam[:m]
	if screen {
		e.boundLam = slices.Grow(e.boundLam, m)
		e.boundLam = e.boundLam[:ref+m]
		lam = e.boundLam[ref : ref+m]
	}
	var tip, next kinematics.Pose
	tip = kinematics.Identity()
	j0 := 0
	if J := ls.J; J >= 0 {
		slot := key(ls.pmult, s.idx)
		pv := &ls.pvals[slot]
		pstarts := ls.pstarts[slot*(J+1) : (slot+1)*(J+1)]
		plam := ls.plam[slot*(J+1) : (slot+1)*(J+1)]
		pstrain := ls.pstrain[slot*n : (slot+1)*n]
		if ls.pstamp[slot] != ls.epoch {
			pose := kinematics.Identity()
			kmax := 0.0
			clear(pstrain)
			for j := 0; j <= J; j++ {
				lv, lstrain, err := e.sharedLink(j, &s)
				if err != nil {
					return nil, err
				}
				pstarts[j] = pose.P
				plam[j] = lv.lam
				mulPose(&next, &pose, &lv.T)
				pose = next
				if ls.nested[j] {
					kmax = maxNaN(kmax, lv.kmax)
				}
				for _, i := range ls.pres[j] {
					pstrain[i] = maxNaN(pstrain[i], lstrain[i])
				}
			}
			*pv = prefixVal{T: pose, kmax: kmax}
			ls.pstamp[slot] = ls.epoch
		}
		tip = pv.T
		sh.kmax = pv.kmax
		for i, v := range pstrain { // a few values: no call to memmove
			sh.strain[i] = v
		}
		if screen {
			for j := range pstarts {
				starts = append(starts, pstarts[j])
				lam[j] = plam[j]
			}
		}
		j0 = J + 1
	}
	for j := j0; j < m; j++ {
		lv, lstrain, err := e.sharedLink(j, &s)
		if err != nil {
			return nil, err
		}
		if screen {
			starts = append(starts, tip.P)
			lam[j] = lv.lam
		}
		mulPose(&next, &tip, &lv.T)
		tip = next
		if ls.nested[j] {
			sh.kmax = maxNaN(sh.kmax, lv.kmax)
		}
		for _, i := range ls.pres[j] {
			sh.strain[i] = maxNaN(sh.strain[i], lstrain[i])
		}
	}
	if screen {
		e.boundStarts = starts
		starts = starts[ref:]
	} else {
		e.linkStarts = starts
	}
	sh.tip = tip
	sh.rho = math.Hypot(tip.P[0], tip.P[1])
	switch {
	case screen:
		sh.bound = e.sagBoundArc(ls, starts, lam, tip.P)
		sh.ref, sh.epoch = int32(ref), ls.epoch
	case !e.tipsOnly:
		// the compliance needs every link's curvature: solve them as the
		// straightforward path does
		full, err := e.solver.Links(a.Theta, a.Beta, e.linkBuf[:0])
		e.linkBuf = full
		if err != nil {
			return nil, err
		}
		sh.comp = e.compliance(full, e.rule())
		sh.hasComp = true
	}
	if what := sh.nonFinite(); what != "" {
		return nil, nonFinite(what + " at angles " + degList(a.Theta))
	}
	return sh, nil
}

// sample is what sharedLink needs of one sample: the grid index of each
// bellows' angle and its sines and cosines.
type sample struct {
	idx      []int32
	ksc, msc [][2]float64
}

// sharedLink returns link j of sample s and its strain per bellows
// (entries of absent bellows undefined): from its table when the
// combination was computed before, otherwise computed (and stored when
// the link is shared). The values are those of evalShape.
func (e *evaluator) sharedLink(j int, s *sample) (*linkVal, []float64, error) {
	ls := &e.share
	n := len(e.robot.Tubes)
	var lv *linkVal
	var strain []float64
	slot := -1
	if ls.slots[j] > 0 {
		slot = key(ls.mult[j], s.idx)
		lv = &ls.vals[j][slot]
		strain = ls.strain[j][slot*n : (slot+1)*n]
		if ls.stamp[j][slot] == ls.epoch {
			return lv, strain, nil
		}
	} else {
		lv, strain = &ls.scratch, ls.sstrain[:n]
	}
	l := &ls.links[j] // Relink changes only U and K
	if err := e.solver.Relink(s.ksc, j, l); err != nil {
		return nil, nil, err
	}
	lv.T = kinematics.LinkTransform(l.U, l.End-l.Start)
	lv.K = l.K
	if ls.iso {
		lv.lam = ls.lam0[j]
	} else {
		lv.lam = linkLambda(&l.K)
	}
	lv.kmax = 0
	if ls.nested[j] {
		lv.kmax = math.Hypot(l.U[0], l.U[1])
	}
	// Wall strain as in evalShape (objective/kinematics/REFERENCE.md §3.6,
	// surrogate/REFERENCE.md §2.9). Without any wall model every strain is
	// 0 times the curvature change, which is finite while the curvature
	// and the pre-curvatures are below 1e300.
	if ls.noWall && math.Abs(l.U[0]) < 1e300 && math.Abs(l.U[1]) < 1e300 {
		for _, i := range ls.pres[j] {
			strain[i] = 0
		}
		if slot >= 0 {
			ls.stamp[j][slot] = ls.epoch
		}
		return lv, strain, nil
	}
	tubes := e.robot.Tubes
	for i := range tubes {
		if l.Present&(1<<uint(i)) == 0 {
			continue
		}
		var ux, uy float64
		if l.Curved&(1<<uint(i)) != 0 {
			sn, c := s.msc[i][0], s.msc[i][1]
			pre := &tubes[i].Precurvature
			ux, uy = c*pre[0]-sn*pre[1], sn*pre[0]+c*pre[1]
		}
		d0, d1 := l.U[0]-ux, l.U[1]-uy
		spc := e.strainPerCurvature[i]
		if spc == 0 && math.Abs(d0) < 1e300 && math.Abs(d1) < 1e300 {
			// no wall model: 0 times a finite curvature change
			strain[i] = 0
			continue
		}
		strain[i] = spc * math.Hypot(d0, d1)
	}
	if slot >= 0 {
		ls.stamp[j][slot] = ls.epoch
	}
	return lv, strain, nil
}
