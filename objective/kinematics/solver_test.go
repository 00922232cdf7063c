package kinematics

import (
	"math"
	"math/rand/v2"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// randomRobot returns a feasible random robot of n tubes (lengths shrinking
// outward so that nesting is possible), isotropic or with full anisotropic
// tensors, with or without threads.
func randomRobot(rng *rand.Rand, n int, aniso, threads bool) *Robot {
	r := &Robot{Tubes: make([]Tube, n)}
	L := 0.1 + 0.4*rng.Float64()
	for i := range r.Tubes {
		lc := L * (0.1 + 0.8*rng.Float64())
		if rng.IntN(8) == 0 {
			lc = L // fully curved
		}
		ei := 0.2 + 3*rng.Float64()
		b := isoEI(ei)
		if aniso {
			a, c := ei, 0.2+3*rng.Float64()
			q := (rng.Float64()*2 - 1) * 0.8 * math.Sqrt(a*c)
			b = [2][2]float64{{a, q}, {q, c}}
		}
		pc := [2]float64{0, 2 + 15*rng.Float64()}
		if rng.IntN(3) == 0 {
			pc = [2]float64{rng.NormFloat64() * 8, rng.NormFloat64() * 8}
		}
		r.Tubes[i] = Tube{StraightLength: L - lc, CurvedLength: lc, Precurvature: pc, Bending: b,
			Torsion: ei / 1.3, LinearDensity: 0.01 * rng.Float64()}
		L *= 0.5 + 0.5*rng.Float64()
	}
	if threads {
		for i := range n - 1 {
			if rng.IntN(2) == 0 {
				r.Threads = append(r.Threads, Thread{Inner: i, Lead: (rng.Float64()*2 - 1) * 0.01})
			}
		}
	}
	return r
}

// randomActuation returns a feasible actuation for r: effective insertions
// drawn inside the nesting polytope of objective/kinematics/REFERENCE.md §3.2, then the thread
// advances removed. With single set, every tube ends at the same point and
// is curved (or straight) along the whole robot, so there is one link.
func randomActuation(rng *rand.Rand, r *Robot, single bool) Actuation {
	n := len(r.Tubes)
	a := Actuation{Theta: make([]float64, n), Beta: make([]float64, n)}
	for i := range a.Theta {
		a.Theta[i] = (rng.Float64()*2 - 1) * 2 * math.Pi
	}
	eff := make([]float64, n)
	if single {
		end := math.Inf(1)
		for _, t := range r.Tubes {
			end = math.Min(end, t.CurvedLength)
		}
		end *= 0.2 + 0.8*rng.Float64()
		for i, t := range r.Tubes {
			eff[i] = end - t.Length()
		}
	} else {
		eff[n-1] = -r.Tubes[n-1].Length() * rng.Float64()
		for i := n - 2; i >= 0; i-- {
			lo := eff[i+1] + r.Tubes[i+1].Length() - r.Tubes[i].Length()
			eff[i] = lo + (eff[i+1]-lo)*rng.Float64()
		}
	}
	// Remove the thread advances: β = β_eff − δ.
	delta := make([]float64, n)
	applyThreads(threadRates(r), a.Theta, make([]float64, n), delta)
	for i := range eff {
		a.Beta[i] = eff[i] - delta[i]
	}
	return a
}

func TestSolverMatchesRobot(t *testing.T) {
	// Solver (fast paths) against the Robot methods (EquilibriumCurvature
	// and LinkTransform per link): the same model evaluated two ways, so
	// agreement to rounding (1e-13 m, 1e-13 on R) is expected [derived].
	rng := rand.New(rand.NewPCG(21, 22))
	for k := range 600 {
		n := 1 + rng.IntN(5)
		aniso, threads, single := k%2 == 1, k%3 == 2, k%4 < 2
		r := randomRobot(rng, n, aniso, threads)
		require.NoError(t, r.Validate(), "random robot %d", k)
		a := randomActuation(rng, r, single)
		require.NoError(t, r.CheckActuation(a), "random actuation %d: %+v", k, a)
		s, err := NewSolver(r)
		require.NoError(t, err)

		want, err := r.Tip(a)
		require.NoError(t, err, "Robot.Tip case %d", k)
		got, err := s.Tip(a.Theta, a.Beta)
		require.NoError(t, err, "Solver.Tip case %d", k)
		assertPose(t, want, got, withinAbs(1e-13), "case %d (n=%d aniso=%v threads=%v single=%v) θ=%v β=%v", k, n, aniso, threads, single, a.Theta, a.Beta)

		wantLinks, err := r.Links(a, nil)
		require.NoError(t, err)
		if single {
			require.Len(t, wantLinks, 1, "case %d: single-link actuation", k)
		}
		gotLinks, err := s.Links(a.Theta, a.Beta, nil)
		require.NoError(t, err)
		require.Len(t, gotLinks, len(wantLinks), "case %d: link count", k)
		for j := range wantLinks {
			w, g := wantLinks[j], gotLinks[j]
			assert.Equal(t, w.Start, g.Start, "case %d link %d Start", k, j)
			assert.Equal(t, w.End, g.End, "case %d link %d End", k, j)
			assert.Equal(t, w.Present, g.Present, "case %d link %d Present", k, j)
			assert.Equal(t, w.Curved, g.Curved, "case %d link %d Curved", k, j)
			assert.InDelta(t, w.MassPerLength, g.MassPerLength, 1e-16, "case %d link %d MassPerLength", k, j)
			for i := range 3 {
				assert.InDelta(t, w.U[i], g.U[i], 1e-12*math.Max(1, math.Abs(w.U[i])), "case %d link %d U[%d]", k, j, i)
				for m := range 3 {
					assert.InDelta(t, w.K[i][m], g.K[i][m], 1e-13, "case %d link %d K[%d][%d]", k, j, i, m)
				}
			}
		}
	}
}

func TestSolverClone(t *testing.T) {
	rng := rand.New(rand.NewPCG(23, 24))
	r := randomRobot(rng, 3, true, true)
	s, err := NewSolver(r)
	require.NoError(t, err)
	c := s.Clone()
	assert.Equal(t, 3, c.N(), "Clone().N()")
	for range 20 {
		a := randomActuation(rng, r, false)
		p1, err1 := s.Tip(a.Theta, a.Beta)
		p2, err2 := c.Tip(a.Theta, a.Beta)
		require.NoError(t, err1)
		require.NoError(t, err2)
		assert.Equal(t, p1, p2, "Clone().Tip(%+v)", a)
	}
	assert.NotSame(t, &s.beta[0], &c.beta[0], "Clone shares scratch space")
}

func TestNewSolverInvalid(t *testing.T) {
	r := threeTubes()
	r.Tubes[1].Torsion = 0
	_, err := NewSolver(r)
	assert.ErrorContains(t, err, "tube 2: torsional stiffness", "NewSolver with GJ = 0")
}

func TestSolverAllocations(t *testing.T) {
	// testing.AllocsPerRun: the evaluation paths meant for sweeps allocate
	// nothing once the Solver (and the caller's buffers) exist.
	rng := rand.New(rand.NewPCG(25, 26))
	cases := []struct {
		name                   string
		n                      int
		aniso, threads, single bool
	}{
		{"two tubes single link", 2, false, false, true},
		{"two anisotropic tubes single link", 2, true, false, true},
		{"three tubes multi link", 3, false, false, false},
		{"four threaded anisotropic tubes", 4, true, true, false},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			r := randomRobot(rng, tc.n, tc.aniso, tc.threads)
			a := randomActuation(rng, r, tc.single)
			s, err := NewSolver(r)
			require.NoError(t, err)
			var sink float64
			allocs := testing.AllocsPerRun(100, func() {
				p, err := s.Tip(a.Theta, a.Beta)
				if err != nil {
					panic(err)
				}
				sink += p.P[0]
			})
			assert.Zero(t, allocs, "Solver.Tip allocations (%s)", tc.name)
			links := make([]Link, 0, 2*tc.n)
			allocs = testing.AllocsPerRun(100, func() {
				links, _ = s.Links(a.Theta, a.Beta, links)
			})
			assert.Zero(t, allocs, "Solver.Links allocations (%s)", tc.name)
			ss, poses := make([]float64, 0, 2048), make([]Pose, 0, 2048)
			allocs = testing.AllocsPerRun(20, func() {
				ss, poses, _ = s.Backbone(a.Theta, a.Beta, 1e-3, ss, poses)
			})
			assert.Zero(t, allocs, "Solver.Backbone allocations (%s)", tc.name)
			assert.False(t, math.IsNaN(sink))
		})
	}
}
