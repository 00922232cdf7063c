package search

import (
	"errors"
	"time"
)

// Status says why a run stopped. Running out of budget is a status, not an error.
type Status int

const (
	// NotTerminated: the run has not stopped.
	NotTerminated Status = iota
	// EvaluationLimit: Settings.MaxEvaluations was reached.
	EvaluationLimit
	// RuntimeLimit: Settings.Runtime was reached.
	RuntimeLimit
	// Stalled: the archive hypervolume stagnated (Settings.Stall).
	Stalled
	// Interrupted: the context was cancelled. A generation cut short is discarded, so the
	// result and the final checkpoint hold the last complete generation.
	Interrupted
	// Converged: NelderMead met its convergence test.
	Converged
	// Failure: the run ended on an error, which Run returns.
	Failure
)

var statusNames = [...]string{
	NotTerminated:   "NotTerminated",
	EvaluationLimit: "EvaluationLimit",
	RuntimeLimit:    "RuntimeLimit",
	Stalled:         "Stalled",
	Interrupted:     "Interrupted",
	Converged:       "Converged",
	Failure:         "Failure",
}

func (s Status) String() string {
	if s >= 0 && int(s) < len(statusNames) {
		return statusNames[s]
	}
	return "Status(?)"
}

// Stats are the counters of a run after one generation.
type Stats struct {
	// Generation counts generations after the initial population (generation 0); for
	// NelderMead, major iterations.
	Generation int
	// Evaluations counts evaluations, the initial population included.
	Evaluations int64
	// Failures counts failed evaluations (Design.Failed not empty).
	Failures int64
	// Feasible is the number of feasible designs in the population.
	Feasible int
	// ArchiveSize is the number of designs in the archive (the front).
	ArchiveSize int
	// Hypervolume is the archive hypervolume at the run's reference point (0 while the archive is
	// empty).
	Hypervolume float64
}

// Progress is passed to Settings.Progress after every generation.
type Progress struct {
	Stats
	// Elapsed is the wall-clock time of the run, earlier runs of a resumed run included.
	Elapsed time.Duration
}

// Result is the outcome of Run.
type Result struct {
	// Status says why the run stopped.
	Status Status
	// Method names the method ("NSGA2", "GA", "NelderMead").
	Method string
	// Seed is the seed of the run.
	Seed uint64
	// Stats are the final counters.
	Stats
	// Runtime is the wall-clock time, earlier runs of a resumed run included.
	Runtime time.Duration
	// Population is the final population in crowded-comparison order (NSGA2), or sorted best
	// first (GA; NelderMead holds the single best design).
	Population []Design
	// Front is the archive: feasible, mutually non-dominated designs, sorted by objectives
	// (lexicographic), with Rank 0 and Crowding computed over the front.
	Front []Design
	// Reference is the hypervolume reference point of History (nil while none was set).
	Reference []float64
	// History holds the Stats after the initial population and after each generation.
	History []Stats
}

// errInterrupted marks a generation abandoned because the context was cancelled.
var errInterrupted = errors.New("search: interrupted")
