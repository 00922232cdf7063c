package problems

import (
	"context"
	"os"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"plica/objective"
)

// TestSearchEvaluatorRecovers: a panic inside the search problem's
// evaluator (here Fill writing into objective and constraint slices that
// are too short) is an *objective.InternalError naming the stage, one line,
// not a panic that reaches the search's own recover as "panic: ...".
func TestSearchEvaluatorRecovers(t *testing.T) {
	data, err := os.ReadFile("examples/boom-search.toml")
	require.NoError(t, err)
	text := strings.Replace(string(data), "relative_steps = 32", "relative_steps = 8", 1)
	s, err := ParseProblem([]byte(text), "small.toml")
	require.NoError(t, err)
	p := s.SearchProblem()
	x := s.Midpoint()
	err = p.Evaluate(context.Background(), 0, x, nil, nil)
	var ie *objective.InternalError
	require.ErrorAs(t, err, &ie)
	assert.Equal(t, "filling objectives and constraints", ie.Stage)
	assert.True(t, strings.HasPrefix(err.Error(), "internal error in filling objectives and constraints: runtime error: index out of range"), err.Error())

	// With room for every value, the same candidate evaluates.
	f, g := make([]float64, p.NumObjectives), make([]float64, p.NumConstraints)
	require.NoError(t, p.Evaluate(context.Background(), 0, x, f, g))

	// A cancelled context stops the evaluation with the context's error.
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	assert.ErrorIs(t, p.Evaluate(ctx, 0, x, f, g), context.Canceled)
}
