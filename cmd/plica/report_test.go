package main

import (
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// reportProblem writes the demo problem with a population of 12 and a
// coarse workspace, so that a search of a few dozen evaluations takes a
// fraction of a second.
func reportProblem(t *testing.T, dir string) string {
	t.Helper()
	text, err := os.ReadFile(examples + "boom-search.toml")
	require.NoError(t, err)
	s := string(text)
	for _, r := range [][2]string{{"relative_steps = 32", "relative_steps = 12"}, {"base_steps = 32", "base_steps = 8"},
		{"population = 60", "population = 12"}} {
		require.Contains(t, s, r[0])
		s = strings.Replace(s, r[0], r[1], 1)
	}
	p := filepath.Join(dir, "small.toml")
	require.NoError(t, os.WriteFile(p, []byte(s), 0o644))
	return p
}

func TestSearchWritesReport(t *testing.T) {
	dir := t.TempDir()
	prob := reportProblem(t, dir)
	run := filepath.Join(dir, "run")
	code, out, errOut := runCLI(t, "search", prob, "-o", run, "-quiet", "-evals", "48")
	require.Equal(t, 0, code, "search: %s", errOut)
	assert.Contains(t, out, "report: "+filepath.Join(run, "report.html"), "search says where the report is")
	page, err := os.ReadFile(filepath.Join(run, "report.html"))
	require.NoError(t, err, "search writes the report")
	assert.Contains(t, string(page), "plica check", "the report carries the check output")
	assert.FileExists(t, filepath.Join(run, "plots", "front.svg"))
	assert.FileExists(t, filepath.Join(run, "plots", "hypervolume.svg"))

	// resume extends the run and writes the report again
	require.NoError(t, os.Remove(filepath.Join(run, "report.html")))
	code, _, errOut = runCLI(t, "resume", run, "-quiet", "-evals", "72")
	require.Equal(t, 0, code, "resume: %s", errOut)
	page, err = os.ReadFile(filepath.Join(run, "report.html"))
	require.NoError(t, err, "resume writes the report")
	assert.Contains(t, string(page), "<th>evaluations</th><td>72</td>", "the report shows the extended run")

	// the report verb, elsewhere and for one design
	other := filepath.Join(dir, "one.html")
	code, out, errOut = runCLI(t, "report", run, "-o", other, "-designs", "1")
	require.Equal(t, 0, code, "report: %s", errOut)
	assert.Contains(t, out, "report: "+other)
	page, err = os.ReadFile(other)
	require.NoError(t, err)
	assert.Contains(t, string(page), `<section id="design-1">`, "requested design")
	assert.Equal(t, 1, strings.Count(string(page), "<section id=\"design-"), "only the requested design")
}

func TestReportErrors(t *testing.T) {
	dir := t.TempDir()
	prob := reportProblem(t, dir)
	run := filepath.Join(dir, "run")
	code, _, errOut := runCLI(t, "search", prob, "-o", run, "-quiet", "-evals", "24")
	require.Equal(t, 0, code, "search: %s", errOut)
	cases := []struct {
		name string
		args []string
		err  string
	}{
		{"no run folder", []string{"report"}, "expected one run folder, got 0"},
		{"not a run folder", []string{"report", dir}, "is not a run folder"},
		{"unknown design", []string{"report", run, "-designs", "999"}, "-designs: the front of"},
		{"bad design id", []string{"report", run, "-designs", "1,x"}, `"x" is not a design id`},
		{"zero design id", []string{"report", run, "-designs", "0"}, `"0" is not a design id`},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) { refused(t, c.err, c.args...) })
	}
}

// TestReportFailureKeepsRun: a report that cannot be written is a warning;
// the search still succeeds and its results are saved.
func TestReportFailureKeepsRun(t *testing.T) {
	dir := t.TempDir()
	prob := reportProblem(t, dir)
	run := filepath.Join(dir, "run")
	require.NoError(t, os.MkdirAll(run, 0o755))
	// a file where the plots folder should go
	require.NoError(t, os.WriteFile(filepath.Join(run, "plots"), nil, 0o644))
	code, _, errOut := runCLI(t, "search", prob, "-o", run, "-quiet", "-evals", "24")
	assert.Equal(t, 0, code, "search succeeds without its report (stderr %q)", errOut)
	assert.Contains(t, errOut, "plica: warning: report not written")
	assert.Contains(t, errOut, "plica report "+run, "says how to retry")
	assert.FileExists(t, filepath.Join(run, "front.csv"), "the run is saved")
	assert.NoFileExists(t, filepath.Join(run, "report.html"))
}
