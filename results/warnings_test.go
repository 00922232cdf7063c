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
