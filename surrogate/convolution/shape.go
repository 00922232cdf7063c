package convolution

import (
	"errors"
	"fmt"

	"plica/surrogate/shell"
)

// ThinWall is the smallest wall ratio of the factor grids (t/rm for
// U-profiles, t/w for sinusoids and trapezoids), which stands for the thin
// limit of surrogate/REFERENCE.md §2.2: at fixed shape parameters a vanishing wall ratio
// also sends w/Dm and t/Dm to zero, and the residual effects of finite
// thickness (meridional stretching, finite crown curvature) vanish with
// it. The grids extend the wall ratio to its validity limit (t/rm < 2,
// t/w < 0.5) because printed bellows are thick: finite thickness moves the
// factors by several percent there, and by much more for U-crowns with
// t/rm near 1 [derived: shell model].
const ThinWall = 0.005

// ErrNoBore is returned for a shape point whose root inner radius
// Dm/2 − w/2 − t/2 is not positive.
var ErrNoBore = errors.New("convolution: shape point has a non-positive root inner radius")

// Shape is the isotropic (E = 1) convolution at Dm = 1 of a point of the
// factor grids (surrogate/REFERENCE.md §1.1, §2.2; printed walls use tp = t). With the
// wall ratio τ:
//
//	U (τ = t/rm):                  rm = Dm·τ·C2²/1.82², q = 4·rm, w = 2·rm/C1, t = τ·rm
//	sinusoid/trapezoid (τ = t/w):  q = 2.2²·Dm·τ·(w/q)·C2q², w = (w/q)·q, t = τ·w
//
// so C1 = 2·rm/w, C2 = 1.82·rm/sqrt(Dm·t) and C2q = q/(2.2·sqrt(Dm·t)).
type Shape struct {
	Meridian Meridian
	Wall     float64 // wall thickness t
	Poisson  float64 // ν
}

// UShapePoint returns the U-convolution (rm = q/4) at C1, C2, τ = t/rm, ν.
func UShapePoint(c1, c2, tau, nu float64) (Shape, error) {
	if err := checkWall(tau); err != nil {
		return Shape{}, err
	}
	if !(c1 > 0 && c1 <= 1 && c2 > 0) {
		return Shape{}, fmt.Errorf("convolution: U shape point needs 0 < C1 ≤ 1, C2 > 0 (got C1 = %g, C2 = %g)", c1, c2)
	}
	const dm = 1.0
	rm := dm * tau * c2 * c2 / (1.82 * 1.82)
	pitch := 4 * rm
	return newShape(2*rm/c1, pitch, tau*rm, nu, func(rMean, w, q float64) Meridian { return UShape(rMean, w, q, q/4) })
}

// SinusoidPoint returns the sinusoid at w/q, C2q, τ = t/w, ν.
func SinusoidPoint(depthRatio, c2q, tau, nu float64) (Shape, error) {
	w, q, t, err := flankedDims("sinusoid", depthRatio, c2q, tau)
	if err != nil {
		return Shape{}, err
	}
	return newShape(w, q, t, nu, Sinusoid)
}

// TrapezoidPoint returns the trapezoid at flat fraction f, w/q, C2q,
// τ = t/w, ν.
func TrapezoidPoint(flatFraction, depthRatio, c2q, tau, nu float64) (Shape, error) {
	w, q, t, err := flankedDims("trapezoid", depthRatio, c2q, tau)
	if err != nil {
		return Shape{}, err
	}
	return newShape(w, q, t, nu, func(rMean, w, q float64) Meridian { return Trapezoid(rMean, w, q, flatFraction) })
}

func checkWall(tau float64) error {
	if !(tau > 0 && tau < 4) {
		return fmt.Errorf("convolution: shape point needs 0 < wall ratio < 4 (got %g)", tau)
	}
	return nil
}

// flankedDims returns depth, pitch and wall of a sinusoid or trapezoid.
func flankedDims(profile string, depthRatio, c2q, tau float64) (w, q, t float64, err error) {
	if err := checkWall(tau); err != nil {
		return 0, 0, 0, err
	}
	if !(depthRatio > 0 && c2q > 0) {
		return 0, 0, 0, fmt.Errorf("convolution: %s shape point needs w/q > 0, C2q > 0 (got %g, %g)", profile, depthRatio, c2q)
	}
	const dm = 1.0
	q = 2.2 * 2.2 * dm * tau * depthRatio * c2q * c2q
	w = depthRatio * q
	return w, q, tau * w, nil
}

// newShape places depth w, pitch q and wall t at Dm = 1 (outer diameter
// Dm + w + t, mean radius (OD − t − w)/2).
func newShape(w, q, t, nu float64, meridian func(rMean, w, q float64) Meridian) (Shape, error) {
	const dm = 1.0
	od := dm + w + t
	if dm/2-w/2-t/2 <= 0 {
		return Shape{}, ErrNoBore
	}
	return Shape{Meridian: meridian((od-t-w)/2, w, q), Wall: t, Poisson: nu}, nil
}

// ShellWall returns the isotropic (E = 1) wall of the shape.
func (s *Shape) ShellWall() shell.Wall {
	return shell.Wall{Es: 1, Et: 1, Nu: s.Poisson, T: s.Wall}
}

// Factors runs the shell model (elements per arc, flank or flat; five
// times as many per half sinusoid) and the strip model on the shape and
// returns the hoop-stiffening factor H = k_shell/k_strip and the strain
// factor ε_shell/ε_strip (peak meridional surface strain at equal
// movement): the entries of package surrogate's generated tables.
func (s *Shape) Factors(elements int) (hoop, strain float64, err error) {
	st, _ := Strip(&s.Meridian, s.Wall, 1, s.Poisson)
	sh, err := Shell(&s.Meridian, s.ShellWall(), elements)
	if err != nil {
		return 0, 0, err
	}
	return sh.K / st.K, sh.StrainPerMovement / st.StrainPerMovement, nil
}
