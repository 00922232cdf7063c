package results

import (
	"fmt"
	"io"
	"os"
	"time"

	"golang.org/x/term"

	"plica/search"
)

// PlainProgressEvery is the least time between two plain progress lines
// (standard error not a terminal: a scheduler's log file, a pipe).
var PlainProgressEvery = 30 * time.Second

// isTerminal reports whether w is a terminal. Only a terminal gets the
// redrawn bar; files and pipes get plain lines.
func isTerminal(w io.Writer) bool {
	f, ok := w.(*os.File)
	return ok && term.IsTerminal(int(f.Fd()))
}

// plainLog writes one line of progress every PlainProgressEvery (and
// one at the end): no carriage returns, no escape codes, so a log file
// kept by a batch scheduler stays readable line by line.
type plainLog struct {
	w       io.Writer
	max     int64
	runtime time.Duration
	every   time.Duration
	now     func() time.Time

	start    time.Time // when this session began
	first    int64     // evaluations done before it (a resumed run's checkpoint)
	lastLine time.Time
	last     search.Progress
	seen     bool
}

func newPlainLog(w io.Writer, set search.Settings, now func() time.Time) *plainLog {
	return &plainLog{w: w, max: set.MaxEvaluations, runtime: set.Runtime, every: PlainProgressEvery, now: now,
		start: now(), first: evaluationsBefore(set)}
}

// evaluationsBefore is the number of evaluations done before this session:
// those of the checkpoint a resumed run starts from, else none. The rate
// shown is this session's: evaluations since it began over the time since.
func evaluationsBefore(set search.Settings) int64 {
	if set.Resume != nil {
		return set.Resume.Evaluations
	}
	return 0
}

// sessionRate is the evaluations per second of a session that began at
// start with first evaluations done (0 at its very first instant).
func sessionRate(evaluations, first int64, start, t time.Time) float64 {
	if dt := t.Sub(start).Seconds(); dt > 0 {
		return float64(evaluations-first) / dt
	}
	return 0
}

func (l *plainLog) update(p search.Progress) {
	t := l.now()
	l.last, l.seen = p, true
	if !l.lastLine.IsZero() && t.Sub(l.lastLine) < l.every {
		return
	}
	l.line("progress", p, t)
	l.lastLine = t
}

func (l *plainLog) finish() {
	if !l.seen {
		return
	}
	l.line("done", l.last, l.now())
}

// line formats evaluations, rate, feasible count, front size,
// hypervolume and the estimated time left.
func (l *plainLog) line(what string, p search.Progress, t time.Time) {
	rate := sessionRate(p.Evaluations, l.first, l.start, t)
	evals := fmt.Sprintf("%d evaluations", p.Evaluations)
	if l.max > 0 {
		evals = fmt.Sprintf("%d/%d evaluations", p.Evaluations, l.max)
	}
	eta := "unknown"
	if what == "done" {
		eta = "0s"
	} else if left, ok := l.eta(p, rate); ok {
		eta = left.Round(time.Second).String()
	}
	fmt.Fprintf(l.w, "%s %s: generation %d, %s, %.1f evals/s, feasible %d, front %d, hypervolume %.6g, ETA %s\n",
		t.UTC().Format(time.RFC3339), what, p.Generation, evals, rate, p.Feasible, p.ArchiveSize, finiteOr0(p.Hypervolume), eta)
}

// eta is the sooner of the evaluation budget at the current rate and the
// wall-clock budget.
func (l *plainLog) eta(p search.Progress, rate float64) (time.Duration, bool) {
	var left time.Duration
	ok := false
	if l.max > 0 && rate > 0 {
		left = time.Duration(float64(max(l.max-p.Evaluations, 0)) / rate * float64(time.Second))
		ok = true
	}
	if l.runtime > 0 {
		r := max(l.runtime-p.Elapsed, 0)
		if !ok || r < left {
			left, ok = r, true
		}
	}
	return left, ok
}
