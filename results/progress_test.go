package results

import (
	"bytes"
	"strings"
	"testing"
	"time"

	"plica/search"
)

// A non-terminal writer gets one plain line per interval and a last line
// at the end: no carriage returns, every field a scheduler log needs.
func TestPlainProgressLines(t *testing.T) {
	var buf bytes.Buffer
	clock := time.Date(2026, 1, 1, 0, 0, 0, 0, time.UTC)
	now := func() time.Time { return clock }
	l := newPlainLog(&buf, search.Settings{MaxEvaluations: 1000}, now)
	l.every = 10 * time.Second
	for g := 0; g <= 20; g++ {
		clock = clock.Add(2 * time.Second) // 20 evaluations per second
		l.update(search.Progress{Stats: search.Stats{Generation: g, Evaluations: int64(40 * (g + 1)), Feasible: 30, ArchiveSize: 7, Hypervolume: 0.25}})
	}
	l.finish()
	out := buf.String()
	if strings.ContainsRune(out, '\r') || strings.ContainsRune(out, '\x1b') {
		t.Fatalf("plain progress holds a carriage return or escape: %q", out)
	}
	lines := strings.Split(strings.TrimSuffix(out, "\n"), "\n")
	// 21 updates 2 s apart from 2 s on: lines at 2, 12, 22, 32, 42 s, then "done".
	if len(lines) != 6 {
		t.Fatalf("got %d lines, want 6:\n%s", len(lines), out)
	}
	for i, want := range map[int]string{
		0: "2026-01-01T00:00:02Z progress: generation 0, 40/1000 evaluations, 20.0 evals/s, feasible 30, front 7, hypervolume 0.25, ETA 48s",
		1: "2026-01-01T00:00:12Z progress: generation 5, 240/1000 evaluations, 20.0 evals/s, feasible 30, front 7, hypervolume 0.25, ETA 38s",
	} {
		if lines[i] != want {
			t.Fatalf("line %d:\n got %s\nwant %s", i+1, lines[i], want)
		}
	}
	if !strings.Contains(lines[5], " done: generation 20, 840/1000 evaluations") || !strings.HasSuffix(lines[5], "ETA 0s") {
		t.Fatalf("last line: %s", lines[5])
	}
}

// A resumed run's first line gives this session's rate: the evaluations
// since the checkpoint (400 done before) over the time since the session
// began, 60 in 3 s = 20 per second, and the ETA from it, (1000 − 460)/20 =
// 27 s (hand calculation). Measured from the checkpoint's count the rate
// would be 153 per second; from the first update's, 0.
func TestPlainProgressResumedRate(t *testing.T) {
	var buf bytes.Buffer
	clock := time.Date(2026, 1, 1, 0, 0, 0, 0, time.UTC)
	cp := &search.Checkpoint{Stats: search.Stats{Generation: 9, Evaluations: 400}}
	l := newPlainLog(&buf, search.Settings{MaxEvaluations: 1000, Resume: cp}, func() time.Time { return clock })
	clock = clock.Add(3 * time.Second)
	l.update(search.Progress{Stats: search.Stats{Generation: 10, Evaluations: 460}})
	want := "2026-01-01T00:00:03Z progress: generation 10, 460/1000 evaluations, 20.0 evals/s, feasible 0, front 0, hypervolume 0, ETA 27s\n"
	if buf.String() != want {
		t.Fatalf("first line of a resumed run:\n got %s\nwant %s", buf.String(), want)
	}
}

// With a wall-clock budget the ETA is the sooner of the two budgets.
func TestPlainProgressETATime(t *testing.T) {
	var buf bytes.Buffer
	clock := time.Date(2026, 1, 1, 0, 0, 0, 0, time.UTC)
	l := newPlainLog(&buf, search.Settings{MaxEvaluations: 1e6, Runtime: time.Minute}, func() time.Time { return clock })
	l.update(search.Progress{Stats: search.Stats{Evaluations: 10}})
	clock = clock.Add(5 * time.Second)
	l.every = 0
	l.update(search.Progress{Stats: search.Stats{Evaluations: 60}, Elapsed: 5 * time.Second})
	if !strings.HasSuffix(strings.TrimSpace(buf.String()), "ETA 55s") {
		t.Fatalf("want ETA 55s: %s", buf.String())
	}
}

// A bytes.Buffer (a pipe or file, not a terminal) never gets the bar.
func TestProgressNotTerminal(t *testing.T) {
	var buf bytes.Buffer
	b := newBar(&buf, search.Settings{MaxEvaluations: 10})
	if b.plain == nil || b.pb != nil {
		t.Fatal("a non-terminal writer got the redrawn bar")
	}
}
