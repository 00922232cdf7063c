// Package surrogate turns bellows geometry and material into the section
// properties a rod model needs: axial stiffness per convolution and EA, the
// 2×2 bending stiffness tensor, GJ, mass per length, and the convolution
// opening and peak wall strain per unit curvature change.
//
// All quantities are SI: metres, pascals, newtons, N·m², kg/m, radians.
//
// Geometry conventions: OuterDiameter is the outside diameter at the crown
// outer surface, Depth w runs from the root centreline to the crown
// centreline, so the mean radius is Rm = OD/2 − t/2 − w/2 (surrogate/REFERENCE.md §1.1).
// Printed walls are orthotropic: meridional bending (axial and bending
// stiffness, strain) uses ModulusAcross (across layers in an upright
// print), hoop action uses ModulusInLayer, and torsion the lower shear
// modulus G = ModulusAcross/(2(1+ν)).
//
// Two fidelities (Bellows.Section):
//
//   - Strip: the r-weighted curved-strip model of one pitch (microseconds),
//     corrected for hoop stiffening by factors interpolated from tables
//     that the shell model generates (hoop_table_gen.go, written by
//     `go generate` with internal/hoopgen). Outside the tables the shell
//     model runs instead.
//   - Shell: a linear axisymmetric Kirchhoff–Love shell finite-element
//     model of half a convolution with conical-frustum elements
//     (milliseconds).
//
// Both fidelities correct the thin-shell wall with the axisymmetric solid
// model of package solid (thick-wall strain, bending strain and EI from
// the bending of the convolution itself; wall_table_gen.go for Strip,
// written by internal/wallgen; surrogate/REFERENCE.md §6). A spine multiplies GJ by a factor
// generated with CalculiX's 3-D shell model, and EA and EI (spine and
// blends in closed form) by corrections from the same runs
// (spine_table_gen.go, written by internal/spinegen; surrogate/REFERENCE.md
// §2.8, §6.4). Validity is the validated
// range of every model; Section.OutOfRange names the limits a geometry
// lies outside.
//
// The wall models of one convolution live in package convolution, the
// shell finite elements in package shell; package solid is a solid model of
// one convolution through the wall and package fecheck a cross-check with
// CalculiX. FitCantilever and CalibrationFactor fit bench measurements
// (surrogate/REFERENCE.md §4).
//
// The beam analogy (EA, EI tensor with an optional axial spine, GJ by the
// membrane formula, helical correction) follows the project's physics
// reference surrogate/REFERENCE.md §2; EJMA-style formulas for metal U-bellows are provided for
// comparison with the literature (EJMAAxialRate and friends), and a small
// table of generic printable materials (LookupMaterial).
//
// Limits (surrogate/REFERENCE.md §2.10, and Validity): linear elastic, small movement per convolution
// (e ≲ 0.1·w), no convolution contact, unpressurised; the beam analogy
// assumes N ≳ 5 convolutions, L ≳ Dm and Dm ≫ w; the orthotropic shell
// (geometric-mean Poisson coupling) and the helical torsion correction
// are not validated against tests.
package surrogate
