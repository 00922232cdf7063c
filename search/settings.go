package search

import (
	"runtime"
	"time"
)

// Settings controls a run. The zero value works; each field documents what zero means. A nil
// *Settings passed to Run is the zero value.
type Settings struct {
	// Seed seeds every random choice of the run (PCG from math/rand/v2). The same seed gives the
	// same result whatever the worker count. The default is 0.
	Seed uint64

	// Population is the population size N of NSGA2 and GA (at least 2). Zero means 100 (Deb et
	// al. 2002).
	Population int

	// MaxEvaluations bounds the number of evaluations, the initial population included: the run
	// stops before a generation that would exceed it, so that it always ends on a whole
	// generation and a resumed run with a larger budget matches a single longer run. The initial
	// population is always evaluated whole. Zero means 25 000 (N = 100 for 250 generations, Deb et
	// al. 2002) when Runtime is zero, and no limit when Runtime is set. A negative value means no
	// limit.
	MaxEvaluations int64

	// Runtime is the wall-clock budget, checked between generations (NelderMead: between
	// iterations); a resumed run counts the time of the runs before it. Zero means no limit.
	Runtime time.Duration

	// Workers is the number of concurrent evaluations. Zero means runtime.NumCPU().
	Workers int

	// EvaluationTimeout, if positive, is the deadline of the context passed to each Evaluate call.
	// Evaluate must honour it; the error it then returns makes the design fail. Zero means none.
	EvaluationTimeout time.Duration

	// Stall stops the run when the archive hypervolume stagnates. The zero value disables it.
	Stall Stall

	// Reference is the hypervolume reference point (length NumObjectives) for Result.History,
	// Progress and Stall. Nil means automatic: fixed when the archive first holds a design, at
	// max_i + 0.1 (max_i − min_i) of the archive objectives (max_i + 0.1 |max_i|, or max_i + 1,
	// for a zero range); Result.Reference reports it.
	Reference []float64

	// ArchiveSize bounds the external archive (Result.Front). Zero means 2·Population; a negative
	// value means unbounded.
	ArchiveSize int

	// Variation sets the crossover and mutation parameters of NSGA2 and GA.
	Variation Variation

	// InitialDesigns are put into the initial population first (warm start); the rest is a Latin
	// hypercube sample of the box. Each must lie inside the bounds; at most Population of them.
	// They are evaluated like any other design.
	InitialDesigns [][]float64

	// CheckpointEvery is the number of generations between calls of Checkpoint. Zero means that
	// Checkpoint is only called when the run stops.
	CheckpointEvery int

	// Checkpoint, if not nil, receives a deep copy of the run state every CheckpointEvery
	// generations and once more when the run stops for any reason (unless the last call was for
	// the same generation). An error ends the run with status Failure and is returned by Run.
	// It is called on the coordinating goroutine. Not used by NelderMead.
	Checkpoint func(*Checkpoint) error

	// ConfigHash identifies the caller's configuration: the problem and every setting that
	// changes the search (Population, Variation, ArchiveSize, Reference, the method's fields).
	// It is stored in checkpoints, and Resume refuses a checkpoint whose hash differs. The
	// default is "".
	ConfigHash string

	// Resume, if not nil, continues the run saved in the checkpoint: same method, population
	// size, problem shape, Seed and ConfigHash. The limits of this Settings apply to the
	// continued run, so a finished run can be extended. InitialDesigns are ignored.
	Resume *Checkpoint

	// Progress, if not nil, is called on the coordinating goroutine after the initial
	// population and after every generation.
	Progress func(Progress)

	// Evaluated, if not nil, is called on the coordinating goroutine for every evaluated design,
	// in evaluation-index order, once its generation is complete (designs of a generation cut
	// short by cancellation are not reported). The design must not be modified or retained;
	// copy what is needed.
	Evaluated func(*Design)
}

// Stall is the hypervolume-stagnation criterion: the run stops after a generation t ≥ Generations
// when HV_t − HV_{t−Generations} ≤ Tolerance · HV_t and HV_t > 0, HV being the archive
// hypervolume at Settings.Reference.
type Stall struct {
	// Generations is the window W. Zero disables the criterion.
	Generations int
	// Tolerance is the relative improvement at or below which the run has stalled. Zero means
	// DefaultStallTolerance.
	Tolerance float64
}

// DefaultPopulation is Settings.Population when zero (Deb et al. 2002).
const DefaultPopulation = 100

// DefaultStallTolerance is Stall.Tolerance when zero.
const DefaultStallTolerance = 1e-4

// config is a Settings with defaults applied.
type config struct {
	Settings
	maxEvals int64 // < 0: no limit
}

// defaultMaxEvaluations is the evaluation budget when neither MaxEvaluations nor Runtime is set:
// N = 100 for 250 generations (Deb et al. 2002).
const defaultMaxEvaluations = 25000

func resolve(s *Settings, dim int) config {
	var c config
	if s != nil {
		c.Settings = *s
	}
	if c.Population == 0 {
		c.Population = DefaultPopulation
	}
	switch {
	case c.MaxEvaluations > 0:
		c.maxEvals = c.MaxEvaluations
	case c.MaxEvaluations == 0 && c.Runtime <= 0:
		c.maxEvals = defaultMaxEvaluations
	default:
		c.maxEvals = -1
	}
	if c.Workers <= 0 {
		c.Workers = runtime.NumCPU()
	}
	if c.Stall.Generations > 0 && c.Stall.Tolerance == 0 {
		c.Stall.Tolerance = DefaultStallTolerance
	}
	if c.ArchiveSize == 0 {
		c.ArchiveSize = 2 * c.Population
	}
	c.Variation = c.Variation.resolve(dim)
	return c
}
