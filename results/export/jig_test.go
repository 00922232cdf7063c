package export

import (
	"math"
	"plica/surrogate"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// TestJigVolume: the rod is closed, oriented outward (positive enclosed
// volume) and of genus 0 (Euler characteristic 2, Euler–Poincaré); its
// volume is the k-gon prism A_k·L on the straight parts (the cylinder,
// exact) and m·sin(Δφ)·A_k·R on the arc (§4, exact for the mesh), which
// tends to Pappus' A·θ·R (Pappus–Guldinus: area × path of the centroid,
// the torus section) within the k-gon area factor and the chord factor.
func TestJigVolume(t *testing.T) {
	for _, c := range []struct {
		name string
		p    JigPath
		d    float64
		k    int
	}{
		{"gentle arc", JigPath{Handle: 0.2, Radius: 0.25, Arc: 0.1, Tip: 0.005}, 0.012, 128},
		{"half turn, no tip", JigPath{Handle: 0.05, Radius: 0.03, Arc: math.Pi * 0.03}, 0.01, 24},
		{"coarse", JigPath{Handle: 0.05, Radius: 0.1, Arc: 0.2, Tip: 0.01}, 0.008, 6},
	} {
		m, err := Jig(c.p, c.d, c.k)
		require.NoError(t, err, c.name)
		require.NoError(t, m.Check(), c.name)
		assert.Equal(t, 2, m.Euler(), "%s: a rod is a sphere topologically", c.name)
		a := c.d / 2 * 1e3 // mm
		ak := AreaFactor(c.k) * math.Pi * a * a
		steps := c.p.ArcSteps(c.k)
		dphi := c.p.Angle() / float64(steps)
		exact := ak*(c.p.Handle+c.p.Tip)*1e3 + float64(steps)*math.Sin(dphi)*ak*c.p.Radius*1e3
		assert.InEpsilon(t, exact, m.Volume(), 1e-9, "%s: mesh volume", c.name)
		pappus := math.Pi*a*a*(c.p.Handle+c.p.Tip)*1e3 + math.Pi*a*a*c.p.Angle()*c.p.Radius*1e3
		bound := 1 - AreaFactor(c.k)*math.Sin(2*math.Pi/float64(c.k))/(2*math.Pi/float64(c.k))
		assert.InDelta(t, 1, m.Volume()/pappus, bound+1e-12, "%s: against Pappus", c.name)
		lo, hi := m.Bounds()
		assert.InDelta(t, 0, lo[2], 1e-9, "%s: rests on the bed", c.name)
		assert.LessOrEqual(t, hi[2], c.d*1e3+1e-9, "%s: height within the diameter", c.name)
		assert.GreaterOrEqual(t, hi[2], c.d*1e3*math.Cos(math.Pi/float64(c.k))-1e-9, "%s: height of the k-gon", c.name)
	}
	// the straight rod alone: an arc of negligible turn is the cylinder
	m, err := Jig(JigPath{Handle: 0.1, Radius: 1e3, Arc: 1e-3}, 0.01, 64)
	require.NoError(t, err)
	assert.InEpsilon(t, AreaFactor(64)*math.Pi*25*101, m.Volume(), 1e-9, "k-gon prism of 101 mm")
}

func TestJigRefusesImpossibleRods(t *testing.T) {
	for name, c := range map[string]struct {
		p JigPath
		d float64
	}{
		"radius below diameter": {JigPath{Handle: 0.1, Radius: 0.005, Arc: 0.01}, 0.01},
		"full turn":             {JigPath{Handle: 0.1, Radius: 0.05, Arc: 0.4}, 0.01},
		"no rod":                {JigPath{Handle: 0.1, Radius: 0.05, Arc: 0.1}, 0},
	} {
		_, err := Jig(c.p, c.d, 32)
		assert.Error(t, err, name)
	}
}

// TestBore: the smallest inner diameter of a revolved wall is the root's
// inner surface, OD − 2·depth − 2·wall for the surrogate's meridian, whose
// depth is measured on the centreline and whose outer diameter is over the
// crests' outer surface [derived from surrogate.Geometry.MeanRadius].
func TestBore(t *testing.T) {
	for _, g := range []surrogate.Geometry{
		{OuterDiameter: 20e-3, Depth: 3e-3, Pitch: 10e-3, Wall: 0.5e-3, Profile: surrogate.Sinusoid},
		{OuterDiameter: 30e-3, Depth: 3e-3, Pitch: 10e-3, Wall: 0.6e-3, Profile: surrogate.Sinusoid},
	} {
		b, err := Bore(g)
		require.NoError(t, err)
		// 10 µm: the miter offset at a polygon vertex of the root moves by
		// t/2/cos of half the turn between meridian segments, a few µm here
		assert.InDelta(t, g.OuterDiameter-2*g.Depth-2*g.Wall, b, 1e-5, "OD %g", g.OuterDiameter)
		assert.LessOrEqual(t, b, g.OuterDiameter-2*g.Depth-2*g.Wall+1e-12, "OD %g: never wider than the true root", g.OuterDiameter)
	}
}
