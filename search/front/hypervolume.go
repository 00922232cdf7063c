package front

import (
	"cmp"
	"fmt"
	"slices"
)

// Hypervolume returns the exact hypervolume of points with respect to the reference point ref,
// all objectives minimised: the Lebesgue measure of the union of the boxes [a, ref] over the
// points a strictly better than ref in every objective (Zitzler and Thiele, IEEE Trans. Evol.
// Comput. 3(4), 1999; Zitzler, Thiele, Laumanns, Fonseca and Grunert da Fonseca, IEEE Trans.
// Evol. Comput. 7(2):117–132, 2003). Other points, including points with NaN, contribute nothing,
// and dominated points are allowed. points is not modified.
//
// Algorithms: one objective, ref − min; two, the O(n log n) sweep; three, slicing along the
// third objective with a 2-D front per slab, O(n²); four or more, the WFG recursion (While,
// Bradstreet and Barone, IEEE Trans. Evol. Comput. 16(1):86–95, 2012): points sorted by the last
// objective, worst first, each contributing its exclusive volume, so that the limited sets lose
// the last objective and the recursion ends in the 2-D sweep. The cost grows quickly with the
// number of objectives.
//
// Hypervolume panics if a point's length differs from len(ref).
func Hypervolume(points [][]float64, ref []float64) float64 {
	m := len(ref)
	in := make([][]float64, 0, len(points))
	for _, p := range points {
		if len(p) != m {
			panic(fmt.Sprintf("front: hypervolume of a %d-objective point with a %d-objective reference", len(p), m))
		}
		if strictlyBetter(p, ref) {
			in = append(in, p)
		}
	}
	if len(in) == 0 || m == 0 {
		return 0
	}
	switch m {
	case 1:
		best := in[0][0]
		for _, p := range in[1:] {
			best = min(best, p[0])
		}
		return ref[0] - best
	case 2:
		return hv2(in, ref)
	case 3:
		return hv3(in, ref)
	}
	return hvWFG(in, ref)
}

// strictlyBetter reports whether p_i < r_i for every i (false for NaN).
func strictlyBetter(p, r []float64) bool {
	for i := range r {
		if !(p[i] < r[i]) {
			return false
		}
	}
	return true
}

// hv2 is the 2-D sweep over points strictly inside ref (reordering pts).
func hv2(pts [][]float64, ref []float64) float64 {
	slices.SortFunc(pts, func(a, b []float64) int {
		if c := cmp.Compare(a[0], b[0]); c != 0 {
			return c
		}
		return cmp.Compare(a[1], b[1])
	})
	var hv float64
	best := ref[1]
	for _, p := range pts {
		if p[1] < best {
			hv += (ref[0] - p[0]) * (best - p[1])
			best = p[1]
		}
	}
	return hv
}

// hv3 slices along the third objective: the points are taken in increasing f3, and each slab
// between consecutive f3 values (the last up to ref3) has the 2-D hypervolume of the (f1, f2)
// front of the points below it. The front is kept sorted by f1 with f2 decreasing, so its area is
// a linear sweep.
func hv3(pts [][]float64, ref []float64) float64 {
	slices.SortFunc(pts, func(a, b []float64) int { return cmp.Compare(a[2], b[2]) })
	var front [][2]float64 // sorted by f1 ascending, f2 strictly decreasing
	var hv float64
	for i, p := range pts {
		front = insertFront2(front, p[0], p[1])
		top := ref[2]
		if i+1 < len(pts) {
			top = pts[i+1][2]
		}
		if h := top - p[2]; h > 0 {
			var area float64
			best := ref[1]
			for _, q := range front {
				area += (ref[0] - q[0]) * (best - q[1])
				best = q[1]
			}
			hv += area * h
		}
	}
	return hv
}

// insertFront2 inserts (f1, f2) into a 2-D non-dominated front sorted by f1 ascending.
func insertFront2(front [][2]float64, f1, f2 float64) [][2]float64 {
	pos, _ := slices.BinarySearchFunc(front, f1, func(q [2]float64, t float64) int {
		if q[0] <= t {
			return -1
		}
		return 1
	})
	lo := pos
	if pos > 0 {
		if front[pos-1][1] <= f2 {
			return front
		}
		if front[pos-1][0] == f1 {
			lo = pos - 1
		}
	}
	hi := pos
	for hi < len(front) && front[hi][1] >= f2 {
		hi++
	}
	return slices.Replace(front, lo, hi, [2]float64{f1, f2})
}

// hvWFG is the WFG recursion over points strictly inside ref, len(ref) ≥ 2.
func hvWFG(pts [][]float64, ref []float64) float64 {
	m := len(ref)
	if m == 2 {
		return hv2(pts, ref)
	}
	pts = nondominated(pts)
	// Worst last objective first: every later point q has q_m ≤ p_m, so limit(q, p) has last
	// coordinate p_m and the limited set is (m−1)-dimensional, scaled by ref_m − p_m.
	slices.SortFunc(pts, func(a, b []float64) int { return cmp.Compare(b[m-1], a[m-1]) })
	var hv float64
	lim := make([][]float64, 0, len(pts))
	buf := make([]float64, len(pts)*(m-1))
	for k, p := range pts {
		incl := 1.0
		for i := range m - 1 {
			incl *= ref[i] - p[i]
		}
		lim = lim[:0]
		for j, q := range pts[k+1:] {
			l := buf[j*(m-1) : (j+1)*(m-1)]
			for i := range m - 1 {
				l[i] = max(q[i], p[i])
			}
			lim = append(lim, l)
		}
		excl := incl
		if len(lim) > 0 {
			excl -= hvWFG(lim, ref[:m-1])
		}
		hv += (ref[m-1] - p[m-1]) * excl
	}
	return hv
}

// nondominated returns the points of pts not weakly dominated by another point (one of each set
// of duplicates kept), in their original order.
func nondominated(pts [][]float64) [][]float64 {
	out := make([][]float64, 0, len(pts))
	for i, p := range pts {
		keep := true
		for j, q := range pts {
			if j == i {
				continue
			}
			if Dominates(q, p) || (j < i && slices.Equal(q, p)) {
				keep = false
				break
			}
		}
		if keep {
			out = append(out, p)
		}
	}
	return out
}
