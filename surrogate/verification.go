package surrogate

// VerificationCase is a published (or derived) value that this package's
// production code must reproduce. plica verify prints it (package
// results/verify gathers the cases of every model package) and the
// package's tests run it; the value is written here and nowhere else.
type VerificationCase struct {
	Area      string // the heading plica verify lists it under
	Name      string
	Unit      string
	Published float64
	Tolerance float64 // relative to |Published| when Relative, else absolute
	Relative  bool
	Source    string // where Published comes from: author, title, year, equation or table
	Slow      bool   // left out by plica verify -quick and go test -short
	Compute   func() (float64, error)
}

// VerificationCases returns the package's verification cases: the shell
// element on cylinders, the EJMA equations on a published worked example,
// the strip model's flat-flank limit and the cantilever calibration fit.
func VerificationCases() []VerificationCase {
	return []VerificationCase{verifyCylinderAxial, verifyCylinderEdge, verifyEJMA, verifyStripFlat, verifyCalibration}
}

// calibrationVector is the synthetic cantilever-fit vector of surrogate/REFERENCE.md §5.4
// (derived from the equations of surrogate/REFERENCE.md §4.2): L = 100 mm,
// P = [0.05, 0.10, 0.15, 0.20] N, δ = [0.40, 0.83, 1.21, 1.62] mm, in SI.
func calibrationVector() []BenchPoint {
	loads := []float64{0.05, 0.10, 0.15, 0.20}
	defl := []float64{0.40, 0.83, 1.21, 1.62}
	pts := make([]BenchPoint, len(loads))
	for i := range loads {
		pts[i] = BenchPoint{Load: loads[i], Deflection: defl[i] * 1e-3, FreeLength: 0.100}
	}
	return pts
}

var (
	verifyCylinderAxial = VerificationCase{Area: "surrogate", Name: "shell element: straight cylinder axial stiffness (R=10, t=0.1, L=5, E=1000)",
		Published: 1256.6370614359173, Tolerance: 1e-9, Relative: true,
		Source:  "membrane solution 2πREt/L (exact); surrogate/REFERENCE.md §5.3",
		Compute: func() (float64, error) { return CylinderAxialStiffness(10, 0.1, 5, 1000, 0.3, 37) }}

	verifyCylinderEdge = VerificationCase{Area: "surrogate", Name: "shell element: semi-infinite cylinder radial edge stiffness 2β³D",
		Published: 0.388982, Tolerance: 1e-5, Relative: true,
		Source:  "Timoshenko & Woinowsky-Krieger, Theory of Plates and Shells, 1959 (from memory); surrogate/REFERENCE.md §5.3",
		Compute: func() (float64, error) { return CylinderEdgeStiffness(10, 0.1, 1000, 0.3, 480) }}

	verifyEJMA = VerificationCase{Area: "surrogate", Name: "EJMA worked example S1: axial rate per convolution f_iu", Unit: "N/m",
		Published: 4.02982e6, Tolerance: 1e-3, Relative: true,
		Source: "EJMA Standards equations as applied in a published worked calculation; surrogate/REFERENCE.md §5.2",
		Compute: func() (float64, error) {
			const in = 0.0254
			db, t, w := 38*in, 0.03*in, 1.095*in
			dm := EJMAMeanDiameter(db, w, t, 1)
			tp := EJMAFormedThickness(t, db, dm)
			return EJMAAxialRate(dm, 29.0e6*6894.757293168, tp, 1, w, 1.65), nil
		}}

	verifyStripFlat = VerificationCase{Area: "surrogate", Name: "strip model: U-profile Cf_strip(0) (flat flanks)",
		Published: 1, Tolerance: 1e-12,
		Source:  "derived, guided-cantilever flank; surrogate/REFERENCE.md §2.1, §2.4",
		Compute: func() (float64, error) { return UCfStrip(0), nil }}

	verifyCalibration = VerificationCase{Area: "calibration", Name: "cantilever EI fit of the synthetic vector (L = 100 mm)", Unit: "N·mm²",
		Published: 41084.6, Tolerance: 1e-5, Relative: true,
		Source: "derived least squares through the origin; surrogate/REFERENCE.md §4.2, §5.4",
		Compute: func() (float64, error) {
			f, err := FitCantilever(calibrationVector(), FitOptions{})
			return f.EI * 1e6, err
		}}
)
