package convolution

import (
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// TestShellMeshConvergence checks that k_conv changes by less than 0.2 %
// from 40 to 160 elements per arc/flank (surrogate/REFERENCE.md §2.2, derived) and the
// peak strain by less than 1 % (κ_s converges one order slower).
func TestShellMeshConvergence(t *testing.T) {
	cases := []struct {
		name  string
		shape func() (Shape, error)
	}{
		{"u C1=0.5 C2=1", func() (Shape, error) { return UShapePoint(0.5, 1, 0.3, 0.35) }},
		{"u C1=0.2 C2=2", func() (Shape, error) { return UShapePoint(0.2, 2, ThinWall, 0.45) }},
		{"sinusoid w/q=0.5 C2q=0.5", func() (Shape, error) { return SinusoidPoint(0.5, 0.5, 0.2, 0.35) }},
		{"sinusoid w/q=3 C2q=1", func() (Shape, error) { return SinusoidPoint(3, 1, ThinWall, 0.3) }},
		{"trapezoid f=0.4", func() (Shape, error) { return TrapezoidPoint(0.4, 0.5, 0.6, 0.2, 0.4) }},
	}
	for _, c := range cases {
		s, err := c.shape()
		require.NoError(t, err, c.name)
		coarse, err := Shell(&s.Meridian, s.ShellWall(), 40)
		require.NoError(t, err, c.name)
		fine, err := Shell(&s.Meridian, s.ShellWall(), 160)
		require.NoError(t, err, c.name)
		assert.InEpsilon(t, fine.K, coarse.K, 2e-3, "%s: k_conv 40 vs 160 elements", c.name)
		assert.InEpsilon(t, fine.StrainPerMovement, coarse.StrainPerMovement, 1e-2, "%s: peak strain 40 vs 160 elements", c.name)
	}
}
