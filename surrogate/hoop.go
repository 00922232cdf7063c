//go:generate go run ./internal/hoopgen

package surrogate

import (
	"errors"
	"fmt"
	"math"
	"sort"

	"plica/surrogate/convolution"
)

// ThinWall is the smallest wall ratio of the generated tables (t/rm for
// U-profiles, t/w for sinusoids and trapezoids), which stands for the thin
// limit (convolution.ThinWall). Thinner designs use the first grid point.
const ThinWall = convolution.ThinWall

// ShapePoint locates a convolution shape on the hoop-stiffening grids
// (surrogate/REFERENCE.md §1.1, §2.2). Printed walls use tp = t.
type ShapePoint struct {
	Profile Profile
	// C1 = 2·rm/w (UShape only; rm = q/4).
	C1 float64
	// C2 is the crown radius in shell boundary-layer lengths:
	// UShape C2 = 1.82·rm/sqrt(Dm·t); Sinusoid and Trapezoid
	// C2q = q/(2.2·sqrt(Dm·t)).
	C2 float64
	// DepthRatio is w/q (Sinusoid, Trapezoid).
	DepthRatio float64
	// FlatFraction is the trapezoid's flat fraction of the pitch.
	FlatFraction float64
	// Wall is the wall ratio: UShape t/rm; Sinusoid, Trapezoid t/w
	// (> 0; ThinWall for the thin limit).
	Wall float64
	// Poisson is ν.
	Poisson float64
}

// ErrNoBore is returned by ShapeFactors for a shape point whose root
// inner radius Dm/2 − w/2 − t/2 is not positive; the generated tables hold
// NaN there, and Lookup reports such cells as outside the table.
var ErrNoBore = convolution.ErrNoBore

// shape returns the isotropic convolution of a shape point at Dm = 1
// (convolution.Shape).
func (p ShapePoint) shape() (convolution.Shape, error) {
	switch p.Profile {
	case UShape:
		return convolution.UShapePoint(p.C1, p.C2, p.Wall, p.Poisson)
	case Sinusoid:
		return convolution.SinusoidPoint(p.DepthRatio, p.C2, p.Wall, p.Poisson)
	case Trapezoid:
		return convolution.TrapezoidPoint(p.FlatFraction, p.DepthRatio, p.C2, p.Wall, p.Poisson)
	}
	return convolution.Shape{}, fmt.Errorf("surrogate: unknown profile %d", int(p.Profile))
}

// ShapeFactors runs the shell model (elements per arc, flank or flat; five
// times as many per half sinusoid) and the r-weighted strip model on the
// isotropic bellows of a shape point and returns the hoop-stiffening
// factor H = k_shell/k_strip and the strain factor ε_shell/ε_strip (peak
// meridional surface strain at equal movement), as
// convolution.Shape.Factors does for the generator of the tables.
func ShapeFactors(p ShapePoint, elements int) (hoop, strain float64, err error) {
	s, err := p.shape()
	if err != nil {
		return 0, 0, err
	}
	return s.Factors(elements)
}

// FactorTable is a generated table of hoop and strain factors on a
// rectilinear grid. Lookup interpolates the logarithms of the factors
// multilinearly (bilinear in the two shape parameters, linear in the wall
// ratio, ν
// and the trapezoid's flat fraction); the factors grow roughly
// exponentially with C2, which the logarithm follows better.
type FactorTable struct {
	// Profile of the table.
	Profile Profile
	// Axes holds the grid of every dimension, ascending. UShape: C1, C2,
	// t/rm, ν; Sinusoid: w/q, C2q, t/w, ν; Trapezoid: flat fraction, w/q,
	// C2q, t/w, ν. The wall-ratio axis starts at ThinWall.
	Axes [][]float64
	// Hoop and Strain hold the factors, row-major (last axis fastest); NaN
	// where the shape has no bore (ErrNoBore).
	Hoop, Strain []float64
	// Elements is the shell resolution the table was generated with.
	Elements int
	// logH and logS cache the logarithms of Hoop and Strain.
	logH, logS []float64
}

// The generated tables (data in hoop_table_gen.go), checked and given
// their logarithms when the package is initialised. Outside them Strip
// fidelity falls back to the shell model.
var uTable, sineTable, trapTable = uFactors.prepare(), sineFactors.prepare(), trapFactors.prepare()

// Tables returns the generated tables.
func Tables() []*FactorTable { return []*FactorTable{uTable, sineTable, trapTable} }

// Point returns the shape point of a grid index (one index per axis).
func (t *FactorTable) Point(idx []int) ShapePoint {
	x := make([]float64, len(idx))
	for i, k := range idx {
		x[i] = t.Axes[i][k]
	}
	n := len(x)
	p := ShapePoint{Profile: t.Profile, Wall: x[n-2], Poisson: x[n-1]}
	switch t.Profile {
	case UShape:
		p.C1, p.C2 = x[0], x[1]
	case Sinusoid:
		p.DepthRatio, p.C2 = x[0], x[1]
	case Trapezoid:
		p.FlatFraction, p.DepthRatio, p.C2 = x[0], x[1], x[2]
	}
	return p
}

// coords returns the table coordinates of a shape point; a wall ratio
// below ThinWall is taken at ThinWall.
func (t *FactorTable) coords(p ShapePoint) (x [5]float64, n int) {
	wr := max(p.Wall, ThinWall)
	switch t.Profile {
	case UShape:
		return [5]float64{p.C1, p.C2, wr, p.Poisson}, 4
	case Sinusoid:
		return [5]float64{p.DepthRatio, p.C2, wr, p.Poisson}, 4
	default:
		return [5]float64{p.FlatFraction, p.DepthRatio, p.C2, wr, p.Poisson}, 5
	}
}

// Lookup interpolates the factors at a shape point; ok is false outside
// the grid.
func (t *FactorTable) Lookup(p ShapePoint) (hoop, strain float64, ok bool) {
	if t == nil {
		return 0, 0, false
	}
	x, n := t.coords(p)
	if n != len(t.Axes) {
		return 0, 0, false
	}
	var lo [5]int
	var fr [5]float64
	for d := 0; d < n; d++ {
		ax := t.Axes[d]
		v := x[d]
		tol := 1e-9 * (ax[len(ax)-1] - ax[0])
		if !(v >= ax[0]-tol && v <= ax[len(ax)-1]+tol) {
			return 0, 0, false
		}
		i := sort.SearchFloat64s(ax, v) - 1 // ax[i] < v ≤ ax[i+1]
		i = max(0, min(i, len(ax)-2))
		lo[d] = i
		fr[d] = math.Max(0, math.Min(1, (v-ax[i])/(ax[i+1]-ax[i])))
	}
	for c := 0; c < 1<<n; c++ {
		wgt := 1.0
		off := 0
		for d := 0; d < n; d++ {
			k := lo[d]
			if c>>d&1 == 1 {
				k++
				wgt *= fr[d]
			} else {
				wgt *= 1 - fr[d]
			}
			off = off*len(t.Axes[d]) + k
		}
		if wgt != 0 {
			if math.IsNaN(t.logH[off]) {
				return 0, 0, false
			}
			hoop += wgt * t.logH[off]
			strain += wgt * t.logS[off]
		}
	}
	return math.Exp(hoop), math.Exp(strain), true
}

// Check reports a malformed table (axis order, sizes).
func (t *FactorTable) Check() error {
	size := 1
	for d, ax := range t.Axes {
		if len(ax) < 2 {
			return fmt.Errorf("surrogate: table %v axis %d has %d points", t.Profile, d, len(ax))
		}
		for i := 1; i < len(ax); i++ {
			if !(ax[i] > ax[i-1]) {
				return fmt.Errorf("surrogate: table %v axis %d not ascending at %d", t.Profile, d, i)
			}
		}
		size *= len(ax)
	}
	if len(t.Hoop) != size || len(t.Strain) != size {
		return errors.New("surrogate: table size does not match its axes")
	}
	for i := range t.Hoop {
		h, s := t.Hoop[i], t.Strain[i]
		if math.IsNaN(h) && math.IsNaN(s) {
			continue // no bore at this grid point
		}
		if !(h > 0 && s > 0) || !finite(h) || !finite(s) {
			return fmt.Errorf("surrogate: table %v entry %d is not a positive finite factor", t.Profile, i)
		}
	}
	return nil
}

// prepare checks a generated table and caches its logarithms; it panics on
// a malformed table (a broken generator, not user input).
func (t *FactorTable) prepare() *FactorTable {
	if err := t.Check(); err != nil {
		panic(err)
	}
	t.logH = make([]float64, len(t.Hoop))
	t.logS = make([]float64, len(t.Strain))
	for i := range t.Hoop {
		t.logH[i] = math.Log(t.Hoop[i])
		t.logS[i] = math.Log(t.Strain[i])
	}
	return t
}

// shapePoint returns the table coordinates of a bellows. The orthotropic
// wall enters through an effective C2 scaled by (E_inlayer/E_across)^(1/4):
// the boundary-layer decay of an orthotropic cylinder is
// β⁴ = 3(1−ν²)·E_θ/(E_s R² t²) with the coupling of shell.Wall [derived].
// ok is false for shapes outside the tables' families (UShape with
// rm < q/4).
func (b *Bellows) shapePoint() (p ShapePoint, ok bool) {
	g := &b.Geometry
	dm := 2 * g.MeanRadius()
	sq := math.Sqrt(dm*g.Wall) / math.Pow(b.Material.ModulusInLayer/b.Material.ModulusAcross, 0.25)
	p = ShapePoint{Profile: g.Profile, Poisson: b.Material.Poisson, Wall: g.Wall / g.Depth}
	switch g.Profile {
	case UShape:
		rm := g.crestRadius()
		if math.Abs(rm-g.Pitch/4) > 1e-9*g.Pitch {
			return p, false
		}
		p.C1 = 2 * rm / g.Depth
		p.C2 = 1.82 * rm / sq
		p.Wall = g.Wall / rm
	case Sinusoid:
		p.DepthRatio = g.Depth / g.Pitch
		p.C2 = g.Pitch / (2.2 * sq)
	case Trapezoid:
		p.DepthRatio = g.Depth / g.Pitch
		p.C2 = g.Pitch / (2.2 * sq)
		p.FlatFraction = g.FlatFraction
	default:
		return p, false
	}
	return p, true
}

// tableFor returns the generated table of a profile.
func tableFor(p Profile) *FactorTable {
	switch p {
	case UShape:
		return uTable
	case Sinusoid:
		return sineTable
	case Trapezoid:
		return trapTable
	}
	return nil
}
