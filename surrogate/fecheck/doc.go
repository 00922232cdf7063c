// Package fecheck cross-checks a bellows against an independent
// finite-element model solved by CalculiX (the ccx executable, Debian
// package calculix-ccx).
//
// For one surrogate.Bellows it writes two CalculiX decks of the real
// geometry, runs ccx on each, reads the results back and compares them
// with the surrogate:
//
//   - shell.inp: a 3-D model of Pitches convolutions with S8R shells on
//     the wall midsurface — revolved or single-start helical, with the
//     plain-wall spine when there is one — and both end rings rigid
//     (*RIGID BODY). End 1 is fixed; end 2 carries, as four load cases of
//     one *GREEN step (one factorization), an axial force, a torque and
//     bending moments about the bellows' x and y. A spined wall's mesh is
//     graded around the circumference: fine across the spine and its
//     blends, the plain wall's element elsewhere. The axial rate (and EA), the 2×2 EI tensor about
//     the neutral axis, GJ and the peak meridional surface strain per unit
//     curvature and per unit axial extension are measured between two
//     rings RingOffset pitches in from the ends, away from the end
//     effects.
//   - solid.inp: an axisymmetric model of one pitch with CAX8 elements
//     through the wall under axial extension, for the axial rate and the
//     peak meridional strain of a thick wall.
//
// The wall material is taken from the bellows: isotropic when the two
// moduli agree, otherwise cylindrically orthotropic with the surrogate's
// convention (meridional and through-thickness modulus across the print
// layers, hoop modulus in the layer plane).
//
// Run does all of that in a temporary directory (or Options.Dir) with a
// context that kills ccx when cancelled; WriteDecks only writes the decks,
// for a machine without ccx. Meshes: Coarse (default, about 5 s per
// bellows on one core, 12 s with a spine) and Fine; Options.Convergence also solves the next
// coarser mesh and reports the relative change. Result and its parts are
// JSON-friendly, with units in the field names, SI throughout.
//
// REFERENCE.md in this directory describes the models, how each quantity
// is extracted, the closed forms used as checks and the CalculiX
// practicalities.
package fecheck
