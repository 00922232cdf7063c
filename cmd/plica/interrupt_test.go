package main

import (
	"bytes"
	"context"
	"crypto/sha256"
	"io/fs"
	"os"
	"os/exec"
	"path/filepath"
	"sort"
	"strconv"
	"strings"
	"syscall"
	"testing"
	"time"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// longCheckDesign is a three-bellows design (numbers invented for the
// test) with every workspace sample count at its cap: a check of it takes
// seconds, long enough to be interrupted in the middle.
const longCheckDesign = `name = "long check"
[[bellows]]
straight_length_mm = 450.0
curved_length_mm = 100.0
precurvature_per_m = 10.0
bending_stiffness_n_mm2 = [1.0e6, 1.0e6]
torsional_stiffness_n_mm2 = 5.0e7
linear_density_kg_per_m = 0.05

[[bellows]]
straight_length_mm = 350.0
curved_length_mm = 100.0
precurvature_per_m = 5.0
bending_stiffness_n_mm2 = [2.0e6, 2.0e6]
torsional_stiffness_n_mm2 = 1.0e8
linear_density_kg_per_m = 0.08

[[bellows]]
straight_length_mm = 250.0
curved_length_mm = 100.0
precurvature_per_m = 3.0
bending_stiffness_n_mm2 = [4.0e6, 4.0e6]
torsional_stiffness_n_mm2 = 2.0e8
linear_density_kg_per_m = 0.1

[workspace]
relative_steps = 4096
base_steps = 1024
samples = 65536
`

// snapshot maps every file under dir to a hash of its content.
func snapshot(t *testing.T, dir string) map[string][32]byte {
	t.Helper()
	out := map[string][32]byte{}
	require.NoError(t, filepath.WalkDir(dir, func(p string, d fs.DirEntry, err error) error {
		if err != nil || d.IsDir() {
			return err
		}
		b, err := os.ReadFile(p)
		if err != nil {
			return err
		}
		out[p] = sha256.Sum256(b)
		return nil
	}))
	return out
}

func keys(m map[string][32]byte) []string {
	var k []string
	for s := range m {
		k = append(k, s)
	}
	sort.Strings(k)
	return k
}

// TestInterruptEveryVerb runs every verb with a context cancelled before it
// starts (Ctrl-C as the command begins): exit status 130, nothing on
// standard output, and no file created or changed.
func TestInterruptEveryVerb(t *testing.T) {
	if testing.Short() {
		t.Skip("runs a small search first")
	}
	dir := t.TempDir()
	problem, run1 := smallRun(t, dir, "run1", "24")
	design := filepath.Join(dir, "design.toml")
	b, err := os.ReadFile(examples + "boom-geometry.toml")
	require.NoError(t, err)
	require.NoError(t, os.WriteFile(design, b, 0o644))

	args := map[string][]string{
		"calibrate": {examples + "boom-bench.csv", "-design", design, "-o", filepath.Join(dir, "cal.toml")},
		"check":     {design},
		"compare":   {run1, run1},
		"export":    {design, "-o", filepath.Join(dir, "print")},
		"fe":        {design, "-o", filepath.Join(dir, "fe")},
		"init":      {filepath.Join(dir, "new.toml")},
		"islands":   {problem, "-islands", "2", "-cores", "1", "-limit", "1h", "-o", filepath.Join(dir, "slurm")},
		"merge":     {run1, run1, "-o", filepath.Join(dir, "merged")},
		"pick":      {run1, "-knee", "-o", filepath.Join(dir, "picked")},
		"pose":      {design, "-angles-deg", "0,180"},
		"refine":    {run1, "-design", "1", "-evals", "10"},
		"report":    {run1},
		"resume":    {run1, "-evals", "48", "-quiet"},
		"search":    {problem, "-o", filepath.Join(dir, "run2"), "-quiet"},
		"verify":    {},
		"version":   {},
	}
	for name := range commands {
		if name == "help" {
			continue // help is answered before any verb runs
		}
		a, ok := args[name]
		require.True(t, ok, "verb %s has no case in this test", name)
		t.Run(name, func(t *testing.T) {
			before := snapshot(t, dir)
			ctx, cancel := context.WithCancel(context.Background())
			cancel()
			var o, e bytes.Buffer
			code := run(ctx, append([]string{name}, a...), &o, &e)
			assert.Equal(t, exitInterrupt, code, "exit status (stderr %q)", e.String())
			assert.Empty(t, o.String(), "nothing on standard output")
			assert.Equal(t, "plica: "+name+" interrupted before it started, nothing written\n", e.String())
			after := snapshot(t, dir)
			assert.Equal(t, keys(before), keys(after), "no file created or removed")
			assert.Equal(t, before, after, "no file changed")
		})
	}
}

// TestInterruptLongCheck cancels a check in the middle of its workspace
// sampling (the context is cancelled 100 ms after the start; the check
// takes seconds): exit status 130, nothing on standard output, one line on
// standard error. The wait is bounded only to fail a hang.
func TestInterruptLongCheck(t *testing.T) {
	dir := t.TempDir()
	design := filepath.Join(dir, "long.toml")
	require.NoError(t, os.WriteFile(design, []byte(longCheckDesign), 0o644))
	for _, extra := range [][]string{nil, {"-json"}} {
		ctx, cancel := context.WithCancel(context.Background())
		time.AfterFunc(100*time.Millisecond, cancel)
		var o, e bytes.Buffer
		done := make(chan int, 1)
		go func() { done <- run(ctx, append([]string{"check", design}, extra...), &o, &e) }()
		select {
		case code := <-done:
			assert.Equal(t, exitInterrupt, code, "stderr %q", e.String())
		case <-time.After(2 * time.Minute):
			t.Fatal("check did not stop after its context was cancelled")
		}
		cancel()
		assert.Empty(t, o.String(), "nothing half-written on standard output")
		assert.Equal(t, "plica: check interrupted, nothing printed: context canceled\n", e.String())
	}
}

// TestInterruptLongSearch cancels a search in its first generations: exit
// status 130, one line on standard error saying how to resume (no second
// line with the bare cancellation), a checkpoint to resume from, and every
// row of evaluations.csv whole (as wide as its header).
func TestInterruptLongSearch(t *testing.T) {
	if testing.Short() {
		t.Skip("runs a search")
	}
	dir := t.TempDir()
	problem := smallProblemFile(t, dir)
	out := filepath.Join(dir, "run")
	ctx, cancel := context.WithCancel(context.Background())
	time.AfterFunc(300*time.Millisecond, cancel)
	var o, e bytes.Buffer
	code := run(ctx, []string{"search", problem, "-o", out, "-quiet", "-evals", "100000"}, &o, &e)
	cancel()
	assert.Equal(t, exitInterrupt, code, "stderr %q", e.String())
	assert.Equal(t, "plica: interrupted; checkpoint saved: continue with plica resume "+out+"\n", e.String())
	b, err := os.ReadFile(filepath.Join(out, "evaluations.csv"))
	require.NoError(t, err)
	lines := strings.Split(strings.TrimSuffix(string(b), "\n"), "\n")
	width := strings.Count(lines[0], ",")
	for i, l := range lines[1:] {
		assert.Equal(t, width, strings.Count(l, ","), "row %d whole", i+1)
	}
}

// cpuTicks is the user plus system CPU time of a process, in clock ticks,
// from /proc/PID/stat (fields 14 and 15, after the command name).
func cpuTicks(pid int) (int, bool) {
	b, err := os.ReadFile("/proc/" + strconv.Itoa(pid) + "/stat")
	if err != nil {
		return 0, false
	}
	s := string(b)
	f := strings.Fields(s[strings.LastIndexByte(s, ')')+1:])
	if len(f) < 13 {
		return 0, false
	}
	u, err1 := strconv.Atoi(f[11])
	k, err2 := strconv.Atoi(f[12])
	return u + k, err1 == nil && err2 == nil
}

// TestSIGTERMStopsCheck sends SIGTERM to a built plica running a long
// check, once the process has used 0.2 s of CPU (so it is past start-up
// and inside the evaluation, whatever the load on the machine): it exits
// with status 130 and prints nothing on standard output. The wait is
// bounded generously, only to fail a hang.
func TestSIGTERMStopsCheck(t *testing.T) {
	if testing.Short() {
		t.Skip("builds and runs the command")
	}
	if _, ok := cpuTicks(os.Getpid()); !ok {
		t.Skip("needs /proc/PID/stat to know the process is running")
	}
	bin := buildPlica(t)
	design := filepath.Join(t.TempDir(), "long.toml")
	require.NoError(t, os.WriteFile(design, []byte(longCheckDesign), 0o644))
	cmd := exec.Command(bin, "check", design)
	var o, e bytes.Buffer
	cmd.Stdout, cmd.Stderr = &o, &e
	require.NoError(t, cmd.Start())
	done := make(chan error, 1)
	go func() { done <- cmd.Wait() }()
	deadline := time.After(2 * time.Minute)
	for {
		if n, ok := cpuTicks(cmd.Process.Pid); ok && n >= 20 {
			break
		}
		select {
		case err := <-done:
			t.Fatalf("check ended before it was signalled: %v (stderr %q)", err, e.String())
		case <-deadline:
			_ = cmd.Process.Kill()
			t.Fatal("check never started working")
		case <-time.After(10 * time.Millisecond):
		}
	}
	require.NoError(t, cmd.Process.Signal(syscall.SIGTERM))
	select {
	case <-done:
	case <-deadline:
		_ = cmd.Process.Kill()
		t.Fatal("check did not stop after SIGTERM")
	}
	assert.Equal(t, exitInterrupt, cmd.ProcessState.ExitCode(), "stderr %q", e.String())
	assert.Empty(t, o.String(), "nothing on standard output")
	assert.Equal(t, "plica: check interrupted, nothing printed: context canceled\n", e.String(), "one line, no progress when not a terminal")
}
