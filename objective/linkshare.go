package objective

import (
	"math"
	"slices"

	"plica/objective/kinematics"
)

// shareLinks makes Evaluate share link solutions across the samples of a
// workspace (objective/REFERENCE.md §4.5); tests turn it off to compare
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
	mult   [][]int
	slots  []int
	vals   [][]linkVal
	strain [][]float64 // per link: slots × n strains
	stamp  [][]uint32
	epoch  uint32
	// prefix: links 0..J share one table keyed on the union of their
	// dependencies (J = −1: none).
	J       int
	pmult   []int
	pvals   []prefixVal
	pstarts [][3]float64 // slots × (J+1) link start positions
	pK      [][3][3]float64
	pstrain []float64
	pstamp  []uint32
	scratch linkVal
	sstrain []float64
}

// linkVal is one link at one combination of its bellows' angles.
type linkVal struct {
	T    kinematics.Pose
	K    [3][3]float64
	kmax float64 // curvature magnitude of a nested link, else 0
}

// prefixVal is the product of links 0..J at one combination of angles,
// with the largest curvature and strains over them.
type prefixVal struct {
	T    kinematics.Pose
	kmax float64
}

// usable reports whether link sharing applies to the evaluator's robot.
func (e *evaluator) shareUsable() bool {
	return shareLinks && !e.solver.Threaded()
}

// build sets the structure from the links of one sample at insertions
// beta, for plan p.
func (ls *linkShare) build(links []kinematics.Link, beta []float64, p *samplePlan, iso bool, n int) {
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
	keyed := func(d uint64, mult []int) ([]int, int) {
		mult = mult[:0]
		size := 1
		for i := range n {
			if d&(1<<uint(i)) == 0 {
				mult = append(mult, -1)
				continue
			}
			st := p.angleSteps[i]
			if st == 0 || size*st > maxShareSlots {
				return mult, 0
			}
			mult = append(mult, size)
			size *= st
		}
		return mult, size
	}
	var all uint64
	for j := range links {
		l := &links[j]
		ls.nested = append(ls.nested, l.Present&(l.Present-1) != 0 || n == 1)
		var size int
		ls.mult[j], size = keyed(deps(l), ls.mult[j])
		ls.slots = append(ls.slots, size)
		if size > 0 {
			ls.vals[j] = growTo(ls.vals[j], size)
			ls.strain[j] = growTo(ls.strain[j], size*n)
			ls.stamp[j] = growTo(ls.stamp[j], size)
		}
		all |= deps(l)
	}
	_, full := keyed(all, nil)
	// the prefix: the longest one (short of the last link) keyed on fewer
	// combinations than the whole sample
	ls.J = -1
	var pd uint64
	for j := 0; j+1 < m; j++ {
		pd |= deps(&links[j])
		mult, size := keyed(pd, nil)
		if size == 0 || full != 0 && size >= full {
			break
		}
		ls.J = j
		ls.pmult = append(ls.pmult[:0], mult...)
		ls.pvals = growTo(ls.pvals, size)
		ls.pstamp = growTo(ls.pstamp, size)
		ls.pstarts = growTo(ls.pstarts, size*(j+1))
		ls.pK = growTo(ls.pK, size*(j+1))
		ls.pstrain = growTo(ls.pstrain, size*n)
	}
	ls.sstrain = growTo(ls.sstrain, n)
}

// growTo returns s with length size, reusing its storage when it can.
func growTo[T any](s []T, size int) []T {
	if cap(s) < size {
		return make([]T, size)
	}
	return s[:size]
}

// key is the slot of the angles idx (grid indices, one per bellows) for
// multipliers mult.
func key(mult []int, idx []int32) int {
	k := 0
	for i, m := range mult {
		if m >= 0 {
			k += m * int(idx[i])
		}
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
			ls.ready = false
			return e.evalShape(a)
		}
		ls.build(links, a.Beta, p, e.solver.Isotropic(), n)
	}
	idx := p.angleIdx[k*n : (k+1)*n]
	sh := e.newShape(a)
	screen := e.screen && !e.tipsOnly
	starts := e.linkStarts[:0]
	links := ls.links
	tip := kinematics.Identity()
	j0 := 0
	if J := ls.J; J >= 0 {
		slot := key(ls.pmult, idx)
		pv := &ls.pvals[slot]
		pstarts := ls.pstarts[slot*(J+1) : (slot+1)*(J+1)]
		pK := ls.pK[slot*(J+1) : (slot+1)*(J+1)]
		pstrain := ls.pstrain[slot*n : (slot+1)*n]
		if ls.pstamp[slot] != ls.epoch {
			pose := kinematics.Identity()
			kmax := 0.0
			clear(pstrain)
			for j := 0; j <= J; j++ {
				lv, lstrain, err := e.sharedLink(j, a.Theta, idx)
				if err != nil {
					return nil, err
				}
				pstarts[j] = pose.P
				pK[j] = lv.K
				pose = pose.Mul(lv.T)
				if ls.nested[j] {
					kmax = maxNaN(kmax, lv.kmax)
				}
				pres := links[j].Present
				for i := range n {
					if pres&(1<<uint(i)) != 0 {
						pstrain[i] = maxNaN(pstrain[i], lstrain[i])
					}
				}
			}
			*pv = prefixVal{T: pose, kmax: kmax}
			ls.pstamp[slot] = ls.epoch
		}
		tip = pv.T
		sh.kmax = pv.kmax
		copy(sh.strain, pstrain)
		if screen {
			starts = append(starts, pstarts...)
			for j := 0; j <= J; j++ {
				links[j].K = pK[j]
			}
		}
		j0 = J + 1
	}
	for j := j0; j < len(links); j++ {
		lv, lstrain, err := e.sharedLink(j, a.Theta, idx)
		if err != nil {
			return nil, err
		}
		if screen {
			starts = append(starts, tip.P)
			links[j].K = lv.K
		}
		tip = tip.Mul(lv.T)
		if ls.nested[j] {
			sh.kmax = maxNaN(sh.kmax, lv.kmax)
		}
		pres := links[j].Present
		for i := range n {
			if pres&(1<<uint(i)) != 0 {
				sh.strain[i] = maxNaN(sh.strain[i], lstrain[i])
			}
		}
	}
	e.linkStarts = starts
	sh.tip = tip
	switch {
	case screen:
		sh.bound = e.sagBound(links, starts, tip.P)
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

// sharedLink returns link j at the angles theta (grid indices idx) and
// its strain per bellows (entries of absent bellows undefined): from its
// table when the combination was computed before, otherwise computed (and
// stored when the link is shared). The values are those of evalShape.
func (e *evaluator) sharedLink(j int, theta []float64, idx []int32) (*linkVal, []float64, error) {
	ls := &e.share
	n := len(e.robot.Tubes)
	var lv *linkVal
	var strain []float64
	slot := -1
	if ls.slots[j] > 0 {
		slot = key(ls.mult[j], idx)
		lv = &ls.vals[j][slot]
		strain = ls.strain[j][slot*n : (slot+1)*n]
		if ls.stamp[j][slot] == ls.epoch {
			return lv, strain, nil
		}
	} else {
		lv, strain = &ls.scratch, ls.sstrain[:n]
	}
	l := ls.links[j]
	if err := e.solver.Relink(theta, j, &l); err != nil {
		return nil, nil, err
	}
	lv.T = kinematics.LinkTransform(l.U, l.End-l.Start)
	lv.K = l.K
	lv.kmax = 0
	if ls.nested[j] {
		lv.kmax = math.Hypot(l.U[0], l.U[1])
	}
	// Wall strain as in evalShape (objective/kinematics/REFERENCE.md §3.6,
	// surrogate/REFERENCE.md §2.9).
	for i, t := range e.robot.Tubes {
		if l.Present&(1<<uint(i)) == 0 {
			continue
		}
		var ux, uy float64
		if l.Curved&(1<<uint(i)) != 0 {
			s, c := math.Sincos(theta[i])
			ux, uy = c*t.Precurvature[0]-s*t.Precurvature[1], s*t.Precurvature[0]+c*t.Precurvature[1]
		}
		dk := math.Hypot(l.U[0]-ux, l.U[1]-uy)
		strain[i] = e.strainPerCurvature[i] * dk
	}
	if slot >= 0 {
		ls.stamp[j][slot] = ls.epoch
	}
	return lv, strain, nil
}
