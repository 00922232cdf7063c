package main

import (
	"bytes"
	"context"
	"encoding/csv"
	"os"
	"path/filepath"
	"strconv"
	"sync"
	"sync/atomic"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"plica/results"
)

// countingCtx is a context that counts how often the work looks at it
// (Err) and cancels itself at look number at (never when at is 0): an
// interrupt placed by the amount of work done, not by a clock.
type countingCtx struct {
	context.Context
	at    int64
	looks atomic.Int64
	once  sync.Once
	done  chan struct{}
}

func newCountingCtx(at int64) *countingCtx {
	return &countingCtx{Context: context.Background(), at: at, done: make(chan struct{})}
}

func (c *countingCtx) Done() <-chan struct{} { return c.done }

func (c *countingCtx) Err() error {
	n := c.looks.Add(1)
	if c.at > 0 && n >= c.at {
		c.once.Do(func() { close(c.done) })
	}
	select {
	case <-c.done:
		return context.Canceled
	default:
		return nil
	}
}

// inflate copies the run folder src to dst with evaluations.csv grown to
// rows rows (the extra rows copies of the first, renumbered, marked as
// failed so they stay off the front) and, with frontRows > 0, front.csv
// grown to that many rows (copies of its first row, renumbered).
func inflate(t *testing.T, src, dst string, rows, frontRows int) {
	t.Helper()
	require.NoError(t, os.CopyFS(dst, os.DirFS(src)))
	grow := func(name string, n int, edit func(h []string, row []string, i int)) {
		h, recs := readTable(t, filepath.Join(dst, name))
		var b bytes.Buffer
		w := csv.NewWriter(&b)
		w.Write(h)
		for i := range n {
			row := append([]string(nil), recs[i%len(recs)]...)
			if i >= len(recs) {
				edit(h, row, i)
			}
			w.Write(row)
		}
		w.Flush()
		require.NoError(t, os.WriteFile(filepath.Join(dst, name), b.Bytes(), 0o644))
	}
	grow(results.EvaluationsFile, rows, func(h, row []string, i int) {
		row[col(t, h, "index")] = strconv.Itoa(i)
		row[col(t, h, "feasible")] = "false"
		row[col(t, h, "failure")] = "copy made by the test"
	})
	if frontRows > 0 {
		grow(results.FrontFile, frontRows, func(h, row []string, i int) { row[col(t, h, "id")] = strconv.Itoa(i + 1) })
	}
}

// midRun runs one verb with a countingCtx cancelling at look at, and checks
// what every interrupted verb promises: exit status 130, nothing on
// standard output, no file of dir created, changed or removed, and the work
// stopped at the interrupt (it looked at the context at most once more).
func midRun(t *testing.T, dir string, at int64, args ...string) {
	t.Helper()
	before := snapshot(t, dir)
	ctx := newCountingCtx(at)
	var o, e bytes.Buffer
	code := run(ctx, args, &o, &e)
	assert.Equal(t, exitInterrupt, code, "%s: exit status (stderr %q)", args[0], e.String())
	assert.Empty(t, o.String(), "%s: nothing on standard output", args[0])
	assert.Contains(t, e.String(), "context canceled", args[0])
	switch args[0] {
	case "merge":
		assert.Contains(t, e.String(), "plica: merge interrupted, nothing written (", "says what was left")
	case "report":
		assert.Contains(t, e.String(), "plica: report interrupted, nothing written (the run folder is unchanged)", "says what was left")
	}
	after := snapshot(t, dir)
	assert.Equal(t, keys(before), keys(after), "%s: no file created or removed", args[0])
	assert.Equal(t, before, after, "%s: no file changed", args[0])
	assert.LessOrEqual(t, ctx.looks.Load(), at+1, "%s: the work stopped at the interrupt", args[0])
}

// looksOf runs a verb to its end with a countingCtx that never cancels and
// returns how often it looked at the context.
func looksOf(t *testing.T, want int, args ...string) int64 {
	t.Helper()
	ctx := newCountingCtx(0)
	var o, e bytes.Buffer
	code := run(ctx, args, &o, &e)
	require.Equal(t, want, code, "%s: stderr %q", args[0], e.String())
	return ctx.looks.Load()
}

// TestInterruptMidRun interrupts merge, compare, report, pick, verify and
// calibrate in the middle of their work, placed by how often they have
// looked at the context: on a run folder of 40 960 evaluations (and for
// compare and pick a front of 16 384 rows) each looks often, stops at the
// interrupt with exit status 130, prints nothing and leaves every file as
// it was. The interrupted merge leaves no output folder.
func TestInterruptMidRun(t *testing.T) {
	dir := t.TempDir()
	_, small := smallRun(t, dir, "small", "24", "-workers", "1")
	big := filepath.Join(dir, "big")
	inflate(t, small, big, 40*1024, 0)
	wide := filepath.Join(dir, "wide")
	inflate(t, small, wide, 24, 16*1024)

	t.Run("merge", func(t *testing.T) {
		done := filepath.Join(t.TempDir(), "merged")
		n := looksOf(t, exitOK, "merge", big, "-o", done)
		require.GreaterOrEqual(t, n, int64(80), "merge looks every 1024 rows of both its passes")
		out := filepath.Join(dir, "merged")
		// in the first pass (reading), then in the second (writing the new folder)
		for _, at := range []int64{n / 4, n * 3 / 4} {
			midRun(t, dir, at, "merge", big, "-o", out)
			assert.NoDirExists(t, out, "an interrupted merge leaves no folder (interrupt at look %d of %d)", at, n)
		}
		// the merge can simply be run again
		code, _, errOut := runCLI(t, "merge", big, "-o", out)
		require.Equal(t, 0, code, errOut)
		require.NoError(t, os.RemoveAll(out))
	})
	t.Run("compare", func(t *testing.T) {
		midRun(t, dir, 20, "compare", wide, wide, "-plot", filepath.Join(dir, "overlay.svg"))
	})
	t.Run("pick", func(t *testing.T) {
		midRun(t, dir, 10, "pick", wide, "-knee", "-o", filepath.Join(dir, "picked"))
		midRun(t, dir, 10, "pick", wide, "-knee")
	})
	t.Run("report", func(t *testing.T) {
		scratch := filepath.Join(t.TempDir(), "big")
		require.NoError(t, os.CopyFS(scratch, os.DirFS(big)))
		n := looksOf(t, exitOK, "report", scratch)
		require.GreaterOrEqual(t, n, int64(80), "report looks every 1024 rows")
		for _, at := range []int64{n / 4, n - 2} {
			midRun(t, dir, at, "report", big)
		}
	})
	t.Run("verify", func(t *testing.T) {
		n := looksOf(t, exitOK, "verify", "-quick")
		require.GreaterOrEqual(t, n, int64(10), "verify looks before each case")
		midRun(t, dir, n/2, "verify", "-quick")
	})
	t.Run("calibrate", func(t *testing.T) {
		args := []string{"calibrate", examples + "boom-bench.csv", "-design", examples + "boom-geometry.toml", "-bellows", "2"}
		scratch := t.TempDir()
		n := looksOf(t, exitOK, append(args, "-o", filepath.Join(scratch, "cal.toml"), "-plot", filepath.Join(scratch, "fit.svg"))...)
		require.GreaterOrEqual(t, n, int64(4), "calibrate looks between its stages")
		for at := int64(2); at < n; at++ {
			midRun(t, dir, at, append(args, "-o", filepath.Join(dir, "cal.toml"), "-plot", filepath.Join(dir, "fit.svg"))...)
		}
	})
}

// TestReadersRespectLock: report, pick and refine on a run folder locked
// by a live process (a search rewriting it) exit 2 naming the holder and
// write nothing; pick -o elsewhere only checks the lock.
func TestReadersRespectLock(t *testing.T) {
	dir := t.TempDir()
	_, rdir := smallRun(t, dir, "run", "24", "-workers", "1")
	writeLockFile(t, rdir, os.Getpid())
	for _, args := range [][]string{
		{"report", rdir},
		{"pick", rdir, "-knee"},
		{"pick", rdir, "-knee", "-o", filepath.Join(dir, "picked")},
		{"refine", rdir, "-design", "1", "-evals", "5"},
	} {
		before := snapshot(t, dir)
		code, out, errOut := runCLI(t, args...)
		assert.Equal(t, exitUsage, code, "%v: %s", args, errOut)
		assert.Empty(t, out, "%v", args)
		assert.Contains(t, errOut, "is in use by another plica (process "+strconv.Itoa(os.Getpid())+" on host", "%v", args)
		assert.Equal(t, before, snapshot(t, dir), "%v: nothing written", args)
	}
	require.NoError(t, os.Remove(filepath.Join(rdir, results.LockFile)))
	code, _, errOut := runCLI(t, "pick", rdir, "-knee")
	require.Equal(t, 0, code, errOut)
	assert.NoFileExists(t, filepath.Join(rdir, results.LockFile), "pick releases the lock")
}
