package export

import (
	"bytes"
	"encoding/binary"
	"math"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"plica/surrogate"
	"plica/surrogate/convolution"
)

// A plain tube is a rectangle revolved: the k-gon of circumradius r has
// area (k/2)·r²·sin(2π/k) (common practice, elementary geometry), so the
// mesh volume is exactly (k/2)·sin(2π/k)·(ro² − ri²)·L.
func TestRevolvePlainTubeExact(t *testing.T) {
	ri, ro, l := 9.0, 10.0, 30.0
	s := Section{{ri, 0}, {ro, 0}, {ro, l}, {ri, l}}
	for _, k := range []int{3, 16, 256} {
		m, err := Revolve(s, k)
		require.NoError(t, err)
		require.NoError(t, m.Check())
		// a revolved annulus is a torus: V − E + F = 0 (Euler–Poincaré, genus 1)
		assert.Equal(t, 0, m.Euler())
		want := float64(k) / 2 * math.Sin(2*math.Pi/float64(k)) * (ro*ro - ri*ri) * l
		assert.InEpsilon(t, want, m.Volume(), 1e-12, "k=%d", k)
		lo, hi := m.Bounds()
		assert.InDelta(t, ro, hi[0], 1e-12)
		assert.InDelta(t, 0, lo[2], 1e-12)
		assert.InDelta(t, l, hi[2], 1e-12)
	}
	// the reversed section gives the same outward mesh
	rev := Section{{ri, l}, {ro, l}, {ro, 0}, {ri, 0}}
	m, err := Revolve(rev, 32)
	require.NoError(t, err)
	assert.Greater(t, m.Volume(), 0.0)
	require.NoError(t, m.Check())
}

// Thin wall: volume ≈ midsurface area × wall, with the midsurface area per
// pitch 2π∫r ds (Pappus–Guldinus, common practice); the offset solid
// differs by O(t²·κ) terms, well under 0.5 % here, and the 128-gon by
// 1 − k·sin(2π/k)/(2π) ≈ 4.0e-4.
func TestWallVolumeThinWall(t *testing.T) {
	rm, w, q, th := 10e-3, 3e-3, 4e-3, 0.4e-3
	for name, mer := range map[string]convolution.Meridian{
		"sine": convolution.Sinusoid(rm, w, q),
		"U":    convolution.UShape(rm, w, q, 0.8e-3),
		"trap": convolution.Trapezoid(rm, w, q, 0.3),
	} {
		n := 5
		s, err := Wall(mer, n, th, 0, 32)
		require.NoError(t, err, name)
		m, err := Revolve(s, 128)
		require.NoError(t, err, name)
		require.NoError(t, m.Check(), name)
		mo := mer.PitchMoments()
		want := 2 * math.Pi * mo.A2 * th * float64(n) * 1e9 // mm³
		assert.InEpsilon(t, want, m.Volume(), 5e-3, name)
		lo, hi := m.Bounds()
		// the crown vertex sits on the offset polyline, within 0.1 % of the arc's
		assert.InEpsilon(t, (rm+w/2+th/2)*1e3, hi[0], 1e-3, name)
		assert.InDelta(t, float64(n)*q*1e3, hi[2]-lo[2], 1e-9, name)
	}
}

// Binary STL layout (common practice): 80-byte header, little-endian
// uint32 facet count, 50 bytes a facet; same mesh, same bytes.
func TestSTLLayoutAndDeterminism(t *testing.T) {
	mer := convolution.Sinusoid(8e-3, 2e-3, 3e-3)
	s, err := Wall(mer, 3, 0.3e-3, 5e-3, 24)
	require.NoError(t, err)
	m, err := Revolve(s, 64)
	require.NoError(t, err)
	require.NoError(t, m.Check())
	var a, b bytes.Buffer
	require.NoError(t, m.WriteSTL(&a, "plica bellows"))
	require.NoError(t, m.WriteSTL(&b, "plica bellows"))
	assert.Equal(t, a.Bytes(), b.Bytes())
	raw := a.Bytes()
	require.Len(t, raw, 84+50*len(m.T))
	assert.Equal(t, uint32(len(m.T)), binary.LittleEndian.Uint32(raw[80:84]))
	// the first facet's stored normal is unit length
	var n [3]float64
	for i := range n {
		n[i] = float64(math.Float32frombits(binary.LittleEndian.Uint32(raw[84+4*i:])))
	}
	assert.InDelta(t, 1, math.Sqrt(n[0]*n[0]+n[1]*n[1]+n[2]*n[2]), 1e-6)
	lo, hi := m.Bounds()
	assert.InDelta(t, 0, lo[2], 1e-12)
	assert.InDelta(t, (3*3e-3+2*5e-3)*1e3, hi[2], 1e-9)
}

func TestRevolveRefusesBadInput(t *testing.T) {
	_, err := Revolve(Section{{1, 0}, {2, 0}, {2, 1}}, 2)
	assert.Error(t, err)
	_, err = Revolve(Section{{0, 0}, {2, 0}, {2, 1}}, 8)
	assert.Error(t, err)
}

// The default mesh keeps the wall volume of the surrogate's mass model
// (surrogate.Section MassPerLength/ρ, surrogate/REFERENCE.md §2.8) within
// 0.5 %.
func TestBellowsVolumeMatchesMassModel(t *testing.T) {
	g := surrogate.Geometry{OuterDiameter: 20e-3, Depth: 3e-3, Pitch: 4.5e-3, Wall: 0.45e-3, Profile: surrogate.Sinusoid}
	mtl := surrogate.Material{Density: 1000, ModulusAcross: 1e9, ModulusInLayer: 1e9, Poisson: 0.35, AllowableStrain: 0.02}
	sec, err := surrogate.Bellows{Geometry: g, Material: mtl}.Section(surrogate.Strip)
	require.NoError(t, err)
	m, n, err := Bellows(g, 35e-3, 0, DefaultSides)
	require.NoError(t, err)
	require.NoError(t, m.Check())
	want := sec.MassPerLength / mtl.Density * float64(n) * g.Pitch * 1e9
	assert.InEpsilon(t, want, m.Volume(), 5e-3)
	lo, hi := m.Bounds()
	assert.InEpsilon(t, g.OuterDiameter*1e3, hi[0]-lo[0], 2e-3)
}
