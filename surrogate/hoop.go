//go:generate go run gen_hoop.go

package surrogate

import (
	"errors"
	"fmt"
	"math"
	"sort"
)

// ThinWall is the smallest wall ratio of the generated tables (t/rm for
// U-profiles, t/w for sinusoids and trapezoids), which stands for the thin
// limit of PHYSICS §6.2: at fixed shape parameters a vanishing wall ratio
// also sends w/Dm and t/Dm to zero, and the residual effects of finite
// thickness (meridional stretching, finite crown curvature) vanish with
// it. Thinner designs use the first grid point. The tables extend the wall
// ratio to its validity limit (t/rm < 2, t/w < 0.5) because printed
// bellows are thick: finite thickness moves the factors by several percent
// there, and by much more for U-crowns with t/rm near 1 [derived: shell
// model].
const ThinWall = 0.005

// ShapePoint locates a convolution shape on the hoop-stiffening grids
// (PHYSICS §1.2, §6.2). Printed walls use tp = t.
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
var ErrNoBore = errors.New("surrogate: shape point has a non-positive root inner radius")

// shapeBellows builds the isotropic (E = 1) bellows of a shape point at
// Dm = 1: with the wall ratio τ,
//
//	U (τ = t/rm):                  rm = Dm·τ·C2²/1.82², q = 4·rm, w = 2·rm/C1, t = τ·rm
//	sinusoid/trapezoid (τ = t/w):  q = 2.2²·Dm·τ·(w/q)·C2q², w = (w/q)·q, t = τ·w
func shapeBellows(p ShapePoint) (Bellows, error) {
	const dm = 1.0
	tau := p.Wall
	if !(tau > 0 && tau < 4) {
		return Bellows{}, fmt.Errorf("surrogate: shape point needs 0 < wall ratio < 4 (got %g)", tau)
	}
	var t float64
	g := Geometry{Profile: p.Profile}
	switch p.Profile {
	case UShape:
		if !(p.C1 > 0 && p.C1 <= 1 && p.C2 > 0) {
			return Bellows{}, fmt.Errorf("surrogate: U shape point needs 0 < C1 ≤ 1, C2 > 0 (got C1 = %g, C2 = %g)", p.C1, p.C2)
		}
		rm := dm * tau * p.C2 * p.C2 / (1.82 * 1.82)
		g.Pitch = 4 * rm
		g.Depth = 2 * rm / p.C1
		t = tau * rm
	case Sinusoid, Trapezoid:
		if !(p.DepthRatio > 0 && p.C2 > 0) {
			return Bellows{}, fmt.Errorf("surrogate: %v shape point needs w/q > 0, C2q > 0 (got %g, %g)", p.Profile, p.DepthRatio, p.C2)
		}
		g.Pitch = 2.2 * 2.2 * dm * tau * p.DepthRatio * p.C2 * p.C2
		g.Depth = p.DepthRatio * g.Pitch
		g.FlatFraction = p.FlatFraction
		t = tau * g.Depth
	default:
		return Bellows{}, fmt.Errorf("surrogate: unknown profile %d", int(p.Profile))
	}
	g.Wall = t
	g.OuterDiameter = dm + g.Depth + t
	if dm/2-g.Depth/2-t/2 <= 0 {
		return Bellows{}, ErrNoBore
	}
	return Bellows{Geometry: g, Material: Material{
		ModulusAcross: 1, ModulusInLayer: 1, Poisson: p.Poisson, Density: 1, AllowableStrain: 1,
	}}, nil
}

// ShapeFactors runs the shell model (elements per arc, flank or flat; five
// times as many per half sinusoid) and the r-weighted strip model on the
// isotropic bellows of a shape point and returns the hoop-stiffening
// factor H = k_shell/k_strip and the strain factor ε_shell/ε_strip (peak
// meridional surface strain at equal movement). These are the entries of
// the generated tables.
func ShapeFactors(p ShapePoint, elements int) (hoop, strain float64, err error) {
	b, err := shapeBellows(p)
	if err != nil {
		return 0, 0, err
	}
	m := b.halfMeridian()
	st := stripModel(&b.Geometry, &m, 1, p.Poisson)
	sh, err := shellModel(&b.Geometry, &b.Material, elements)
	if err != nil {
		return 0, 0, err
	}
	return sh.k / st.k, sh.epsPerE / st.epsPerE, nil
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

// generated tables (hoop_table_gen.go sets them; nil means "no table",
// and Strip fidelity then falls back to the shell model).
var uTable, sineTable, trapTable *FactorTable

// Tables returns the generated tables (nil entries if absent).
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
// β⁴ = 3(1−ν²)·E_θ/(E_s R² t²) with the coupling of shellMat [derived].
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
