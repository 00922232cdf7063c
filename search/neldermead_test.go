package search

import (
	"context"
	"math"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
	"gonum.org/v1/gonum/optimize"
)

func unbounded(n int) (lo, hi []float64) {
	lo, hi = make([]float64, n), make([]float64, n)
	for i := range lo {
		lo[i], hi[i] = math.Inf(-1), math.Inf(1)
	}
	return lo, hi
}

// TestNelderMeadRosenbrock checks the rows of search/REFERENCE.md §6 (gonum v0.17.0 check values; X and F
// with tolerances, evaluation counts only against gonum itself).
func TestNelderMeadRosenbrock(t *testing.T) {
	lo2, hi2 := unbounded(2)
	lo5, hi5 := unbounded(5)
	cases := []struct {
		name   string
		p      Problem
		x0     []float64
		nm     NelderMead
		max    int64
		wantX  []float64
		xTol   float64
		wantF  float64
		fTol   float64
		direct bool // compare with optimize.Minimize on the same function
	}{
		// Table: FunctionConvergence, X = (1, 1), F = 4.93e−32, 436 evaluations.
		{"2-D from (-1.2, 1)", Rosenbrock(lo2, hi2), []float64{-1.2, 1}, NelderMead{}, 0, []float64{1, 1}, 1e-12, 0, 1e-25, true},
		// Table: X = (1, 1, 1, 1, 1), F = 7.07e−17.
		{"5-D extended", Rosenbrock(lo5, hi5), []float64{1.3, 0.7, 0.8, 1.9, 1.2}, NelderMead{}, 0, []float64{1, 1, 1, 1, 1}, 1e-6, 0, 1e-12, true},
		// Table: FunctionConverge{1e-14, 200}, 20 000 evaluations: F = 4.93e−32.
		{"2-D tight tolerance", Rosenbrock(lo2, hi2), []float64{-1.2, 1}, NelderMead{FunctionTolerance: 1e-14, Iterations: 200}, 20000, []float64{1, 1}, 1e-12, 0, 1e-25, false},
		// Table: box x1 ∈ [−2, 0.5], x2 ∈ [−2, 2] with the sine transform: X = (0.5, 0.25),
		// F = 0.25 (exact: f ≥ (1 − x1)² ≥ 0.25 on the box).
		{"box via sine transform", Rosenbrock([]float64{-2, -2}, []float64{0.5, 2}), []float64{-1.2, 1}, NelderMead{}, 0, []float64{0.5, 0.25}, 1e-6, 0.25, 1e-10, false},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			nm := c.nm
			nm.Initial = c.x0
			res, err := Run(context.Background(), c.p, &Settings{MaxEvaluations: c.max}, &nm)
			require.NoError(t, err, "NelderMead on %s", c.name)
			assert.Equal(t, Converged, res.Status, "status")
			require.Len(t, res.Population, 1, "best design")
			best := res.Population[0]
			for i, x := range c.wantX {
				assert.InDelta(t, x, best.X[i], c.xTol, "x[%d]", i)
			}
			assert.InDelta(t, c.wantF, best.F[0], c.fTol, "f")
			assert.Equal(t, best.F[0], best.Scalar, "scalar of one objective with weight 1")
			t.Logf("%s: X %v, F %.3g, %d evaluations, %d iterations", c.name, best.X, best.F[0], res.Evaluations, res.Generation)
			if c.direct {
				// With infinite bounds the transform is the identity, so the run is exactly
				// gonum's (reference library).
				g, err := optimize.Minimize(optimize.Problem{Func: func(x []float64) float64 {
					f := make([]float64, 1)
					_ = c.p.Evaluate(context.Background(), 0, x, f, nil)
					return f[0]
				}}, c.x0, nil, &optimize.NelderMead{})
				require.NoError(t, err, "gonum NelderMead")
				assert.Equal(t, g.X, best.X, "X equals gonum's")
				assert.Equal(t, g.F, best.F[0], "F equals gonum's")
				assert.EqualValues(t, g.FuncEvaluations, res.Evaluations, "evaluations equal gonum's")
			}
			for _, d := range res.Front {
				for i, x := range d.X {
					require.True(t, x >= c.p.Lower[i] && x <= c.p.Upper[i], "trial point %v outside the box", d.X)
				}
			}
		})
	}
}

func TestNelderMeadConstrained(t *testing.T) {
	// min f1 of CONSTR with a penalty: x1 = 7/18 at x2 = 2.5, both constraints active (derived).
	res, err := Run(context.Background(), CONSTR(), &Settings{MaxEvaluations: 5000},
		&NelderMead{Initial: []float64{0.8, 2}, Scalarization: Scalarization{Weights: []float64{1, 0}}})
	require.NoError(t, err, "NelderMead on CONSTR")
	best := res.Population[0]
	assert.InDelta(t, 7.0/18, best.F[0], 1e-4, "least f1")
	assert.InDelta(t, 2.5, best.X[1], 1e-2, "x2 at the corner")
	assert.LessOrEqual(t, best.CV, 1e-6, "violation with penalty 1e6")
}

func TestNelderMeadCategoricalAndFixed(t *testing.T) {
	// A categorical and a fixed variable keep their initial values.
	p := Problem{Dim: 3, Lower: []float64{-5, 0, 2}, Upper: []float64{5, 0, 2}, Categorical: []int{0, 3, 0}, NumObjectives: 1,
		Evaluate: func(_ context.Context, _ int64, x, f, _ []float64) error {
			f[0] = (x[0]-1)*(x[0]-1) + x[1] + x[2]
			return nil
		}}
	res, err := Run(context.Background(), p, nil, &NelderMead{Initial: []float64{3, 2, 2}})
	require.NoError(t, err, "NelderMead")
	best := res.Population[0]
	assert.InDelta(t, 1, best.X[0], 1e-4, "free variable")
	assert.Equal(t, 2.0, best.X[1], "categorical variable kept")
	assert.Equal(t, 2.0, best.X[2], "fixed variable kept")
}

func TestNelderMeadInterrupted(t *testing.T) {
	ctx, cancel := context.WithCancel(context.Background())
	lo, hi := unbounded(2)
	p := Rosenbrock(lo, hi)
	inner := p.Evaluate
	p.Evaluate = func(ctx context.Context, i int64, x, f, g []float64) error {
		if i == 50 {
			cancel()
		}
		return inner(ctx, i, x, f, g)
	}
	res, err := Run(ctx, p, nil, &NelderMead{Initial: []float64{-1.2, 1}})
	require.NoError(t, err, "interrupted NelderMead")
	assert.Equal(t, Interrupted, res.Status, "status")
	assert.EqualValues(t, 51, res.Evaluations, "no evaluation after the cancellation")
	require.Len(t, res.Population, 1, "best so far")
}

// TestRefine polishes a design of a short NSGA2 run on ZDT1 with the achievement function
// referenced at its own objectives: the result must weakly dominate it (up to the augmentation
// term) and lie nearer the true front f2 = 1 − √f1 (Zitzler, Deb and Thiele 2000).
func TestRefine(t *testing.T) {
	p := ZDT1(4)
	run, err := Run(context.Background(), p, &Settings{Seed: 1, Population: 20, MaxEvaluations: 200}, &NSGA2{})
	require.NoError(t, err, "short NSGA2 run")
	start := run.Front[len(run.Front)/2]
	gap := func(f []float64) float64 { return f[1] - (1 - math.Sqrt(f[0])) }
	require.Greater(t, gap(start.F), 1e-3, "the start design is off the front")
	res, err := Refine(context.Background(), p, start.X, Scalarization{Kind: Achievement, Reference: start.F}, &Settings{MaxEvaluations: 3000})
	require.NoError(t, err, "Refine")
	best := res.Population[0]
	for i := range best.F {
		assert.LessOrEqual(t, best.F[i], start.F[i]+1e-6, "objective %d not worse than the start", i)
	}
	assert.Less(t, gap(best.F), gap(start.F)/10, "refined design %v nearer the front than %v", best.F, start.F)
}
