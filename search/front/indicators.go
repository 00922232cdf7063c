package front

import (
	"cmp"
	"fmt"
	"math"
	"slices"
)

// NonDominated returns the indices of the points that no other point weakly
// dominates, keeping the first of equal points, in increasing index order.
// Points with NaN are left out. It sorts the points lexicographically, so a
// point can only be dominated by one before it, and compares each point with
// the front found so far: O(n log n + n·|front|) (Kung, Luccio and
// Preparata, J. ACM 22(4):469–476, 1975, use the same order; from memory).
func NonDominated(points [][]float64) []int {
	order := make([]int, 0, len(points))
	for i, p := range points {
		if !hasNaN(p) {
			order = append(order, i)
		}
	}
	slices.SortStableFunc(order, func(a, b int) int { return slices.Compare(points[a], points[b]) })
	var front []int
	for _, i := range order {
		keep := true
		for _, j := range front {
			if WeaklyDominates(points[j], points[i]) {
				keep = false
				break
			}
		}
		if keep {
			front = append(front, i)
		}
	}
	slices.Sort(front)
	return front
}

func hasNaN(p []float64) bool {
	for _, v := range p {
		if math.IsNaN(v) {
			return true
		}
	}
	return false
}

// ParetoFront returns the feasible items of a set whose objective vectors no
// other feasible item weakly dominates, one per objective vector (the first
// in the order given, as the search archive keeps it), sorted by objectives
// (lexicographic) as search.Result.Front is. point gives an item's
// objective vector (all minimised) and whether it is feasible. Merging the
// fronts of several runs and taking ParetoFront of the union gives the
// front of the union of all their designs.
func ParetoFront[T any](items []T, point func(*T) (f []float64, feasible bool)) []T {
	var feas []T
	var pts [][]float64
	for i := range items {
		if f, ok := point(&items[i]); ok {
			feas = append(feas, items[i])
			pts = append(pts, f)
		}
	}
	idx := NonDominated(pts)
	out := make([]T, len(idx))
	outF := make([][]float64, len(idx))
	for k, i := range idx {
		out[k], outF[k] = feas[i], pts[i]
	}
	order := make([]int, len(idx))
	for k := range order {
		order[k] = k
	}
	slices.SortStableFunc(order, func(a, b int) int { return slices.Compare(outF[a], outF[b]) })
	sorted := make([]T, len(idx))
	for k, i := range order {
		sorted[k] = out[i]
	}
	return sorted
}

// Normalization maps objectives onto [0, 1] between an ideal and a nadir
// point: f̂_k = (f_k − Ideal_k)/(Nadir_k − Ideal_k). Fronts that are compared
// must share one normalisation (search/front/REFERENCE.md §2), never per-run bounds.
type Normalization struct {
	Ideal, Nadir []float64
}

// NewNormalization takes the ideal and nadir points of the non-dominated
// set of the union of the given sets (the best estimate of the true front
// that the runs offer). It returns an error when the union has no point.
func NewNormalization(sets ...[][]float64) (Normalization, error) {
	var all [][]float64
	for _, s := range sets {
		all = append(all, s...)
	}
	idx := NonDominated(all)
	if len(idx) == 0 {
		return Normalization{}, fmt.Errorf("no points to normalise")
	}
	m := len(all[idx[0]])
	n := Normalization{Ideal: make([]float64, m), Nadir: make([]float64, m)}
	for k := range m {
		n.Ideal[k], n.Nadir[k] = math.Inf(1), math.Inf(-1)
	}
	for _, i := range idx {
		for k, v := range all[i] {
			n.Ideal[k] = min(n.Ideal[k], v)
			n.Nadir[k] = max(n.Nadir[k], v)
		}
	}
	return n, nil
}

// Span is Nadir_k − Ideal_k, or 1 where the two coincide (an objective
// without range: every point then maps to 0 there, none is favoured).
func (n Normalization) Span(k int) float64 {
	s := n.Nadir[k] - n.Ideal[k]
	if !(s > 0) {
		return 1
	}
	return s
}

// Apply returns the normalised copies of points.
func (n Normalization) Apply(points [][]float64) [][]float64 {
	out := make([][]float64, len(points))
	for i, p := range points {
		q := make([]float64, len(p))
		for k, v := range p {
			q[k] = (v - n.Ideal[k]) / n.Span(k)
		}
		out[i] = q
	}
	return out
}

// ReferenceDivisions returns H, the number of divisions of the largest
// uniform simplex-lattice reference set (Das and Dennis, SIAM J. Optim.
// 8(3):631–657, 1998) with at most n points in m objectives, where such a
// set has C(H+m−1, m−1) points; at least 1. Ishibuchi, Imada, Setoguchi and
// Nojima (Evol. Comput. 26(3):411–440, 2018; from memory) specify
// the hypervolume reference point as 1 + 1/H in the normalised space for a
// front of n solutions (search/front/REFERENCE.md §2).
func ReferenceDivisions(n, m int) int {
	if m <= 1 {
		return max(1, n-1)
	}
	h := 1
	for latticeSize(h+1, m) <= float64(n) {
		h++
	}
	return h
}

// latticeSize is C(h+m−1, m−1), the number of points of a simplex lattice
// with h divisions in m objectives.
func latticeSize(h, m int) float64 {
	c := 1.0
	for i := 1; i <= m-1; i++ {
		c = c * float64(h+i) / float64(i)
	}
	return c
}

// GD is the generational distance of a to the reference set z with p = 1:
// the mean over a of the Euclidean distance to the nearest point of z (Van
// Veldhuizen and Lamont 1998, from memory; search/front/REFERENCE.md §1.2). NaN when a or z is empty.
func GD(a, z [][]float64) float64 { return meanMinDistance(a, z, euclid) }

// IGD is the inverted generational distance with p = 1: the mean over the
// reference set z of the Euclidean distance to the nearest point of a
// (search/front/REFERENCE.md §1.2). IGD is not Pareto-compliant: a set that dominates
// another can score worse. NaN when a or z is empty.
func IGD(a, z [][]float64) float64 {
	return meanMinDistance(z, a, func(zz, aa []float64) float64 { return euclid(aa, zz) })
}

// IGDPlus is IGD with the distance d⁺(z, a) = sqrt(Σ_i max(a_i − z_i, 0)²),
// which counts only where a is worse than z; it is weakly Pareto-compliant
// (Ishibuchi, Masuda, Tanigaki and Nojima, EMO 2015; search/front/REFERENCE.md §1.2). NaN
// when a or z is empty.
func IGDPlus(a, z [][]float64) float64 {
	return meanMinDistance(z, a, func(zz, aa []float64) float64 {
		s := 0.0
		for i := range zz {
			d := max(aa[i]-zz[i], 0)
			s += d * d
		}
		return math.Sqrt(s)
	})
}

func euclid(a, b []float64) float64 {
	s := 0.0
	for i := range a {
		d := a[i] - b[i]
		s += d * d
	}
	return math.Sqrt(s)
}

// meanMinDistance is (1/|from|) Σ_{p ∈ from} min_{q ∈ to} dist(p, q).
func meanMinDistance(from, to [][]float64, dist func(p, q []float64) float64) float64 {
	if len(from) == 0 || len(to) == 0 {
		return math.NaN()
	}
	sum := 0.0
	for _, p := range from {
		best := math.Inf(1)
		for _, q := range to {
			best = min(best, dist(p, q))
		}
		sum += best
	}
	return sum / float64(len(from))
}

// EpsilonAdditive is the additive ε-indicator I_ε+(a, b) =
// max_{q ∈ b} min_{p ∈ a} max_i (p_i − q_i): the smallest shift that makes a
// weakly dominate b; ≤ 0 means it already does (Zitzler, Thiele, Laumanns,
// Fonseca and Grunert da Fonseca, IEEE TEC 7(2):117–132, 2003; search/front/REFERENCE.md
// §1.3). NaN when a or b is empty.
func EpsilonAdditive(a, b [][]float64) float64 {
	if len(a) == 0 || len(b) == 0 {
		return math.NaN()
	}
	eps := math.Inf(-1)
	for _, q := range b {
		best := math.Inf(1)
		for _, p := range a {
			worst := math.Inf(-1)
			for i := range q {
				worst = max(worst, p[i]-q[i])
			}
			best = min(best, worst)
		}
		eps = max(eps, best)
	}
	return eps
}

// Coverage is the C-metric C(a, b) = |{q ∈ b : ∃ p ∈ a, p ⪯ q}| / |b|, the
// share of b weakly dominated by some point of a (Zitzler and Thiele, IEEE
// TEC 3(4):257–271, 1999; search/front/REFERENCE.md §1.4). It is not symmetric, and
// C(a, b) ≠ 1 − C(b, a) in general. NaN when b is empty.
func Coverage(a, b [][]float64) float64 {
	if len(b) == 0 {
		return math.NaN()
	}
	n := 0
	for _, q := range b {
		for _, p := range a {
			if WeaklyDominates(p, q) {
				n++
				break
			}
		}
	}
	return float64(n) / float64(len(b))
}

// MannWhitney is the two-sided Mann–Whitney U test of x against y (Mann
// and Whitney, Ann. Math. Statist. 18(1):50–60, 1947): U counts the pairs
// with x_i > y_j, ties counting one half; p is the probability, if both
// samples come from one distribution, of a U at least as far from its mean
// n_x·n_y/2. Without ties and with n_x + n_y ≤ 60, p is exact (the count of
// rank arrangements, by recursion on the largest rank); otherwise it is the
// normal approximation with the tie-corrected variance and a continuity
// correction of 1/2. p is NaN when a sample is empty.
func MannWhitney(x, y []float64) (u, p float64) {
	nx, ny := len(x), len(y)
	if nx == 0 || ny == 0 {
		return math.NaN(), math.NaN()
	}
	type obs struct {
		v    float64
		from int
	}
	all := make([]obs, 0, nx+ny)
	for _, v := range x {
		all = append(all, obs{v, 0})
	}
	for _, v := range y {
		all = append(all, obs{v, 1})
	}
	slices.SortStableFunc(all, func(a, b obs) int { return cmp.Compare(a.v, b.v) })
	// mid-ranks; tieTerm is Σ (t³ − t) over groups of ties
	rankSumX, tieTerm, ties := 0.0, 0.0, false
	for i := 0; i < len(all); {
		j := i
		for j < len(all) && all[j].v == all[i].v {
			j++
		}
		rank := float64(i+j+1) / 2 // ranks i+1 … j
		for k := i; k < j; k++ {
			if all[k].from == 0 {
				rankSumX += rank
			}
		}
		if t := float64(j - i); t > 1 {
			tieTerm += t*t*t - t
			ties = true
		}
		i = j
	}
	u = rankSumX - float64(nx*(nx+1))/2
	mean := float64(nx*ny) / 2
	if !ties && nx+ny <= 60 {
		lo := min(u, float64(nx*ny)-u)
		p = min(1, 2*mwLowerTail(nx, ny, int(math.Round(lo))))
		return u, p
	}
	n := float64(nx + ny)
	variance := float64(nx*ny) / 12 * ((n + 1) - tieTerm/(n*(n-1)))
	if variance <= 0 {
		return u, 1
	}
	z := (math.Abs(u-mean) - 0.5) / math.Sqrt(variance)
	if z < 0 {
		z = 0
	}
	return u, min(1, math.Erfc(z/math.Sqrt2))
}

// mwLowerTail is P(U ≤ k) for samples of sizes m and n without ties: the
// number of arrangements with U ≤ k over C(m+n, m), from the recursion
// c(u; m, n) = c(u − n; m − 1, n) + c(u; m, n − 1) on whether the largest
// observation belongs to the first sample (Mann and Whitney 1947, eq. 3).
func mwLowerTail(m, n, k int) float64 {
	// c(u; i, j) for j ≤ n is kept for the previous and the current i, as
	// flat rows of length m·n + 1; only additions, so the counts are exact
	// while they stay below 2⁵³.
	w := m*n + 1
	prev, cur := make([]float64, (n+1)*w), make([]float64, (n+1)*w)
	for j := 0; j <= n; j++ {
		prev[j*w] = 1 // i = 0: only u = 0
	}
	for i := 1; i <= m; i++ {
		clear(cur)
		for j := 0; j <= n; j++ {
			row := cur[j*w : j*w+i*j+1]
			for u := range row {
				v := 0.0
				if u >= j {
					v = prev[j*w+u-j] // the largest is in the first sample: it beats all j
				}
				if j > 0 {
					v += cur[(j-1)*w+u]
				}
				row[u] = v
			}
		}
		prev, cur = cur, prev
	}
	total, tail := 0.0, 0.0
	for u, c := range prev[n*w : n*w+w] {
		total += c
		if u <= k {
			tail += c
		}
	}
	return tail / total
}
