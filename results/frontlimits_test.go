package results

import (
	"context"
	"encoding/json"
	"path/filepath"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"plica/problems"
	"plica/search"
)

// cappedReachProblem is the small desk-boom problem (maximise reach,
// minimise tip sag) with a [[constraint]] reach_mm <= 10: the reach of the
// longest-reaching front design is then limited by that constraint by
// construction (the boom reaches about 17 mm without it).
func cappedReachProblem(t *testing.T) *problems.Spec {
	t.Helper()
	return coarseExample(t, "boom-search.toml", "capped.toml", "population = 60", "population = 16",
		"[search]", "[[constraint]]\nscore = \"reach_mm\"\nmax = 10.0\n\n[search]")
}

// TestFrontLimitsKnownLimit: on a search whose reach is capped by a
// [[constraint]] reach_mm <= 10, run.json's front_limits say for reach_mm
// that the longest-reaching design is limited by reach_mm<=10 (met within
// 5 %, its reach between 9.5 and 10 mm), and one line per objective.
func TestFrontLimitsKnownLimit(t *testing.T) {
	spec := cappedReachProblem(t)
	dir := filepath.Join(t.TempDir(), "run")
	res, err := runTo(t, spec, dir, 800, 2, context.Background(), false)
	require.NoError(t, err)
	require.NotEmpty(t, res.Front)
	var info struct {
		FrontLimits []FrontLimit `json:"front_limits"`
	}
	require.NoError(t, json.Unmarshal([]byte(readFile(t, filepath.Join(dir, RunFile))), &info))
	require.Len(t, info.FrontLimits, 2, "one per objective")
	reach := info.FrontLimits[0]
	assert.Equal(t, "reach_mm", reach.Objective)
	assert.Equal(t, "maximize", reach.Goal)
	assert.Equal(t, "front-001", reach.Design, "the front is sorted by the first objective")
	assert.InDelta(t, 9.75, reach.Value, 0.25, "best reach just under the cap")
	require.NotEmpty(t, reach.Active, "the cap is active: %s", reach.Sentence)
	names := []string{}
	for _, a := range reach.Active {
		names = append(names, a.Name)
		assert.LessOrEqual(t, a.Margin, activeTolerance)
		assert.GreaterOrEqual(t, a.Margin, 0.0)
	}
	assert.Contains(t, names, "reach_mm<=10")
	assert.Contains(t, reach.Sentence, "limited by")
	assert.Contains(t, reach.Sentence, "reach_mm<=10 (margin")
	assert.Equal(t, "tip_sag_mm", info.FrontLimits[1].Objective)
	assert.NotEmpty(t, info.FrontLimits[1].Sentence)
}

// TestFrontLimitsRules: on a hand-made front of the desk-boom problem the
// rules hold: the constraint within 5 % of its limit is active and
// described with its check value, the one with 30 % to spare is not, a
// zero-limit check met exactly (validated_range, clipped at zero) is left
// out, a variable within 1 % of its range of a bound is named, and with no
// active constraint the nearest one is named instead.
func TestFrontLimitsRules(t *testing.T) {
	spec := smallProblem(t)
	names := spec.ConstraintNames()
	p := spec.SearchProblem()
	mid := spec.Midpoint()
	g := make([]float64, len(names))
	for j := range g {
		g[j] = -0.3
	}
	idx := map[string]int{}
	for j, n := range names {
		idx[n] = j
	}
	require.Contains(t, idx, "tip_sag")
	require.Contains(t, idx, "validated_range[1]")
	g[idx["tip_sag"]] = -0.02
	g[idx["validated_range[1]"]] = 0
	x := append([]float64(nil), mid...)
	x[0] = p.Lower[0] + 0.001*(p.Upper[0]-p.Lower[0])
	rows := []FrontRow{
		{ID: 1, Design: search.Design{X: x, F: []float64{-15, 3.9}, G: g}},
		{ID: 2, Design: search.Design{X: mid, F: []float64{-5, 1}, G: []float64{}}},
	}
	res, err := spec.Evaluate(x)
	require.NoError(t, err)
	rows[0].Result = res
	ls := FrontLimits(spec, rows)
	require.Len(t, ls, 2)
	r := ls[0]
	assert.Equal(t, "front-001", r.Design)
	assert.Equal(t, 15.0, r.Value, "natural sign of a maximised objective")
	require.Len(t, r.Active, 1)
	assert.Equal(t, "tip_sag", r.Active[0].Name)
	assert.InDelta(t, 0.02, r.Active[0].Margin, 1e-12)
	assert.Equal(t, "mm", r.Active[0].Unit)
	assert.Nil(t, r.Nearest)
	cols := NewColumns(spec)
	require.Len(t, r.AtBound, 1)
	assert.True(t, strings.HasPrefix(r.AtBound[0], cols.Variables[0]+" at its lower bound"), r.AtBound[0])
	assert.Contains(t, r.Sentence, "reach_mm, highest in front-001 (15), limited by tip_sag (")
	assert.Contains(t, r.Sentence, "margin 2 %")
	assert.NotContains(t, r.Sentence, "validated_range")

	s := ls[1]
	assert.Equal(t, "front-002", s.Design, "lowest tip sag")
	assert.Empty(t, s.Active)
	assert.Nil(t, s.Nearest, "no margins, no nearest")
	assert.Contains(t, s.Sentence, "no constraint within 5 % of its limit and no variable at a bound")

	rows[1].Design.G = append([]float64(nil), g...)
	rows[1].Design.G[idx["tip_sag"]] = -0.3
	ls = FrontLimits(spec, rows)
	require.NotNil(t, ls[1].Nearest)
	assert.InDelta(t, 0.3, ls[1].Nearest.Margin, 1e-12)
	assert.Contains(t, ls[1].Sentence, "nearest")
}
