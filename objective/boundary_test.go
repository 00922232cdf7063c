package objective_test

import (
	"context"
	"encoding/csv"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"plica/objective"
	"plica/problems"
	"plica/results"
)

// TestNoPanicTextInEvaluations runs a small search of the demo problem in
// which every evaluation panics in workspace sampling (a forced panic
// through the test hook). The run completes, and the failure column of
// evaluations.csv holds one-line reasons naming the stage, never the panic
// text or a goroutine trace.
func TestNoPanicTextInEvaluations(t *testing.T) {
	text, err := os.ReadFile("../problems/examples/boom-search.toml")
	require.NoError(t, err)
	s := strings.Replace(string(text), "population = 60", "population = 8", 1)
	spec, err := problems.ParseProblem([]byte(s), "small.toml")
	require.NoError(t, err)

	defer objective.SetStageHook(func(stage string) {
		if stage == objective.StageWorkspace {
			var m map[string]int
			m["x"] = 1 // assignment to a nil map: a runtime panic
		}
	})()
	dir := filepath.Join(t.TempDir(), "run")
	f, err := results.Create(dir)
	require.NoError(t, err)
	set := spec.Settings()
	set.MaxEvaluations, set.Workers = 16, 2
	_, err = results.Execute(context.Background(), spec, f, set, results.Options{Version: "test"})
	require.NoError(t, err)

	file, err := os.Open(filepath.Join(dir, results.EvaluationsFile))
	require.NoError(t, err)
	defer file.Close()
	rows, err := csv.NewReader(file).ReadAll()
	require.NoError(t, err)
	require.Greater(t, len(rows), 1, "a header and evaluations")
	col := -1
	for j, name := range rows[0] {
		if name == "failure" {
			col = j
		}
	}
	require.GreaterOrEqual(t, col, 0, "a failure column in %v", rows[0])
	for _, row := range rows[1:] {
		msg := row[col]
		assert.Equal(t, "internal error in workspace sampling: assignment to entry in nil map", msg)
		assert.NotContains(t, strings.ToLower(msg), "panic")
		assert.NotContains(t, msg, "goroutine")
		assert.NotContains(t, msg, "\n")
	}
}
