package results

import (
	"bytes"
	"context"
	"encoding/json"
	"errors"
	"os"
	"os/exec"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"testing"
	"time"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"plica/problems"
)

// deadPID is the id of a process of this host that has exited.
func deadPID(t *testing.T) int {
	t.Helper()
	cmd := exec.Command(os.Args[0], "-test.run=^$")
	require.NoError(t, cmd.Run())
	require.False(t, processAlive(cmd.Process.Pid), "the process has exited")
	return cmd.Process.Pid
}

func writeLock(t *testing.T, dir string, l lockInfo) {
	t.Helper()
	b, err := json.Marshal(l)
	require.NoError(t, err)
	require.NoError(t, os.WriteFile(filepath.Join(dir, LockFile), b, 0o644))
}

// TestLock: a folder in use is refused naming the holder (an input error),
// released by Unlock; a stale lock of a process that no longer runs is
// taken over with a note; a lock of another host, or one that cannot be
// read, is refused.
func TestLock(t *testing.T) {
	dir := filepath.Join(t.TempDir(), "run")
	f, err := Create(dir)
	require.NoError(t, err)
	require.FileExists(t, filepath.Join(dir, LockFile))
	b, err := os.ReadFile(filepath.Join(dir, LockFile))
	require.NoError(t, err)
	var l lockInfo
	require.NoError(t, json.Unmarshal(b, &l))
	assert.Equal(t, os.Getpid(), l.PID)
	assert.Equal(t, hostname(), l.Host)
	assert.WithinDuration(t, time.Now(), l.Started, time.Minute)

	_, err = Create(dir)
	var le *LockedError
	require.ErrorAs(t, err, &le, "a second Create of a folder in use")
	assert.True(t, errors.Is(err, problems.ErrInput), "a locked folder is an input error (exit 2)")
	assert.Contains(t, err.Error(), "process "+strconv.Itoa(os.Getpid())+" on host "+hostname())
	g := &Folder{Dir: dir}
	require.ErrorAs(t, g.Lock(), &le, "Lock of a folder in use")

	require.NoError(t, f.Unlock())
	assert.NoFileExists(t, filepath.Join(dir, LockFile), "Unlock removes the lock")
	require.NoError(t, g.Lock(), "free again")
	require.NoError(t, g.Unlock())

	// kill -9 leaves the lock of a process that is gone
	writeLock(t, dir, lockInfo{PID: deadPID(t), Host: hostname(), Started: time.Now().Add(-time.Hour)})
	h := &Folder{Dir: dir}
	require.NoError(t, h.Lock(), "a stale lock is taken over")
	assert.Contains(t, h.LockNote(), "took over the stale lock of process")
	b, err = os.ReadFile(filepath.Join(dir, LockFile))
	require.NoError(t, err)
	assert.Contains(t, string(b), `"pid":`+strconv.Itoa(os.Getpid()), "the lock is now this process's")
	require.NoError(t, h.Unlock())

	writeLock(t, dir, lockInfo{PID: deadPID(t), Host: "elsewhere", Started: time.Now()})
	err = (&Folder{Dir: dir}).Lock()
	require.ErrorAs(t, err, &le, "a lock of another host cannot be checked")
	assert.Contains(t, err.Error(), "on host elsewhere")

	require.NoError(t, os.WriteFile(filepath.Join(dir, LockFile), []byte("{\"pid\":"), 0o644))
	err = (&Folder{Dir: dir}).Lock()
	require.ErrorAs(t, err, &le)
	assert.Contains(t, err.Error(), "run.lock cannot be read")

	// Unlock leaves a lock that is no longer its own
	require.NoError(t, os.Remove(filepath.Join(dir, LockFile)))
	k := &Folder{Dir: dir}
	require.NoError(t, k.Lock())
	writeLock(t, dir, lockInfo{PID: 1, Host: "other", Started: time.Now()})
	require.NoError(t, k.Unlock())
	assert.FileExists(t, filepath.Join(dir, LockFile))
}

// TestResumeLog: rows 0 … keep-1 must each be there in order with the
// header's width; rows after them are dropped whatever they hold; every
// other file is refused with a message naming the line.
func TestResumeLog(t *testing.T) {
	spec := smallProblem(t)
	header := EvaluationHeader(spec)
	head := strings.Join(header, ",") + "\n"
	nv, no, ng := len(spec.Variables), len(spec.Objectives), spec.NumConstraints()
	cells := func(i int) []string {
		c := []string{strconv.Itoa(i)}
		for _, v := range spec.Variables {
			c = append(c, strconv.FormatFloat(v.Lower, 'g', -1, 64))
		}
		c = append(c, slices.Repeat([]string{"200"}, no)...)
		c = append(c, slices.Repeat([]string{"-0.5"}, ng)...)
		return append(c, "0", "true", "")
	}
	row := func(i int) string { return strings.Join(cells(i), ",") + "\n" }
	var rows []string
	for i := range 6 {
		rows = append(rows, row(i))
	}
	// A failed evaluation as the search writes it: NaN objectives and
	// constraints, an infinite violation, its reason.
	failedCells := cells(2)
	for k := 1 + nv; k < 1+nv+no+ng; k++ {
		failedCells[k] = "NaN"
	}
	failedCells[1+nv+no+ng], failedCells[len(failedCells)-2], failedCells[len(failedCells)-1] = "+Inf", "false", "evaluation failed"
	rows[2] = strings.Join(failedCells, ",") + "\n"
	dir := t.TempDir()
	path := filepath.Join(dir, EvaluationsFile)
	check := func(content string, keep int64) ([]byte, error) {
		t.Helper()
		require.NoError(t, os.WriteFile(path, []byte(content), 0o644))
		return ResumeLog(path, spec, keep)
	}
	// withCell is rows[:4] with cell k of row 1 replaced.
	withCell := func(k int, v string) string {
		c := cells(1)
		c[k] = v
		return head + rows[0] + strings.Join(c, ",") + "\n" + rows[2] + rows[3]
	}
	// column of cell k of a row (1-based bytes), for the message.
	colOf := func(k int) string {
		return strconv.Itoa(len(strings.Join(cells(1)[:k], ",")) + 2)
	}

	out, err := check(head+strings.Join(rows, "")+"6,1.5,2", 4)
	require.NoError(t, err)
	assert.Equal(t, head+strings.Join(rows[:4], ""), string(out), "rows after the checkpoint and a torn last line are dropped")
	out, err = check(head+strings.Join(rows[:4], "")[:len(strings.Join(rows[:4], ""))-1], 4)
	require.NoError(t, err)
	assert.Equal(t, head+strings.Join(rows[:4], ""), string(out), "a last row without its newline gets one")
	out, err = check("anything", 0)
	require.NoError(t, err)
	assert.Equal(t, head, string(out), "nothing is needed before the first checkpoint")

	bad := []struct {
		name, content, want string
	}{
		{"cut short", head + strings.Join(rows[:3], ""), "holds 3 of the 4 evaluations the checkpoint counts"},
		{"glued", head + rows[0] + rows[1][:4] + rows[2] + rows[3] + rows[4], " cells, expected " + strconv.Itoa(len(header)) + " (a line cut short or glued to the next)"},
		{"variable", withCell(1, "zz"), ":3:3: " + header[1] + ` = "zz" (expected a number; a failed evaluation writes NaN)`},
		{"objective", withCell(1+nv, ""), ":3:" + colOf(1+nv) + ": " + header[1+nv] + ` = "" (expected a number`},
		{"constraint", withCell(1+nv+no+1, "1e"), ":3:" + colOf(1+nv+no+1) + ": " + header[1+nv+no+1] + ` = "1e"`},
		{"violation", withCell(1+nv+no+ng, "x"), ": violation = \"x\""},
		{"feasible", withCell(2+nv+no+ng, "yes"), `: feasible = "yes" (expected true or false)`},
		{"row missing", head + rows[0] + rows[2] + rows[3] + rows[4], `:3: index "2", expected 1 (rows missing or out of order)`},
		{"header", "index,y_mm\n" + strings.Join(rows, ""), ":1: the header differs"},
		{"empty", "", "no header"},
		{"bad quote", head + rows[0] + "1,\"1.5,200,0,true,\n" + rows[2], "evaluation 1 is unreadable"},
	}
	for _, c := range bad {
		_, err := check(c.content, 4)
		require.Error(t, err, c.name)
		assert.True(t, errors.Is(err, problems.ErrInput), "%s: an input error", c.name)
		assert.Contains(t, err.Error(), c.want, c.name)
		assert.NotContains(t, err.Error(), "\n", "%s: one line", c.name)
	}
	require.NoError(t, os.Remove(path))
	_, err = ResumeLog(path, spec, 4)
	assert.ErrorContains(t, err, "is missing, but the checkpoint counts 4 evaluations")
}

// TestResumeRefusesCutLog: a run whose evaluations.csv lost rows the
// checkpoint counts is not resumed, and the folder is left as it was; a
// budget below the evaluations done is refused the same way.
func TestResumeRefusesCutLog(t *testing.T) {
	spec := smallProblem(t)
	dir := filepath.Join(t.TempDir(), "run")
	_, err := runTo(t, spec, dir, 48, 1, context.Background(), false)
	require.NoError(t, err)
	path := filepath.Join(dir, EvaluationsFile)
	full := readFile(t, path)
	lines := strings.SplitAfter(full, "\n")
	// a cut line glued to the next, in the middle of the file
	cut := strings.Join(lines[:10], "") + lines[10][:len(lines[10])/2] + strings.Join(lines[11:], "")
	require.NoError(t, os.WriteFile(path, []byte(cut), 0o644))
	info := readFile(t, filepath.Join(dir, RunFile))
	_, err = runTo(t, spec, dir, 96, 1, context.Background(), true)
	require.Error(t, err)
	assert.True(t, errors.Is(err, problems.ErrInput))
	assert.Contains(t, err.Error(), "evaluations.csv:11: evaluation 9 has")
	assert.Equal(t, cut, readFile(t, path), "evaluations.csv untouched")
	assert.Equal(t, info, readFile(t, filepath.Join(dir, RunFile)), "run.json untouched")

	require.NoError(t, os.WriteFile(path, []byte(full), 0o644))
	_, err = runTo(t, spec, dir, 24, 1, context.Background(), true)
	require.Error(t, err)
	assert.True(t, errors.Is(err, problems.ErrInput))
	assert.Contains(t, err.Error(), "the evaluation budget (-evals) 24 is below the 48 evaluations already done")
	assert.Equal(t, info, readFile(t, filepath.Join(dir, RunFile)), "run.json untouched")

	// the latest checkpoint unreadable: the previous one, with a note
	require.NoError(t, os.WriteFile(filepath.Join(dir, CheckpointFile), []byte("{"), 0o644))
	f, err := Open(dir)
	require.NoError(t, err)
	set := spec.Settings()
	set.MaxEvaluations, set.Workers, set.CheckpointEvery = 60, 1, 2
	var notes []string
	_, err = Execute(context.Background(), spec, f, set, Options{Version: "test", Resume: true, Note: func(s string) { notes = append(notes, s) }})
	require.NoError(t, err)
	require.Len(t, notes, 1)
	assert.Contains(t, notes[0], "checkpoint.json is unusable")
	assert.Contains(t, notes[0], "resuming from checkpoint.prev.json")
}

// TestExecuteFailed: a write that fails after the run began (front.csv
// cannot replace what is in its way, as a full disk refuses a file) leaves
// run.json saying "failed" with the reason, listing only the files
// written.
func TestExecuteFailed(t *testing.T) {
	spec := smallProblem(t)
	dir := filepath.Join(t.TempDir(), "run")
	f, err := Create(dir)
	require.NoError(t, err)
	require.NoError(t, os.MkdirAll(filepath.Join(dir, FrontFile, "in-the-way"), 0o755))
	set := spec.Settings()
	set.MaxEvaluations, set.Workers = 36, 1
	res, err := Execute(context.Background(), spec, f, set, Options{Version: "test"})
	require.Error(t, err)
	require.NotNil(t, res, "the search itself ran")
	info, rerr := f.ReadInfo()
	require.NoError(t, rerr)
	assert.Equal(t, StatusFailed, info.Status)
	assert.Equal(t, err.Error(), info.Reason)
	assert.Contains(t, info.Reason, "front.csv")
	assert.Contains(t, info.Files, EvaluationsFile)
	assert.Contains(t, info.Files, RunFile)
	assert.Contains(t, info.Files, DesignFileName(1), "the design files were written before front.csv")
	assert.NotContains(t, info.Files, FrontFile, "front.csv was never written")
	assert.NotContains(t, f.Written(), FrontFile)
	for _, name := range info.Files {
		assert.FileExists(t, filepath.Join(dir, name), "listed files exist")
	}
	b, _ := os.ReadFile(filepath.Join(dir, RunFile))
	assert.True(t, bytes.Contains(b, []byte(`"status": "failed"`)), "run.json says failed")
}

// TestMergeRefusesDoubleCount: a merged run together with one of its
// sources (directly or through a merge of merges), or two searches of the
// same problem and seed, would count evaluations twice and are refused;
// run.json of a merge records its sources.
func TestMergeRefusesDoubleCount(t *testing.T) {
	tmp := t.TempDir()
	a, b, c := filepath.Join(tmp, "a"), filepath.Join(tmp, "b"), filepath.Join(tmp, "c")
	islandRun(t, a, 1)
	islandRun(t, b, 2)
	islandRun(t, c, 3)
	ab := filepath.Join(tmp, "ab")
	_, err := Merge(context.Background(), []string{a, b}, ab, "test")
	require.NoError(t, err)
	abc := filepath.Join(tmp, "abc")
	res, err := Merge(context.Background(), []string{ab, c}, abc, "test")
	require.NoError(t, err)
	require.Len(t, res.Info.Sources, 3)
	assert.Equal(t, []uint64{1, 2, 3}, []uint64{res.Info.Sources[0].Seed, res.Info.Sources[1].Seed, res.Info.Sources[2].Seed})

	for _, bad := range []struct {
		runs []string
		want string
	}{
		{[]string{ab, a}, "ab is a merge that already holds the evaluations of " + a + " (seed 1): merging both would count them twice"},
		{[]string{b, ab}, "ab is a merge that already holds the evaluations of " + b + " (seed 2)"},
		{[]string{abc, b}, "abc is a merge that already holds the evaluations of " + b},
		{[]string{abc, ab}, "both hold the evaluations of the search"},
	} {
		out := filepath.Join(tmp, "x")
		_, err := Merge(context.Background(), bad.runs, out, "test")
		require.Error(t, err, "%v", bad.runs)
		assert.True(t, errors.Is(err, problems.ErrInput))
		assert.Contains(t, err.Error(), bad.want)
		assert.NoDirExists(t, out, "nothing written")
	}
	twin := filepath.Join(tmp, "twin")
	islandRun(t, twin, 1)
	_, err = Merge(context.Background(), []string{a, twin}, filepath.Join(tmp, "y"), "test")
	assert.ErrorContains(t, err, "same seed 1: they evaluate the same designs")

	_, err = Merge(context.Background(), []string{a, b}, filepath.Join(a, "designs"), "test")
	assert.ErrorContains(t, err, "is designs of the run folder")
	_, err = Merge(context.Background(), []string{a, b}, "", "test")
	assert.ErrorContains(t, err, "-o: the name is empty")
}

// TestWriteFailedInfoFullDisk: when no temporary file can be made (a full
// disk), the failure is still recorded by rewriting run.json in place; when
// run.json cannot be rewritten either, the error says it could not be
// updated and which files the run wrote.
func TestWriteFailedInfoFullDisk(t *testing.T) {
	dir := filepath.Join(t.TempDir(), "run")
	f, err := Create(dir)
	require.NoError(t, err)
	defer f.Unlock()
	info := &RunInfo{Program: "plica", Status: StatusRunning, Variables: []string{"a_mm", "b_mm"}}
	require.NoError(t, f.WriteInfo(info))
	full := errors.New("no space left on device")
	createTemp = func(string, string) (*os.File, error) { return nil, full }
	defer func() { createTemp = os.CreateTemp }()
	info.Status, info.Reason = StatusFailed, "write evaluations.csv: no space left on device"
	info.Files = []string{RunFile, EvaluationsFile}
	require.NoError(t, f.writeFailedInfo(info), "recorded in place")
	got, err := f.ReadInfo()
	require.NoError(t, err)
	assert.Equal(t, StatusFailed, got.Status)
	assert.Equal(t, info.Reason, got.Reason)
	assert.Equal(t, info.Files, got.Files)
	entries, err := os.ReadDir(dir)
	require.NoError(t, err)
	for _, e := range entries {
		assert.NotContains(t, e.Name(), ".tmp", "no temporary file")
	}

	// run.json that cannot be opened for writing (a folder in its place).
	require.NoError(t, os.Remove(f.Path(RunFile)))
	require.NoError(t, os.Mkdir(f.Path(RunFile), 0o755))
	werr := f.writeFailedInfo(info)
	require.Error(t, werr)
	ue := &UnrecordedError{Err: errors.New("search: boom"), Path: f.Path(RunFile), Record: werr, Files: f.Written()}
	assert.ErrorIs(t, ue, ue.Err)
	assert.Contains(t, ue.Error(), f.Path(RunFile)+` could not be updated to say "failed"`)
}

// TestRunInfoMethodNames: run.json names the method as the problem file
// does ("nsga2"); a run.json of the old form ("NSGA2", "GA", in the run and
// in a merge's sources) still loads, read as the problem file's names.
func TestRunInfoMethodNames(t *testing.T) {
	spec := smallProblem(t)
	dir := filepath.Join(t.TempDir(), "run")
	f, err := Create(dir)
	require.NoError(t, err)
	set := spec.Settings()
	set.MaxEvaluations, set.Workers = 24, 1
	_, err = Execute(context.Background(), spec, f, set, Options{Version: "test"})
	require.NoError(t, err)
	require.NoError(t, f.Unlock())
	b, err := os.ReadFile(f.Path(RunFile))
	require.NoError(t, err)
	assert.Contains(t, string(b), `"method": "`+spec.Search.Method.String()+`"`)
	assert.Equal(t, "nsga2", problems.NSGA2.String(), "the problem file's name")

	old := []byte(`{"program":"plica","method":"NSGA2","status":"EvaluationLimit","time_budget":"0s",
"sources":[{"run":"a","method":"GA"},{"run":"b","method":"NSGA2"}],"merged_from":[{"run":"a","method":"GA"}]}`)
	require.NoError(t, os.WriteFile(f.Path(RunFile), old, 0o644))
	info, err := f.ReadInfo()
	require.NoError(t, err)
	assert.Equal(t, "nsga2", info.Method)
	assert.Equal(t, StatusEvaluationLimit, info.Status)
	assert.Equal(t, []string{"ga", "nsga2"}, []string{info.Sources[0].Method, info.Sources[1].Method})
	assert.Equal(t, "ga", info.MergedFrom[0].Method)
}

// TestLockReusedPID: a lock naming a live process by id alone can be one
// whose id was reused (after a reboot, say). A lock naming pid 1 with a
// start time that is not pid 1's is stale and taken over with a note, as
// is one of another boot; the lock of this process, with its own start
// time, is refused. Without /proc only the process id is checked.
func TestLockReusedPID(t *testing.T) {
	if _, ok := startTicks(1); !ok || bootID() == "" {
		t.Skip("no /proc with process start times and a boot id here")
	}
	dir := filepath.Join(t.TempDir(), "run")
	require.NoError(t, os.MkdirAll(dir, 0o755))
	one, _ := startTicks(1)
	writeLock(t, dir, lockInfo{PID: 1, Host: hostname(), Started: time.Now(), BootID: bootID(), StartTicks: one + 12345})
	assert.NoError(t, CheckUnlocked(dir), "a reused id does not lock the folder for readers")
	f := &Folder{Dir: dir}
	require.NoError(t, f.Lock(), "pid 1 with another start time is stale")
	assert.Contains(t, f.LockNote(), "took over the stale lock of process 1")
	assert.Contains(t, f.LockNote(), "its id was reused")
	b, err := os.ReadFile(filepath.Join(dir, LockFile))
	require.NoError(t, err)
	var mine lockInfo
	require.NoError(t, json.Unmarshal(b, &mine))
	me, _ := startTicks(os.Getpid())
	assert.Equal(t, me, mine.StartTicks, "the lock records this process's start time")
	assert.Equal(t, bootID(), mine.BootID, "and the boot id")
	require.NoError(t, f.Unlock())

	writeLock(t, dir, lockInfo{PID: 1, Host: hostname(), Started: time.Now(), BootID: "another-boot", StartTicks: one})
	g := &Folder{Dir: dir}
	require.NoError(t, g.Lock(), "a lock of another boot is stale")
	assert.Contains(t, g.LockNote(), "the machine has restarted since")
	require.NoError(t, g.Unlock())

	writeLock(t, dir, lockInfo{PID: os.Getpid(), Host: hostname(), Started: time.Now(), BootID: bootID(), StartTicks: me})
	var le *LockedError
	require.ErrorAs(t, (&Folder{Dir: dir}).Lock(), &le, "this live process's lock is refused")
	require.ErrorAs(t, CheckUnlocked(dir), &le)

	// Without /proc, pid 1 is alive and its lock is refused.
	procDir = filepath.Join(t.TempDir(), "no-proc")
	defer func() { procDir = "/proc" }()
	writeLock(t, dir, lockInfo{PID: 1, Host: hostname(), Started: time.Now(), BootID: bootID(), StartTicks: one + 12345})
	require.ErrorAs(t, (&Folder{Dir: dir}).Lock(), &le, "only the pid can be checked")
	writeLock(t, dir, lockInfo{PID: deadPID(t), Host: hostname(), Started: time.Now()})
	h := &Folder{Dir: dir}
	require.NoError(t, h.Lock(), "a pid that no longer runs is stale without /proc too")
	require.NoError(t, h.Unlock())
}
