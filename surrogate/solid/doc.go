// Package solid is a two-dimensional solid finite-element model of the
// wall of one bellows convolution, for wall strain that stays right when
// the wall is thick against the radius of its folds, and for the bending
// of the convolution itself.
//
// The element is the 8-node serendipity quadrilateral (Q8) with 3×3
// Gauss integration by default (2×2 reduced on request), in four modes:
// plane stress and plane strain (for verification), axisymmetric
// (harmonic n = 0) and the first Fourier harmonic of a body of
// revolution (n = 1: ur = U cos θ, uz = W cos θ, uθ = V sin θ), which
// carries bending about an axis normal to the axis of revolution. The
// stiffness matrix is assembled in band storage and factorised with
// LAPACK's banded Cholesky through gonum.
//
// Convolution.Mesh meshes half a convolution (root apex to crest apex)
// of a sinusoid or U profile with elements through the wall; Analyze
// solves it axially (n = 0) and in bending (n = 1) with the mirror
// conditions of an infinitely repeated bellows and returns the axial
// stiffness and EI per convolution and the peak strain (largest-magnitude
// principal strain, and the meridional surface strain) per unit
// extension and per unit curvature, with where it occurs.
//
// Assumptions: linear elasticity, small strain and rotation, isotropic
// material, a convolution far from the bellows' ends (periodic), a wall
// of constant thickness offset normal to its midline, loads of pure
// axial force or pure bending moment.
//
// Validated range (see CONVERGENCE.md and the tests): fold ratio
// t/(2ρ) from 0.15 to 0.8, w/q from 0.25 to 1.6 (sinusoid) and 1 to 1.6
// (U), Rm/w from about 1.9 up; on the default mesh (Convolution.DefaultMesh)
// stiffness is converged to 0.01 % and peak strain to about 0.5 % there.
// Outside it the model still solves, but the default mesh is unproven.
// REFERENCE.md describes the element, the harmonic method, the mesh and
// the symmetry conditions with their published sources.
package solid
