package search

import (
	"context"
	"fmt"
	"math"
)

// Method is a search method: *NSGA2, *GA or *NelderMead (a closed set: its method is
// unexported).
type Method interface {
	search(ctx context.Context, p *Problem, s *Settings) (*Result, error)
}

var (
	_ Method = (*NSGA2)(nil)
	_ Method = (*GA)(nil)
	_ Method = (*NelderMead)(nil)
)

// Run minimises p with method m. A nil s is the zero Settings; a nil m is NSGA2 for two
// objectives or more and GA for one.
//
// Running out of budget, stalling or a cancelled ctx (for example on Ctrl-C) end the run with the
// corresponding Result.Status and a nil error, after a final call of Settings.Checkpoint.
// Evaluation failures never end a run. Run returns an error for an invalid problem or settings
// (with a nil Result), and for a failing checkpoint hook (with the Result so far).
func Run(ctx context.Context, p Problem, s *Settings, m Method) (*Result, error) {
	if m == nil {
		if p.NumObjectives == 1 {
			m = &GA{}
		} else {
			m = &NSGA2{}
		}
	}
	return m.search(ctx, &p, s)
}

// NSGA2 is the elitist non-dominated sorting genetic algorithm as published by Deb, Pratap,
// Agarwal and Meyarivan, "A fast and elitist multiobjective genetic algorithm: NSGA-II", IEEE
// Trans. Evol. Comput. 6(2):182–197, 2002.
//
// Each generation makes N children from the population P by crowded binary tournament
// (Sec. III-C), bounded SBX and polynomial mutation (Settings.Variation), evaluates them, and
// keeps the best N of P ∪ Q by constrained non-domination rank (Sec. III-A and VI) and then
// crowding distance (Sec. III-B), the crowding of the split front being computed over the whole
// front before truncation. The initial population is a Latin hypercube sample after any
// Settings.InitialDesigns. Non-dominated sorting uses an O(N log N) sweep for two objectives and
// the efficient non-dominated sort of Zhang et al. (2015) otherwise (search/REFERENCE.md §2.2). Crowding loses selection pressure from four objectives on.
type NSGA2 struct{}

func (*NSGA2) search(ctx context.Context, p *Problem, s *Settings) (*Result, error) {
	if err := p.validate(true); err != nil {
		return nil, err
	}
	return runPopulation(ctx, p, resolve(s, p.Dim), "NSGA2", &crowdingSurvival{m: p.NumObjectives}, nil)
}

// GA is an elitist (μ+λ) genetic algorithm on a scalarisation of the objectives, hosted like
// NSGA2: N children by binary tournament, SBX and polynomial mutation; the best N of parents and
// children survive. Constraints are handled by Deb's feasibility-first rule (Deb, "An efficient
// constraint handling method for genetic algorithms", Comput. Methods Appl. Mech. Eng. 186,
// 2000), the parameter-free form of a constraint penalty: feasible designs compare by the scalar,
// infeasible ones by CV, and any feasible design beats any infeasible one. Scalarization.Penalty
// is not used. Result.Population[0] is the best design.
type GA struct {
	// Scalarization turns the objectives into the single fitness. The zero value is the plain
	// sum of the objectives.
	Scalarization Scalarization
}

func (g *GA) search(ctx context.Context, p *Problem, s *Settings) (*Result, error) {
	if err := p.validate(true); err != nil {
		return nil, err
	}
	sc, err := g.Scalarization.resolve(p.NumObjectives)
	if err != nil {
		return nil, err
	}
	return runPopulation(ctx, p, resolve(s, p.Dim), "GA", scalarSurvival{}, &sc)
}

// ScalarizationKind selects the scalarising function.
type ScalarizationKind int

const (
	// WeightedSum is Σ_i w_i (f_i − z_i).
	WeightedSum ScalarizationKind = iota
	// Achievement is the augmented achievement scalarising function of Wierzbicki ("The use of
	// reference objectives in multiobjective optimization", 1980):
	// max_i w_i (f_i − z_i) + ρ Σ_i w_i (f_i − z_i). Unlike the weighted sum it reaches
	// non-convex parts of a front.
	Achievement
)

// Scalarization maps an objective vector to one number to minimise.
type Scalarization struct {
	// Kind selects the function. The default is WeightedSum.
	Kind ScalarizationKind
	// Weights w (length NumObjectives, non-negative, not all zero); larger weight, more
	// importance. Nil means all 1. Scale the weights by the objectives' ranges to compare
	// objectives of different units.
	Weights []float64
	// Reference is the reference (aspiration) point z (length NumObjectives). Nil means 0.
	Reference []float64
	// Rho is the augmentation ρ of Achievement. Zero means 1e-6.
	Rho float64
	// Penalty multiplies CV in NelderMead's objective, s(x) + Penalty·CV(x). Zero means 1e6
	// (search/REFERENCE.md §6).
	Penalty float64
}

// resolve validates s for m objectives and applies the defaults.
func (s Scalarization) resolve(m int) (Scalarization, error) {
	switch {
	case s.Kind != WeightedSum && s.Kind != Achievement:
		return s, fmt.Errorf("search: unknown scalarization kind %d", s.Kind)
	case s.Weights != nil && len(s.Weights) != m:
		return s, fmt.Errorf("search: %d scalarization weights for %d objectives", len(s.Weights), m)
	case s.Reference != nil && len(s.Reference) != m:
		return s, fmt.Errorf("search: scalarization reference of %d values for %d objectives", len(s.Reference), m)
	case s.Rho < 0 || math.IsNaN(s.Rho) || s.Penalty < 0 || math.IsNaN(s.Penalty):
		return s, fmt.Errorf("search: scalarization rho %g and penalty %g must not be negative", s.Rho, s.Penalty)
	}
	if s.Weights == nil {
		s.Weights = make([]float64, m)
		for i := range s.Weights {
			s.Weights[i] = 1
		}
	}
	sum := 0.0
	for i, w := range s.Weights {
		if !(w >= 0) || math.IsInf(w, 1) {
			return s, fmt.Errorf("search: scalarization weight %d is %g, want a non-negative finite number", i, w)
		}
		sum += w
	}
	if sum == 0 {
		return s, fmt.Errorf("search: scalarization weights are all zero")
	}
	if s.Reference == nil {
		s.Reference = make([]float64, m)
	}
	if s.Rho == 0 {
		s.Rho = 1e-6
	}
	if s.Penalty == 0 {
		s.Penalty = 1e6
	}
	return s, nil
}

// Value returns the scalarisation of the objective vector f, with the defaults of the fields
// (nil Weights count as all 1, a nil Reference as 0, a zero Rho as 1e-6).
func (s *Scalarization) Value(f []float64) float64 {
	var sum float64
	worst := math.Inf(-1)
	for i, v := range f {
		w, z := 1.0, 0.0
		if s.Weights != nil {
			w = s.Weights[i]
		}
		if s.Reference != nil {
			z = s.Reference[i]
		}
		t := w * (v - z)
		sum += t
		worst = max(worst, t)
	}
	if s.Kind == Achievement {
		rho := s.Rho
		if rho == 0 {
			rho = 1e-6
		}
		return worst + rho*sum
	}
	return sum
}
