package main

import (
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// TestResumeOldTaskRun: a run with task points made by an older plica,
// whose task constraint was g_task_coverage (now g_task_miss), is refused
// by resume with exit status 2 and one line naming the run folder, the
// reason and what to do; the folder is left as it was.
func TestResumeOldTaskRun(t *testing.T) {
	dir := filepath.Join(t.TempDir(), "old")
	code, _, errOut := runCLI(t, "search", examples+"boom-blocked.toml", "-o", dir, "-quiet", "-evals", "80", "-workers", "2")
	require.Equal(t, 0, code, errOut)
	// what the older plica wrote: the same run with the old column name
	for _, name := range []string{"run.json", "evaluations.csv"} {
		p := filepath.Join(dir, name)
		b, err := os.ReadFile(p)
		require.NoError(t, err)
		require.Contains(t, string(b), "g_task_miss")
		require.NoError(t, os.WriteFile(p, []byte(strings.ReplaceAll(string(b), "g_task_miss", "g_task_coverage")), 0o644))
	}
	before := map[string]string{}
	entries, err := os.ReadDir(dir)
	require.NoError(t, err)
	for _, e := range entries {
		if !e.IsDir() {
			b, err := os.ReadFile(filepath.Join(dir, e.Name()))
			require.NoError(t, err)
			before[e.Name()] = string(b)
		}
	}

	code, out, errOut := runCLI(t, "resume", dir, "-evals", "160")
	assert.Equal(t, 2, code, "bad input: exit status 2 (stdout %q)", out)
	assert.Empty(t, out)
	line := strings.TrimSpace(errOut)
	assert.NotContains(t, line, "\n", "one line: %q", errOut)
	for _, want := range []string{dir, "g_task_coverage", "g_task_miss", "older plica", "plica search " + filepath.Join(dir, "problem.toml")} {
		assert.Contains(t, line, want)
	}

	entries, err = os.ReadDir(dir)
	require.NoError(t, err)
	after := map[string]string{}
	for _, e := range entries {
		if !e.IsDir() {
			b, err := os.ReadFile(filepath.Join(dir, e.Name()))
			require.NoError(t, err)
			after[e.Name()] = string(b)
		}
	}
	assert.Equal(t, before, after, "the folder is left as it was")
}
