package kinematics

import (
	"errors"
	"fmt"
	"math"
	"slices"
)

// SweepTips appends to dst the tip positions (base frame, m) of a sweep of
// actuations: tube `tube` turned by relSteps relative rotations 2πj/relSteps
// over a full turn on top of theta, and the whole set by baseSteps common
// rotations 2πk/baseSteps, insertions beta; the common rotation is
// innermost (index j·baseSteps + k). Actuations that break the nesting
// rules are skipped and reported in the returned count of skipped relative
// steps.
//
// The sweep reuses its trigonometry: a common rotation of a torsionally
// rigid set turns the unloaded shape rigidly about the base axis
// (objective/kinematics/REFERENCE.md §3.1: every bending plane turns by the
// same angle, so every link curvature does; threads advance with relative
// angles only), so each relative step is one Tip and its base steps are
// planar rotations of that tip by one table of cos and sin, not new solves.
// Tested against Solver.Tip of every actuation of the grid.
func (s *Solver) SweepTips(theta, beta []float64, tube, relSteps, baseSteps int, dst [][3]float64) ([][3]float64, int, error) {
	n := s.n
	if len(theta) != n || len(beta) != n {
		return dst, 0, checkActuationValues(n, theta, beta)
	}
	if tube < 0 || tube >= n {
		return dst, 0, fmt.Errorf("sweep of tube %d: the set has tubes 1 to %d", tube+1, n)
	}
	if relSteps < 1 || baseSteps < 1 {
		return dst, 0, fmt.Errorf("sweep needs at least one relative and one base step, got %d and %d", relSteps, baseSteps)
	}
	s.sweepTables(baseSteps)
	th := s.sweepTheta[:n]
	copy(th, theta)
	dst = slices.Grow(dst, relSteps*baseSteps)
	skipped := 0
	for j := range relSteps {
		th[tube] = theta[tube] + 2*math.Pi*float64(j)/float64(relSteps)
		tip, err := s.Tip(th, beta)
		if err != nil {
			var ae *ActuationError
			if errors.As(err, &ae) {
				skipped++
				continue
			}
			return dst, skipped, err
		}
		x, y, z := tip.P[0], tip.P[1], tip.P[2]
		m := len(dst)
		out := dst[m : m+baseSteps]
		sn, cs := s.baseSin[:len(out)], s.baseCos[:len(out)]
		for k := range out {
			out[k] = [3]float64{cs[k]*x - sn[k]*y, sn[k]*x + cs[k]*y, z}
		}
		dst = dst[:m+baseSteps]
	}
	return dst, skipped, nil
}

// sweepTables fills the base-rotation table of SweepTips.
func (s *Solver) sweepTables(baseSteps int) {
	if len(s.sweepTheta) < s.n {
		s.sweepTheta = make([]float64, s.n)
	}
	if len(s.baseSin) == baseSteps {
		return
	}
	s.baseSin, s.baseCos = make([]float64, baseSteps), make([]float64, baseSteps)
	for k := range baseSteps {
		s.baseSin[k], s.baseCos[k] = math.Sincos(2 * math.Pi * float64(k) / float64(baseSteps))
	}
}
