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

func scatteredDesign(t *testing.T, scatter string) string {
	t.Helper()
	data, err := os.ReadFile(examples + "boom-measured.toml")
	require.NoError(t, err)
	f := filepath.Join(t.TempDir(), "scattered.toml")
	require.NoError(t, os.WriteFile(f, append(data, []byte("\n[scatter]\n"+scatter+"\n")...), 0o644))
	return f
}

// TestCheckRobustJSONContract: the "robust" member carries the fields
// the issue fixes as a contract, and probabilities are probabilities.
func TestCheckRobustJSONContract(t *testing.T) {
	f := scatteredDesign(t, "stiffness_pct = 10\nprecurvature_pct = 5\nsamples = 500\nseed = 4")
	code, out, _ := runCLI(t, "check", "-json", "-robust", "-samples", "30", f)
	require.Equal(t, 0, code, out)
	var raw struct {
		Robust struct {
			Samples         int     `json:"samples"`
			PassProbability float64 `json:"pass_probability"`
			Checks          []struct {
				Name            string   `json:"name"`
				PassProbability *float64 `json:"pass_probability"`
			} `json:"checks"`
			Scores map[string]map[string]float64 `json:"scores"`
		} `json:"robust"`
	}
	require.NoError(t, json.Unmarshal([]byte(out), &raw))
	r := raw.Robust
	assert.Equal(t, 30, r.Samples, "-samples overrides the table")
	assert.GreaterOrEqual(t, r.PassProbability, 0.0)
	assert.LessOrEqual(t, r.PassProbability, 1.0)
	require.NotEmpty(t, r.Checks)
	for _, c := range r.Checks {
		assert.NotEmpty(t, c.Name)
		require.NotNil(t, c.PassProbability)
	}
	sag := r.Scores["tip_sag_mm"]
	for _, k := range []string{"mean", "sd", "p05", "p50", "p95"} {
		assert.Contains(t, sag, k)
	}
	assert.LessOrEqual(t, sag["p05"], sag["p50"])
	assert.LessOrEqual(t, sag["p50"], sag["p95"])
	assert.Greater(t, sag["sd"], 0.0)

	code, text, _ := runCLI(t, "check", "-robust", "-samples", "20", f)
	require.Equal(t, 0, code)
	assert.Contains(t, text, "P(pass)")
	assert.Contains(t, text, "std error")
	assert.Contains(t, text, "all checks")
	assert.Contains(t, text, "verify on printed prototypes")
}

func TestCheckRobustBadInput(t *testing.T) {
	code, _, errOut := runCLI(t, "check", "-robust", examples+"boom-measured.toml")
	assert.Equal(t, 2, code)
	assert.Contains(t, errOut, "has no scatter")
	code, _, errOut = runCLI(t, "check", "-robust", "-samples", "2000000", examples+"boom-measured.toml")
	assert.Equal(t, 2, code)
	assert.Contains(t, errOut, "-samples")
	f := scatteredDesign(t, "wall_pct = -1")
	code, _, errOut = runCLI(t, "check", "-robust", f)
	assert.Equal(t, 2, code)
	assert.Equal(t, 1, strings.Count(strings.TrimSpace(errOut), "\n")+1, "one line: %s", errOut)
	assert.Contains(t, errOut, "scatter.wall_pct")
}
