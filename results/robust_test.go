package results

import (
	"os"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"plica/objective"
	"plica/problems"
	"plica/search"
)

func robustSpec(t *testing.T, extra string) *problems.Spec {
	t.Helper()
	data, err := os.ReadFile("../problems/examples/boom-search.toml")
	require.NoError(t, err)
	s := strings.Replace(string(data), "[search]", extra+"\n[search]", 1)
	spec, err := problems.ParseProblem([]byte(s), "../problems/examples/p.toml")
	require.NoError(t, err)
	return spec
}

// TestRobustCells: every robust column gets a cell; a row the run did not
// score (interrupted before the front's Monte Carlo) says not_scored with
// NaN numbers, and a problem without [scatter] has no robust columns.
func TestRobustCells(t *testing.T) {
	assert.Nil(t, RobustColumns(robustSpec(t, "")))
	spec := robustSpec(t, "[scatter]\nwall_pct = 5\nsamples = 20\n")
	assert.False(t, spec.Robust(), "scatter alone: a nominal search")
	h := RobustColumns(spec)
	x := spec.Midpoint()
	row := FrontRow{ID: 1, Design: search.Design{X: x, F: make([]float64, 2)}}
	cells := robustCells(spec, row)
	require.Len(t, cells, len(h))
	assert.Equal(t, RobustNotScored, cells[0])
	assert.Equal(t, "NaN", cells[2])
	assert.Equal(t, RobustNominal, cells[len(cells)-1], "search_estimate")
	res, err := spec.Evaluate(x)
	require.NoError(t, err)
	row.Result = res
	s := spec.ScatterSeeded(4)
	robustRow(t.Context(), spec, s, &row)
	require.NotNil(t, row.Robust)
	assert.Equal(t, uint64(4), row.ScatterSeed)
	cells = robustCells(spec, row)
	require.Len(t, cells, len(h))
	assert.Equal(t, RobustMonteCarlo, cells[0])
	assert.Equal(t, "20", cells[1])
	d, sc, err := spec.Design(x)
	require.NoError(t, err)
	want, err := objective.MonteCarlo(t.Context(), d, sc, s, 2)
	require.NoError(t, err)
	assert.Equal(t, formatFloat(want.PassProbability), cells[2], "the row's Monte Carlo is the design's, whatever the worker count")
}
