package main

import (
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"plica/problems"
)

// TestSearchResumeRefine drives the search verbs on a small version of the
// demo problem: the run folder is complete, the same seed gives the same
// front with 1 and 2 workers, front designs round-trip into check and pose,
// a finished run can be extended by resume, and refine writes a design that
// check accepts.
func TestSearchResumeRefine(t *testing.T) {
	dir := t.TempDir()
	prob := smallProblemFile(t, dir)
	a, b := filepath.Join(dir, "a"), filepath.Join(dir, "b")
	code, out, errOut := runCLI(t, "search", prob, "-o", a, "-quiet", "-evals", "96", "-workers", "1")
	require.Equal(t, 0, code, "search: %s %s", out, errOut)
	assert.Contains(t, out, "EvaluationLimit after 96 evaluations")
	for _, f := range []string{"run.json", "problem.toml", "evaluations.csv", "history.csv", "front.csv", "checkpoint.json", "designs/front-001.toml"} {
		assert.FileExists(t, filepath.Join(a, f))
	}
	code, _, _ = runCLI(t, "search", prob, "-o", b, "-quiet", "-evals", "96", "-workers", "2")
	require.Equal(t, 0, code)
	fa, _ := os.ReadFile(filepath.Join(a, "front.csv"))
	fb, _ := os.ReadFile(filepath.Join(b, "front.csv"))
	assert.Equal(t, string(fa), string(fb), "same seed, same front for 1 and 2 workers")

	design := filepath.Join(a, "designs", "front-001.toml")
	code, _, errOut = runCLI(t, "check", design)
	assert.Contains(t, []int{0, 1}, code, "check accepts a front design (%s)", errOut)
	code, _, errOut = runCLI(t, "pose", design, "-angles-deg", "0,90")
	assert.Equal(t, 0, code, "pose accepts a front design (%s)", errOut)

	code, out, errOut = runCLI(t, "resume", a, "-quiet", "-evals", "144")
	require.Equal(t, 0, code, "resume extends a finished run: %s %s", out, errOut)
	assert.Contains(t, out, "after 144 evaluations")

	code, out, errOut = runCLI(t, "refine", a, "-design", "1", "-evals", "40")
	require.Equal(t, 0, code, "refine: %s %s", out, errOut)
	refined := filepath.Join(a, "designs", "refined-001.toml")
	require.FileExists(t, refined)
	code, _, errOut = runCLI(t, "check", refined)
	assert.Contains(t, []int{0, 1}, code, "check accepts a refined design (%s)", errOut)

	code, _, errOut = runCLI(t, "search", prob, "-o", filepath.Join(dir, "c"), "-quiet", "-seed", "-5")
	assert.Equal(t, 2, code, "a negative seed is a usage error, not the problem's seed")
	assert.Contains(t, errOut, "-seed: -5 is out of range")
	assert.NoDirExists(t, filepath.Join(dir, "c"), "nothing is written for a bad -seed")
	code, _, errOut = runCLI(t, "search", prob, "-o", a, "-quiet")
	assert.Equal(t, 2, code, "a folder that holds a run is refused")
	assert.Contains(t, errOut, "already holds a run")
	code, _, errOut = runCLI(t, "refine", a, "-design", "999")
	assert.Equal(t, 2, code, "unknown design id")
	assert.Contains(t, errOut, "has no design 999")
	code, _, errOut = runCLI(t, "refine", a, "-design", "1", "-evals", "-5")
	assert.Equal(t, 2, code, "a negative budget is a usage error, not an unlimited run")
	assert.Contains(t, errOut, "-evals: -5 is out of range")
}

func TestSearchBadProblemWritesNothing(t *testing.T) {
	dir := t.TempDir()
	bad := filepath.Join(dir, "bad.toml")
	require.NoError(t, os.WriteFile(bad, []byte("[[bellows]]\nwall_mm = [0.8, 0.4]\n"), 0o644))
	out := filepath.Join(dir, "run")
	code, _, errOut := runCLI(t, "search", bad, "-o", out)
	assert.Equal(t, 2, code)
	assert.Contains(t, errOut, "bad.toml:2:1: bellows[1].wall_mm: range [0.8, 0.4] has lo > hi")
	assert.NoDirExists(t, out, "nothing is written for a bad problem")
}

func TestInit(t *testing.T) {
	dir := t.TempDir()
	p := filepath.Join(dir, "mine.toml")
	code, out, _ := runCLI(t, "init", p)
	require.Equal(t, 0, code)
	assert.Contains(t, out, "wrote "+p)
	_, err := problems.LoadProblem(p)
	assert.NoError(t, err, "the starter problem loads")
	code, _, errOut := runCLI(t, "init", p)
	assert.Equal(t, 2, code, "init never overwrites")
	assert.Contains(t, errOut, "exists")
}

// TestSearchSaysCalibrated: a search whose problem names a calibration file
// says in its summary that the stiffness is calibrated.
func TestSearchSaysCalibrated(t *testing.T) {
	dir := t.TempDir()
	prob := smallProblemFile(t, dir)
	cal, err := os.ReadFile(examples + "boom-calibration.toml")
	require.NoError(t, err)
	require.NoError(t, os.WriteFile(filepath.Join(dir, "cal.toml"), cal, 0o644))
	text, err := os.ReadFile(prob)
	require.NoError(t, err)
	s := strings.Replace(string(text), "outer_diameter_mm = 30.0\n", "outer_diameter_mm = 30.0\ncalibration_file = \"cal.toml\"\n", 1)
	require.NoError(t, os.WriteFile(prob, []byte(s), 0o644))
	code, out, errOut := runCLI(t, "search", prob, "-o", filepath.Join(dir, "run"), "-quiet", "-evals", "24")
	require.Equal(t, 0, code, "search: %s", errOut)
	assert.Contains(t, out, "stiffness per bellows: strip, calibrated")
}
