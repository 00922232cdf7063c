package verify

import (
	"testing"

	"github.com/stretchr/testify/assert"
)

// TestVerificationCases runs the same built-in cases that plica verify
// prints; each carries its published value and source.
func TestVerificationCases(t *testing.T) {
	cases := Run(testing.Short())
	assert.GreaterOrEqual(t, len(cases), 15)
	for _, c := range cases {
		assert.NoError(t, c.Err, "%s: %s", c.Area, c.Name)
		assert.True(t, c.Pass(), "%s: %s: computed %.12g, published %.12g, tolerance %g (relative %v), source %s",
			c.Area, c.Name, c.Computed, c.Published, c.Tolerance, c.Relative, c.Source)
		assert.NotEmpty(t, c.Source, "%s has a source", c.Name)
	}
}
