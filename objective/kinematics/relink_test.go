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
