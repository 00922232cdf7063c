// Package report builds the self-contained HTML report of a run folder and
// its SVG figures: the front (every pair of objectives, with the feasible
// evaluations behind it), the variables of the chosen designs, the
// hypervolume history, the backbone and the workspace of each chosen
// design, the overlay of several runs' fronts (plica compare -plot) and the
// cantilever bench fit (plica calibrate -plot). Load reads a run folder,
// Build makes the report and Write writes it with its figures.
package report
