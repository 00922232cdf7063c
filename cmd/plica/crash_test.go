package main

import (
	"bytes"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"syscall"
	"testing"
	"time"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// buildPlica compiles the command once per test binary.
func buildPlica(t *testing.T) string {
	t.Helper()
	bin := filepath.Join(t.TempDir(), "plica")
	out, err := exec.Command("go", "build", "-o", bin, ".").CombinedOutput()
	require.NoError(t, err, "go build: %s", out)
	return bin
}

// smallProblemFile writes the demo problem with a small population, a
// coarse workspace and a checkpoint every generation.
func smallProblemFile(t *testing.T, dir string) string {
	t.Helper()
	text, err := os.ReadFile(examples + "boom-search.toml")
	require.NoError(t, err)
	s := string(text)
	for _, r := range [][2]string{{"relative_steps = 32", "relative_steps = 12"}, {"base_steps = 32", "base_steps = 8"},
		{"population = 60", "population = 12"}, {"checkpoint_every = 5", "checkpoint_every = 1"}} {
		require.Contains(t, s, r[0])
		s = strings.Replace(s, r[0], r[1], 1)
	}
	p := filepath.Join(dir, "small.toml")
	require.NoError(t, os.WriteFile(p, []byte(s), 0o644))
	return p
}

// smallRun writes smallProblemFile into dir, searches it for evals
// evaluations (and any further flags) into dir/name and fails the test
// unless the search succeeds. It returns the problem file and the run
// folder.
func smallRun(t *testing.T, dir, name, evals string, flags ...string) (prob, run string) {
	t.Helper()
	prob = smallProblemFile(t, dir)
	run = filepath.Join(dir, name)
	code, stdout, stderr := runCLI(t, append([]string{"search", prob, "-o", run, "-quiet", "-evals", evals}, flags...)...)
	require.Equal(t, 0, code, "search: %s %s", stdout, stderr)
	return prob, run
}

func countLines(path string) int {
	b, err := os.ReadFile(path)
	if err != nil {
		return 0
	}
	return bytes.Count(b, []byte("\n"))
}

// TestKillAndResume kills a running search with SIGKILL at several points
// (before and after checkpoints) and resumes it until it finishes; the
// final front, design files and evaluation archive equal those of an
// uninterrupted run with the same seed.
func TestKillAndResume(t *testing.T) {
	if testing.Short() {
		t.Skip("builds and runs the command")
	}
	bin := buildPlica(t)
	dir := t.TempDir()
	prob := smallProblemFile(t, dir)
	const evals = "240"
	ref := filepath.Join(dir, "ref")
	out, err := exec.Command(bin, "search", prob, "-o", ref, "-quiet", "-evals", evals).CombinedOutput()
	require.NoError(t, err, "reference run: %s", out)

	run := filepath.Join(dir, "killed")
	cmd := exec.Command(bin, "search", prob, "-o", run, "-quiet", "-evals", evals)
	kills := 0
	for _, rows := range []int{1, 40, 100, 150} { // kill once evaluations.csv holds this many lines
		require.NoError(t, cmd.Start())
		deadline := time.Now().Add(60 * time.Second)
		for countLines(filepath.Join(run, "evaluations.csv")) < rows && time.Now().Before(deadline) {
			time.Sleep(2 * time.Millisecond)
		}
		if err := cmd.Process.Signal(syscall.SIGKILL); err == nil {
			kills++
		}
		cmd.Wait()
		// The kill must land mid-run: run.json still says so.
		info, err := os.ReadFile(filepath.Join(run, "run.json"))
		require.NoError(t, err, "run.json exists after the kill at %d lines", rows)
		assert.Contains(t, string(info), `"status": "running"`, "killed while running (at %d lines)", rows)
		cmd = exec.Command(bin, "resume", run, "-quiet")
	}
	require.Greater(t, kills, 0)
	out, err = cmd.CombinedOutput()
	require.NoError(t, err, "final resume: %s", out)
	for _, name := range []string{"front.csv", "evaluations.csv", "history.csv", "designs/front-001.toml"} {
		want, err := os.ReadFile(filepath.Join(ref, name))
		require.NoError(t, err)
		got, err := os.ReadFile(filepath.Join(run, name))
		require.NoError(t, err)
		assert.Equal(t, string(want), string(got), "%s after %d kills and resumes", name, kills)
	}
}
