package problems

import (
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// TestNeverNestThreaded: a threaded inner bellows runs its crowns in the
// outer crowns and its roots inside the outer roots, so its ranges can
// never nest when either gap is negative at the best bounds. The outer
// bellows of threadedProblem (30 mm across, walls from 0.45 mm, depths
// from 2 mm) is at most 30 − 2·0.45 = 29.1 mm across inside its crowns
// and 29.1 − 2·2 = 25.1 mm inside its roots (hand calculation). An inner
// bellows at least 29.5 mm across misses the crowns; one at least 28.4 mm
// across and at most 1.5 mm deep clears the crowns but its roots,
// 28.4 − 2·1.5 = 25.4 mm across, miss the outer roots.
func TestNeverNestThreaded(t *testing.T) {
	for _, c := range []struct{ od, depth, want string }{
		{"[29.5, 30.0]", "[2.0, 3.0]", "bellows 1 is at least 29.5 mm across but bellows 2 around it has the inside of its crowns at most 29.1 mm across and of its roots 25.1 mm"},
		{"[28.4, 29.0]", "[1.0, 1.5]", "bellows 1 is at least 28.4 mm across but bellows 2 around it has the inside of its roots at most 25.1 mm across, around inner roots at least 25.4 mm"},
	} {
		text := strings.Replace(threadedProblem, "outer_diameter_mm = [16.0, 20.0]", "outer_diameter_mm = "+c.od, 1)
		text = strings.Replace(text, "depth_mm = [2.0, 3.0]", "depth_mm = "+c.depth, 1)
		require.NotEqual(t, threadedProblem, text)
		_, err := ParseProblem([]byte(text), "p.toml")
		require.Error(t, err, c.od)
		assert.Contains(t, err.Error(), "bellows[1].outer_diameter_mm: the ranges can never nest: "+c.want, c.od)
	}
}
