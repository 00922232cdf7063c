package search

import (
	"context"
	"errors"
	"fmt"
	"math"
	"slices"
	"time"

	"gonum.org/v1/gonum/optimize"
)

// NelderMead refines one design by minimising a scalarisation of the objectives plus a constraint
// penalty, s(x) + Penalty·CV(x), with the Nelder–Mead simplex method of gonum/optimize (Lagarias,
// Reeds, Wright and Wright, "Convergence properties of the Nelder–Mead simplex method in low
// dimensions", SIAM J. Optim. 9(1):112–147, 1998; dimension-adaptive coefficients). A failed
// evaluation counts as +Inf.
//
// Bounds are handled by the sine transform x_i = l_i + (u_i − l_i)(1 + sin z_i)/2, started at
// z_i = asin(2(x_i − l_i)/(u_i − l_i) − 1), so every trial point lies in the box (search/REFERENCE.md §6). A
// variable with both bounds infinite is optimised directly; one-sided bounds are refused.
// Categorical and fixed (l_i = u_i) variables keep their initial values.
//
// Evaluations are sequential. Settings.MaxEvaluations and Runtime map to gonum's FuncEvaluations
// and Runtime; Population, Workers, Variation, Stall, checkpoints and Resume do not apply.
// Result.Population holds the best design; Result.Front the archive of the evaluated designs.
type NelderMead struct {
	// Initial is the starting point (length Dim, inside the bounds). Nil means the centre of the
	// box, which needs finite bounds.
	Initial []float64
	// Scalarization turns the objectives into the value minimised. The zero value is the sum of
	// the objectives, with Penalty 1e6.
	Scalarization Scalarization
	// SimplexSize is the edge of the initial simplex in transformed variables (radians for a
	// bounded variable). Zero means gonum's default, 0.05.
	SimplexSize float64
	// FunctionTolerance and Iterations are the convergence test: the run has converged when the
	// best value improved by at most FunctionTolerance over Iterations major iterations (gonum
	// FunctionConverge). Zero means gonum's defaults, 1e-10 and 100.
	FunctionTolerance float64
	Iterations        int
}

// Refine polishes x0 with NelderMead on the scalarisation sc; for example, a design of an NSGA2
// front with an Achievement scalarisation whose Reference is the design's own objective vector.
func Refine(ctx context.Context, p Problem, x0 []float64, sc Scalarization, s *Settings) (*Result, error) {
	return Run(ctx, p, s, &NelderMead{Initial: x0, Scalarization: sc})
}

func (nm *NelderMead) search(ctx context.Context, p *Problem, s *Settings) (*Result, error) {
	if err := p.validate(false); err != nil {
		return nil, err
	}
	c := resolve(s, p.Dim)
	if c.Resume != nil {
		return nil, errors.New("search: NelderMead cannot resume from a checkpoint")
	}
	if c.Reference != nil && len(c.Reference) != p.NumObjectives {
		return nil, fmt.Errorf("search: reference point of %d values for %d objectives", len(c.Reference), p.NumObjectives)
	}
	sc, err := nm.Scalarization.resolve(p.NumObjectives)
	if err != nil {
		return nil, err
	}
	x0 := slices.Clone(nm.Initial)
	var free []int
	for i := range p.Dim {
		if p.categories(i) > 0 {
			continue
		}
		lo, hi := p.Lower[i], p.Upper[i]
		if math.IsInf(lo, 0) != math.IsInf(hi, 0) {
			return nil, fmt.Errorf("search: variable %d: NelderMead needs both bounds finite or both infinite, have [%g, %g]", i, lo, hi)
		}
		if hi > lo {
			free = append(free, i)
		}
	}
	if x0 == nil {
		x0 = make([]float64, p.Dim)
		for i := range x0 {
			if k := p.categories(i); k > 0 {
				continue
			}
			if math.IsInf(p.Lower[i], 0) {
				return nil, fmt.Errorf("search: variable %d is unbounded; NelderMead needs an initial point", i)
			}
			x0[i] = p.Lower[i] + (p.Upper[i]-p.Lower[i])/2
		}
	}
	if err := p.checkPoint(x0); err != nil {
		return nil, fmt.Errorf("search: NelderMead initial point: %w", err)
	}

	r := &refiner{ctx: ctx, p: p, cfg: c, sc: sc, x0: x0, free: free,
		ev:   evaluator{p: p, workers: 1, timeout: c.EvaluationTimeout},
		arch: archive{m: p.NumObjectives, capacity: c.ArchiveSize},
		buf:  make([]float64, p.Dim), start: time.Now()}
	z0 := make([]float64, len(free))
	for j, i := range free {
		z0[j] = r.toZ(i, x0[i])
	}
	status := Converged
	var iterations int
	if len(free) == 0 {
		r.value(z0)
	} else {
		settings := &optimize.Settings{
			Runtime: c.Runtime,
			Converger: &optimize.FunctionConverge{
				Absolute:   cmpOr(nm.FunctionTolerance, 1e-10),
				Iterations: cmpOr(nm.Iterations, 100),
			},
		}
		if c.maxEvals >= 0 {
			settings.FuncEvaluations = int(c.maxEvals)
		}
		prob := optimize.Problem{
			Func: r.value,
			Status: func() (optimize.Status, error) {
				if ctx.Err() != nil {
					return optimize.Failure, errInterrupted
				}
				return optimize.NotTerminated, nil
			},
		}
		res, err := optimize.Minimize(prob, z0, settings, &optimize.NelderMead{SimplexSize: nm.SimplexSize})
		switch {
		case errors.Is(err, errInterrupted):
			status = Interrupted
		case err != nil && res == nil:
			return nil, fmt.Errorf("search: NelderMead: %w", err)
		case err != nil:
			status = Failure
		case res.Status == optimize.FunctionEvaluationLimit:
			status = EvaluationLimit
		case res.Status == optimize.RuntimeLimit:
			status = RuntimeLimit
		}
		if res != nil {
			iterations = res.MajorIterations
		}
		if status == Failure {
			return r.result(status, iterations), fmt.Errorf("search: NelderMead: %w", err)
		}
	}
	return r.result(status, iterations), nil
}

// cmpOr returns v, or def when v is zero.
func cmpOr[T int | float64](v, def T) T {
	if v == 0 {
		return def
	}
	return v
}

// refiner evaluates NelderMead's trial points.
type refiner struct {
	ctx      context.Context
	p        *Problem
	cfg      config
	sc       Scalarization
	x0       []float64
	free     []int
	ev       evaluator
	arch     archive
	buf      []float64
	evals    int64
	failures int64
	best     *Design
	start    time.Time
}

// toZ maps variable i's value x to the transformed variable.
func (r *refiner) toZ(i int, x float64) float64 {
	lo, hi := r.p.Lower[i], r.p.Upper[i]
	if math.IsInf(lo, 0) {
		return x
	}
	return math.Asin(min(max(2*(x-lo)/(hi-lo)-1, -1), 1))
}

// toX maps the transformed variable z of variable i back into its bounds.
func (r *refiner) toX(i int, z float64) float64 {
	lo, hi := r.p.Lower[i], r.p.Upper[i]
	if math.IsInf(lo, 0) {
		return z
	}
	return min(max(lo+(hi-lo)*(1+math.Sin(z))/2, lo), hi)
}

// value evaluates the design at transformed point z and returns s(x) + Penalty·CV(x).
func (r *refiner) value(z []float64) float64 {
	if r.ctx.Err() != nil {
		return math.Inf(1)
	}
	d := newDesign(r.p)
	d.Index = r.evals
	r.evals++
	copy(d.X, r.x0)
	for j, i := range r.free {
		d.X[i] = r.toX(i, z[j])
	}
	r.ev.one(r.ctx, d, r.buf)
	if d.Failed != "" {
		r.failures++
		d.Scalar = math.Inf(1)
	} else {
		d.Scalar = r.sc.Value(d.F)
		if d.CV > 0 {
			d.Scalar += r.sc.Penalty * d.CV
		}
	}
	if r.cfg.Evaluated != nil {
		r.cfg.Evaluated(d)
	}
	r.arch.add(d)
	if r.arch.capacity >= 0 && len(r.arch.items) > 2*r.arch.capacity {
		r.arch.truncate()
	}
	if r.best == nil || d.Scalar < r.best.Scalar {
		r.best = d
	}
	return d.Scalar
}

func (r *refiner) result(status Status, iterations int) *Result {
	r.arch.truncate()
	res := &Result{
		Status: status, Method: "NelderMead", Seed: r.cfg.Seed, Runtime: time.Since(r.start),
		Stats: Stats{Generation: iterations, Evaluations: r.evals, Failures: r.failures, ArchiveSize: len(r.arch.items)},
		Front: frontOf(r.arch.items, r.p.NumObjectives),
	}
	if r.best != nil {
		res.Population = []Design{r.best.clone()}
		if r.best.Feasible() {
			res.Feasible = 1
		}
	}
	res.Reference = slices.Clone(r.cfg.Reference)
	if res.Reference == nil && len(r.arch.items) > 0 {
		res.Reference = autoReference(r.arch.items, r.p.NumObjectives)
	}
	if res.Reference != nil {
		res.Hypervolume = archiveHypervolume(r.arch.items, res.Reference)
	}
	return res
}
