package problems

import (
	"testing"

	"github.com/stretchr/testify/assert"
)

// TestNearest: the did-you-mean rule shared by file keys, scores, bench
// columns and pick's -where columns [derived: Levenshtein distances by
// hand].
func TestNearest(t *testing.T) {
	for _, c := range []struct {
		s     string
		known []string
		want  string
	}{
		{"wall", []string{"pitch_mm", "wall_mm"}, "wall_mm"},          // unit suffix
		{"tip_sag", []string{"reach_mm", "tip_sag_mm"}, "tip_sag_mm"}, // unit suffix
		{"populaton", []string{"method", "population"}, "population"}, // distance 1
		{"reach_nm", []string{"reach_mm", "mass_g"}, "reach_mm"},      // distance 1
		{"xyz", []string{"reach_mm", "mass_g"}, ""},                   // distance > 3 and > len/3
		{"curvature_max", []string{"curvature_min_per_m"}, ""},        // distance 8 > 3 and 3·8 > 13
	} {
		assert.Equal(t, c.want, Nearest(c.s, c.known), "Nearest(%q, %v)", c.s, c.known)
	}
	assert.Equal(t, 3, editDistance("kitten", "sitting"), "the textbook pair (common practice)")
	assert.Equal(t, 0, editDistance("", ""))
	assert.Equal(t, 4, editDistance("", "abcd"))
}
