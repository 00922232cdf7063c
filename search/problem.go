package search

import (
	"context"
	"fmt"
	"math"
)

// Problem is a box-bounded minimisation problem with NumObjectives objectives and NumConstraints
// inequality constraints g_j(x) ≤ 0.
type Problem struct {
	// Dim is the number of decision variables.
	Dim int

	// Lower and Upper are the bounds of each variable (length Dim). The population methods need
	// finite bounds with Lower[i] ≤ Upper[i]; NelderMead also accepts a variable with both bounds
	// infinite (it is then unbounded). A variable with Lower[i] = Upper[i] is fixed.
	Lower, Upper []float64

	// Categorical gives, per variable, 0 for a continuous variable or k > 0 for a categorical one
	// with k categories, whose value is the category index 0, 1, …, k−1 stored as a float64. The
	// bounds of a categorical variable are ignored. Nil means all variables are continuous.
	Categorical []int

	// NumObjectives is the number of objectives, all minimised (at least 1).
	NumObjectives int

	// NumConstraints is the number of inequality constraints g_j(x) ≤ 0 (may be 0).
	NumConstraints int

	// ConstraintScale divides each constraint value before the violations are summed into CV. Nil
	// means all scales are 1; otherwise it has length NumConstraints with positive finite entries.
	ConstraintScale []float64

	// Evaluate computes the objectives f (length NumObjectives) and constraints g (length
	// NumConstraints) at x (length Dim). It must not modify x or keep any of the slices, and must
	// be safe for concurrent use: it is called from several goroutines at once. index is the
	// design's evaluation index, unique within a run (0, 1, 2, … in creation order), for example
	// to name temporary files. Evaluation should be a pure function of x; results then do not
	// depend on the worker count.
	//
	// A returned error, a panic, or a NaN or ±Inf in f or g makes the design infeasible with the
	// reason recorded in Design.Failed; the run goes on. Entries of f and g left unset are NaN.
	Evaluate func(ctx context.Context, index int64, x, f, g []float64) error
}

// validate checks p. When bounded is true every bound must be finite.
func (p *Problem) validate(bounded bool) error {
	switch {
	case p.Dim <= 0:
		return fmt.Errorf("search: problem dimension %d, want at least 1", p.Dim)
	case len(p.Lower) != p.Dim || len(p.Upper) != p.Dim:
		return fmt.Errorf("search: %d lower and %d upper bounds for dimension %d", len(p.Lower), len(p.Upper), p.Dim)
	case p.Categorical != nil && len(p.Categorical) != p.Dim:
		return fmt.Errorf("search: %d categorical entries for dimension %d", len(p.Categorical), p.Dim)
	case p.NumObjectives < 1:
		return fmt.Errorf("search: %d objectives, want at least 1", p.NumObjectives)
	case p.NumConstraints < 0:
		return fmt.Errorf("search: %d constraints, want at least 0", p.NumConstraints)
	case p.ConstraintScale != nil && len(p.ConstraintScale) != p.NumConstraints:
		return fmt.Errorf("search: %d constraint scales for %d constraints", len(p.ConstraintScale), p.NumConstraints)
	case p.Evaluate == nil:
		return fmt.Errorf("search: problem has no Evaluate function")
	}
	for j, s := range p.ConstraintScale {
		if !(s > 0) || math.IsInf(s, 1) {
			return fmt.Errorf("search: constraint %d: scale %g, want a positive finite number", j, s)
		}
	}
	for i := range p.Dim {
		if k := p.categories(i); k < 0 {
			return fmt.Errorf("search: variable %d: %d categories, want 0 (continuous) or more", i, k)
		} else if k > 0 {
			continue
		}
		lo, hi := p.Lower[i], p.Upper[i]
		if math.IsNaN(lo) || math.IsNaN(hi) {
			return fmt.Errorf("search: variable %d: bounds [%g, %g] contain NaN", i, lo, hi)
		}
		if bounded && (math.IsInf(lo, 0) || math.IsInf(hi, 0)) {
			return fmt.Errorf("search: variable %d: bounds [%g, %g] must be finite", i, lo, hi)
		}
		if lo > hi {
			return fmt.Errorf("search: variable %d: lower bound %g above upper bound %g", i, lo, hi)
		}
	}
	return nil
}

// categories returns the number of categories of variable i (0 for a continuous variable).
func (p *Problem) categories(i int) int {
	if p.Categorical == nil {
		return 0
	}
	return p.Categorical[i]
}

// checkPoint reports whether x is a valid point of p: inside the bounds, and an integer category
// index for a categorical variable.
func (p *Problem) checkPoint(x []float64) error {
	if len(x) != p.Dim {
		return fmt.Errorf("%d values for dimension %d", len(x), p.Dim)
	}
	for i, v := range x {
		if k := p.categories(i); k > 0 {
			if v != math.Trunc(v) || v < 0 || v > float64(k-1) {
				return fmt.Errorf("variable %d: category %g, want an integer in [0, %d]", i, v, k-1)
			}
			continue
		}
		if !(v >= p.Lower[i] && v <= p.Upper[i]) {
			return fmt.Errorf("variable %d: %g outside [%g, %g]", i, v, p.Lower[i], p.Upper[i])
		}
	}
	return nil
}

// Design is one evaluated candidate.
type Design struct {
	// Index is the evaluation index passed to Problem.Evaluate.
	Index int64

	// X holds the variables, F the objectives and G the constraint values.
	X, F, G []float64

	// CV is the overall constraint violation Σ_j max(0, G[j]/scale_j); 0 means feasible. A failed
	// evaluation has CV = +Inf.
	CV float64

	// Failed is empty for a successful evaluation, otherwise the reason (error text, panic value,
	// or the first non-finite objective or constraint).
	Failed string

	// Rank is the non-domination rank counted from 0 (NSGA2) or the position in the sorted
	// population (GA). In Result.Front it is 0.
	Rank int

	// Crowding is the crowding distance within the design's front (NSGA2, Result.Front); +Inf at
	// the ends of a front.
	Crowding float64

	// Scalar is the value of the method's scalarisation (GA; NelderMead adds Penalty·CV), +Inf
	// for a failed evaluation; 0 under NSGA2.
	Scalar float64

	// mark is the engine's bookkeeping for reusing designs that left both the population and
	// the archive (engine.recycle); copies have 0.
	mark int64
}

// Feasible reports whether d satisfies every constraint and was evaluated without failure.
func (d *Design) Feasible() bool { return d.CV == 0 && d.Failed == "" }

// Point returns the objectives and the feasibility of d, as front.ParetoFront
// takes them.
func (d *Design) Point() (f []float64, feasible bool) { return d.F, d.Feasible() }

// newDesign allocates a design for p with X, F and G carved from one backing array.
func newDesign(p *Problem) *Design {
	n, m, c := p.Dim, p.NumObjectives, p.NumConstraints
	buf := make([]float64, n+m+c)
	return &Design{
		X: buf[:n:n],
		F: buf[n : n+m : n+m],
		G: buf[n+m : n+m+c : n+m+c],
	}
}

// clone returns a deep copy of d.
func (d *Design) clone() Design {
	c := *d
	c.mark = 0
	buf := make([]float64, len(d.X)+len(d.F)+len(d.G))
	n, m := len(d.X), len(d.F)
	c.X = buf[:n:n]
	c.F = buf[n : n+m : n+m]
	c.G = buf[n+m:]
	copy(c.X, d.X)
	copy(c.F, d.F)
	copy(c.G, d.G)
	return c
}
