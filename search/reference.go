package search

import (
	"context"
	"math"
)

// Reference problems with known solutions, for tests, benchmarks and examples. Definitions follow
// the cited papers (from memory, checked numerically against the fronts stated with each).

// ZDT1 is the first problem of Zitzler, Deb and Thiele, "Comparison of multiobjective
// evolutionary algorithms: empirical results", Evol. Comput. 8(2):173–195, 2000: n variables in
// [0, 1] (n = 30 in the paper), f1 = x1, g = 1 + 9 Σ_{i≥2} x_i/(n − 1), f2 = g (1 − √(f1/g)).
// The Pareto front is f2 = 1 − √f1, f1 ∈ [0, 1] (x_i = 0 for i ≥ 2); its hypervolume at (1, 1)
// is 2/3.
func ZDT1(n int) Problem {
	lo, hi := make([]float64, n), make([]float64, n)
	for i := range hi {
		hi[i] = 1
	}
	return Problem{
		Dim: n, Lower: lo, Upper: hi, NumObjectives: 2,
		Evaluate: func(_ context.Context, _ int64, x, f, _ []float64) error {
			var s float64
			for _, v := range x[1:] {
				s += v
			}
			g := 1.0
			if n > 1 {
				g += 9 * s / float64(n-1)
			}
			f[0] = x[0]
			f[1] = g * (1 - math.Sqrt(x[0]/g))
			return nil
		},
	}
}

// DTLZ2 is the second problem of Deb, Thiele, Laumanns and Zitzler, "Scalable multi-objective
// optimization test problems", Proc. IEEE Congress on Evolutionary Computation 2002, 825–830,
// with m objectives and n ≥ m variables in [0, 1]: g = Σ_{i≥m} (x_i − 0.5)², and, with
// θ_i = x_i π/2, f_1 = (1 + g) cos θ_1 ⋯ cos θ_{m−1}, f_k = (1 + g) cos θ_1 ⋯ cos θ_{m−k}
// sin θ_{m−k+1} for 1 < k < m, and f_m = (1 + g) sin θ_1. The Pareto front is the part of the unit
// sphere Σ f_k² = 1 with f ≥ 0 (x_i = 0.5 for i ≥ m); for m = 3 its hypervolume at (1, 1, 1) is
// 1 − π/6 (search/REFERENCE.md §5.5, derived).
func DTLZ2(m, n int) Problem {
	lo, hi := make([]float64, n), make([]float64, n)
	for i := range hi {
		hi[i] = 1
	}
	return Problem{
		Dim: n, Lower: lo, Upper: hi, NumObjectives: m,
		Evaluate: func(_ context.Context, _ int64, x, f, _ []float64) error {
			var g float64
			for _, v := range x[m-1:] {
				g += (v - 0.5) * (v - 0.5)
			}
			r := 1 + g
			for k := range m { // f[k] for objective k+1
				v := r
				for i := range m - 1 - k {
					v *= math.Cos(x[i] * math.Pi / 2)
				}
				if k > 0 {
					v *= math.Sin(x[m-1-k] * math.Pi / 2)
				}
				f[k] = v
			}
			return nil
		},
	}
}

// BNH is the constrained two-objective problem of Binh and Korn, "MOBES: a multiobjective
// evolution strategy for constrained optimization problems", 1997: x1 ∈ [0, 5], x2 ∈ [0, 3],
// f1 = 4x1² + 4x2², f2 = (x1 − 5)² + (x2 − 5)², subject to (x1 − 5)² + x2² ≤ 25 and
// (x1 − 8)² + (x2 + 3)² ≥ 7.7. The front is x1 = x2 ∈ [0, 3], then x2 = 3, x1 ∈ [3, 5]; its
// hypervolume at (140, 50) is 15856/3 (search/REFERENCE.md §5.2, derived).
func BNH() Problem {
	return Problem{
		Dim: 2, Lower: []float64{0, 0}, Upper: []float64{5, 3}, NumObjectives: 2, NumConstraints: 2,
		Evaluate: func(_ context.Context, _ int64, x, f, g []float64) error {
			f[0] = 4*x[0]*x[0] + 4*x[1]*x[1]
			f[1] = (x[0]-5)*(x[0]-5) + (x[1]-5)*(x[1]-5)
			g[0] = (x[0]-5)*(x[0]-5) + x[1]*x[1] - 25
			g[1] = 7.7 - (x[0]-8)*(x[0]-8) - (x[1]+3)*(x[1]+3)
			return nil
		},
	}
}

// CONSTR is the constrained two-objective problem of Deb, "Multi-Objective Optimization using
// Evolutionary Algorithms", Wiley, 2001, used by Deb et al. (2002): x1 ∈ [0.1, 1], x2 ∈ [0, 5],
// f1 = x1, f2 = (1 + x2)/x1, subject to x2 + 9x1 ≥ 6 and −x2 + 9x1 ≥ 1. The front is
// f2 = 7/f1 − 9 for f1 ∈ [7/18, 2/3] and f2 = 1/f1 for f1 ∈ [2/3, 1]; its hypervolume at (1, 9)
// is 8 − 7 ln(12/7) − ln(3/2) (search/REFERENCE.md §5.3, derived).
func CONSTR() Problem {
	return Problem{
		Dim: 2, Lower: []float64{0.1, 0}, Upper: []float64{1, 5}, NumObjectives: 2, NumConstraints: 2,
		Evaluate: func(_ context.Context, _ int64, x, f, g []float64) error {
			f[0] = x[0]
			f[1] = (1 + x[1]) / x[0]
			g[0] = 6 - x[1] - 9*x[0]
			g[1] = 1 + x[1] - 9*x[0]
			return nil
		},
	}
}

// Rosenbrock is the extended Rosenbrock function Σ_i 100(x_{i+1} − x_i²)² + (1 − x_i)²
// (Rosenbrock, "An automatic method for finding the greatest or least value of a function",
// Comput. J. 3(3), 1960), one objective, with the given bounds (infinite bounds are allowed for
// NelderMead). Its unconstrained minimum is 0 at x = (1, …, 1).
func Rosenbrock(lower, upper []float64) Problem {
	return Problem{
		Dim: len(lower), Lower: lower, Upper: upper, NumObjectives: 1,
		Evaluate: func(_ context.Context, _ int64, x, f, _ []float64) error {
			var s float64
			for i := range len(x) - 1 {
				a, b := x[i+1]-x[i]*x[i], 1-x[i]
				s += 100*a*a + b*b
			}
			f[0] = s
			return nil
		},
	}
}
