//go:generate go run ./internal/wallgen

package surrogate

import (
	"fmt"
	"math"
	"sort"

	"plica/surrogate/convolution"
	"plica/surrogate/solid"
)

// WallTable is a generated table of the solid model's corrections to the
// thin-shell wall (convolution.WallFactors) on a rectilinear grid of
// (w/q, t/2ρ, w/Dm, ν) for one profile. Lookup interpolates the
// logarithms of the factors multilinearly; below the first t/2ρ and w/Dm
// grid points (the thin and flat limits, where the factors level off) it
// takes the first point.
type WallTable struct {
	// Profile of the table: Sinusoid, or UShape with rm = q/4.
	Profile Profile
	// Axes: w/q, t/(2ρ), w/Dm, ν, each ascending.
	Axes [][]float64
	// Axial, Bending and EI hold the factors, row-major (last axis
	// fastest); NaN where the solid model cannot mesh the point.
	Axial, Bending, EI []float64

	logs [3][]float64
}

// The generated wall tables (data in wall_table_gen.go), checked when the
// package is initialised.
var sineWallTable, uWallTable = sineWall.prepare(), uWall.prepare()

// WallTables returns the generated wall tables.
func WallTables() []*WallTable { return []*WallTable{sineWallTable, uWallTable} }

// Point returns the wall point of a grid index (one index per axis).
func (t *WallTable) Point(idx []int) convolution.WallPoint {
	p := convolution.WallPoint{Profile: solid.Sinusoid}
	if t.Profile == UShape {
		p.Profile = solid.UShape
	}
	p.DepthRatio, p.FoldRatio = t.Axes[0][idx[0]], t.Axes[1][idx[1]]
	p.DepthDiameter, p.Nu = t.Axes[2][idx[2]], t.Axes[3][idx[3]]
	return p
}

// Check reports a malformed table.
func (t *WallTable) Check() error {
	if len(t.Axes) != 4 {
		return fmt.Errorf("surrogate: wall table %v has %d axes, want 4", t.Profile, len(t.Axes))
	}
	size := 1
	for d, ax := range t.Axes {
		if len(ax) < 2 {
			return fmt.Errorf("surrogate: wall table %v axis %d has %d points", t.Profile, d, len(ax))
		}
		for i := 1; i < len(ax); i++ {
			if !(ax[i] > ax[i-1]) {
				return fmt.Errorf("surrogate: wall table %v axis %d not ascending at %d", t.Profile, d, i)
			}
		}
		size *= len(ax)
	}
	if len(t.Axial) != size || len(t.Bending) != size || len(t.EI) != size {
		return fmt.Errorf("surrogate: wall table %v size does not match its axes", t.Profile)
	}
	for i := range t.Axial {
		a, b, e := t.Axial[i], t.Bending[i], t.EI[i]
		if math.IsNaN(a) && math.IsNaN(b) && math.IsNaN(e) {
			continue
		}
		if !(a > 0 && b > 0 && e > 0) || !finite(a) || !finite(b) || !finite(e) {
			return fmt.Errorf("surrogate: wall table %v entry %d is not a positive finite factor", t.Profile, i)
		}
	}
	return nil
}

func (t *WallTable) prepare() *WallTable {
	if err := t.Check(); err != nil {
		panic(err)
	}
	for k, v := range [3][]float64{t.Axial, t.Bending, t.EI} {
		t.logs[k] = make([]float64, len(v))
		for i, x := range v {
			t.logs[k][i] = math.Log(x)
		}
	}
	return t
}

// Lookup interpolates the factors at (w/q, t/2ρ, w/Dm, ν); ok is false
// outside the grid or next to a cell the solid model could not mesh.
func (t *WallTable) Lookup(depthRatio, foldRatio, depthDiameter, nu float64) (f convolution.WallFactors, ok bool) {
	x := [4]float64{depthRatio, max(foldRatio, t.Axes[1][0]), max(depthDiameter, t.Axes[2][0]), nu}
	var lo [4]int
	var fr [4]float64
	for d := range 4 {
		ax := t.Axes[d]
		v := x[d]
		tol := 1e-9 * (ax[len(ax)-1] - ax[0])
		if !(v >= ax[0]-tol && v <= ax[len(ax)-1]+tol) {
			return f, false
		}
		i := sort.SearchFloat64s(ax, v) - 1
		i = max(0, min(i, len(ax)-2))
		lo[d] = i
		fr[d] = math.Max(0, math.Min(1, (v-ax[i])/(ax[i+1]-ax[i])))
	}
	var acc [3]float64
	for c := range 16 {
		wgt := 1.0
		off := 0
		for d := range 4 {
			k := lo[d]
			if c>>d&1 == 1 {
				k++
				wgt *= fr[d]
			} else {
				wgt *= 1 - fr[d]
			}
			off = off*len(t.Axes[d]) + k
		}
		if wgt == 0 {
			continue
		}
		if math.IsNaN(t.logs[0][off]) {
			return f, false
		}
		for k := range acc {
			acc[k] += wgt * t.logs[k][off]
		}
	}
	return convolution.WallFactors{Axial: math.Exp(acc[0]), Bending: math.Exp(acc[1]), EI: math.Exp(acc[2])}, true
}

// wallTableFor returns the wall table of a profile, nil for trapezoids.
func wallTableFor(p Profile) *WallTable {
	switch p {
	case Sinusoid:
		return sineWallTable
	case UShape:
		return uWallTable
	}
	return nil
}

// FoldRatio returns t/(2ρ), half the wall over the smallest radius of
// curvature ρ of the wall's midline: ρ = q²/(2π²w) for the sinusoid, the
// crest radius for the U; +Inf for the trapezoid, whose meridian has
// kinks.
func (g Geometry) FoldRatio() float64 {
	switch g.Profile {
	case Sinusoid:
		return math.Pi * math.Pi * g.Depth * g.Wall / (g.Pitch * g.Pitch)
	case UShape:
		return g.Wall / (2 * g.crestRadius())
	}
	return math.Inf(1)
}

// wallFromTable interpolates the solid model's corrections for the
// bellows (convolution.WallFactors, isotropic wall with the bellows' ν)
// from the generated tables; ok is false for trapezoids, U-profiles with
// rm ≠ q/4 and points outside the tables.
func (b *Bellows) wallFromTable() (convolution.WallFactors, bool) {
	g := &b.Geometry
	if g.Profile == Sinusoid || (g.Profile == UShape && math.Abs(g.crestRadius()-g.Pitch/4) <= 1e-9*g.Pitch) {
		return wallTableFor(g.Profile).Lookup(g.Depth/g.Pitch, g.FoldRatio(), g.Depth/(2*g.MeanRadius()), b.Material.Poisson)
	}
	return convolution.WallFactors{}, false
}

// thinWall are the factors of the thin-shell wall.
var thinWall = convolution.WallFactors{Axial: 1, Bending: 1, EI: 1}

// wallDirect runs the solid model for the bellows' corrections on its
// default mesh (convolution.Wall, isotropic wall with the bellows' ν).
// ok is false where the solid model has nothing to say (trapezoids, or a
// geometry it cannot mesh); the factors are then those of the thin-shell
// wall.
func (b *Bellows) wallDirect() (convolution.WallFactors, bool) {
	m := b.Geometry.HalfMeridian()
	f, err := convolution.Wall(&m, b.Geometry.Wall, b.Material.Poisson, solid.MeshSize{})
	if err != nil {
		return thinWall, false
	}
	return f, true
}
