package results

import (
	"context"
	"encoding/json"
	"os"
	"path/filepath"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"plica/problems"
)

// TestBlockedDemoDiagnosis: the shipped blocked demo asks for points 60 mm
// off-axis at the tip's height; its run finds no feasible design, and
// run.json says that task_miss blocks every evaluation, with the closest
// miss and the least-infeasible designs. (Demo scenario with invented
// numbers; the diagnosis itself is checked against a known infeasibility in
// search's TestDiagnoserKnownInfeasibility.)
func TestBlockedDemoDiagnosis(t *testing.T) {
	spec, err := problems.LoadProblem("../problems/examples/boom-blocked.toml")
	require.NoError(t, err)
	dir := filepath.Join(t.TempDir(), "run")
	res, err := runTo(t, spec, dir, 400, 1, context.Background(), false)
	require.NoError(t, err)
	require.Empty(t, res.Front)
	var info struct {
		Diagnosis *Diagnosis `json:"diagnosis"`
	}
	b, err := os.ReadFile(filepath.Join(dir, RunFile))
	require.NoError(t, err)
	require.NoError(t, json.Unmarshal(b, &info))
	d := info.Diagnosis
	require.NotNil(t, d, "a run with an empty front carries a diagnosis")
	assert.Equal(t, int64(0), d.Feasible)
	var miss *BlockingConstraint
	for i := range d.Blocking {
		if d.Blocking[i].Name == "task_miss" {
			miss = &d.Blocking[i]
		}
	}
	require.NotNil(t, miss, "task_miss blocks")
	assert.Equal(t, 1.0, miss.ShareViolating)
	assert.Greater(t, miss.SmallestViolation, 0.0)
	assert.Len(t, d.Sentences, len(d.Blocking))
	require.NotEmpty(t, d.LeastInfeasible)
	assert.Contains(t, d.LeastInfeasible[0].Margins, "task_miss")
	assert.GreaterOrEqual(t, d.LeastInfeasible[0].Margins["task_miss"], miss.SmallestViolation, "no design misses by less than the smallest miss")
}
