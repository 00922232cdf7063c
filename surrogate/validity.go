package surrogate

import (
	"fmt"
	"math"
	"strconv"
)

// The quantities of the validated range (Validity).
const (
	QuantityWallDepth    = "t/w"  // wall over convolution depth
	QuantityFold         = "t/2ρ" // half the wall over the fold radius of the midline
	QuantityDepthDiam    = "w/Dm" // depth over mean diameter
	QuantityDepthPitch   = "w/q"  // depth over pitch
	QuantityConvolutions = "N"    // convolutions along the bellows (length/pitch)
	QuantityOpening      = "e/w"  // largest opening of one convolution over its depth
	// spined bellows only (SpineWidth > 0): the spine's factors (GJ, EA, EI)
	QuantitySpine           = "b_s/(π·Dm)"   // spine arc fraction
	QuantitySpinePitchDiam  = "q/Dm (spine)" // pitch over mean diameter of a spined bellows
	QuantitySpineDepthPitch = "w/q (spine)"  // depth over pitch of a spined bellows
	// QuantitySpineStrain is the spine arc fraction again, checked against
	// the wall strain's limit: no spine is validated there (Max 0), so
	// every spined bellows lies outside it, whatever the stiffness limits
	// above say.
	QuantitySpineStrain = "b_s/(π·Dm) (wall strain)"
)

// Limit is one edge pair of the validated range: inside [Min, Max] the
// model named by Model has been tested against the reference named by
// Basis (see the tests of validity_test.go and fecheck's TestFE…).
type Limit struct {
	Quantity string
	// Profiles the limit applies to; nil: every profile.
	Profiles []Profile
	Min, Max float64 // Max may be +Inf
	Model    string
	Basis    string
}

// Validity is the validated range of the surrogate, one table for every
// model. Section.OutOfRange reports the geometric limits (t/w, t/2ρ,
// w/Dm, w/q); the convolution count and the opening per convolution
// depend on the bellows' length and curvature, which the caller knows
// (CheckLimit).
//
// A trapezoid's meridian has kinks, so its fold ratio is infinite: its
// wall strain comes from the thin-shell model without a thick-wall
// correction, and every trapezoid lies outside the t/2ρ limit.
var Validity = []Limit{
	{Quantity: QuantityWallDepth, Min: 0, Max: 0.5,
		Model: "stiffness (strip/shell model with hoop stiffening)",
		Basis: "CalculiX 3-D solid model of the periodic convolution (fecheck TestFESolidVsCalculiX)"},
	{Quantity: QuantityFold, Profiles: []Profile{Sinusoid, UShape}, Min: 0, Max: 0.8,
		Model: "thick-wall strain (axisymmetric solid model)",
		Basis: "CalculiX 3-D solid model; solid model convergence study; Golovin and Winkler–Bach curved bar"},
	{Quantity: QuantityFold, Profiles: []Profile{Trapezoid}, Min: 0, Max: 0,
		Model: "thick-wall strain (none for a kinked meridian: thin-shell strain only)",
		Basis: "no solid model of a kinked wall"},
	{Quantity: QuantityDepthDiam, Min: 0, Max: 0.25,
		Model: "bending of the convolution (harmonic-1 solid model) and beam analogy",
		Basis: "CalculiX 3-D solid model"},
	{Quantity: QuantityDepthPitch, Profiles: []Profile{Sinusoid}, Min: 0.15, Max: 1.6,
		Model: "wall strain and EI of the sinusoid (solid model tables)",
		Basis: "CalculiX 3-D solid model"},
	{Quantity: QuantityDepthPitch, Profiles: []Profile{UShape}, Min: 0.6, Max: 1.6,
		Model: "wall strain and EI of the U profile (solid model tables)",
		Basis: "CalculiX 3-D solid model"},
	{Quantity: QuantitySpine, Profiles: []Profile{Sinusoid, UShape}, Min: spineBetaMin, Max: spineBetaMax,
		Model: spineModel, Basis: spineBasis},
	{Quantity: QuantitySpine, Profiles: []Profile{Trapezoid}, Min: 0, Max: 0,
		Model: "torsion of a spined bellows (no generated factor for a trapezoid)",
		Basis: "no 3-D shell runs of a spined trapezoid"},
	{Quantity: QuantitySpinePitchDiam, Profiles: []Profile{Sinusoid}, Min: 0.16, Max: 0.4,
		Model: spineModel, Basis: spineBasis},
	{Quantity: QuantitySpinePitchDiam, Profiles: []Profile{UShape}, Min: 0.08 / 0.75, Max: 0.2 / 0.75,
		Model: spineModel, Basis: spineBasis},
	{Quantity: QuantitySpineDepthPitch, Profiles: []Profile{Sinusoid}, Min: spineSineWQ[0], Max: spineSineWQ[1],
		Model: spineModel, Basis: spineBasis},
	{Quantity: QuantitySpineDepthPitch, Profiles: []Profile{UShape}, Min: spineUWQ[0], Max: spineUWQ[1],
		Model: spineModel, Basis: spineBasis},
	{Quantity: QuantitySpineStrain, Min: 0, Max: 0,
		Model: "wall strain of a spined bellows (none: uncorrected for the spine, it reads −75 … +35 % of the 3-D shell model's peak strain; check with plica fe and a prototype)",
		Basis: "CalculiX 3-D shell model with the spine and its blends: surrogate −75 … +35 % of the FE peak, which sits on the blend's kink at the spine's edge and is not shown mesh-converged there (surrogate/REFERENCE.md §6.4)"},
	{Quantity: QuantityConvolutions, Min: 5, Max: math.Inf(1),
		Model: "beam analogy (end effects of the end rings negligible)",
		Basis: "common practice"},
	{Quantity: QuantityOpening, Min: 0, Max: 0.1,
		Model: "linear elastic wall (small movement per convolution, no contact)",
		Basis: "common practice"},
}

const (
	spineModel = "stiffness of a spined bellows (generated 3-D shell factors of GJ, EA and EI)"
	spineBasis = "CalculiX 3-D shell model with the spine and its blends (spinegen table; fecheck TestFESpineGJ on other geometries)"
)

// The w/q ranges over which the spine's factors (GJ, EA, EI), generated
// at one w/q per profile, were tested against CalculiX (fecheck
// TestFESpineGJ).
var (
	spineSineWQ = [2]float64{0.5, 0.65}
	spineUWQ    = [2]float64{0.75, 0.9}
)

// RangeNote is one limit of Validity a bellows lies outside.
type RangeNote struct {
	Quantity string
	Value    float64
	Min, Max float64
	Model    string
}

// String names the limit, e.g. "t/2ρ = 0.93 is above 0.8, the validated
// range of the thick-wall strain (axisymmetric solid model)".
func (n RangeNote) String() string {
	side, edge := "above", n.Max
	if n.Value < n.Min {
		side, edge = "below", n.Min
	}
	v := "∞"
	if !math.IsInf(n.Value, 0) {
		v = strconv.FormatFloat(n.Value, 'g', 3, 64)
	}
	return fmt.Sprintf("%s = %s is %s %s, the validated range of the %s", n.Quantity, v, side, strconv.FormatFloat(edge, 'g', 3, 64), n.Model)
}

// Excess is how far the value lies outside the limit, relative to the
// edge (to the range width for an edge at 0), at most 10 (an infinite
// value): positive outside, 0 at the edge.
func (n RangeNote) Excess() float64 {
	x := 0.0
	switch {
	case n.Value > n.Max:
		x = (n.Value - n.Max) / math.Max(math.Abs(n.Max), 1e-3)
	case n.Value < n.Min:
		x = (n.Min - n.Value) / math.Max(math.Abs(n.Min), 1e-3)
	}
	if !(x <= 10) {
		x = 10
	}
	return x
}

func (l *Limit) applies(p Profile) bool {
	if l.Profiles == nil {
		return true
	}
	for _, q := range l.Profiles {
		if q == p {
			return true
		}
	}
	return false
}

// CheckLimit returns the note of every limit of quantity for profile p
// that the value v lies outside.
func CheckLimit(quantity string, p Profile, v float64) []RangeNote {
	var out []RangeNote
	for i := range Validity {
		l := &Validity[i]
		if l.Quantity != quantity || !l.applies(p) {
			continue
		}
		if !(v >= l.Min && v <= l.Max) {
			out = append(out, RangeNote{Quantity: quantity, Value: v, Min: l.Min, Max: l.Max, Model: l.Model})
		}
	}
	return out
}

// OutOfRange returns the geometric limits of Validity (t/w, t/2ρ, w/Dm,
// w/q; and for a spined bellows the spine arc fraction, q/Dm and w/q of
// the spine's factors, then the wall strain's spine limit, which every
// spined bellows lies outside) the geometry lies outside, in the order of
// Validity.
func (g Geometry) OutOfRange() []RangeNote {
	var out []RangeNote
	out = append(out, CheckLimit(QuantityWallDepth, g.Profile, g.Wall/g.Depth)...)
	out = append(out, CheckLimit(QuantityFold, g.Profile, g.FoldRatio())...)
	out = append(out, CheckLimit(QuantityDepthDiam, g.Profile, g.Depth/(2*g.MeanRadius()))...)
	out = append(out, CheckLimit(QuantityDepthPitch, g.Profile, g.Depth/g.Pitch)...)
	if g.SpineWidth > 0 {
		out = append(out, CheckLimit(QuantitySpine, g.Profile, g.SpineFraction())...)
		out = append(out, CheckLimit(QuantitySpinePitchDiam, g.Profile, g.Pitch/(2*g.MeanRadius()))...)
		out = append(out, CheckLimit(QuantitySpineDepthPitch, g.Profile, g.Depth/g.Pitch)...)
		out = append(out, CheckLimit(QuantitySpineStrain, g.Profile, g.SpineFraction())...)
	}
	return out
}
