package export

import (
	"fmt"
	"math"

	"plica/surrogate"
)

// DefaultSides is the default number of polygon sides about the axis: the
// k-gon carries the area factor k·sin(2π/k)/(2π) = 1 − 4.0e-4 at k = 128
// (common practice), so with DefaultPerPiece meridian points the mesh
// volume stays within 0.5 % of the surrogate's wall volume.
//
// HelicalPerPiece is the same for a helical wall, whose two run-out turns
// would otherwise take a 25-turn bellows over 20 MB; the meridian
// polygon's volume shortfall grows as the inverse square of the points a
// piece, and stays under 0.2 % on the tested profiles at 14
// (results/export/REFERENCE.md §5).
const (
	DefaultSides    = 128
	DefaultPerPiece = 16
	HelicalPerPiece = 14
	MaxSides        = 4096
)

// AreaFactor returns k·sin(2π/k)/(2π), the area of the regular k-gon over
// that of its circumcircle.
func AreaFactor(k int) float64 {
	return float64(k) * math.Sin(2*math.Pi/float64(k)) / (2 * math.Pi)
}

// Bellows meshes a bellows of the geometry over length (m, whole
// convolutions: the length rounded to the nearest pitch, at least one)
// with plain collars of length collar (m) at both ends, k sides about
// the axis. The axis is +z from z = 0; output in mm. A helical geometry
// gets that many full-depth turns and a run-out of one pitch at each end
// between them and the collars (results/export/REFERENCE.md §5). A spine
// is meshed with its blends (results/export/REFERENCE.md §7).
func Bellows(g surrogate.Geometry, length, collar float64, k int) (Mesh, int, error) {
	if k < 3 || k > MaxSides {
		return Mesh{}, 0, fmt.Errorf("segments %d: expected 3 to %d", k, MaxSides)
	}
	n := int(math.Round(length / g.Pitch))
	if n < 1 {
		n = 1
	}
	if g.Helical {
		m, err := helical(g, n, collar, k)
		return m, n, err
	}
	if g.SpineWidth > 0 {
		m, err := spinedBellows(g, n, collar, k, DefaultPerPiece)
		return m, n, err
	}
	s, err := Wall(g.HalfMeridian(), n, g.Wall, collar, DefaultPerPiece)
	if err != nil {
		return Mesh{}, 0, err
	}
	m, err := Revolve(s, k)
	return m, n, err
}

// Bore returns the smallest inner diameter of the printed wall, m: twice
// the smallest radius of the wall section (at the roots and collars).
func Bore(g surrogate.Geometry) (float64, error) {
	s, err := Wall(g.HalfMeridian(), 1, g.Wall, 0, DefaultPerPiece)
	if err != nil {
		return 0, err
	}
	r := math.Inf(1)
	for _, p := range s {
		r = math.Min(r, p[0])
	}
	return 2 * r * 1e-3, nil
}
