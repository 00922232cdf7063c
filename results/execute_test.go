package results

import (
	"context"
	"errors"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"plica/objective"
	"plica/problems"
	"plica/search"
)

// smallProblem is the shipped demo problem with a coarse workspace and a
// small population, so a test search takes a fraction of a second.
func smallProblem(t testing.TB) *problems.Spec {
	t.Helper()
	text, err := os.ReadFile("../problems/examples/boom-search.toml")
	require.NoError(t, err)
	s := strings.Replace(string(text), "relative_steps = 32", "relative_steps = 12", 1)
	s = strings.Replace(s, "base_steps = 32", "base_steps = 8", 1)
	s = strings.Replace(s, "population = 60", "population = 12", 1)
	spec, err := problems.ParseProblem([]byte(s), "small.toml")
	require.NoError(t, err)
	return spec
}

func runTo(t *testing.T, spec *problems.Spec, dir string, evals int64, workers int, ctx context.Context, resume bool) (*search.Result, error) {
	t.Helper()
	var f *Folder
	var err error
	if resume {
		f, err = Open(dir)
	} else {
		f, err = Create(dir)
	}
	require.NoError(t, err)
	set := spec.Settings()
	set.MaxEvaluations = evals
	set.Workers = workers
	set.CheckpointEvery = 2
	return Execute(ctx, spec, f, set, Options{Version: "test", Resume: resume})
}

func readFile(t *testing.T, path string) string {
	t.Helper()
	b, err := os.ReadFile(path)
	require.NoError(t, err)
	return string(b)
}

// TestResumeMatchesUninterrupted: a run stopped by Ctrl-C (context
// cancellation) and resumed writes the same front, the same evaluation
// archive and the same design files as an uninterrupted run with the same
// seed, whatever the worker count.
func TestResumeMatchesUninterrupted(t *testing.T) {
	spec := smallProblem(t)
	tmp := t.TempDir()
	whole := filepath.Join(tmp, "whole")
	_, err := runTo(t, spec, whole, 120, 1, context.Background(), false)
	require.NoError(t, err)

	cut := filepath.Join(tmp, "cut")
	ctx, cancel := context.WithCancel(context.Background())
	f, err := Create(cut)
	require.NoError(t, err)
	set := spec.Settings()
	set.MaxEvaluations = 120
	set.Workers = 2
	set.CheckpointEvery = 2
	set.Progress = func(p search.Progress) {
		if p.Generation == 3 {
			cancel()
		}
	}
	res, err := Execute(ctx, spec, f, set, Options{Version: "test"})
	require.True(t, errors.Is(err, context.Canceled), "interrupted run returns context.Canceled, got %v", err)
	require.Equal(t, search.Interrupted, res.Status)
	require.FileExists(t, filepath.Join(cut, CheckpointFile), "Ctrl-C leaves a checkpoint")

	_, err = runTo(t, spec, cut, 120, 2, context.Background(), true)
	require.NoError(t, err)
	for _, name := range []string{FrontFile, EvaluationsFile, HistoryFile, DesignFileName(1)} {
		assert.Equal(t, readFile(t, filepath.Join(whole, name)), readFile(t, filepath.Join(cut, name)), "%s after resume", name)
	}
}

func TestCreateRefusesExistingRun(t *testing.T) {
	dir := t.TempDir()
	_, err := Create(dir)
	require.NoError(t, err)
	require.NoError(t, os.WriteFile(filepath.Join(dir, RunFile), []byte("{}"), 0o644))
	_, err = Create(dir)
	assert.ErrorContains(t, err, "already holds a run")
}

func TestCreateReadOnly(t *testing.T) {
	if os.Geteuid() == 0 {
		// root ignores permission bits; a path under a regular file
		// cannot be created by anyone
		f := filepath.Join(t.TempDir(), "file")
		require.NoError(t, os.WriteFile(f, nil, 0o644))
		_, err := Create(filepath.Join(f, "run"))
		assert.ErrorContains(t, err, "cannot create run folder")
		return
	}
	dir := t.TempDir()
	require.NoError(t, os.Chmod(dir, 0o555))
	_, err := Create(filepath.Join(dir, "run"))
	assert.Error(t, err)
}

func TestWriteAtomicLeavesNoTemp(t *testing.T) {
	dir := t.TempDir()
	p := filepath.Join(dir, "a.txt")
	require.NoError(t, WriteAtomic(p, []byte("one")))
	require.NoError(t, WriteAtomic(p, []byte("two")))
	assert.Equal(t, "two", readFile(t, p))
	entries, err := os.ReadDir(dir)
	require.NoError(t, err)
	assert.Len(t, entries, 1, "no temporary files left behind")
}

// TestRunFolderKeepsCalibration: a problem that names a calibration file
// gives a run folder that carries a copy of it; the folder resumes after
// being moved, and its front designs carry the factors themselves.
func TestRunFolderKeepsCalibration(t *testing.T) {
	src := t.TempDir()
	cal, err := os.ReadFile("../problems/examples/boom-calibration.toml")
	require.NoError(t, err)
	require.NoError(t, os.WriteFile(filepath.Join(src, "cal.toml"), cal, 0o644))
	text, err := os.ReadFile("../problems/examples/boom-search.toml")
	require.NoError(t, err)
	s := string(text)
	for _, r := range [][2]string{{"relative_steps = 32", "relative_steps = 12"}, {"base_steps = 32", "base_steps = 8"}, {"population = 60", "population = 12"},
		{"outer_diameter_mm = 30.0\n", "outer_diameter_mm = 30.0\ncalibration_file = \"cal.toml\"\n"}} {
		require.Contains(t, s, r[0])
		s = strings.Replace(s, r[0], r[1], 1)
	}
	pf := filepath.Join(src, "p.toml")
	require.NoError(t, os.WriteFile(pf, []byte(s), 0o644))
	spec, err := problems.LoadProblem(pf)
	require.NoError(t, err)

	run := filepath.Join(t.TempDir(), "run")
	_, err = runTo(t, spec, run, 36, 1, context.Background(), false)
	require.NoError(t, err)
	assert.FileExists(t, filepath.Join(run, "calibration", "cal.toml"))
	assert.Contains(t, readFile(t, filepath.Join(run, ProblemFile)), `calibration_file = "calibration/cal.toml"`)
	front := readFile(t, filepath.Join(run, DesignFileName(1)))
	assert.Contains(t, front, "calibration_factor = [", "front designs carry the factors")
	assert.NotContains(t, front, "calibration_file")
	d, _, err := problems.ParseDesign([]byte(front), "front.toml")
	require.NoError(t, err)
	st, err := d.Stiffness()
	require.NoError(t, err)
	assert.Equal(t, objective.SourceCalibrated, st[1].Source)

	moved := filepath.Join(t.TempDir(), "moved")
	require.NoError(t, os.Rename(run, moved))
	rspec, err := problems.LoadProblem(filepath.Join(moved, ProblemFile))
	require.NoError(t, err, "the moved run's problem loads")
	assert.Equal(t, spec.Hash(), rspec.Hash(), "the portable copy hashes like the original")
	_, err = runTo(t, rspec, moved, 60, 1, context.Background(), true)
	require.NoError(t, err, "the moved run resumes")
}
