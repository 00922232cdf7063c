package results

import (
	"fmt"
	"io"
	"math"

	"plica/problems"
	"plica/search"
)

// Warning is a finding about a whole run that a designer should act on
// (run.json "warnings"): Kind names it for programs, Message says it.
type Warning struct {
	// Kind is one of the Warn* kinds.
	Kind    string `json:"kind"`
	Message string `json:"message"`
}

// Kinds of run warnings.
const (
	// WarnAtBound: most front designs hold a variable at one bound of
	// its range, so the best designs may lie beyond it.
	WarnAtBound = "variable_at_bound"
	// WarnImproving: the front's hypervolume still grew over the last
	// fifth of the evaluations by more than the stall tolerance.
	WarnImproving = "front_still_improving"
	// WarnBellowsOrder: a nesting clearance failed by more than the wall
	// in most evaluations, as when the bellows are listed outermost
	// first.
	WarnBellowsOrder = "bellows_order"
)

// boundTolerance is the share of a variable's range within which a value
// counts as at its bound (1 %, common practice for such flags).
const boundTolerance = 0.01

// frontWarnings gives the warnings about a search's front: the variables
// that most front designs hold at one bound (search.AtBound: at least three
// quarters of the designs within 1 % of the range of the same bound), and
// a front still improving at the end (stillImproving).
func frontWarnings(spec *problems.Spec, front []search.Design, history []search.Stats, stallTol float64) []Warning {
	out := []Warning{}
	if len(front) > 0 {
		p := spec.SearchProblem()
		cols := NewColumns(spec)
		for i, b := range search.AtBound(&p, front, boundTolerance) {
			if b == 0 || i >= len(cols.Variables) {
				continue
			}
			side, val := "lower", p.Lower[i]
			if b > 0 {
				side, val = "upper", p.Upper[i]
			}
			out = append(out, Warning{Kind: WarnAtBound, Message: fmt.Sprintf("%s: most front designs (at least three quarters of %d) sit at its %s bound %s; the best designs may lie beyond it: widen that range if the design allows",
				cols.Variables[i], len(front), side, formatFloat(val))})
		}
	}
	if m, ok := stillImproving(history, stallTol); ok {
		out = append(out, Warning{Kind: WarnImproving, Message: m})
	}
	return out
}

// stillImproving says whether the archive hypervolume grew over the last
// fifth of the evaluations by more than tol relative to its final value
// (the relative test of search.Stall, over that window): the run was
// stopped while its front still improved and a longer run is likely to
// find better designs. The history's hypervolumes share one reference
// point, so they compare.
func stillImproving(history []search.Stats, tol float64) (string, bool) {
	if len(history) < 2 {
		return "", false
	}
	last := history[len(history)-1]
	if !(last.Hypervolume > 0) || last.Evaluations <= 0 {
		return "", false
	}
	cut := last.Evaluations - last.Evaluations/5
	then := history[0]
	for _, s := range history {
		if s.Evaluations > cut {
			break
		}
		then = s
	}
	if then.Evaluations >= last.Evaluations {
		return "", false
	}
	gain := (last.Hypervolume - then.Hypervolume) / last.Hypervolume
	if !(gain > tol) || math.IsInf(gain, 0) {
		return "", false
	}
	return fmt.Sprintf("the front was still improving when the run stopped: its hypervolume grew by %.3g %% over the last %d of %d evaluations (stall tolerance %.3g %%); resume with a larger budget (plica resume -evals) for a better front",
		100*gain, last.Evaluations-then.Evaluations, last.Evaluations, 100*tol), true
}

// WriteWarnings prints a run's warnings for a terminal, one a line.
func WriteWarnings(w io.Writer, ws []Warning) {
	for _, x := range ws {
		fmt.Fprintf(w, "warning: %s\n", x.Message)
	}
}
