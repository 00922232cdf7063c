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

// TestSpineVolume: a bellows with a spine and its blends is closed,
// oriented and a tube (Euler characteristic 0, Euler–Poincaré), and its
// volume is the wall volume of plica's mass model with the spine and the
// blends (surrogate/REFERENCE.md §2.8: midsurface area × t, the blended
// surface's area by quadrature) within 0.5 % at the default sides, at
// spine fractions β 0.03–0.25, revolved and helical (a helical turn holds
// one pitch of it, REFERENCE.md §5). The spine's middle lies on Rm ± t/2.
func TestSpineVolume(t *testing.T) {
	mtl, ok := surrogate.LookupMaterial("petg")
	require.True(t, ok)
	for _, c := range []struct {
		name string
		g    surrogate.Geometry
	}{
		{"sinusoid, spine on +x", surrogate.Geometry{OuterDiameter: 20e-3, Depth: 3e-3, Pitch: 10e-3, Wall: 0.5e-3, Profile: surrogate.Sinusoid, SpineWidth: 6e-3}},
		{"sinusoid, β 0.03", surrogate.Geometry{OuterDiameter: 30e-3, Depth: 2.2e-3, Pitch: 4.4e-3, Wall: 0.4e-3, Profile: surrogate.Sinusoid, SpineWidth: 2.6e-3}},
		{"sinusoid, spine at 100°", surrogate.Geometry{OuterDiameter: 30e-3, Depth: 3e-3, Pitch: 10e-3, Wall: 0.6e-3, Profile: surrogate.Sinusoid, SpineWidth: 10e-3, SpineAngle: 100 * math.Pi / 180}},
		{"u-profile", surrogate.Geometry{OuterDiameter: 24e-3, Depth: 4e-3, Pitch: 8e-3, Wall: 0.6e-3, Profile: surrogate.UShape, CrestRadius: 2e-3, SpineWidth: 8e-3}},
		{"u-profile, β 0.15, deep", surrogate.Geometry{OuterDiameter: 33e-3, Depth: 5.4e-3, Pitch: 7.2e-3, Wall: 0.4e-3, Profile: surrogate.UShape, SpineWidth: 12.8e-3, SpineAngle: -0.4}},
		{"trapezoid, β 0.25", surrogate.Geometry{OuterDiameter: 24e-3, Depth: 3e-3, Pitch: 6e-3, Wall: 0.5e-3, Profile: surrogate.Trapezoid, FlatFraction: 0.3, SpineWidth: 16e-3}},
	} {
		for _, helical := range []bool{false, true} {
			g := c.g
			g.Helical = helical
			name := fmt.Sprintf("%s, helical %v", c.name, helical)
			sec, err := surrogate.Bellows{Geometry: g, Material: mtl}.Section(surrogate.Strip)
			require.NoError(t, err, name)
			want := sec.MassPerLength / mtl.Density * g.Pitch * 1e9 // mm³ a pitch
			a, _, err := Bellows(g, 4*g.Pitch, 0, DefaultSides)
			require.NoError(t, err, name)
			m, got, err := Bellows(g, 5*g.Pitch, 0, DefaultSides)
			require.NoError(t, err, name)
			require.Equal(t, 5, got)
			require.NoError(t, m.Check(), name)
			assert.Equal(t, 0, m.Euler(), "%s: a tube", name)
			vol := m.Volume() / 5
			if helical {
				vol = m.Volume() - a.Volume() // one full-depth turn, the run-outs apart
			}
			t.Logf("%s: β %.3f, mesh %.3f mm³ a pitch, mass model %.3f (%+.3f %%), %d triangles", name, g.SpineFraction(), vol, want, 100*(vol/want-1), len(m.T))
			assert.InEpsilon(t, want, vol, 5e-3, "%s: against the mass model with the blends", name)
			if helical {
				continue
			}
			// the spine's middle: plain wall at the mean radius ± t/2
			dir := [2]float64{math.Cos(g.SpineAngle), math.Sin(g.SpineAngle)}
			far, near := 0.0, math.Inf(1)
			for _, v := range m.V {
				r := math.Hypot(v[0], v[1])
				if (v[0]*dir[0]+v[1]*dir[1])/r > math.Cos(0.45*g.SpineWidth/g.MeanRadius()) {
					far, near = math.Max(far, r), math.Min(near, r)
				}
			}
			assert.InDelta(t, (g.MeanRadius()+g.Wall/2)*1e3, far, 1e-9, "%s: the spine's outer surface", name)
			assert.InDelta(t, (g.MeanRadius()-g.Wall/2)*1e3, near, 1e-9, "%s: the spine's inner surface", name)
		}
	}
}

// TestSpineColumns: the blends are graded (steps at most half the plain
// wall's 2π/k, at least 8 a blend) with columns on the kinks of the blend
// fraction (0 at the spine's edges, 1 at the blends' ends), and the mesh
// with a spine is the same bytes twice.
func TestSpineColumns(t *testing.T) {
	g := surrogate.Geometry{OuterDiameter: 20e-3, Depth: 3e-3, Pitch: 10e-3, Wall: 0.5e-3, Profile: surrogate.Sinusoid, SpineWidth: 6e-3, SpineAngle: 1}
	for _, k := range []int{16, DefaultSides} {
		cols := spineColumns(g, k)
		h, b := g.SpineArcs()
		var edges, ends, inBlend int
		for i, c := range cols {
			next := cols[(i+1)%len(cols)].phi
			if i == len(cols)-1 {
				next += 2 * math.Pi
			}
			require.Greater(t, next, c.phi)
			assert.LessOrEqual(t, next-c.phi, 2*math.Pi/float64(k)+1e-12)
			assert.InDelta(t, g.SpineBlend(c.phi), c.f, 1e-12, "k=%d column %d", k, i)
			d := math.Abs(math.Remainder(c.phi-g.SpineAngle, 2*math.Pi))
			switch {
			case math.Abs(d-h) < 1e-12:
				edges++
			case math.Abs(d-h-b) < 1e-12:
				ends++
			case d > h && d < h+b:
				inBlend++
				assert.LessOrEqual(t, next-c.phi, math.Pi/float64(k)+1e-12)
			}
		}
		assert.Equal(t, 2, edges, "k=%d", k)
		assert.Equal(t, 2, ends, "k=%d", k)
		assert.GreaterOrEqual(t, inBlend, 2*7, "k=%d", k)
	}
	var x, y bytes.Buffer
	for _, buf := range []*bytes.Buffer{&x, &y} {
		m, _, err := Bellows(g, 0.05, 5e-3, DefaultSides)
		require.NoError(t, err)
		require.NoError(t, m.WriteSTL(buf, "plica"))
	}
	assert.Equal(t, x.Bytes(), y.Bytes())
}

// TestSpineCollars: with collars the spine mesh stays closed and its
// volume grows by the two plain collar tubes (k-gon ring area × length,
// §1) to 10 % (the spine tapers into them).
func TestSpineCollars(t *testing.T) {
	g := surrogate.Geometry{OuterDiameter: 20e-3, Depth: 3e-3, Pitch: 10e-3, Wall: 0.5e-3, Profile: surrogate.Sinusoid, SpineWidth: 6e-3}
	a, _, err := Bellows(g, 0.05, 0, 64)
	require.NoError(t, err)
	b, _, err := Bellows(g, 0.05, 4e-3, 64)
	require.NoError(t, err)
	require.NoError(t, b.Check())
	rRoot := g.MeanRadius() - g.Depth/2
	ring := AreaFactor(64) * math.Pi * (math.Pow(rRoot+g.Wall/2, 2) - math.Pow(rRoot-g.Wall/2, 2)) * 1e6
	assert.InEpsilon(t, 2*ring*4, b.Volume()-a.Volume(), 0.1, "two 4 mm collars (the spine tapers into them)")
}
