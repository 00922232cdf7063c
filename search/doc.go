// Package search minimises box-bounded, possibly constrained, multi-objective problems.
//
// It knows nothing of the application: a Problem is a dimension, bounds, optional categorical
// variables, counts of objectives and constraints, and an Evaluate function. All objectives are
// minimised and a constraint g_j(x) ≤ 0 is satisfied. The overall constraint violation is
// CV(x) = Σ_j max(0, g_j(x)/s_j) with per-constraint scales s_j (default 1); a design is feasible
// when CV = 0 (Deb, "An efficient constraint handling method for genetic algorithms", Comput.
// Methods Appl. Mech. Eng. 186, 2000).
//
// Methods, in the style of gonum/optimize (Run(ctx, Problem, *Settings, Method)):
//
//   - NSGA2: the elitist non-dominated sorting genetic algorithm of Deb, Pratap, Agarwal and
//     Meyarivan, "A fast and elitist multiobjective genetic algorithm: NSGA-II", IEEE Trans. Evol.
//     Comput. 6(2):182–197, 2002: constraint-domination (Sec. VI), fast non-dominated sort
//     (Sec. III-A; an O(N log N) sweep for two objectives after Jensen, IEEE Trans. Evol. Comput.
//     7(5), 2003), crowding distance (Sec. III-B) and the crowded binary tournament (Sec. III-C).
//     Variation is bounded simulated binary crossover (Deb and Agrawal, Complex Systems 9(2), 1995)
//     and bounded polynomial mutation (Deb and Goyal, 1996), in the forms of the authors' reference
//     code; categorical variables use uniform crossover and random-reset mutation.
//   - GA: an elitist (μ+λ) genetic algorithm with the same operators on a scalarisation of the
//     objectives (weighted sum or Wierzbicki's achievement function) and Deb's (2000)
//     feasibility-first constraint handling.
//   - NelderMead: local refinement with gonum/optimize's Nelder–Mead simplex (Lagarias, Reeds,
//     Wright and Wright, SIAM J. Optim. 9(1), 1998) over the sine transform of the box, on a
//     scalarisation with a constraint penalty.
//
// The population methods run on github.com/MaxHalford/eaopt through a single adapter (eaopt.go):
// a custom eaopt.Model performs one whole generation, with this package's own random number
// generator, worker pool and archive. Results are identical for any worker count: all random
// numbers are drawn on the coordinating goroutine and evaluation only writes its own design. A
// Checkpoint holds the generator state, so a resumed run reaches exactly the same front as an
// uninterrupted one.
//
// The final front is an external archive: the feasible, mutually non-dominated designs seen so far,
// bounded in size by removing, one at a time, the design with the smallest crowding distance
// (Deb et al. 2002, Sec. III-B) among the archive members. Dominance, the exact hypervolume of the
// archive and the indicators that compare fronts are package search/front.
package search
