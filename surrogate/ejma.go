package surrogate

import "math"

// EJMA-style formulas for unreinforced U-bellows (surrogate/REFERENCE.md §2.11), for
// comparison with the metal-bellows literature: Standards of the Expansion
// Joint Manufacturers Association (EJMA), 9th/10th ed.; the same
// coefficients appear in ASME BPVC Section VIII Div. 1, Mandatory
// Appendix 26 (from memory). The shape coefficients Cf and Cd come from
// the standards' curves and are supplied by the caller. Inputs are SI;
// plies is n.

// EJMAMeanDiameter returns Dm = Db + w + n·t for inside diameter db,
// convolution height w, ply thickness t and n plies.
func EJMAMeanDiameter(db, w, t float64, plies int) float64 {
	return db + w + float64(plies)*t
}

// EJMAFormedThickness returns the ply thickness corrected for forming,
// tp = t·sqrt(Db/Dm) (formed metal; printed walls use tp = t).
func EJMAFormedThickness(t, db, dm float64) float64 { return t * math.Sqrt(db/dm) }

// EJMAShapeFactors returns C1 = 2·rm/w and C2 = 1.82·rm/sqrt(Dm·tp).
func EJMAShapeFactors(rm, w, dm, tp float64) (c1, c2 float64) {
	return 2 * rm / w, 1.82 * rm / math.Sqrt(dm*tp)
}

// EJMAAxialRate returns the theoretical axial spring rate of one
// convolution, f_iu = 1.7·Dm·Eb·tp³·n/(w³·Cf), N/m. The rate of N
// convolutions in series is K_x = f_iu/N.
func EJMAAxialRate(dm, eb, tp float64, plies int, w, cf float64) float64 {
	return 1.7 * dm * eb * tp * tp * tp * float64(plies) / (w * w * w * cf)
}

// EJMAMembraneStress returns S5 = Eb·tp²·e/(2·w³·Cf), the meridional
// membrane stress from an axial movement e per convolution, Pa.
func EJMAMembraneStress(eb, tp, e, w, cf float64) float64 {
	return eb * tp * tp * e / (2 * w * w * w * cf)
}

// EJMABendingStress returns S6 = 5·Eb·tp·e/(3·w²·Cd), the meridional
// bending stress from an axial movement e per convolution, Pa.
func EJMABendingStress(eb, tp, e, w, cd float64) float64 {
	return 5 * eb * tp * e / (3 * w * w * cd)
}
