package surrogate

import "plica/surrogate/convolution"

// Profile is the meridian shape of one convolution.
type Profile int

const (
	// Sinusoid: r(z) = Rm − (w/2)·cos(2πz/q).
	Sinusoid Profile = iota
	// UShape: semicircular crown and root of radius CrestRadius joined by
	// straight radial flanks.
	UShape
	// Trapezoid: flat crown and root joined by straight sloped flanks;
	// FlatFraction of the pitch is flat (split equally between crown and root).
	Trapezoid
)

// Fidelity selects the stiffness model.
type Fidelity int

const (
	// Strip is the closed-form curved-strip model with the generated hoop
	// stiffening correction (microseconds).
	Strip Fidelity = iota
	// Shell is the axisymmetric thin-shell finite-element model of half a
	// convolution (milliseconds).
	Shell
)

// Material holds the wall material. Printed walls are orthotropic: the
// meridional direction crosses the layers in an upright print.
type Material struct {
	Name            string
	ModulusAcross   float64 // across-layer (Z) Young's modulus, Pa
	ModulusInLayer  float64 // in-layer (XY) Young's modulus, Pa
	Poisson         float64 // Poisson ratio
	Density         float64 // kg/m³
	AllowableStrain float64 // allowable meridional (across-layer) strain
}

// Geometry describes the bellows wall. Diameters are to the outer surface
// of the crown.
type Geometry struct {
	OuterDiameter float64 // outside diameter at the crown, m
	Depth         float64 // convolution height w (root to crown, centreline), m
	Pitch         float64 // convolution pitch q, m
	Wall          float64 // wall thickness t, m
	Profile       Profile
	CrestRadius   float64 // UShape: crown/root radius rm, m (0 → q/4)
	FlatFraction  float64 // Trapezoid: flat fraction of the pitch, 0..1
	Helical       bool    // single-start helical convolutions (lead = pitch)
	SpineWidth    float64 // arc width of an axial strip of plain wall, m (0: none)
	SpineAngle    float64 // angular position of the spine about the axis from the tube's own +x, rad
}

// Bellows is one bellows: geometry, material and calibration.
type Bellows struct {
	Geometry
	Material Material
	// Calibration multiplies the predicted EI about the bellows' own x and
	// y axes. A zero entry means 1 (uncalibrated).
	Calibration [2]float64
}

// Section holds the section properties of a bellows treated as a beam.
type Section struct {
	AxialRatePerConvolution float64       // k_conv, N/m
	EA                      float64       // axial stiffness of the equivalent beam, N
	EI                      [2][2]float64 // bending stiffness tensor about own x, y, N·m² (calibrated)
	PrincipalEI             [2]float64    // principal values (max first), N·m²
	PrincipalAngle          float64       // angle of the first principal axis from own x, rad
	GJ                      float64       // torsional stiffness, N·m²
	MassPerLength           float64       // kg/m
	OpeningPerCurvature     float64       // extreme convolution opening per unit curvature change, m per 1/m
	StrainPerCurvature      float64       // peak meridional wall strain per unit curvature change, per 1/m
	StrainPerMovement       float64       // peak meridional wall strain per unit axial extension of one convolution, 1/m
	HoopFactor              float64       // hoop-stiffening factor H = k_shell/k_strip applied (Strip) or implied (Shell)
	Fidelity                Fidelity
	// WallFactors are the solid model's corrections applied to the
	// thin-shell wall (axial strain, bending strain, EI); all 1 when
	// ThickWall is false.
	WallFactors convolution.WallFactors
	// ThickWall is true when the solid wall model (generated tables or a
	// direct solve) gave the strain and EI; false for trapezoids and for
	// geometries the solid model cannot mesh, which keep the thin-shell
	// wall.
	ThickWall bool
	// OutOfRange lists every limit of Validity the geometry lies outside
	// (empty inside the validated range).
	OutOfRange []RangeNote
}
