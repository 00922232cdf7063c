package objective

import (
	"fmt"
	"math"
	"slices"
)

// Scenario is everything besides the bellows themselves that the scores
// need: the load, the printer, the workspace sampling, task points and the
// requirements a design must meet. The zero value of every field means its
// documented default.
type Scenario struct {
	Load         Load
	Printer      Printer
	Workspace    Workspace
	Tasks        []TaskPoint
	Requirements Requirements
	// Scatter is the print scatter for robust checks (nil: none).
	Scatter *Scatter
}

// Load is the payload and gravity.
type Load struct {
	// PayloadMass hangs at the tip, kg.
	PayloadMass float64
	// TipForce is an extra dead force at the tip (base frame), N.
	TipForce [3]float64
	// TipMoment is a dead moment at the tip (base frame), N·m.
	TipMoment [3]float64
	// Gravity is the gravity vector in the base frame, m/s². Zero means
	// (0, −9.80665, 0): the arm points horizontally and gravity pulls
	// toward the base frame's −y.
	Gravity [3]float64
	// NoGravity switches gravity (self-weight and payload weight) off.
	NoGravity bool
}

// StandardGravity is the standard acceleration of gravity, m/s² (CGPM 1901,
// the conventional value).
const StandardGravity = 9.80665

// GravityVector returns the gravity vector the scores use.
func (l Load) GravityVector() [3]float64 {
	if l.NoGravity {
		return [3]float64{}
	}
	if l.Gravity == ([3]float64{}) {
		return [3]float64{0, -StandardGravity, 0}
	}
	return l.Gravity
}

// Printer describes the printing process for the printability checks.
type Printer struct {
	// Process is the printing process; the zero value is FFF.
	Process Process
	// LineWidth is the extrusion line width, m (FFF). Zero: 1.2 × Nozzle.
	LineWidth float64
	// Nozzle is the nozzle diameter, m (FFF). Zero: 0.4 mm.
	Nozzle float64
	// LayerHeight is the layer height, m. Zero: 0.2 mm.
	LayerHeight float64
	// OverhangLimit is the largest printable wall angle from vertical, rad.
	// Zero: 45° for FFF, no limit for resin and powder.
	OverhangLimit float64
	// MinWall is the smallest printable wall, m. Zero: one line width (FFF),
	// 0.8 mm (powder), 0.5 mm (resin).
	MinWall float64
}

// Workspace sets how the actuation space is sampled.
type Workspace struct {
	// RelativeSteps samples the relative rotation of neighbouring bellows
	// over a full turn. Zero: 64.
	RelativeSteps int
	// BaseSteps samples the common rotation of the whole set over a full
	// turn. Zero: 64.
	BaseSteps int
	// InsertionSteps samples each insertion range. Zero: 8.
	InsertionSteps int
	// Samples is the number of low-discrepancy samples used when the
	// actuation space has more than three dimensions. Zero: 4096.
	Samples int
	// VoxelSize is the edge of the voxels used for the reachable volume, m.
	// Zero: 2 mm.
	VoxelSize float64
	// Insertion is the insertion range [lo, hi] of each bellows, m,
	// innermost first; a missing or zero-width range means fixed at lo.
	Insertion [][2]float64
}

// Largest workspace sample counts. The cost of an evaluation grows with
// the number of shapes sampled (at most Samples, or the grid when it is
// smaller) times BaseSteps; these caps keep the largest evaluation to
// seconds, not hours. Each is 16 to 64 times its default.
const (
	MaxRelativeSteps  = 4096
	MaxBaseSteps      = 1024
	MaxInsertionSteps = 1024
	MaxSamples        = 65536
)

// check refuses negative counts and counts above the caps.
func (w Workspace) check() error {
	for _, c := range []struct {
		name   string
		v, max int
	}{
		{"relative steps", w.RelativeSteps, MaxRelativeSteps},
		{"base steps", w.BaseSteps, MaxBaseSteps},
		{"insertion steps", w.InsertionSteps, MaxInsertionSteps},
		{"samples", w.Samples, MaxSamples},
	} {
		if c.v < 0 || c.v > c.max {
			return fmt.Errorf("workspace %s %d is out of range (expected 0 for the default, or up to %d)", c.name, c.v, c.max)
		}
	}
	if !(w.VoxelSize >= 0) || math.IsInf(w.VoxelSize, 0) {
		return fmt.Errorf("workspace voxel size %g m is out of range (expected 0 for the default, or a finite size > 0)", w.VoxelSize)
	}
	return nil
}

// TaskPoint is a point the tip should reach.
type TaskPoint struct {
	Position  [3]float64 // base frame, m
	Tolerance float64    // position tolerance, m (zero: 1 mm)
	// Direction, when non-zero, is the wanted tip tangent (base frame).
	Direction [3]float64
	// DirectionTolerance is the allowed angle to Direction, rad (zero: 5°).
	DirectionTolerance float64
	// Unloaded checks the point on the shape without gravity (the file's
	// loaded = false); by default the loaded shape is checked.
	Unloaded bool
}

// Requirements are the limits a design must meet. A zero limit is not
// checked, except where a default is stated.
type Requirements struct {
	MaxTipSag            float64 // m
	MinReach             float64 // m
	MinBendAngleRange    float64 // rad
	MaxResidualCurvature float64 // 1/m
	MaxStraightTipOffset float64 // m
	MaxStraightTipAngle  float64 // rad, tip tangent from the base axis at the straightest configuration
	// StrainSafetyFactor divides the material's allowable strain (which is
	// already a design value). Zero: 1.
	StrainSafetyFactor float64
	// MinStabilityMargin on 1 − L/L_crit. Zero: 0 (snap-free required).
	MinStabilityMargin float64
	// MinClearance between neighbouring bellows (radial), m. Zero: 0.2 mm,
	// unless MinClearanceSet says an explicit 0 was meant.
	MinClearance    float64
	MinClearanceSet bool
	// MinTaskCoverage is the fraction 0..1 of task points to reach. Zero:
	// 1 when task points are given, unless MinTaskCoverageSet says an
	// explicit 0 was meant.
	MinTaskCoverage    float64
	MinTaskCoverageSet bool
	MaxMass            float64 // kg
	MinPayloadToWeight float64 // payload mass / bellows mass
	// MinPassProbability is the chance constraint of a robust search and
	// plica check -robust: every check passes with at least this
	// probability under the scenario's Scatter (0: none). The nominal
	// checks do not read it.
	MinPassProbability float64
	// OutsideValidatedRange switches off the validated_range checks:
	// bellows outside surrogate.Validity are still warned about, but a
	// search no longer treats leaving the range as a constraint.
	OutsideValidatedRange bool
}

// Process is a printing process.
type Process int

// The printing processes.
const (
	FFF    Process = iota // fused filament fabrication, the default
	Resin                 // vat photopolymerisation
	Powder                // powder bed fusion
)

var processNames = []string{FFF: "fff", Resin: "resin", Powder: "powder"}

// ProcessNames lists the process names, in value order.
func ProcessNames() []string { return slices.Clone(processNames) }

// String returns the process's name as files write it.
func (p Process) String() string {
	if p >= 0 && int(p) < len(processNames) {
		return processNames[p]
	}
	return fmt.Sprintf("process(%d)", int(p))
}

// MarshalText writes the process's name.
func (p Process) MarshalText() ([]byte, error) {
	if p < 0 || int(p) >= len(processNames) {
		return nil, fmt.Errorf("process(%d) has no name", int(p))
	}
	return []byte(processNames[p]), nil
}

// UnmarshalText reads a process name; an unknown one is a
// *surrogate.InputError (key "process") that lists the names.
func (p *Process) UnmarshalText(text []byte) error {
	v, err := parseName(processNames, text, "process")
	if err == nil {
		*p = Process(v)
	}
	return err
}
