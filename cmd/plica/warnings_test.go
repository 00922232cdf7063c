package main

import (
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// TestSearchPrintsWarnings: a short search of the small demo problem stops
// long before its front settles (96 evaluations), so the summary carries
// the still-improving warning, one "warning:" line per entry of run.json's
// warnings array, and resume, which extends it, prints the warnings of
// the extended run the same way.
func TestSearchPrintsWarnings(t *testing.T) {
	dir := t.TempDir()
	prob := smallProblemFile(t, dir)
	out := filepath.Join(dir, "run")
	code, stdout, stderr := runCLI(t, "search", prob, "-o", out, "-quiet", "-evals", "96", "-workers", "1")
	require.Equal(t, 0, code, "search: %s %s", stdout, stderr)
	warnings := func() []map[string]string {
		b, err := os.ReadFile(filepath.Join(out, "run.json"))
		require.NoError(t, err)
		var info struct {
			Warnings []map[string]string `json:"warnings"`
		}
		require.NoError(t, json.Unmarshal(b, &info))
		require.NotNil(t, info.Warnings, "run.json has a warnings array")
		return info.Warnings
	}
	check := func(stdout string) {
		ws := warnings()
		var kinds []string
		for _, w := range ws {
			kinds = append(kinds, w["kind"])
			assert.Contains(t, stdout, "warning: "+w["message"]+"\n", "the summary prints warning %s", w["kind"])
		}
		assert.Equal(t, len(ws), strings.Count(stdout, "warning: "), "one line per warning")
		assert.Contains(t, kinds, "front_still_improving", "96 evaluations: the front still improves")
	}
	check(stdout)
	code, stdout, stderr = runCLI(t, "resume", out, "-quiet", "-evals", "144")
	require.Equal(t, 0, code, "resume: %s %s", stdout, stderr)
	check(stdout)
}
