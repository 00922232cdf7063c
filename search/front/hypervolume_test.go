package front

import (
	"fmt"
	"math"
	"math/rand/v2"
	"strconv"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// TestHypervolumeHandCases checks the hand-checkable cases of search/front/REFERENCE.md §1.1 (derived by hand;
// the definition is Zitzler and Thiele, IEEE Trans. Evol. Comput. 3(4), 1999) that are not
// verification cases (verification.go: the 2-d staircase, four 3-d points, three 4-d points).
func TestHypervolumeHandCases(t *testing.T) {
	cases := []struct {
		name   string
		points [][]float64
		ref    []float64
		want   float64
	}{
		// The staircase of verification.go plus the dominated (2.5, 2.5) and the point (5, 0)
		// outside the reference, which are filtered.
		{"2d dominated and outside", [][]float64{{1, 3}, {2, 2}, {3, 1}, {2.5, 2.5}, {5, 0}}, []float64{4, 4}, 6},
		// Non-dominated {(2, 7.5), (4, 6.5)}: 5 + 3; ignoring dominance would give 17.
		{"2d mixed dominance", [][]float64{{6, 6.5}, {5, 7}, {4, 6.5}, {3, 7.5}, {2, 7.5}}, []float64{7, 8.5}, 8},
		// 3·9 − 3·3 + 1 by inclusion–exclusion.
		{"3d three boxes", [][]float64{{1, 1, 3}, {1, 3, 1}, {3, 1, 1}}, []float64{4, 4, 4}, 19},
		{"3d negative coordinate", [][]float64{{1, 0, 1}, {1, 1, 0}, {-1, 2, 2}}, []float64{5, 5, 5}, 114},
		{"3d symmetric", [][]float64{{2, 1, 1}, {1, 2, 1}, {1, 1, 2}}, []float64{3.5, 3.5, 3.5}, 14.625},
		// One objective: ref − min.
		{"1d", [][]float64{{3}, {1}, {7}}, []float64{5}, 4},
		{"empty", nil, []float64{1, 1}, 0},
		{"on the reference boundary", [][]float64{{1, 4}, {4, 1}}, []float64{4, 4}, 0},
		{"NaN ignored", [][]float64{{math.NaN(), 1}, {1, 3}}, []float64{4, 4}, 3},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			got := Hypervolume(c.points, c.ref)
			assert.InDelta(t, c.want, got, 1e-12, "Hypervolume(%v, ref %v)", c.points, c.ref)
		})
	}
}

// gridHypervolume counts the unit cells of [lo, ref) dominated by integer points: an exact
// oracle for points with integer coordinates (derived from the definition).
func gridHypervolume(points [][]float64, ref []float64, lo int) float64 {
	m := len(ref)
	cell := make([]int, m)
	for i := range cell {
		cell[i] = lo
	}
	count := 0
	for {
		for _, p := range points {
			in := true
			for i := range m {
				if !(p[i] <= float64(cell[i]) && float64(cell[i]) < ref[i]) {
					in = false
					break
				}
			}
			if in {
				count++
				break
			}
		}
		i := 0
		for ; i < m; i++ {
			cell[i]++
			if float64(cell[i]) < ref[i] {
				break
			}
			cell[i] = lo
		}
		if i == m {
			return float64(count)
		}
	}
}

// TestHypervolumeAgainstGrid compares every algorithm (2-D sweep, 3-D slicing, WFG from 3 to 5
// objectives) with cell counting on random integer points, duplicates and dominated points
// included.
func TestHypervolumeAgainstGrid(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 7))
	for _, m := range []int{2, 3, 4, 5} {
		for trial := range 20 {
			n := 1 + rng.IntN(12)
			pts := make([][]float64, n)
			for i := range pts {
				pts[i] = make([]float64, m)
				for k := range pts[i] {
					pts[i][k] = float64(rng.IntN(6))
				}
			}
			if n > 2 {
				pts[n-1] = append([]float64(nil), pts[0]...) // a duplicate
			}
			ref := make([]float64, m)
			for k := range ref {
				ref[k] = 6
			}
			want := gridHypervolume(pts, ref, 0)
			name := fmt.Sprintf("m=%d trial=%d", m, trial)
			assert.Equal(t, want, Hypervolume(pts, ref), "Hypervolume %s %v", name, pts)
			if m >= 3 {
				in := make([][]float64, 0, n)
				for _, p := range pts {
					if strictlyBetter(p, ref) {
						in = append(in, p)
					}
				}
				if len(in) > 0 {
					assert.Equal(t, want, hvWFG(in, ref), "WFG %s %v", name, pts)
				}
			}
		}
	}
}

// TestHypervolumeZDT1Sample checks the finite-front values of search/REFERENCE.md §5.1 (derived): 100
// points f1 = i/99 on f2 = 1 − √f1 give 0.871409 at (1.1, 1.1) and 0.661409 at (1, 1).
func TestHypervolumeZDT1Sample(t *testing.T) {
	pts := make([][]float64, 100)
	for i := range pts {
		f1 := float64(i) / 99
		pts[i] = []float64{f1, 1 - math.Sqrt(f1)}
	}
	assert.InDelta(t, 0.871409, Hypervolume(pts, []float64{1.1, 1.1}), 5e-7, "100 points at (1.1, 1.1)")
	assert.InDelta(t, 0.661409, Hypervolume(pts, []float64{1, 1}), 5e-7, "100 points at (1, 1)")
}

func TestHypervolumeDoesNotModifyInput(t *testing.T) {
	pts := [][]float64{{3, 1, 1, 1}, {1, 3, 1, 1}, {1, 1, 3, 1}, {2, 2, 2, 0}}
	saved := make([][]float64, len(pts))
	for i, p := range pts {
		saved[i] = append([]float64(nil), p...)
	}
	Hypervolume(pts, []float64{4, 4, 4, 4})
	assert.Equal(t, saved, pts, "points after Hypervolume")
}

func TestHypervolumePanicsOnLengthMismatch(t *testing.T) {
	require.Panics(t, func() { Hypervolume([][]float64{{1, 2, 3}}, []float64{4, 4}) }, "3-objective point, 2-objective reference")
}

// BenchmarkHypervolume measures the exact hypervolume of points on the unit sphere's positive
// orthant (a non-dominated set) with 2, 3 and 4 objectives.
func BenchmarkHypervolume(b *testing.B) {
	for _, c := range []struct{ m, n int }{{2, 200}, {3, 200}, {4, 100}} {
		b.Run("M="+strconv.Itoa(c.m)+"/n="+strconv.Itoa(c.n), func(b *testing.B) {
			pts := spherePoints(c.m, c.n)
			ref := make([]float64, c.m)
			for i := range ref {
				ref[i] = 1.1
			}
			for b.Loop() {
				Hypervolume(pts, ref)
			}
		})
	}
}

// spherePoints returns n deterministic points with Σ f_i² = 1, f_i ≥ 0.
func spherePoints(m, n int) [][]float64 {
	pts := make([][]float64, n)
	state := uint64(12345)
	for i := range pts {
		p := make([]float64, m)
		var s float64
		for k := range p {
			state = state*6364136223846793005 + 1442695040888963407
			p[k] = float64(state>>11)/(1<<53) + 1e-3
			s += p[k] * p[k]
		}
		for k := range p {
			p[k] /= math.Sqrt(s)
		}
		pts[i] = p
	}
	return pts
}
