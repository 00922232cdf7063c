package kinematics

import (
	"math"
	"math/rand/v2"
	"testing"

	"github.com/stretchr/testify/require"
)

// TestRelinkEqualsLinks: Relink, applied to the links of one actuation with
// the angles of another of the same insertions, gives exactly (bit for bit)
// the links Links solves from scratch for the second actuation, for an
// isotropic pair (SEG-1) and a three-tube set with an anisotropic tube.
// The straightforward path it replaces is Links itself (derived: both sum
// (3.1) over the same tubes in the same order).
func TestRelinkEqualsLinks(t *testing.T) {
	r3, a3 := bench3Tube()
	cases := []struct {
		name string
		r    *Robot
		beta []float64
	}{
		{"SEG-1", seg1Robot(), seg1Beta},
		{"three anisotropic", r3, a3.Beta},
	}
	rng := rand.New(rand.NewPCG(3, 4))
	for _, c := range cases {
		s, err := NewSolver(c.r)
		require.NoError(t, err)
		n := len(c.r.Tubes)
		base := make([]float64, n)
		links, err := s.Links(base, c.beta, nil)
		require.NoError(t, err)
		require.Greater(t, len(links), 2, c.name)
		for range 200 {
			theta := make([]float64, n)
			for i := range theta {
				theta[i] = (rng.Float64() - 0.5) * 4 * math.Pi
			}
			want, err := s.Links(theta, c.beta, nil)
			require.NoError(t, err)
			require.Len(t, want, len(links), c.name)
			sc := make([][2]float64, n)
			for i, th := range theta {
				sc[i][0], sc[i][1] = SinCos(th)
			}
			for j := range links {
				l := links[j]
				require.NoError(t, s.Relink(sc, j, &l))
				require.Equal(t, want[j], l, "%s: link %d at %v", c.name, j, theta)
			}
		}
	}
}

// TestResetEqualsNewSolver: a Solver used on one robot and Reset to
// another solves exactly (bit for bit) as NewSolver of the second one, for
// random robots of one to four tubes, isotropic or not, with and without
// threads (the first thirty in a row, so that thread rates are reused),
// in both directions of size (the storage grows and shrinks).
// The straightforward path it replaces is NewSolver itself.
func TestResetEqualsNewSolver(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 8))
	var s *Solver
	for k := range 60 {
		n := 1 + k%4
		if k < 30 {
			n = 4 - k%3 // shrinking: the storage is reused
		}
		r := randomRobot(rng, n, k%3 == 0, k < 30)
		want, err := NewSolver(r)
		require.NoError(t, err)
		if s == nil {
			s = want.Clone()
		} else {
			require.NoError(t, s.Reset(r))
		}
		for range 5 {
			a := randomActuation(rng, r, false)
			wl, werr := want.Links(a.Theta, a.Beta, nil)
			gl, gerr := s.Links(a.Theta, a.Beta, nil)
			require.Equal(t, werr, gerr, "robot %d", k)
			require.Equal(t, wl, gl, "robot %d at %v", k, a)
			wt, werr := want.Tip(a.Theta, a.Beta)
			gt, gerr := s.Tip(a.Theta, a.Beta)
			require.Equal(t, werr, gerr, "robot %d", k)
			require.Equal(t, wt, gt, "robot %d at %v", k, a)
		}
	}
	// a robot that fails validation leaves the error of NewSolver
	bad := &Robot{Tubes: []Tube{{}}}
	_, werr := NewSolver(bad)
	require.Error(t, werr)
	require.Equal(t, werr, s.Reset(bad))
}
