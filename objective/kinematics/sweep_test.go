package kinematics

import (
	"math"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// TestSweepTipsEqualsTip: every tip of a sweep equals Solver.Tip of the full
// actuation (the relative angle on its tube, the common angle added to every
// tube), for an anisotropic pair, the three-tube multi-link set and a
// threaded pair whose insertion follows the relative angle; infeasible
// steps of the threaded pair are skipped, not failed.
func TestSweepTipsEqualsTip(t *testing.T) {
	aniso := benchPair()
	aniso.Tubes[0].Bending = [2][2]float64{{1, 0.1}, {0.1, 1.4}}
	r3, a3 := bench3Tube()
	threaded := benchPair()
	threaded.Tubes[0].StraightLength = 0.05
	threaded.Threads = []Thread{{Inner: 0, Lead: 0.03}}
	cases := []struct {
		name        string
		r           *Robot
		theta, beta []float64
	}{
		{"anisotropic pair", aniso, []float64{0.3, -1}, []float64{0, 0}},
		{"three tubes", r3, a3.Theta, a3.Beta},
		{"threaded", threaded, []float64{0, 0}, []float64{-0.05, 0}},
	}
	for _, c := range cases {
		s, err := NewSolver(c.r)
		require.NoError(t, err, c.name)
		const rel, base = 12, 7
		tips, skipped, err := s.SweepTips(c.theta, c.beta, 0, rel, base, nil)
		require.NoError(t, err, c.name)
		ref, err := NewSolver(c.r)
		require.NoError(t, err)
		k := 0
		for j := range rel {
			th := append([]float64(nil), c.theta...)
			th[0] += 2 * math.Pi * float64(j) / rel
			if _, err := ref.Tip(th, c.beta); err != nil {
				continue
			}
			for b := range base {
				phi := 2 * math.Pi * float64(b) / base
				full := make([]float64, len(th))
				for i := range th {
					full[i] = th[i] + phi
				}
				want, err := ref.Tip(full, c.beta)
				require.NoError(t, err)
				require.Less(t, k, len(tips), c.name)
				for i := range 3 {
					assert.InDelta(t, want.P[i], tips[k][i], 1e-15, "%s: rel %d base %d comp %d", c.name, j, b, i)
				}
				k++
			}
		}
		assert.Equal(t, len(tips), k, c.name)
		assert.Equal(t, rel*base, len(tips)+skipped*base, c.name)
	}
}

// BenchmarkSweepTips: tips per second of a 64 × 64 sweep (relative ×
// common rotation) of the anisotropic pair, one core.
func BenchmarkSweepTips(b *testing.B) {
	r := benchPair()
	r.Tubes[0].Bending = [2][2]float64{{1, 0.1}, {0.1, 1.4}}
	r.Tubes[1].Bending = [2][2]float64{{2, 0}, {0, 1.2}}
	s, err := NewSolver(r)
	if err != nil {
		b.Fatal(err)
	}
	theta, beta := []float64{0.3, 0}, []float64{0, 0}
	buf := make([][3]float64, 0, 64*64)
	var sink float64
	for b.Loop() {
		tips, _, err := s.SweepTips(theta, beta, 0, 64, 64, buf[:0])
		if err != nil {
			b.Fatal(err)
		}
		sink += tips[len(tips)-1][0]
	}
	if math.IsNaN(sink) {
		b.Fatal("NaN tip")
	}
	b.ReportMetric(float64(b.N)*64*64/b.Elapsed().Seconds(), "tips/s")
	b.ReportMetric(float64(b.N)*64/b.Elapsed().Seconds(), "solves/s")
}
