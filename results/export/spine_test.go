package export

import (
	"math"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"plica/surrogate"
)

// TestSpineVolume: a bellows with a spine is closed, oriented and a tube
// (Euler characteristic 0, Euler–Poincaré), and its volume is the wall
// volume of plica's mass model with the spine (surrogate/REFERENCE.md
// §2.8: t·L·((2π − Δφ)/q·∫r ds + Rm·Δφ), Pappus–Guldinus for the
// convolutions and a flat strip for the spine) within 0.5 % (the revolved
// default, §1–§2) plus the two sectors of 2π/k at the spine's edges,
// where the wall blends from convolutions to plain.
func TestSpineVolume(t *testing.T) {
	for _, c := range []struct {
		name string
		g    surrogate.Geometry
	}{
		{"sinusoid, spine on +x", surrogate.Geometry{OuterDiameter: 20e-3, Depth: 3e-3, Pitch: 10e-3, Wall: 0.5e-3, Profile: surrogate.Sinusoid, SpineWidth: 6e-3}},
		{"sinusoid, spine at 100°", surrogate.Geometry{OuterDiameter: 30e-3, Depth: 3e-3, Pitch: 10e-3, Wall: 0.6e-3, Profile: surrogate.Sinusoid, SpineWidth: 10e-3, SpineAngle: 100 * math.Pi / 180}},
		{"u-profile", surrogate.Geometry{OuterDiameter: 24e-3, Depth: 4e-3, Pitch: 8e-3, Wall: 0.6e-3, Profile: surrogate.UShape, CrestRadius: 2e-3, SpineWidth: 8e-3}},
	} {
		mtl, ok := surrogate.LookupMaterial("petg")
		require.True(t, ok)
		b := surrogate.Bellows{Geometry: c.g, Material: mtl}
		sec, err := b.Section(surrogate.Strip)
		require.NoError(t, err, c.name)
		n := 5
		m, got, err := Bellows(c.g, float64(n)*c.g.Pitch, 0, DefaultSides)
		require.NoError(t, err, c.name)
		require.Equal(t, n, got)
		require.NoError(t, m.Check(), c.name)
		assert.Equal(t, 0, m.Euler(), "%s: a tube", c.name)
		want := sec.MassPerLength / mtl.Density * float64(n) * c.g.Pitch * 1e9 // mm³
		plain := 2 * math.Pi * c.g.MeanRadius() * c.g.Wall * float64(n) * c.g.Pitch * 1e9
		tol := 0.005*want + 2.0/DefaultSides*math.Abs(want-plain)
		assert.InDelta(t, want, m.Volume(), tol, "%s: against the mass model with the spine", c.name)
		// the spine is where it should be: the plain strip at the mean
		// radius ± t/2 reaches no farther out than Rm + t/2 at SpineAngle
		dir := [2]float64{math.Cos(c.g.SpineAngle), math.Sin(c.g.SpineAngle)}
		far := 0.0
		for _, v := range m.V {
			r := math.Hypot(v[0], v[1])
			if (v[0]*dir[0]+v[1]*dir[1])/r > math.Cos(0.5*c.g.SpineWidth/c.g.MeanRadius())*0.999 {
				far = math.Max(far, r)
			}
		}
		assert.InDelta(t, (c.g.MeanRadius()+c.g.Wall/2)*1e3, far, 1e-9, "%s: the spine's outer surface", c.name)
	}
}

// TestSpineCollars: with collars the spine mesh stays closed and its
// volume grows by the two plain collar tubes (k-gon ring area × length,
// §1) to within the spine bound above.
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
