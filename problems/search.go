package problems

import (
	"context"
	"fmt"
	"math"

	"plica/objective"
	"plica/search"
)

// NumConstraints is the number of constraint slots: one per requirement
// check, then one per limit of every [[constraint]].
func (s *Spec) NumConstraints() int {
	n := len(s.Checks)
	for _, c := range s.Constraints {
		if !math.IsNaN(c.Min) {
			n++
		}
		if !math.IsNaN(c.Max) {
			n++
		}
	}
	return n
}

// ConstraintNames names the constraint slots, e.g. "tip_sag" or
// "reach_mm>=8".
func (s *Spec) ConstraintNames() []string {
	names := append([]string(nil), s.Checks...)
	for _, c := range s.Constraints {
		if !math.IsNaN(c.Min) {
			names = append(names, fmt.Sprintf("%s>=%s", c.Score, fmtNum(c.Min)))
		}
		if !math.IsNaN(c.Max) {
			names = append(names, fmt.Sprintf("%s<=%s", c.Score, fmtNum(c.Max)))
		}
	}
	return names
}

// SearchProblem turns the problem into a search problem over the file's
// variables (file units; categories as indices). Objectives to maximise
// are negated. Constraint values are margins relative to the limit, g ≤ 0
// feasible: (value − limit)/|limit| for an upper limit and
// (limit − value)/|limit| for a lower one (not divided for a zero limit).
func (s *Spec) SearchProblem() search.Problem { return s.ObservedSearchProblem(nil) }

// ObservedSearchProblem is SearchProblem whose evaluator also hands every
// successful evaluation (its index, result and constraint values) to
// observe, when not nil. observe is called from the search's workers, so
// concurrently; it must not keep g.
func (s *Spec) ObservedSearchProblem(observe func(index int64, res *objective.Result, g []float64)) search.Problem {
	p := search.Problem{
		Dim:            len(s.Variables),
		Lower:          make([]float64, len(s.Variables)),
		Upper:          make([]float64, len(s.Variables)),
		Categorical:    make([]int, len(s.Variables)),
		NumObjectives:  len(s.Objectives),
		NumConstraints: s.NumConstraints(),
	}
	for j, v := range s.Variables {
		if v.Options != nil {
			p.Categorical[j] = len(v.Options)
			p.Upper[j] = float64(len(v.Options) - 1)
			continue
		}
		p.Lower[j], p.Upper[j] = v.Lower, v.Upper
	}
	p.Evaluate = func(ctx context.Context, index int64, x, f, g []float64) (err error) {
		// A panic is a reason in the failure column, naming the stage,
		// never a goroutine trace (objective recovers its own stages).
		stage := "building the design"
		defer func() {
			if r := recover(); r != nil {
				err = &objective.InternalError{Stage: stage, Value: r}
			}
		}()
		d, sc, err := s.Design(x)
		if err != nil {
			return err
		}
		stage = "evaluation"
		if s.Robust() {
			res, rob, err := objective.FirstOrderNominal(ctx, d, sc, s.Scatter)
			if err != nil {
				return err
			}
			stage = "filling objectives and constraints"
			return s.FillRobust(res, rob, f, g)
		}
		res, err := objective.EvaluateContext(ctx, d, sc)
		if err != nil {
			return err
		}
		stage = "filling objectives and constraints"
		if err := s.Fill(res, f, g); err != nil {
			return err
		}
		if observe != nil {
			stage = "recording the evaluation"
			observe(index, res, g)
		}
		return nil
	}
	return p
}

// FillRobust writes the objectives and constraint values of a candidate
// scored under scatter by the first-order estimate (objective/REFERENCE.md
// §9.7): a quantile objective is mean + z_q·sd, z_q = Φ⁻¹(q); with a
// min_pass_probability p each check's value is moved k = Φ⁻¹(p) standard
// deviations toward its limit before its margin is taken, so g ≤ 0 is
// exactly Φ(margin/sd) ≥ p. [[constraint]] limits apply to nominal scores.
func (s *Spec) FillRobust(res *objective.Result, rob *objective.Robust, f, g []float64) error {
	if err := s.Fill(res, f, g); err != nil {
		return err
	}
	for i, o := range s.Objectives {
		if o.Quantile == 0 {
			continue
		}
		st, ok := rob.Scores[o.Score]
		if !ok {
			return fmt.Errorf("score %s is not available for this design", o.Score)
		}
		f[i] = o.Minimised(st.Mean + st.SD*objective.NormalQuantile(o.Quantile))
	}
	if s.MinPassProbability > 0 {
		k := objective.NormalQuantile(s.MinPassProbability)
		for i, c := range res.Checks {
			if i >= len(rob.Checks) || rob.Checks[i].Name != c.Name {
				return fmt.Errorf("check %d has no first-order estimate", i+1)
			}
			sd := rob.Checks[i].SD
			if c.Max {
				g[i] = margin(c.Value+k*sd, c.Limit, c.Limit)
			} else {
				g[i] = margin(c.Limit, c.Value-k*sd, c.Limit)
			}
		}
	}
	return nil
}

// Evaluate scores the candidate at x.
func (s *Spec) Evaluate(x []float64) (*objective.Result, error) {
	d, sc, err := s.Design(x)
	if err != nil {
		return nil, err
	}
	return objective.Evaluate(d, sc)
}

// Fill writes the objectives and constraint values of an evaluated
// candidate.
func (s *Spec) Fill(res *objective.Result, f, g []float64) error {
	for i, o := range s.Objectives {
		sc, _ := objective.LookupScore(o.Score)
		v := sc.Value(&res.Scores)
		if math.IsNaN(v) {
			return fmt.Errorf("score %s is not available for this design", o.Score)
		}
		f[i] = o.Minimised(v)
	}
	if len(res.Checks) != len(s.Checks) {
		return fmt.Errorf("the design has %d checks, the problem %d", len(res.Checks), len(s.Checks))
	}
	k := 0
	for i, c := range res.Checks {
		if c.Name != s.Checks[i] {
			return fmt.Errorf("check %d is %s, expected %s", i+1, c.Name, s.Checks[i])
		}
		if c.Max {
			g[k] = margin(c.Value, c.Limit, c.Limit)
		} else {
			g[k] = margin(c.Limit, c.Value, c.Limit)
		}
		k++
	}
	for _, c := range s.Constraints {
		sc, _ := objective.LookupScore(c.Score)
		v := sc.Value(&res.Scores)
		if !math.IsNaN(c.Min) {
			g[k] = margin(c.Min, v, c.Min)
			k++
		}
		if !math.IsNaN(c.Max) {
			g[k] = margin(v, c.Max, c.Max)
			k++
		}
	}
	return nil
}

// margin is (a − b)/|limit| (or a − b for a zero limit): positive when a
// exceeds b, in units of the limit, so the search ranks infeasible
// designs by how far they miss.
func margin(a, b, limit float64) float64 {
	if limit == 0 {
		return a - b
	}
	return (a - b) / math.Abs(limit)
}

// Settings turns the [search] table into search settings; zero fields
// keep the search package's defaults.
func (s *Spec) Settings() search.Settings {
	st := s.Search
	out := search.Settings{
		Seed:            st.Seed,
		Population:      st.Population,
		MaxEvaluations:  st.Evaluations,
		Runtime:         st.Time,
		Workers:         st.Workers,
		Stall:           search.Stall{Generations: st.StallGenerations, Tolerance: st.StallTolerance},
		CheckpointEvery: st.CheckpointEvery,
		ConfigHash:      s.Hash(),
	}
	if out.CheckpointEvery == 0 {
		out.CheckpointEvery = 5
	}
	return out
}

// Method returns the search method of the [search] table.
func (s *Spec) Method() search.Method {
	if s.Search.Method == GA {
		sc := search.Scalarization{Weights: s.Search.Weights}
		return &search.GA{Scalarization: sc}
	}
	return &search.NSGA2{}
}
