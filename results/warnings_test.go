package results

import (
	"encoding/csv"
	"os"
	"path/filepath"
	"slices"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"plica/search"
)

// TestFrontWarningsColumn: a warn-only check that does not pass (here
// validated_range[1]) writes pass_NAME = false and its name into the
// warnings column while pass stays true; a design whose warn-only checks
// pass leaves the column empty. The rule is objective.Check.Warn's
// (a warning never fails a design); the column only makes it visible.
func TestFrontWarningsColumn(t *testing.T) {
	spec := smallProblem(t)
	x := spec.Midpoint()
	res, err := spec.Evaluate(x)
	require.NoError(t, err)
	require.True(t, slices.Contains(spec.Checks, "validated_range[1]"), "demo problem has the validated-range check")
	for i := range res.Checks {
		res.Checks[i].Pass = true
	}
	res.Pass = true
	warned := *res
	warned.Checks = slices.Clone(res.Checks)
	for i := range warned.Checks {
		if warned.Checks[i].Name == "validated_range[1]" {
			warned.Checks[i].Pass = false
			require.True(t, warned.Checks[i].Warn)
		}
	}
	g := make([]float64, spec.NumConstraints())
	dir := filepath.Join(t.TempDir(), "run")
	f, err := Create(dir)
	require.NoError(t, err)
	rows := []FrontRow{
		{ID: 1, Design: search.Design{Index: 1, X: x, G: g}, Result: res},
		{ID: 2, Design: search.Design{Index: 2, X: x, G: g}, Result: &warned},
		{ID: 3, Design: search.Design{Index: 3, X: x, G: g}, Err: "failed"},
	}
	require.NoError(t, f.WriteFront(spec, rows, func(FrontRow) string { return "" }))
	fh, err := os.Open(filepath.Join(dir, FrontFile))
	require.NoError(t, err)
	defer fh.Close()
	recs, err := csv.NewReader(fh).ReadAll()
	require.NoError(t, err)
	require.Len(t, recs, 4)
	h := recs[0]
	col := func(name string) int {
		i := slices.Index(h, name)
		require.GreaterOrEqual(t, i, 0, "column %s", name)
		return i
	}
	wc, pc, vc := col(WarningsColumn), col("pass"), col("pass_validated_range[1]")
	assert.Equal(t, []string{"", "validated_range[1]", ""}, []string{recs[1][wc], recs[2][wc], recs[3][wc]})
	assert.Equal(t, []string{"true", "true", "false"}, []string{recs[1][pc], recs[2][pc], recs[3][pc]})
	assert.Equal(t, "false", recs[2][vc])
	assert.Equal(t, "design_file", h[len(h)-1])
}

// TestFrontAtBoundWarning: a front whose designs all hold the first
// variable at its upper bound (and a second at its lower one for three of
// four designs, search.AtBound's "most") warns for each, naming variable
// and bound; a front spread over the middle of every range stays quiet.
func TestFrontAtBoundWarning(t *testing.T) {
	spec := smallProblem(t)
	p := spec.SearchProblem()
	require.GreaterOrEqual(t, p.Dim, 2)
	cols := NewColumns(spec)
	mid := spec.Midpoint()
	var stuck, spread []search.Design
	for k := range 4 {
		x := slices.Clone(mid)
		x[0] = p.Upper[0] - 0.001*(p.Upper[0]-p.Lower[0]) // within 1 % of the range
		if k < 3 {
			x[1] = p.Lower[1]
		}
		stuck = append(stuck, search.Design{Index: int64(k), X: x})
		y := slices.Clone(mid)
		y[0] = p.Lower[0] + (0.3+0.1*float64(k))*(p.Upper[0]-p.Lower[0])
		spread = append(spread, search.Design{Index: int64(k), X: y})
	}
	ws := frontWarnings(spec, stuck, nil, 1e-4)
	require.Len(t, ws, 2, "two variables at a bound: %v", ws)
	assert.Equal(t, WarnAtBound, ws[0].Kind)
	assert.Contains(t, ws[0].Message, cols.Variables[0]+": most front designs")
	assert.Contains(t, ws[0].Message, "upper bound "+formatFloat(p.Upper[0]))
	assert.Contains(t, ws[1].Message, cols.Variables[1]+": most front designs")
	assert.Contains(t, ws[1].Message, "lower bound "+formatFloat(p.Lower[1]))

	two := slices.Clone(stuck[:2]) // one of two at the lower bound of x[1] is not most
	two[1].X = slices.Clone(two[1].X)
	two[1].X[1] = mid[1]
	ws = frontWarnings(spec, append(two, spread[:2]...), nil, 1e-4)
	assert.Empty(t, ws, "half the designs at a bound is not most: %v", ws)
	assert.Empty(t, frontWarnings(spec, spread, nil, 1e-4), "spread front: no warning")
	assert.NotNil(t, frontWarnings(spec, nil, nil, 1e-4), "an empty list, not null, in run.json")
}

// TestStillImprovingWarning: the hypervolume history of a run of 1000
// evaluations. Growing from 0.90 to 1.00 over the last 200 evaluations
// (gain (1.00 − 0.90)/1.00 = 10 %, far above a 1e-4 stall tolerance) warns,
// and says by how much; flat over the last fifth (and a gain of 5e-5,
// below the tolerance) stays quiet, as does a history with an empty
// archive. The test is search.Stall's relative one (search/settings.go).
func TestStillImprovingWarning(t *testing.T) {
	hist := func(hv ...float64) []search.Stats {
		var h []search.Stats
		for i, v := range hv {
			h = append(h, search.Stats{Generation: i, Evaluations: int64(100 * (i + 1)), Hypervolume: v})
		}
		return h
	}
	// evaluations 100 … 1000; the last fifth starts after 800
	growing := hist(0.1, 0.3, 0.5, 0.7, 0.8, 0.85, 0.88, 0.90, 0.95, 1.00)
	m, ok := stillImproving(growing, 1e-4)
	require.True(t, ok, "10 %% gain over the last fifth")
	assert.Contains(t, m, "grew by 10 % over the last 200 of 1000 evaluations")
	ws := frontWarnings(smallProblem(t), nil, growing, 1e-4)
	require.Len(t, ws, 1)
	assert.Equal(t, WarnImproving, ws[0].Kind)

	flat := hist(0.1, 0.3, 0.5, 0.7, 0.8, 0.9, 0.99, 1.0, 1.0, 1.0)
	_, ok = stillImproving(flat, 1e-4)
	assert.False(t, ok, "no gain over the last fifth")
	tiny := hist(0.1, 0.3, 0.5, 0.7, 0.8, 0.9, 0.99, 0.99995, 1.0, 1.0)
	_, ok = stillImproving(tiny, 1e-4)
	assert.False(t, ok, "a gain of 5e-5 is below the tolerance")
	_, ok = stillImproving(tiny, 1e-5)
	assert.True(t, ok, "but above a tolerance of 1e-5")
	_, ok = stillImproving(hist(0, 0, 0), 1e-4)
	assert.False(t, ok, "empty archive: nothing to say")
	_, ok = stillImproving(nil, 1e-4)
	assert.False(t, ok, "no history")
}

// TestOrderWarning: the explainer warns about the bellows order when most
// evaluations (80 % or more) had a pair's clearance failing by more than
// the wall (objective.Result.MisorderedPairs), and stays quiet when only a
// few did.
func TestOrderWarning(t *testing.T) {
	build := func(misordered, total int) *explainer {
		ex := &explainer{names: []string{"a"}, reachMeeting: make([]reachRecord, 1)}
		for i := range total {
			res := synthetic(0.01)
			if i < misordered {
				res.MisorderedPairs = []int{1}
			}
			ex.add(int64(i), res, []float64{1})
			ex.commit(int64(i), false)
		}
		return ex
	}
	w, ok := build(9, 10).orderWarning()
	require.True(t, ok, "9 of 10 evaluations misordered")
	assert.Equal(t, WarnBellowsOrder, w.Kind)
	assert.Contains(t, w.Message, "clearance[1-2] failed by more than the outer bellows' wall in up to 90 % of the evaluations")
	assert.Contains(t, w.Message, "innermost first")
	_, ok = build(8, 10).orderWarning()
	assert.True(t, ok, "80 % is most")
	_, ok = build(3, 10).orderWarning()
	assert.False(t, ok, "a few outliers of a wide range")
	_, ok = build(0, 10).orderWarning()
	assert.False(t, ok, "none misordered")
	var none *explainer
	_, ok = none.orderWarning()
	assert.False(t, ok, "no explainer")
}
