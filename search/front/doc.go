// Package front is the mathematics of Pareto fronts, all objectives
// minimised (a maximised score negated), as the search sees them:
// dominance, non-dominated sets, the exact hypervolume, normalisation
// between an ideal and a nadir point, the quality indicators that compare
// fronts (GD, IGD, IGD+, the additive ε-indicator, coverage) with the
// Mann–Whitney U test over repeated runs, reference points from simplex
// lattices, and the ways of choosing one design of a front (the knee,
// pseudo-weights, compromise values).
//
// It knows nothing of designs, files or bellows; package search imports it,
// never the reverse. No function modifies its arguments.
package front
