package surrogate

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/stat/distuv"
)

// Bench calibration of the bending stiffness (surrogate/REFERENCE.md §2.10, §4.1, §4.2).
//
// A printed bellows is clamped at one end as a cantilever and loaded at the
// free end; the tip deflection along the load is read for a few loads. The
// Euler–Bernoulli tip-load formula δ = P·L³/(3·EI) [published: Roark's
// Formulas for Stress and Strain, Table 8.1 case 1a; Gere & Timoshenko,
// Mechanics of Materials, App. G, Table G-1 case 4; case numbers from
// memory (verify)] is linear in the flexibility 1/EI, so EI follows from
// linear least squares. The fits here are pure functions of SI slices.

// SmallDeflectionLimit is the largest tip deflection per free length for
// which the linear cantilever formula is trusted (δ/L ≲ 0.1, error ≲ 1–2 %,
// surrogate/REFERENCE.md §4.1, from memory). Beyond it the linear formula
// overestimates the deflection along the load, so a fit reads EI high.
const SmallDeflectionLimit = 0.1

// BenchPoint is one tip-load measurement on a cantilevered bellows.
type BenchPoint struct {
	Load       float64 // tip load P, N (≥ 0)
	Deflection float64 // tip deflection δ along the load, m
	FreeLength float64 // free length L from the clamp to the load, m (> 0)
	// Setup numbers the mounting the deflection zero belongs to (one
	// specimen clamped at one free length), from 0. Only the intercept fit
	// uses it: each setup gets its own zero offset.
	Setup int
}

// FitOptions selects the cantilever model. The zero value fits
//
//	δ_i = P_i·L_i³/(3·EI)
//
// through the origin (deflection zeroed at P = 0), at the 95 % level.
type FitOptions struct {
	// Intercept adds one zero offset a_k per setup (δ not zeroed at P = 0;
	// the offset absorbs self-weight sag and the gauge zero):
	// δ_i = a_k + P_i·L_i³/(3·EI).
	Intercept bool
	// ClampCompliance adds the rotation of a compliant clamp,
	// δ_i = … + P_i·L_i²/k_θ, linear in (1/EI, 1/k_θ). It needs two or
	// more different free lengths.
	ClampCompliance bool
	// Level is the two-sided confidence level of the intervals; 0 means
	// 0.95.
	Level float64
}

// Fit is a least-squares cantilever fit. Standard errors come from the
// residual variance s² = SSE/(n − p) and the parameter covariance
// s²·(XᵀX)⁻¹ of the linear model; the standard error of EI is the delta
// method SE(EI) ≈ EI²·SE(1/EI), and the interval of EI is the exact image
// of the Student-t interval of 1/EI,
// [1/(b + t·SE_b), 1/(b − t·SE_b)] with b = 1/EI, t = t_{(1+Level)/2, n−p}
// (surrogate/REFERENCE.md §4.2). The upper bound is +Inf when b − t·SE_b ≤ 0: the data do
// not bound EI from above.
type Fit struct {
	EI float64    // bending stiffness, N·m²
	SE float64    // standard error of EI (delta method), N·m²
	CI [2]float64 // confidence interval of EI at Level, N·m²

	Flexibility   float64 // b = 1/EI, 1/(N·m²)
	FlexibilitySE float64 // SE(b), 1/(N·m²)

	// ClampCompliance is 1/k_θ, rad/(N·m), with its standard error; both
	// 0 unless FitOptions.ClampCompliance. A negative value means no
	// measurable clamp rotation (see Warnings).
	ClampCompliance, ClampComplianceSE float64
	// Offsets are the fitted zero offsets per setup, m, with their
	// standard errors; nil unless FitOptions.Intercept. A setup without
	// points has offset 0.
	Offsets, OffsetsSE []float64

	Level     float64   // confidence level
	T         float64   // Student t quantile used for the intervals
	DOF       int       // degrees of freedom n − p
	Points    int       // n, the points fitted (see FitCantilever)
	Lengths   int       // number of different free lengths
	Params    int       // p
	S         float64   // residual standard deviation, m
	R2        float64   // coefficient of determination (see FitCantilever)
	Fitted    []float64 // fitted δ_i, m, for every input point in input order
	Residuals []float64 // δ_i − fitted δ_i, m, likewise
	// MaxDeflectionRatio is the largest |δ_i − a_k|/L_i (load-induced
	// deflection per free length).
	MaxDeflectionRatio float64
	// Warnings are plain-language notes on the data: points beyond the
	// small-deflection range, a negative clamp compliance.
	Warnings []string

	opts   FitOptions
	setups []int       // setup → parameter column (−1: no points)
	coef   []float64   // β
	cov    [][]float64 // covariance of β
}

// FitCantilever fits EI to tip-load measurements by linear least squares
// (surrogate/REFERENCE.md §4.2 and its variants). The regressors are x₁ = P·L³/3 (for
// b = 1/EI), x₂ = P·L² (for 1/k_θ, with ClampCompliance) and one
// indicator per setup (with Intercept). With one free length and neither
// option this is exactly surrogate/REFERENCE.md §4.2: ĉ = ΣPδ/ΣP², s² = Σ(δ − ĉP)²/(n − 1),
// SE(ĉ) = s/√ΣP², EI = L³/(3ĉ).
//
// Without Intercept, points with zero load and zero deflection are the
// zero reference, not measurements: they are left out of n (they would
// add degrees of freedom without information) but keep their entries in
// Fitted and Residuals.
//
// R² is 1 − SSE/SST with SST = Σδ² for the fit through the origin
// (uncentred, as is usual for a model without intercept) and
// SST = Σ(δ − mean of its setup)² with Intercept (centred per setup).
//
// Errors (*InputError, key "points" or "point N" counted from 1) report
// non-finite values, negative loads, non-positive lengths, too few points
// for the parameters (n − p ≥ 1 is needed for an uncertainty), data that
// cannot separate the parameters (all loads zero, one free length with
// ClampCompliance), and a deflection that does not grow with load.
func FitCantilever(points []BenchPoint, opts FitOptions) (Fit, error) {
	if opts.Level == 0 {
		opts.Level = 0.95
	}
	if !(opts.Level > 0 && opts.Level < 1) {
		return Fit{}, &InputError{Key: "level", Msg: fmt.Sprintf("%g is out of range (expected a confidence level in (0, 1))", opts.Level)}
	}
	for i, p := range points {
		key := fmt.Sprintf("point %d", i+1)
		switch {
		case math.IsNaN(p.Load) || math.IsInf(p.Load, 0) || p.Load < 0:
			return Fit{}, &InputError{Key: key, Msg: fmt.Sprintf("load %g N is out of range (expected a finite load >= 0)", p.Load)}
		case math.IsNaN(p.Deflection) || math.IsInf(p.Deflection, 0):
			return Fit{}, &InputError{Key: key, Msg: fmt.Sprintf("deflection %g m is not finite", p.Deflection)}
		case math.IsNaN(p.FreeLength) || math.IsInf(p.FreeLength, 0) || p.FreeLength <= 0:
			return Fit{}, &InputError{Key: key, Msg: fmt.Sprintf("free length %g m is out of range (expected > 0)", p.FreeLength)}
		case p.Setup < 0:
			return Fit{}, &InputError{Key: key, Msg: fmt.Sprintf("setup %d is negative (expected a setup number >= 0)", p.Setup)}
		}
	}
	// Without an intercept a zero-load point reading exactly zero is the
	// zero reference itself, not a measurement: it is left out of n.
	all := points
	if !opts.Intercept {
		points = nil
		for _, p := range all {
			if p.Load != 0 || p.Deflection != 0 {
				points = append(points, p)
			}
		}
	}
	n := len(points)
	lengths := map[float64]bool{}
	maxSetup := -1
	for _, p := range points {
		lengths[p.FreeLength] = true
		maxSetup = max(maxSetup, p.Setup)
	}

	f := Fit{opts: opts, Points: n, Lengths: len(lengths), Level: opts.Level}
	if opts.ClampCompliance && len(lengths) < 2 {
		return Fit{}, &InputError{Key: "points", Msg: fmt.Sprintf("%d free length(s) cannot separate EI from the clamp compliance (expected two or more different free lengths)", len(lengths))}
	}
	// Columns: b = 1/EI, then 1/k_θ, then one offset per setup present.
	p := 1
	if opts.ClampCompliance {
		p++
	}
	if opts.Intercept {
		f.setups = make([]int, maxSetup+1)
		for i := range f.setups {
			f.setups[i] = -1
		}
		for _, pt := range points {
			if f.setups[pt.Setup] < 0 {
				f.setups[pt.Setup] = p
				p++
			}
		}
	}
	f.Params = p
	if n-p < 1 {
		return Fit{}, &InputError{Key: "points", Msg: fmt.Sprintf("%d point(s) for %d fitted parameter(s) (expected at least %d points for an uncertainty)", n, p, p+1)}
	}
	f.DOF = n - p

	x := mat.NewDense(n, p, nil)
	y := mat.NewVecDense(n, nil)
	for i, pt := range points {
		f.row(x.RawRowView(i), pt)
		y.SetVec(i, pt.Deflection)
	}
	// Scale columns to unit length for a well-conditioned normal matrix.
	scale := make([]float64, p)
	for j := range p {
		scale[j] = mat.Norm(x.ColView(j), 2)
		if scale[j] == 0 {
			if j == 0 {
				return Fit{}, &InputError{Key: "points", Msg: "every load is zero (expected non-zero loads)"}
			}
			return Fit{}, &InputError{Key: "points", Msg: "the clamp term has no data (expected non-zero loads)"}
		}
	}
	z := mat.NewDense(n, p, nil)
	z.Apply(func(i, j int, v float64) float64 { return v / scale[j] }, x)
	var a mat.SymDense
	a.SymOuterK(1, z.T())
	var ch mat.Cholesky
	if ok := ch.Factorize(&a); !ok || ch.Cond() > 1e12 {
		return Fit{}, &InputError{Key: "points", Msg: "the data cannot separate the fitted terms (expected different loads in each setup and, for the clamp term, different free lengths)"}
	}
	var zty, bz mat.VecDense
	zty.MulVec(z.T(), y)
	if err := ch.SolveVecTo(&bz, &zty); err != nil {
		return Fit{}, &InputError{Key: "points", Msg: "the data cannot separate the fitted terms: " + err.Error()}
	}
	var ainv mat.SymDense
	if err := ch.InverseTo(&ainv); err != nil {
		return Fit{}, &InputError{Key: "points", Msg: "the data cannot separate the fitted terms: " + err.Error()}
	}
	f.coef = make([]float64, p)
	for j := range p {
		f.coef[j] = bz.AtVec(j) / scale[j]
	}

	// Residuals, SSE and the R² reference.
	f.Fitted = make([]float64, len(all))
	f.Residuals = make([]float64, len(all))
	xi := make([]float64, p)
	var sse, sst float64
	setupSum := map[int]float64{}
	setupN := map[int]float64{}
	for _, pt := range points {
		setupSum[pt.Setup] += pt.Deflection
		setupN[pt.Setup]++
	}
	for i, pt := range all {
		f.row(xi, pt)
		for j, v := range xi {
			f.Fitted[i] += v * f.coef[j]
		}
		r := pt.Deflection - f.Fitted[i]
		f.Residuals[i] = r
		sse += r * r
		d := pt.Deflection
		if opts.Intercept {
			d -= setupSum[pt.Setup] / setupN[pt.Setup]
		}
		sst += d * d
	}
	s2 := sse / float64(f.DOF)
	f.S = math.Sqrt(s2)
	f.R2 = 1 - sse/sst
	if sst == 0 {
		f.R2 = math.NaN()
	}
	f.cov = make([][]float64, p)
	for i := range p {
		f.cov[i] = make([]float64, p)
		for j := range p {
			f.cov[i][j] = s2 * ainv.At(i, j) / (scale[i] * scale[j])
		}
	}

	b, seb := f.coef[0], math.Sqrt(f.cov[0][0])
	if !(b > 0) {
		return Fit{}, &InputError{Key: "points", Msg: fmt.Sprintf("the deflection does not grow with load (fitted 1/EI = %.4g 1/(N·m²); expected > 0)", b)}
	}
	f.T = distuv.StudentsT{Mu: 0, Sigma: 1, Nu: float64(f.DOF)}.Quantile(1 - (1-opts.Level)/2)
	f.Flexibility, f.FlexibilitySE = b, seb
	f.EI = 1 / b
	f.SE = seb / (b * b)
	f.CI = [2]float64{1 / (b + f.T*seb), math.Inf(1)}
	if lo := b - f.T*seb; lo > 0 {
		f.CI[1] = 1 / lo
	}
	if opts.ClampCompliance {
		f.ClampCompliance, f.ClampComplianceSE = f.coef[1], math.Sqrt(f.cov[1][1])
		if f.ClampCompliance < 0 {
			f.Warnings = append(f.Warnings, fmt.Sprintf("the fitted clamp compliance is negative (%.3g ± %.2g rad/(N·m)): no measurable clamp rotation; a fit without the clamp term is better determined",
				f.ClampCompliance, f.ClampComplianceSE))
		}
	}
	if opts.Intercept {
		f.Offsets = make([]float64, len(f.setups))
		f.OffsetsSE = make([]float64, len(f.setups))
		for k, j := range f.setups {
			if j >= 0 {
				f.Offsets[k], f.OffsetsSE[k] = f.coef[j], math.Sqrt(f.cov[j][j])
			}
		}
	}
	for i, pt := range all {
		d := pt.Deflection
		if opts.Intercept {
			d -= f.Offsets[pt.Setup]
		}
		ratio := math.Abs(d) / pt.FreeLength
		f.MaxDeflectionRatio = max(f.MaxDeflectionRatio, ratio)
		if ratio > SmallDeflectionLimit {
			f.Warnings = append(f.Warnings, fmt.Sprintf("point %d: deflection/length %.3g exceeds %g, beyond the small-deflection range of the linear cantilever formula (surrogate/REFERENCE.md §4.1); EI reads high there, drop the point or use smaller loads",
				i+1, ratio, SmallDeflectionLimit))
		}
	}
	return f, nil
}

// row fills the regressors of one point.
func (f *Fit) row(dst []float64, pt BenchPoint) {
	for j := range dst {
		dst[j] = 0
	}
	l := pt.FreeLength
	dst[0] = pt.Load * l * l * l / 3
	if f.opts.ClampCompliance {
		dst[1] = pt.Load * l * l
	}
	if f.opts.Intercept && pt.Setup < len(f.setups) && f.setups[pt.Setup] >= 0 {
		dst[f.setups[pt.Setup]] = 1
	}
}

// Band returns the fitted tip deflection at load P (N) and free length L
// (m) in the given setup, m, and the half width of its confidence band at
// the fit's level: t·sqrt(xᵀ·Cov·x), the interval of the mean deflection
// (standard regression). A setup without an offset contributes none.
func (f *Fit) Band(load, length float64, setup int) (mean, half float64) {
	if f.coef == nil {
		return math.NaN(), math.NaN()
	}
	x := make([]float64, len(f.coef))
	f.row(x, BenchPoint{Load: load, FreeLength: length, Setup: setup})
	var v float64
	for i := range x {
		mean += x[i] * f.coef[i]
		for j := range x {
			v += x[i] * f.cov[i][j] * x[j]
		}
	}
	return mean, f.T * math.Sqrt(max(v, 0))
}

// Factor is a multiplicative calibration factor: fitted EI over the EI the
// surrogate predicts without calibration (surrogate/REFERENCE.md §2.10).
type Factor struct {
	Value float64    // c = EI_fit/EI_pred
	SE    float64    // SE(EI_fit)/EI_pred
	CI    [2]float64 // the interval of EI_fit divided by EI_pred
}

// CalibrationFactor divides a fit by the predicted EI (N·m², > 0). The
// prediction is a model output without scatter, so the uncertainty of the
// factor is that of the bench fit, scaled: SE(c) = SE(EI)/EI_pred and the
// interval is the fit's interval over EI_pred [derived].
func CalibrationFactor(f Fit, predicted float64) (Factor, error) {
	if math.IsNaN(predicted) || math.IsInf(predicted, 0) || predicted <= 0 {
		return Factor{}, &InputError{Key: "predicted_ei", Msg: fmt.Sprintf("%g N·m² is out of range (expected a predicted EI > 0)", predicted)}
	}
	if !(f.EI > 0) {
		return Factor{}, &InputError{Key: "fit", Msg: "no fitted EI (expected a successful fit)"}
	}
	return Factor{Value: f.EI / predicted, SE: f.SE / predicted,
		CI: [2]float64{f.CI[0] / predicted, f.CI[1] / predicted}}, nil
}

// CantileverEI returns the bending stiffness a cantilever test measures
// about each of the bellows' own axes, N·m², from the EI tensor: a tip load
// that bends the bellows about x alone (its tip free to move sideways)
// deflects along the load by P·L³/3·(EI⁻¹)_xx, so the test sees
// 1/(EI⁻¹)_xx = det(EI)/EI_yy, and likewise det(EI)/EI_xx about y
// [derived from surrogate/REFERENCE.md §2.8 and §4.1]. Without coupling (EI_xy = 0) these are the
// diagonal entries. Because calibration scales the tensor as
// EI'_ij = √(c_i·c_j)·EI_ij (Bellows.Calibration), the test value about x
// scales by c_x alone, so c_x = EI_fit,x/CantileverEI(EI)[0] reproduces the
// bench exactly. NaN for a tensor that is not positive definite.
func CantileverEI(ei [2][2]float64) [2]float64 {
	xy := (ei[0][1] + ei[1][0]) / 2
	det := ei[0][0]*ei[1][1] - xy*xy
	if !(ei[0][0] > 0 && ei[1][1] > 0 && det > 0) {
		return [2]float64{math.NaN(), math.NaN()}
	}
	return [2]float64{det / ei[1][1], det / ei[0][0]}
}
