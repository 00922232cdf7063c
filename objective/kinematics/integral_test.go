package kinematics

import (
	"testing"

	"github.com/stretchr/testify/assert"
	"gonum.org/v1/gonum/integrate/quad"
)

// TestLinkTransformIntegral: J = ∫₀ˢ p(τ) dτ in closed form matches gonum's
// Gauss–Legendre quadrature (gonum integrate/quad.Fixed, 60 nodes) of the
// position of LinkTransform, on both sides of the series threshold
// |x| = 0.5, at x → 0 and with twist; the pose equals LinkTransform's bit
// for bit.
func TestLinkTransformIntegral(t *testing.T) {
	for _, c := range []struct {
		u [3]float64
		s float64
	}{
		{[3]float64{0, 0, 0}, 0.2},
		{[3]float64{1e-9, 0, 0}, 0.2},
		{[3]float64{0.3, -1.1, 0}, 0.4},   // x ≈ 0.456, series
		{[3]float64{0.4, -1.3, 0}, 0.4},   // x ≈ 0.544, closed form
		{[3]float64{12, 5, 0}, 0.15},      // x = 1.95
		{[3]float64{3, -7, 20}, 0.3},      // twist
		{[3]float64{0, 40, 0}, 0.2},       // x = 8, beyond a turn
		{[3]float64{2.49, 0.1, 0.2}, 0.2}, // x just below the threshold
	} {
		pose, J := LinkTransformIntegral(c.u, c.s)
		assert.Equal(t, LinkTransform(c.u, c.s), pose, "pose of %v", c.u)
		scale := c.s * c.s / 2
		for i := range 3 {
			want := quad.Fixed(func(tau float64) float64 { return LinkTransform(c.u, tau).P[i] }, 0, c.s, 60, nil, 0)
			assert.InDelta(t, want, J[i], 1e-14*scale, "J[%d] of u=%v s=%v", i, c.u, c.s)
		}
	}
}
