package front

import (
	"math"
	"slices"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

func argmaxOf(x []float64) int {
	best := 0
	for i, v := range x {
		if v > x[best] {
			best = i
		}
	}
	return best
}

// TestKneeDistances: points on the line (hyperplane) through the extreme
// points have distance 0 and a bulge towards the ideal point is the knee
// [derived: distance of (0.4, 0.4) from x + y = 1 is 0.2/√2; of
// (0.2, 0.2, 0.2) from x + y + z = 1 is 0.4/√3]. Normalisation makes the
// pick independent of units and offsets (Das 1999; Branke et al. 2004).
func TestKneeDistances(t *testing.T) {
	line := [][]float64{{0, 1}, {0.25, 0.75}, {0.4, 0.4}, {0.75, 0.25}, {1, 0}}
	d, note := KneeDistances(line)
	assert.Empty(t, note, "regular front")
	assert.Equal(t, 2, argmaxOf(d), "the bulge is the knee")
	assert.InDelta(t, 0.2/math.Sqrt2, d[2], 1e-12, "distance of the bulge")
	for _, i := range []int{0, 1, 3, 4} {
		assert.InDelta(t, 0, d[i], 1e-12, "point %v lies on the line", line[i])
	}
	// units and offsets: f1 in mm·1000 + 50, f2 in g
	scaledLine := make([][]float64, len(line))
	for i, p := range line {
		scaledLine[i] = []float64{1000*p[0] + 50, p[1]}
	}
	d2, _ := KneeDistances(scaledLine)
	assert.InDeltaSlice(t, d, d2, 1e-12, "knee distances do not depend on units")

	plane := [][]float64{{1, 0, 0}, {0, 1, 0}, {0, 0, 1}, {1.0 / 3, 1.0 / 3, 1.0 / 3}, {0.2, 0.2, 0.2}, {0.5, 0.5, 0}}
	d3, note := KneeDistances(plane)
	assert.Empty(t, note)
	assert.Equal(t, 4, argmaxOf(d3), "3-D bulge is the knee")
	assert.InDelta(t, 0.4/math.Sqrt(3), d3[4], 1e-12, "distance of (0.2, 0.2, 0.2) from x + y + z = 1")
	assert.InDelta(t, 0, d3[3], 1e-12, "centre of the plane")

	concave := [][]float64{{0, 1}, {0.7, 0.7}, {1, 0}}
	dc, note := KneeDistances(concave)
	assert.Contains(t, note, "no knee", "a concave front says so")
	assert.Less(t, dc[1], 0.0, "the concave point lies beyond the line")

	cases := []struct {
		name string
		pts  [][]float64
		want int
		note string
	}{
		{"one point", [][]float64{{3, 4}}, 0, "one design"},
		{"all equal", [][]float64{{3, 4}, {3, 4}}, 0, "same objectives"},
		{"one objective varies", [][]float64{{3, 4}, {3, 2}, {3, 5}}, 1, "one objective varies"},
		{"zero range in one of three", [][]float64{{0, 1, 7}, {0.4, 0.4, 7}, {1, 0, 7}}, 1, "1 of 3 objectives"},
		// (0,0,1) is best in f1 and f2: the extremes span no plane
		{"shared extreme point", [][]float64{{0, 0, 1}, {1, 1, 0}, {0.3, 0.2, 0.4}}, 2, "closest to the ideal"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			d, note := KneeDistances(c.pts)
			require.Len(t, d, len(c.pts))
			assert.Equal(t, c.want, argmaxOf(d), "knee of %v (distances %v)", c.pts, d)
			assert.Contains(t, note, c.note, "note for %v", c.pts)
		})
	}
}

// TestPseudoWeights: w_i = ((f_max − f_i)/(f_max − f_min)) / Σ_j (…)
// (Deb 2001, search/front/REFERENCE.md §3) [derived by hand for the points below].
func TestPseudoWeights(t *testing.T) {
	pts := [][]float64{{0, 1}, {0.5, 0.5}, {1, 0}, {0.2, 0.6}}
	want := [][]float64{{1, 0}, {0.5, 0.5}, {0, 1}, {0.8 / 1.2, 0.4 / 1.2}}
	got := PseudoWeights(pts)
	for i := range pts {
		assert.InDeltaSlice(t, want[i], got[i], 1e-12, "pseudo-weights of %v", pts[i])
	}
	one := PseudoWeights([][]float64{{2, 3}})
	assert.Equal(t, [][]float64{{0.5, 0.5}}, one, "a single design gets equal weights")
	// compromise with equal weights prefers the balanced point; weight on f1
	// prefers the best f1 [derived: max_i w_i f̂_i]
	c := CompromiseValues(pts, []float64{0.5, 0.5})
	assert.Equal(t, 1, slices.Index(c, slices.Min(c)), "equal weights: (0.5, 0.5)")
	c = CompromiseValues(pts, []float64{1, 0})
	assert.Equal(t, 0, slices.Index(c, slices.Min(c)), "weight on f1: the best f1")
}
