package search

import (
	"context"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// TestDiagnoserKnownInfeasibility: on the unit square, g1 = x0 − 2 ≤ 0
// always holds and g2 = 2.5 − x0 − x1 ≤ 0 never does; the smallest
// violation of g2 over the square is 0.5, at the corner (1, 1) (a linear
// function takes its minimum over a box at a vertex; elementary, derived).
// The diagnosis must name g2 alone, approach 0.5 from above, and find both
// variables of the least-infeasible designs at their upper bounds.
func TestDiagnoserKnownInfeasibility(t *testing.T) {
	p := Problem{Dim: 2, Lower: []float64{0, 0}, Upper: []float64{1, 1}, NumObjectives: 2, NumConstraints: 2,
		Evaluate: func(_ context.Context, _ int64, x, f, g []float64) error {
			f[0], f[1] = x[0], 1-x[1]
			g[0] = x[0] - 2
			g[1] = 2.5 - x[0] - x[1]
			return nil
		}}
	var dg Diagnoser
	set := &Settings{Seed: 3, Population: 20, MaxEvaluations: 2000, Evaluated: dg.Add}
	res, err := Run(context.Background(), p, set, &NSGA2{})
	require.NoError(t, err)
	assert.Empty(t, res.Front)
	assert.Equal(t, int64(2000), dg.Evaluations)
	assert.Equal(t, int64(0), dg.Feasible)
	assert.Equal(t, int64(0), dg.Stats[0].Violating, "g1 never blocks")
	assert.Equal(t, dg.Evaluations, dg.Stats[1].Violating, "g2 always blocks")
	assert.GreaterOrEqual(t, dg.Stats[1].SmallestViolation, 0.5)
	assert.Less(t, dg.Stats[1].SmallestViolation, 0.51, "the search presses toward the corner")
	require.Len(t, dg.Least, 5)
	assert.InDelta(t, dg.Stats[1].SmallestViolation, dg.Least[0].CV, 1e-12, "least infeasible first")
	assert.Equal(t, []int{1, 1}, AtBound(&p, dg.Least, 0.02), "both variables at their upper bounds")
}

// TestAtBoundQuiet: designs spread over the range hold no variable at a
// bound, and a design at the lower bound says so.
func TestAtBoundQuiet(t *testing.T) {
	p := Problem{Dim: 1, Lower: []float64{0}, Upper: []float64{1}}
	spread := []Design{{X: []float64{0.2}}, {X: []float64{0.5}}, {X: []float64{0.9}}, {X: []float64{0.0}}}
	assert.Equal(t, []int{0}, AtBound(&p, spread, 0.01))
	low := []Design{{X: []float64{0}}, {X: []float64{0.001}}, {X: []float64{0.0}}, {X: []float64{0.7}}}
	assert.Equal(t, []int{-1}, AtBound(&p, low, 0.01))
}
