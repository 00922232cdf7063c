package statics

import (
	"math"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// TestVerificationCases runs the package's verification cases (verification.go), the ones plica
// verify prints, each against its published value and tolerance.
func TestVerificationCases(t *testing.T) {
	cases := VerificationCases()
	require.NotEmpty(t, cases)
	for _, c := range cases {
		t.Run(c.Name, func(t *testing.T) {
			if c.Slow && testing.Short() {
				t.Skip("slow case")
			}
			got, err := c.Compute()
			require.NoError(t, err)
			tol := c.Tolerance
			if c.Relative {
				tol *= math.Abs(c.Published)
			}
			assert.InDelta(t, c.Published, got, tol, "%s (source: %s)", c.Name, c.Source)
			assert.NotEmpty(t, c.Source, "source")
		})
	}
}
