package kinematics

// Tube is one tube (or bellows) of a nested set, described in its own
// material frame.
type Tube struct {
	// StraightLength is the proximal straight length Ls, m.
	StraightLength float64
	// CurvedLength is the distal pre-curved length Lc, m.
	CurvedLength float64
	// Precurvature is (u*_x, u*_y) of the curved part in the tube's own
	// frame, 1/m. A tube pre-curved by a scalar κ toward its own +x has
	// Precurvature = {0, κ}.
	Precurvature [2]float64
	// Bending is the symmetric 2×2 bending stiffness tensor about the tube's
	// own x and y axes, N·m². Bending[0][0] = EI_x resists u_x,
	// Bending[1][1] = EI_y resists u_y.
	Bending [2][2]float64
	// Torsion is GJ, N·m².
	Torsion float64
	// LinearDensity is the mass per length, kg/m (used by loaded statics).
	LinearDensity float64
}

// Length returns the total length Ls + Lc, m.
func (t Tube) Length() float64 { return t.StraightLength + t.CurvedLength }

// Thread couples tube Inner (0-based) to tube Inner+1 by a single-start
// helical thread of the given lead: rotating the inner tube by Δθ relative
// to the outer one advances the inner tube axially by Lead·Δθ/(2π).
//
// Sign convention: Δθ = θ_Inner − θ_Inner+1, and a positive Δθ (the inner
// tube turned by the right-hand rule about +z relative to the outer one)
// advances the inner tube distally, toward +z (a right-handed thread; a
// negative Lead models a left-handed one). The effective insertion of the
// inner tube is β_Inner + Lead·(θ_Inner − θ_Inner+1)/(2π), where β_Inner is
// its insertion at zero relative rotation. A threaded tube rides along with
// the tube it is threaded into, so along a chain of threads the advances add
// up from the outside in. Every evaluation (CheckActuation, Links, Tip,
// Backbone, Solver) applies threads automatically.
type Thread struct {
	Inner int
	Lead  float64 // m per turn
}

// Robot is a set of nested tubes, innermost first.
type Robot struct {
	Tubes   []Tube
	Threads []Thread
}

// Actuation holds the base angle θ_i (rad) and insertion β_i (m, ≤ 0 means
// the tube's base lies behind the base plane) of every tube, innermost
// first.
type Actuation struct {
	Theta []float64
	Beta  []float64
}

// Pose is a rigid transform: rotation R (body → base, row-major) and
// position P, m.
type Pose struct {
	R [3][3]float64
	P [3]float64
}

// Link is one constant-curvature piece of the backbone.
type Link struct {
	Start, End float64    // arc length along the backbone, m
	U          [3]float64 // equilibrium body-frame curvature (3.1), 1/m
	// K is the composite stiffness Σ R_z(θ_i) K_i R_z(θ_i)ᵀ of the tubes
	// present in the link (3×3, z entry Σ GJ_i), N·m². Its inverse maps a
	// body-frame moment to a curvature change (loaded statics).
	K [3][3]float64
	// MassPerLength is Σ of the present tubes' linear densities, kg/m.
	MassPerLength float64
	// Present is a bit set of the tubes present in the link (bit i: tube i).
	Present uint64
	// Curved is a bit set of the present tubes that are curved in the link.
	Curved uint64
}
