package results

import (
	"fmt"
	"math"
	"sort"
	"strings"

	"plica/problems"
	"plica/search"
)

// FewFeasible is the front size below which a run carries a diagnosis.
const FewFeasible = 3

// Diagnosis says which constraints blocked a search that found no
// feasible design, or few (run.json "diagnosis").
type Diagnosis struct {
	Evaluations int64 `json:"evaluations"`
	Feasible    int64 `json:"feasible"`
	// Blocking lists the constraints some evaluation violated, the most
	// often violated first.
	Blocking []BlockingConstraint `json:"blocking"`
	// LeastInfeasible are the designs closest to feasible (smallest
	// overall violation), with their margins.
	LeastInfeasible []DiagnosedDesign `json:"least_infeasible"`
	// AtBound names the variables that most least-infeasible designs hold
	// at one bound ("bellows1_wall_mm at its upper bound").
	AtBound []string `json:"variables_at_bound"`
	// Sentences say in one line per blocking constraint how much it
	// blocks.
	Sentences []string `json:"sentences"`
	// Explanations say, for the blocking constraints it can, in the
	// checks' units what blocks: the best value seen against the limit,
	// and for a reach the task points or min_reach_mm need, the
	// constraint that caps it (a session's own evaluations: a resumed run
	// explains from the evaluations since it resumed).
	Explanations []string `json:"explanations,omitempty"`
}

// BlockingConstraint is one constraint's record over the evaluations.
type BlockingConstraint struct {
	Name string `json:"name"`
	// ShareViolating is the fraction of successful evaluations violating
	// it.
	ShareViolating float64 `json:"share_violating"`
	// SmallestViolation is the smallest violation seen, in the margin the
	// search uses (relative to the limit; in the check's unit for a zero
	// limit).
	SmallestViolation float64 `json:"smallest_violation"`
	// BestMargin is the best margin seen (negative: satisfied somewhere).
	BestMargin float64 `json:"best_margin"`
}

// DiagnosedDesign is a least-infeasible design.
type DiagnosedDesign struct {
	Evaluation int64              `json:"evaluation"`
	Violation  float64            `json:"violation"`
	Variables  map[string]string  `json:"variables"`
	Margins    map[string]float64 `json:"margins"`
	// DesignFile is the design's file in the run folder
	// (closest/design-N.toml), which check and pose accept.
	DesignFile string `json:"design_file,omitempty"`
}

// Diagnose builds the diagnosis from a run's diagnoser; nil when nothing
// was evaluated.
func Diagnose(spec *problems.Spec, g *search.Diagnoser) *Diagnosis {
	if g == nil || g.Evaluations == 0 {
		return nil
	}
	names := spec.ConstraintNames()
	dg := &Diagnosis{Evaluations: g.Evaluations, Feasible: g.Feasible, Blocking: []BlockingConstraint{},
		LeastInfeasible: []DiagnosedDesign{}, AtBound: []string{}, Sentences: []string{}}
	for j, s := range g.Stats {
		if s.Violating == 0 || j >= len(names) {
			continue
		}
		dg.Blocking = append(dg.Blocking, BlockingConstraint{Name: names[j], ShareViolating: float64(s.Violating) / float64(g.Evaluations),
			SmallestViolation: s.SmallestViolation, BestMargin: s.Best})
	}
	sort.SliceStable(dg.Blocking, func(a, b int) bool { return dg.Blocking[a].ShareViolating > dg.Blocking[b].ShareViolating })
	cols := NewColumns(spec)
	for _, d := range g.Least {
		dd := DiagnosedDesign{Evaluation: d.Index, Violation: d.CV, Variables: map[string]string{}, Margins: map[string]float64{}}
		for i, c := range variableCells(spec, d.X) {
			dd.Variables[cols.Variables[i]] = c
		}
		for j, v := range d.G {
			if j < len(names) {
				dd.Margins[names[j]] = v
			}
		}
		dg.LeastInfeasible = append(dg.LeastInfeasible, dd)
	}
	p := spec.SearchProblem()
	for i, b := range search.AtBound(&p, g.Least, 0.01) {
		switch b {
		case -1:
			dg.AtBound = append(dg.AtBound, cols.Variables[i]+" at its lower bound")
		case 1:
			dg.AtBound = append(dg.AtBound, cols.Variables[i]+" at its upper bound")
		}
	}
	for _, b := range dg.Blocking {
		dg.Sentences = append(dg.Sentences, blockingSentence(b, g.Feasible == 0))
	}
	return dg
}

// blockingSentence is the computed sentence for one blocking constraint.
func blockingSentence(b BlockingConstraint, none bool) string {
	s := fmt.Sprintf("%s is violated by %.0f %% of the evaluations", b.Name, 100*b.ShareViolating)
	switch {
	case b.BestMargin > 0:
		s += fmt.Sprintf("; no evaluation met it, the closest missed by %.4g", b.SmallestViolation)
	case none:
		s += fmt.Sprintf("; met alone by some (best margin %.4g) but not together with the others", b.BestMargin)
	default:
		s += fmt.Sprintf(" (smallest violation %.4g)", b.SmallestViolation)
	}
	return s
}

// WriteDiagnosis prints a diagnosis for a terminal.
func WriteDiagnosis(w interface{ Write([]byte) (int, error) }, d *Diagnosis) {
	if d == nil {
		return
	}
	fmt.Fprintf(w, "diagnosis: %d feasible of %d evaluations\n", d.Feasible, d.Evaluations)
	for _, s := range d.Sentences {
		fmt.Fprintf(w, "  %s\n", s)
	}
	for _, s := range d.Explanations {
		fmt.Fprintf(w, "  %s\n", s)
	}
	if len(d.AtBound) > 0 {
		fmt.Fprintf(w, "  least-infeasible designs hold %s\n", strings.Join(d.AtBound, ", "))
	}
	if len(d.LeastInfeasible) > 0 {
		l := d.LeastInfeasible[0]
		fmt.Fprintf(w, "  least infeasible: evaluation %d, overall violation %.4g", l.Evaluation, finite(l.Violation))
		if l.DesignFile != "" {
			fmt.Fprintf(w, " (design files %s/design-1.toml to design-%d.toml)", ClosestDir, len(d.LeastInfeasible))
		}
		fmt.Fprintln(w)
	}
}

func finite(x float64) float64 {
	if math.IsInf(x, 0) || math.IsNaN(x) {
		return 0
	}
	return x
}
