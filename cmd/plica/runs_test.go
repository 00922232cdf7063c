package main

import (
	"bytes"
	"context"
	"encoding/json"
	"fmt"
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
	"time"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"plica/results"
)

func writeLockFile(t *testing.T, dir string, pid int) {
	t.Helper()
	host, err := os.Hostname()
	require.NoError(t, err)
	require.NoError(t, os.MkdirAll(dir, 0o755))
	b, err := json.Marshal(map[string]any{"pid": pid, "host": host, "started": time.Now().UTC()})
	require.NoError(t, err)
	require.NoError(t, os.WriteFile(filepath.Join(dir, results.LockFile), b, 0o644))
}

// TestRunFolderLock: search and resume refuse a folder in use (exit 2,
// naming the holder), take over a stale lock with a note, and release the
// lock on success, on Ctrl-C and on a refused resume.
func TestRunFolderLock(t *testing.T) {
	dir := t.TempDir()
	prob := smallProblemFile(t, dir)
	rdir := filepath.Join(dir, "rdir")
	writeLockFile(t, rdir, os.Getpid())
	code, _, errOut := runCLI(t, "search", prob, "-o", rdir, "-quiet", "-evals", "24")
	assert.Equal(t, 2, code)
	assert.Contains(t, errOut, "is in use by another plica (process "+strconv.Itoa(os.Getpid())+" on host")
	assert.NoFileExists(t, filepath.Join(rdir, results.RunFile), "nothing written into a folder in use")

	// the holder was killed with kill -9: its process is gone
	gone := exec.Command(os.Args[0], "-test.run=^$")
	_ = gone.Run() // any exit will do: only its id is wanted
	require.NotNil(t, gone.ProcessState, "the process ran and exited")
	writeLockFile(t, rdir, gone.Process.Pid)
	code, _, errOut = runCLI(t, "search", prob, "-o", rdir, "-quiet", "-evals", "24")
	require.Equal(t, 0, code, errOut)
	assert.Contains(t, errOut, "plica: note: took over the stale lock of process "+strconv.Itoa(gone.Process.Pid))
	assert.NoFileExists(t, filepath.Join(rdir, results.LockFile), "released after success")

	writeLockFile(t, rdir, os.Getpid())
	code, _, errOut = runCLI(t, "resume", rdir, "-quiet", "-evals", "36")
	assert.Equal(t, 2, code)
	assert.Contains(t, errOut, "is in use by another plica")
	require.NoError(t, os.Remove(filepath.Join(rdir, results.LockFile)))

	// Ctrl-C: the lock goes with the process's exit
	ctx, cancel := context.WithCancel(context.Background())
	var o, e bytes.Buffer
	go func() {
		for !fileHasLines(filepath.Join(rdir, results.EvaluationsFile), 40) {
			time.Sleep(5 * time.Millisecond)
		}
		cancel()
	}()
	code = run(ctx, []string{"resume", rdir, "-quiet", "-evals", "100000"}, &o, &e)
	assert.Equal(t, 130, code, e.String())
	assert.True(t, strings.HasSuffix(e.String(), "plica: interrupted; checkpoint saved: continue with plica resume "+rdir+"\n"),
		"the resume message is the last line, no bare cancellation after it: %q", e.String())
	assert.NoFileExists(t, filepath.Join(rdir, results.LockFile), "released after Ctrl-C")

	code, _, errOut = runCLI(t, "resume", rdir, "-quiet", "-evals", "12")
	assert.Equal(t, 2, code)
	assert.Regexp(t, `-evals\) 12 is below the \d+ evaluations already done`, errOut)
	assert.NoFileExists(t, filepath.Join(rdir, results.LockFile), "released after a refusal")
}

func fileHasLines(path string, n int) bool {
	b, err := os.ReadFile(path)
	return err == nil && bytes.Count(b, []byte("\n")) >= n
}

// TestResumeRefusesTruncatedLog: a truncated evaluations.csv is refused
// with one line (exit 2), the folder left as it was.
func TestResumeRefusesTruncatedLog(t *testing.T) {
	dir := t.TempDir()
	_, rdir := smallRun(t, dir, "rdir", "48")
	path := filepath.Join(rdir, results.EvaluationsFile)
	b, err := os.ReadFile(path)
	require.NoError(t, err)
	cut := b[:len(b)/2]
	require.NoError(t, os.WriteFile(path, cut, 0o644))
	code, _, errOut := runCLI(t, "resume", rdir, "-quiet", "-evals", "96")
	assert.Equal(t, 2, code)
	assert.Contains(t, errOut, "evaluations.csv")
	assert.Contains(t, errOut, "the checkpoint counts 48 evaluations")
	assert.Equal(t, 1, strings.Count(errOut, "\n"), "one line: %q", errOut)
	now, err := os.ReadFile(path)
	require.NoError(t, err)
	assert.Equal(t, cut, now, "evaluations.csv untouched")
	require.NoError(t, os.Remove(path))
	code, _, errOut = runCLI(t, "resume", rdir, "-quiet", "-evals", "96")
	assert.Equal(t, 2, code)
	assert.Contains(t, errOut, "evaluations.csv is missing, but the checkpoint counts 48 evaluations")
}

// TestSearchFailureSaysFailed: a write that fails after the search began
// (front.csv cannot replace what is in its way, as on a full disk) exits
// 1; run.json says "failed" with the reason, and both run.json and the
// summary list only the files written.
func TestSearchFailureSaysFailed(t *testing.T) {
	dir := t.TempDir()
	prob := smallProblemFile(t, dir)
	rdir := filepath.Join(dir, "rdir")
	require.NoError(t, os.MkdirAll(filepath.Join(rdir, results.FrontFile, "in-the-way"), 0o755))
	code, out, errOut := runCLI(t, "search", prob, "-o", rdir, "-quiet", "-evals", "24")
	assert.Equal(t, 1, code, errOut)
	assert.Contains(t, out, "run "+rdir+": failed after 24 evaluations")
	assert.Contains(t, out, "files: "+filepath.Join(rdir, results.EvaluationsFile)+", ")
	assert.NotContains(t, out, filepath.Join(rdir, results.FrontFile))
	assert.Contains(t, errOut, `says "failed" with the reason`)
	b, err := os.ReadFile(filepath.Join(rdir, results.RunFile))
	require.NoError(t, err)
	var info results.RunInfo
	require.NoError(t, json.Unmarshal(b, &info))
	assert.Equal(t, results.StatusFailed, info.Status)
	assert.Contains(t, info.Reason, results.FrontFile)
	assert.NotContains(t, info.Files, results.FrontFile)
	assert.Contains(t, info.Files, results.EvaluationsFile)
	assert.NoFileExists(t, filepath.Join(rdir, results.LockFile), "released after a failure")
}

// TestOutputsNeverInputs: -o (and -plot) equal to an input, empty, or
// unwritable is refused with exit status 2 before anything is written.
func TestOutputsNeverInputs(t *testing.T) {
	dir := t.TempDir()
	prob, rdir := smallRun(t, dir, "rdir", "24")
	bench, design := filepath.Join(dir, "bench.csv"), filepath.Join(dir, "design.toml")
	for src, dst := range map[string]string{calExamples + "boom-bench.csv": bench, calExamples + "boom-geometry.toml": design} {
		b, err := os.ReadFile(src)
		require.NoError(t, err)
		require.NoError(t, os.WriteFile(dst, b, 0o644))
	}
	benchText, _ := os.ReadFile(bench)
	designText, _ := os.ReadFile(design)
	afile := filepath.Join(dir, "a-file")
	require.NoError(t, os.WriteFile(afile, nil, 0o644))
	plot := filepath.Join(dir, "fit.svg")
	cal := []string{"calibrate", bench, "-design", design, "-bellows", "2"}
	probDir := filepath.Join(dir, "beside")
	require.NoError(t, os.MkdirAll(probDir, 0o755))
	prob2 := filepath.Join(probDir, results.ProblemFile)
	b, _ := os.ReadFile(prob)
	require.NoError(t, os.WriteFile(prob2, b, 0o644))

	cases := []struct {
		args []string
		want string
	}{
		{[]string{"search", prob, "-o", ""}, `-o: the name is empty`},
		{[]string{"search", prob, "-o", prob}, "is an input of this command"},
		{[]string{"search", prob2, "-o", probDir}, "would overwrite the input " + prob2},
		{[]string{"merge", rdir, "-o", ""}, `-o: the name is empty`},
		{[]string{"merge", rdir, "-o", rdir}, "is the run folder given"},
		{[]string{"pick", rdir, "-knee", "-o", ""}, `-o: the name is empty`},
		{[]string{"pick", rdir, "-knee", "-o", rdir}, "is the run folder given"},
		{[]string{"pick", rdir, "-knee", "-o", afile}, "is a file (expected a folder"},
		{[]string{"report", rdir, "-o", ""}, `-o: the name is empty`},
		{[]string{"report", rdir, "-o", filepath.Join(rdir, results.FrontFile)}, "is front.csv of the run folder"},
		{[]string{"report", rdir, "-o", filepath.Join(afile, "r.html")}, "cannot be written"},
		{[]string{"compare", rdir, "-plot", ""}, `-plot: the name is empty`},
		{[]string{"compare", rdir, "-plot", filepath.Join(rdir, results.RunFile)}, "is run.json of the run folder"},
		{append(cal, "-o", ""), `-o: the name is empty`},
		{append(cal, "-o", bench), "-o " + bench + " is an input of this command"},
		{append(cal, "-o", design), "-o " + design + " is an input of this command"},
		{append(cal, "-plot", bench), "-plot " + bench + " is an input"},
		{append(cal, "-o", filepath.Join(dir, "c.toml"), "-plot", filepath.Join(dir, "c.toml")), "name the same file"},
		{append(cal, "-plot", plot, "-o", filepath.Join(afile, "cal.toml")), "-o " + filepath.Join(afile, "cal.toml") + " cannot be written"},
		{append(cal, "-plot", plot, "-o", dir), "is a folder (expected a file name)"},
	}
	for _, c := range cases {
		refused(t, c.want, c.args...)
	}
	assert.NoFileExists(t, plot, "an unwritable -o leaves the plot unwritten")
	now, _ := os.ReadFile(bench)
	assert.Equal(t, benchText, now, "the bench CSV is untouched")
	now, _ = os.ReadFile(design)
	assert.Equal(t, designText, now, "the design is untouched")
	now, _ = os.ReadFile(prob2)
	assert.Equal(t, b, now, "the problem beside the run is untouched")
	assert.NoFileExists(t, filepath.Join(probDir, results.RunFile))

	// a design naming a calibration file: -o may not replace it
	calFile := filepath.Join(dir, "cal.toml")
	code, _, errOut := runCLI(t, append(cal, "-o", calFile)...)
	require.Equal(t, 0, code, errOut)
	d2 := strings.Replace(string(designText), "outer_diameter_mm = 30.0\n", "outer_diameter_mm = 30.0\ncalibration_file = \"cal.toml\"\n", 1)
	require.NotEqual(t, string(designText), d2)
	require.NoError(t, os.WriteFile(design, []byte(d2), 0o644))
	calText, _ := os.ReadFile(calFile)
	code, _, errOut = runCLI(t, append(cal, "-o", calFile)...)
	assert.Equal(t, 2, code, errOut)
	assert.Contains(t, errOut, "is an input of this command")
	now, _ = os.ReadFile(calFile)
	assert.Equal(t, calText, now, "the calibration file the design reads is untouched")
}

// TestMergeDoubleCountCLI: merging a merged run with one of its sources is
// refused with exit status 2.
func TestMergeDoubleCountCLI(t *testing.T) {
	dir := t.TempDir()
	prob := smallProblemFile(t, dir)
	a, b, ab := filepath.Join(dir, "a"), filepath.Join(dir, "b"), filepath.Join(dir, "ab")
	for i, r := range []string{a, b} {
		code, _, errOut := runCLI(t, "search", prob, "-o", r, "-quiet", "-evals", "24", "-seed", fmt.Sprint(i+1))
		require.Equal(t, 0, code, errOut)
	}
	code, _, errOut := runCLI(t, "merge", a, b, "-o", ab)
	require.Equal(t, 0, code, errOut)
	assert.NoFileExists(t, filepath.Join(ab, results.LockFile), "merge releases its lock")
	code, _, errOut = runCLI(t, "merge", ab, a, "-o", filepath.Join(dir, "x"))
	assert.Equal(t, 2, code)
	assert.Contains(t, errOut, "merging both would count them twice")
	assert.NoDirExists(t, filepath.Join(dir, "x"))
}

// TestSearchFullDisk: a search on a disk that fills up mid-run (a 120 KiB
// tmpfs) exits 1 and run.json says "failed" with the reason: the failure
// is recorded in place of the old run.json when no new file fits. Needs
// root to mount the tmpfs.
func TestSearchFullDisk(t *testing.T) {
	if testing.Short() {
		t.Skip("mounts a tmpfs and runs a search until the disk is full")
	}
	if os.Geteuid() != 0 {
		t.Skip("mounting a small tmpfs needs root")
	}
	dir := t.TempDir()
	mnt := filepath.Join(dir, "disk")
	require.NoError(t, os.Mkdir(mnt, 0o755))
	if out, err := exec.Command("mount", "-t", "tmpfs", "-o", "size=120k", "tmpfs", mnt).CombinedOutput(); err != nil {
		t.Skipf("cannot mount a tmpfs here (%v: %s)", err, out)
	}
	defer exec.Command("umount", mnt).Run()
	rdir := filepath.Join(mnt, "run")
	code, _, errOut := runCLI(t, "search", "../../problems/examples/boom-search.toml", "-o", rdir, "-quiet", "-evals", "4000")
	assert.Equal(t, 1, code, errOut)
	assert.Contains(t, errOut, "no space left on device")
	assert.Contains(t, errOut, rdir+`/run.json says "failed" with the reason`)
	assert.NotContains(t, errOut, "could not")
	b, err := os.ReadFile(filepath.Join(rdir, results.RunFile))
	require.NoError(t, err)
	var info results.RunInfo
	require.NoError(t, json.Unmarshal(b, &info), "run.json is whole: %s", b)
	assert.Equal(t, results.StatusFailed, info.Status)
	assert.Contains(t, info.Reason, "no space left on device")
	for _, name := range info.Files {
		assert.FileExists(t, filepath.Join(rdir, name), "listed files exist")
	}
}

// TestBadCellRefused: a variable cell of evaluations.csv that is not a
// number is refused by resume, merge and report alike (exit 2, one line
// naming file, line, column and column name), the folder left as it was.
func TestBadCellRefused(t *testing.T) {
	dir := t.TempDir()
	_, rdir := smallRun(t, dir, "rdir", "48")
	path := filepath.Join(rdir, results.EvaluationsFile)
	b, err := os.ReadFile(path)
	require.NoError(t, err)
	lines := strings.Split(string(b), "\n")
	header := strings.Split(lines[0], ",")
	cells := strings.Split(lines[2], ",")
	col := len(cells[0]) + 2 // the first variable, after the index
	cells[1] = "zz"
	lines[2] = strings.Join(cells, ",")
	bad := []byte(strings.Join(lines, "\n"))
	require.NoError(t, os.WriteFile(path, bad, 0o644))
	want := fmt.Sprintf(`%s:3:%d: %s = "zz" (expected a number; a failed evaluation writes NaN)`, path, col, header[1])
	for _, args := range [][]string{
		{"resume", rdir, "-quiet", "-evals", "96"},
		{"merge", rdir, "-o", filepath.Join(dir, "merged")},
		{"report", rdir},
	} {
		code, _, errOut := runCLI(t, args...)
		assert.Equal(t, 2, code, "%v: %s", args, errOut)
		assert.Contains(t, errOut, want, args[0])
		assert.Equal(t, 1, strings.Count(errOut, "\n"), "%v: one line: %q", args, errOut)
		now, err := os.ReadFile(path)
		require.NoError(t, err)
		assert.Equal(t, bad, now, "%s: evaluations.csv untouched", args[0])
	}
	assert.NoDirExists(t, filepath.Join(dir, "merged"), "merge wrote nothing")
}
