package export

import (
	"bytes"
	"fmt"
	"math"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"plica/surrogate"
)

var helicalCases = []struct {
	name string
	g    surrogate.Geometry
}{
	{"sinusoid", surrogate.Geometry{OuterDiameter: 20e-3, Depth: 3e-3, Pitch: 10e-3, Wall: 0.5e-3, Profile: surrogate.Sinusoid, Helical: true}},
	{"fine sinusoid", surrogate.Geometry{OuterDiameter: 20e-3, Depth: 3e-3, Pitch: 4.5e-3, Wall: 0.45e-3, Profile: surrogate.Sinusoid, Helical: true}},
	{"u-profile", surrogate.Geometry{OuterDiameter: 24e-3, Depth: 4e-3, Pitch: 8e-3, Wall: 0.6e-3, Profile: surrogate.UShape, CrestRadius: 2e-3, Helical: true}},
	{"trapezoid", surrogate.Geometry{OuterDiameter: 24e-3, Depth: 3e-3, Pitch: 8e-3, Wall: 0.5e-3, Profile: surrogate.Trapezoid, FlatFraction: 0.3, Helical: true}},
	{"sinusoid with a spine at 100°", surrogate.Geometry{OuterDiameter: 30e-3, Depth: 3e-3, Pitch: 10e-3, Wall: 0.6e-3, Profile: surrogate.Sinusoid, Helical: true, SpineWidth: 10e-3, SpineAngle: 100 * math.Pi / 180}},
}

// TestHelicalClosedAndOriented: the helical wall with its run-outs and
// collars is closed (every edge in exactly two triangles, each way once),
// oriented outward (positive enclosed volume, divergence theorem), free of
// degenerate triangles and a tube (Euler characteristic 0,
// Euler–Poincaré, genus 1), for any number of sides down to the triangle;
// it stands on z = 0 and is 2·collar + (n+2)·q high (two run-out turns);
// same geometry, same bytes.
func TestHelicalClosedAndOriented(t *testing.T) {
	for _, c := range helicalCases {
		for _, k := range []int{3, 7, 64} {
			for _, collar := range []float64{0, 4e-3} {
				m, n, err := Bellows(c.g, 5*c.g.Pitch, collar, k)
				require.NoError(t, err, c.name)
				require.Equal(t, 5, n)
				require.NoError(t, m.Check(), "%s k=%d collar=%g", c.name, k, collar)
				assert.Equal(t, 0, m.Euler(), "%s k=%d: a tube", c.name, k)
				assert.Greater(t, m.Volume(), 0.0, "%s k=%d: outward", c.name, k)
				lo, hi := m.Bounds()
				assert.InDelta(t, 0, lo[2], 1e-12, c.name)
				assert.InDelta(t, (2*collar+7*c.g.Pitch)*1e3, hi[2], 1e-9, c.name)
			}
		}
		m, _, err := Bellows(c.g, 5*c.g.Pitch, 5e-3, DefaultSides)
		require.NoError(t, err)
		require.NoError(t, m.Check(), c.name)
		lo, hi := m.Bounds()
		// the crown vertex sits on the offset polyline within 0.1 % of the
		// surrogate's outer diameter (as for the revolved wall)
		assert.InEpsilon(t, c.g.OuterDiameter*1e3, hi[0]-lo[0], 2e-3, c.name)
		var a, b bytes.Buffer
		require.NoError(t, m.WriteSTL(&a, "plica"))
		m2, _, err := Bellows(c.g, 5*c.g.Pitch, 5e-3, DefaultSides)
		require.NoError(t, err)
		require.NoError(t, m2.WriteSTL(&b, "plica"))
		assert.Equal(t, a.Bytes(), b.Bytes(), "%s: deterministic bytes", c.name)
	}
}

// TestHelicalSectionsSimple: every angle's wall section (centreline offset
// ±t/2, closed by the collar ends) is a simple polygon, so the run-outs'
// blend of the profile into the plain collar does not fold the wall.
func TestHelicalSectionsSimple(t *testing.T) {
	for _, c := range helicalCases {
		k := 32
		h := newHelix(c.g, 3, 2e-3, k)
		for j := 0; j < k; j += 3 {
			line, _, _ := h.section(j)
			outer, inner := offset(line, c.g.Wall/2), offset(line, -c.g.Wall/2)
			poly := append([][2]float64{}, outer...)
			for i := len(inner) - 1; i >= 0; i-- {
				poly = append(poly, inner[i])
			}
			require.NoError(t, simplePolygon(poly), "%s, column %d", c.name, j)
		}
	}
}

// simplePolygon reports the first pair of non-adjacent edges that meet.
func simplePolygon(p [][2]float64) error {
	n := len(p)
	cross := func(o, a, b [2]float64) float64 {
		return (a[0]-o[0])*(b[1]-o[1]) - (a[1]-o[1])*(b[0]-o[0])
	}
	for i := 0; i < n; i++ {
		a, b := p[i], p[(i+1)%n]
		for j := i + 2; j < n; j++ {
			if i == 0 && j == n-1 {
				continue
			}
			c, d := p[j], p[(j+1)%n]
			if math.Max(a[0], b[0]) < math.Min(c[0], d[0]) || math.Max(c[0], d[0]) < math.Min(a[0], b[0]) ||
				math.Max(a[1], b[1]) < math.Min(c[1], d[1]) || math.Max(c[1], d[1]) < math.Min(a[1], b[1]) {
				continue
			}
			d1, d2 := cross(a, b, c), cross(a, b, d)
			d3, d4 := cross(c, d, a), cross(c, d, b)
			if d1*d2 <= 0 && d3*d4 <= 0 {
				return fmt.Errorf("edges %d and %d meet at (%g, %g) m", i, j, c[0], c[1])
			}
		}
	}
	return nil
}

// TestHelicalTurnVolume: one more full-depth turn adds exactly one
// pitch of the mass model's wall volume in the continuum. The shear
// (r, φ, z) ↦ (r, φ, z + q·φ/2π) has Jacobian 1, so sweeping a meridian
// section S along the helix encloses the volume of revolving it,
// 2π∫∫_S r dA (Pappus–Guldinus, common practice), for any lead; with the
// profile given in the meridian plane, as plica's is, this holds exactly,
// not only for a lead small against the circumference. Equivalently every
// horizontal slice of the full-depth wall has the same area (Cavalieri's
// principle, common practice). The surrogate's mass model has no helical
// term (surrogate/REFERENCE.md §2.8): MassPerLength/ρ·q per turn.
//
// The mesh adds to the revolved mesh of one convolution, whose volume is
// the k-gon area factor times the polygon section's Pappus volume
// (REFERENCE.md §1), the term q·sin(2π/k)/12·Σ(Δr)² over the section's
// edges in one period (REFERENCE.md §5, derived there: moving one angle's
// section up by h changes the volume linearly in h); the test checks the
// identity to 1e-9 (against the revolved mesh at the helical wall's
// HelicalPerPiece points a piece) and the whole against the mass model
// within 0.5 %.
func TestHelicalTurnVolume(t *testing.T) {
	for _, c := range helicalCases {
		for _, k := range []int{16, DefaultSides} {
			a, _, err := Bellows(c.g, 5*c.g.Pitch, 0, k)
			require.NoError(t, err)
			b, _, err := Bellows(c.g, 6*c.g.Pitch, 0, k)
			require.NoError(t, err)
			turn := b.Volume() - a.Volume()
			ra, rb := revolvedAt(t, c.g, 5, HelicalPerPiece, k), revolvedAt(t, c.g, 6, HelicalPerPiece, k)
			shear := c.g.Pitch * 1e3 * math.Sin(2*math.Pi/float64(k)) / 12 * periodSquares(c.g)
			if c.g.SpineWidth > 0 {
				// the plain strip has Δr = 0 on its sides
				shear *= 1 - c.g.SpineFraction()
				// the shear term of equal wedges only approximates the
				// graded columns' (REFERENCE.md §5, §7): to 1e-3
				assert.InEpsilon(t, rb.Volume()-ra.Volume()+shear, turn, 1e-3, "%s k=%d: the mesh identity", c.name, k)
			} else {
				assert.InEpsilon(t, rb.Volume()-ra.Volume()+shear, turn, 1e-9, "%s k=%d: the mesh identity", c.name, k)
			}
			if k != DefaultSides {
				continue
			}
			mtl, ok := surrogate.LookupMaterial("petg")
			require.True(t, ok)
			sec, err := surrogate.Bellows{Geometry: c.g, Material: mtl}.Section(surrogate.Strip)
			require.NoError(t, err)
			want := sec.MassPerLength / mtl.Density * c.g.Pitch * 1e9 // mm³
			tol := 0.005 * want
			t.Logf("%s: a turn %.3f mm³, mass model %.3f mm³ (%+.2f %%), shear term %.4f mm³", c.name, turn, want, 100*(turn/want-1), shear)
			assert.InDelta(t, want, turn, tol, "%s: a turn against the mass model", c.name)
		}
	}
}

// revolvedAt is the revolved mesh of n convolutions of the geometry
// without collars, perPiece points a curved piece, with its spine as in
// Bellows.
func revolvedAt(t *testing.T, g surrogate.Geometry, n, perPiece, k int) Mesh {
	if g.SpineWidth > 0 {
		m, err := spinedBellows(g, n, 0, k, perPiece)
		require.NoError(t, err)
		return m
	}
	s, err := Wall(g.HalfMeridian(), n, g.Wall, 0, perPiece)
	require.NoError(t, err)
	m, err := Revolve(s, k)
	require.NoError(t, err)
	return m
}

// periodSquares is Σ(Δr)², mm², over the edges of one period of the wall
// section's outer and inner offset lines (the middle period of three).
func periodSquares(g surrogate.Geometry) float64 {
	h := newHelix(g, 1, 0, 1)
	var line [][2]float64
	for m := 0; m < 3; m++ {
		for _, p := range h.conv {
			line = append(line, [2]float64{p[0], p[1] + float64(m)*h.q})
		}
	}
	s := 0.0
	for _, d := range []float64{g.Wall / 2, -g.Wall / 2} {
		o := offset(line, d)
		for i := h.per; i < 2*h.per; i++ {
			dr := (o[i+1][0] - o[i][0]) * 1e3
			s += dr * dr
		}
	}
	return s
}

// TestHelicalCollars: the collars add two plain k-gon tubes (k-gon ring
// area × length, REFERENCE.md §1): below and above the run-outs the
// helical wall is the plain tube at the root radius. Not exactly: the
// first run-out point takes its offset normal from the edge to the point
// below it, the collar's end without a collar and a collar point with
// one, which moves the wall there by a fraction of its thickness; 1e-3 of
// the collars' volume holds it (it came out near 1.5e-4).
func TestHelicalCollars(t *testing.T) {
	for _, c := range helicalCases {
		a, _, err := Bellows(c.g, 3*c.g.Pitch, 0, 48)
		require.NoError(t, err)
		b, _, err := Bellows(c.g, 3*c.g.Pitch, 6e-3, 48)
		require.NoError(t, err)
		rRoot := newHelix(c.g, 1, 0, 1).rRoot
		ring := AreaFactor(48) * math.Pi * (math.Pow(rRoot+c.g.Wall/2, 2) - math.Pow(rRoot-c.g.Wall/2, 2)) * 1e6
		assert.InEpsilon(t, 2*ring*6, b.Volume()-a.Volume(), 1e-3, c.name)
	}
}

// TestHelicalWholeVolume: the whole part, run-outs and collars included,
// against the volume of a solid in cylindrical coordinates,
// V = ∫₀^2π ∫∫_{S(φ)} r dr dz dφ over its meridian sections S(φ)
// (common practice), taken as the Riemann sum at the mesh's own k angles
// over the sections the mesh is built from (their moments ∫∫ r dA by the
// shoelace sums) times the k-gon area factor, which is exact for a
// revolved mesh (REFERENCE.md §1). The helical mesh adds the shear term
// of REFERENCE.md §5 for the n full turns; what is left (the run-outs'
// own shear term and the interpolation between angles, both O(1/k), and
// at a spine its two edge sectors) is held to 1e-3 at k = 128 (it came
// out between 3e-5 and 7e-4) and falls with k. Each run-out also lies
// between a plain root tube and a full-depth turn of one pitch.
func TestHelicalWholeVolume(t *testing.T) {
	for _, c := range helicalCases {
		n := 5
		var prev float64
		for _, k := range []int{128, 512} {
			m, _, err := Bellows(c.g, float64(n)*c.g.Pitch, 5e-3, k)
			require.NoError(t, err)
			h := newHelix(c.g, n, 5e-3, k)
			sum := 0.0
			for j := 0; j < h.k; j++ {
				_, _, o, i := h.wall(j, c.g.Wall)
				poly := append([][2]float64{}, o...)
				for x := len(i) - 1; x >= 0; x-- {
					poly = append(poly, i[x])
				}
				mo := 0.0
				for e := range poly {
					p, q := poly[e], poly[(e+1)%len(poly)]
					mo += (p[0]*q[1] - q[0]*p[1]) * (p[0] + q[0]) / 6 // ∫∫ r dA, shoelace moment
				}
				// the wedges to the neighbouring columns, sin Δφ·∫∫r dA each
				// (REFERENCE.md §4), half of each to this column
				w := math.Sin(2 * math.Pi / float64(k))
				if h.cols != nil {
					w = (math.Sin(h.cols[j].dL) + math.Sin(h.cols[j].dR)) / 2
				}
				sum += w * mo * 1e9
			}
			ref := sum
			shear := float64(n) * c.g.Pitch * 1e3 * math.Sin(2*math.Pi/float64(k)) / 12 * periodSquares(c.g)
			if c.g.SpineWidth > 0 {
				shear *= 1 - c.g.SpineFraction()
			}
			rel := math.Abs(m.Volume()-ref-shear) / ref
			t.Logf("%s k=%d: mesh %.3f mm³, sections' sum %.3f mm³, shear term %.3f mm³, left %.2g", c.name, k, m.Volume(), ref, shear, rel)
			if k == 128 {
				assert.Less(t, rel, 1e-3, "%s: k = 128", c.name)
			} else {
				assert.Less(t, rel, prev, "%s: falls with k", c.name)
			}
			prev = rel
		}
		if c.g.SpineWidth > 0 {
			continue
		}
		k := 64
		a, _, err := Bellows(c.g, 4*c.g.Pitch, 0, k)
		require.NoError(t, err)
		b, _, err := Bellows(c.g, 5*c.g.Pitch, 0, k)
		require.NoError(t, err)
		turn := b.Volume() - a.Volume()
		runout := (a.Volume() - 4*turn) / 2
		h := newHelix(c.g, 1, 0, k)
		plain := AreaFactor(k) * math.Pi * (math.Pow(h.rRoot+c.g.Wall/2, 2) - math.Pow(h.rRoot-c.g.Wall/2, 2)) * h.q * 1e9
		t.Logf("%s: run-out %.2f mm³, plain tube %.2f, full turn %.2f", c.name, runout, plain, turn)
		assert.Greater(t, runout, plain, c.name)
		assert.Less(t, runout, turn, c.name)
	}
}

// BenchmarkHelicalBellows meshes the shipped boom's inner bellows made
// helical at the defaults (25 full-depth turns, 5 mm collars, 128 sides)
// and reports the STL size.
func BenchmarkHelicalBellows(b *testing.B) {
	g := surrogate.Geometry{OuterDiameter: 20e-3, Depth: 3e-3, Pitch: 10e-3, Wall: 0.5e-3, Profile: surrogate.Sinusoid, Helical: true}
	var m Mesh
	for i := 0; i < b.N; i++ {
		var err error
		m, _, err = Bellows(g, 0.25, 5e-3, DefaultSides)
		if err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(float64(84+50*len(m.T))/1e6, "MB")
	b.ReportMetric(float64(len(m.T)), "triangles")
}

// TestHelicalSizeAtDefaults: the shipped boom's bellows (25 turns of
// 10 mm pitch) made helical stay under 20 MB of STL at the defaults, and
// closed at full resolution.
func TestHelicalSizeAtDefaults(t *testing.T) {
	for _, g := range []surrogate.Geometry{
		{OuterDiameter: 20e-3, Depth: 3e-3, Pitch: 10e-3, Wall: 0.5e-3, Profile: surrogate.Sinusoid, Helical: true},
		{OuterDiameter: 30e-3, Depth: 3e-3, Pitch: 10e-3, Wall: 0.6e-3, Profile: surrogate.Sinusoid, Helical: true, SpineWidth: 4e-3},
	} {
		m, n, err := Bellows(g, 0.25, 5e-3, DefaultSides)
		require.NoError(t, err)
		require.Equal(t, 25, n)
		require.NoError(t, m.Check())
		assert.Less(t, 84+50*len(m.T), 20_000_000, "OD %g mm", g.OuterDiameter*1e3)
	}
}
