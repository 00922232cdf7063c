package results

import (
	"fmt"
	"io"
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
	// SinceEvaluation is 0 when the diagnosis covers every evaluation of
	// the run; after a resume from a checkpoint that kept no diagnosis
	// counters (written by an older plica), the evaluation after which it
	// starts.
	SinceEvaluation int64 `json:"since_evaluation,omitempty"`
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
	fmt.Fprintf(w, "diagnosis: %d feasible of %d evaluations", d.Feasible, d.Evaluations)
	if d.SinceEvaluation > 0 {
		fmt.Fprintf(w, " (only those after evaluation %d: the run was resumed from a checkpoint without diagnosis counters)", d.SinceEvaluation)
	}
	fmt.Fprintln(w)
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

// activeTolerance is the margin, as a share of the limit, within which a
// constraint counts as active at a front design (a designer's choice: a
// limit met with less than 5 % to spare is what stops that design going
// further).
const activeTolerance = 0.05

// FrontLimit says what limits the front design that is best in one
// objective (run.json "front_limits"): the constraints it meets with
// little to spare and the variables it holds at a bound of their range.
type FrontLimit struct {
	// Objective is the objective's column (e.g. "reach_mm"), Goal
	// "maximize" or "minimize".
	Objective string `json:"objective"`
	Goal      string `json:"goal"`
	// Design is the front design best in it (front-NNN, as in designs/)
	// and Value its value of the objective.
	Design string  `json:"design"`
	Value  float64 `json:"value"`
	// Active lists the constraints met within activeTolerance of their
	// limit, the tightest first.
	Active []ActiveConstraint `json:"active_constraints"`
	// Nearest is the constraint with the smallest margin when none is
	// active (nil when the design has no constraint with a margin).
	Nearest *ActiveConstraint `json:"nearest_constraint,omitempty"`
	// AtBound names the variables it holds within 1 % of the range of a
	// bound ("bellows2_wall_mm at its lower bound 0.8").
	AtBound []string `json:"variables_at_bound"`
	// Sentence says the above in one line.
	Sentence string `json:"sentence"`
}

// ActiveConstraint is one constraint of a front design and its margin.
type ActiveConstraint struct {
	Name string `json:"name"`
	// Margin is the slack, as a share of the limit (0.02: met with 2 %
	// to spare); in the check's unit for a zero limit.
	Margin float64 `json:"margin"`
	// Relative is false for a zero limit, whose margin is in the unit.
	Relative bool `json:"relative"`
	// Value and Limit are the check's, in Unit (absent for a
	// [[constraint]] slot, whose value is the score's).
	Value float64 `json:"value,omitempty"`
	Limit float64 `json:"limit,omitempty"`
	Unit  string  `json:"unit,omitempty"`
	Max   bool    `json:"max"`
	// fromCheck says Value, Limit and Unit are a check's.
	fromCheck bool
}

// FrontLimits says, for each objective, what limits the front design best
// in it: the constraints within activeTolerance of their limit and the
// variables within boundTolerance of a bound. rows are the front as
// written (front-NNN numbering). A constraint with a zero limit whose
// margin is exactly zero is left out: such values are clipped at zero
// (validated_range, task_miss), so meeting them exactly is their normal
// state, not a sign that they bind.
func FrontLimits(spec *problems.Spec, rows []FrontRow) []FrontLimit {
	out := []FrontLimit{}
	if len(rows) == 0 {
		return out
	}
	names := spec.ConstraintNames()
	cols := NewColumns(spec)
	p := spec.SearchProblem()
	for i, o := range spec.Objectives {
		best := -1
		for r := range rows {
			f := rows[r].Design.F
			if i < len(f) && (best < 0 || f[i] < rows[best].Design.F[i]) {
				best = r
			}
		}
		if best < 0 {
			continue
		}
		row := rows[best]
		goal := "minimize"
		if o.Maximize {
			goal = "maximize"
		}
		fl := FrontLimit{Objective: cols.Objectives[i], Goal: goal, Design: frontDesignName(row.ID),
			Value: o.Natural(row.Design.F[i]), Active: []ActiveConstraint{}, AtBound: []string{}}
		var cands []ActiveConstraint
		for j, g := range row.Design.G {
			if j >= len(names) || math.IsNaN(g) || math.IsInf(g, 0) || g > 0 {
				continue
			}
			a := ActiveConstraint{Name: names[j], Margin: -g, Relative: true}
			if j < len(spec.Checks) && row.Result != nil && j < len(row.Result.Checks) {
				c := row.Result.Checks[j]
				a.Value, a.Limit, a.Unit, a.Max, a.fromCheck = c.Value, c.Limit, c.Unit, c.Max, true
				a.Relative = c.Limit != 0
			} else if k := j - len(spec.Checks); k >= 0 {
				a.Relative = constraintLimit(spec, k) != 0
			} else {
				a.Relative = g != 0 // a check whose re-evaluation failed: its limit is unknown
			}
			if !a.Relative && g == 0 {
				continue
			}
			cands = append(cands, a)
		}
		sort.SliceStable(cands, func(a, b int) bool { return cands[a].Margin < cands[b].Margin })
		for _, a := range cands {
			if a.Margin <= activeTolerance {
				fl.Active = append(fl.Active, a)
			}
		}
		if len(fl.Active) == 0 && len(cands) > 0 {
			n := cands[0]
			fl.Nearest = &n
		}
		for v := 0; v < p.Dim && v < len(row.Design.X); v++ {
			if p.Categorical != nil && p.Categorical[v] > 0 {
				continue
			}
			span := p.Upper[v] - p.Lower[v]
			if !(span > 0) || math.IsInf(span, 0) {
				continue
			}
			x := row.Design.X[v]
			switch {
			case x-p.Lower[v] <= boundTolerance*span:
				fl.AtBound = append(fl.AtBound, fmt.Sprintf("%s at its lower bound %s", cols.Variables[v], formatFloat(p.Lower[v])))
			case p.Upper[v]-x <= boundTolerance*span:
				fl.AtBound = append(fl.AtBound, fmt.Sprintf("%s at its upper bound %s", cols.Variables[v], formatFloat(p.Upper[v])))
			}
		}
		fl.Sentence = limitSentence(fl)
		out = append(out, fl)
	}
	return out
}

// constraintLimit is the limit of the k-th [[constraint]] slot.
func constraintLimit(spec *problems.Spec, k int) float64 {
	for _, c := range spec.Constraints {
		for _, lim := range []float64{c.Min, c.Max} {
			if math.IsNaN(lim) {
				continue
			}
			if k == 0 {
				return lim
			}
			k--
		}
	}
	return math.NaN()
}

// frontDesignName is the name of front design id (front-001).
func frontDesignName(id int) string { return fmt.Sprintf("front-%03d", id) }

// describe says one constraint's margin: "peak_strain[1] (0.0488 against
// at most 0.05, margin 2.4 %)".
func (a ActiveConstraint) describe() string {
	m := fmt.Sprintf("margin %.2g %%", 100*a.Margin)
	if !a.Relative {
		m = "margin " + withUnit(a.Margin, a.Unit)
	}
	if a.fromCheck {
		op := "at most"
		if !a.Max {
			op = "at least"
		}
		return fmt.Sprintf("%s (%s against %s %s, %s)", a.Name, withUnit(a.Value, a.Unit), op, withUnit(a.Limit, a.Unit), m)
	}
	return fmt.Sprintf("%s (%s)", a.Name, m)
}

// limitSentence is a front limit's one computed sentence.
func limitSentence(fl FrontLimit) string {
	verb := "lowest"
	if fl.Goal == "maximize" {
		verb = "highest"
	}
	s := fmt.Sprintf("%s, %s in %s (%.4g),", fl.Objective, verb, fl.Design, fl.Value)
	var parts []string
	for _, a := range fl.Active {
		parts = append(parts, a.describe())
	}
	switch {
	case len(parts) > 0:
		s += " limited by " + strings.Join(parts, ", ")
		if len(fl.AtBound) > 0 {
			s += " and " + strings.Join(fl.AtBound, ", ")
		}
	case len(fl.AtBound) > 0:
		s += " limited by " + strings.Join(fl.AtBound, ", ")
		if fl.Nearest != nil {
			s += fmt.Sprintf("; no constraint within %.0f %% of its limit (nearest %s)", 100*activeTolerance, fl.Nearest.describe())
		}
	default:
		s += fmt.Sprintf(" has no constraint within %.0f %% of its limit and no variable at a bound, so the trade-off with the other objectives (or a search not yet converged) limits it", 100*activeTolerance)
		if fl.Nearest != nil {
			s += fmt.Sprintf("; nearest %s", fl.Nearest.describe())
		}
	}
	return s
}

// WriteFrontLimits prints the front limits for a terminal, one a line.
func WriteFrontLimits(w io.Writer, ls []FrontLimit) {
	for _, l := range ls {
		fmt.Fprintf(w, "limits: %s\n", l.Sentence)
	}
}
