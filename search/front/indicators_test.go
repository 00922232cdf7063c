package front

import (
	"math"
	"math/rand/v2"
	"slices"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// Hand-checkable sets of search/front/REFERENCE.md §1; the values there are derived
// from the indicators' definitions (Zitzler et al., IEEE TEC 7(2), 2003;
// Ishibuchi et al., EMO 2015; Zitzler and Thiele, IEEE TEC 3(4), 1999).
var (
	setA1 = [][]float64{{2, 4}, {3, 3}, {4, 2}}
	setA2 = [][]float64{{2, 8}, {4, 4}, {8, 2}}
	setZ5 = [][]float64{{0, 10}, {1, 6}, {2, 2}, {6, 1}, {10, 0}}
)

// TestDistanceIndicators: the GD/IGD/IGD+ table of search/front/REFERENCE.md §1.2
// [derived there; hand check given beside the table]. Tolerance 1e-6: the
// table prints six significant digits; the closed forms are checked to
// 1e-12.
func TestDistanceIndicators(t *testing.T) {
	cases := []struct {
		name  string
		a, z  [][]float64
		gd    float64
		igd   float64
		igdp  float64
		exact bool
	}{
		{"two ends of three", [][]float64{{0, 1}, {1, 0}}, [][]float64{{0, 1}, {0.5, 0.5}, {1, 0}}, 0, math.Sqrt(0.5) / 3, 0.5 / 3, true},
		{"A1 against Z", setA1, setZ5, math.NaN(), (2*math.Sqrt(40) + 2*math.Sqrt(5) + math.Sqrt(2)) / 5, (2 + 1 + math.Sqrt(2) + 1 + 2) / 5, true},
		{"A2 against Z", setA2, setZ5, math.NaN(), (3*math.Sqrt(8) + 2*math.Sqrt(5)) / 5, (2 + math.Sqrt(5) + math.Sqrt(8) + math.Sqrt(5) + 2) / 5, true},
		{"A1 printed values", setA1, setZ5, math.NaN(), 3.7071, 1.4828, false},
		{"A2 printed values", setA2, setZ5, math.NaN(), 2.5915, 2.2601, false},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			tol := 1e-12
			if !c.exact {
				tol = 1e-4 // four decimals printed in search/front/REFERENCE.md §1.2
			}
			if !math.IsNaN(c.gd) {
				assert.InDelta(t, c.gd, GD(c.a, c.z), tol, "GD(%v; %v)", c.a, c.z)
			}
			assert.InDelta(t, c.igd, IGD(c.a, c.z), tol, "IGD(%v; %v)", c.a, c.z)
			assert.InDelta(t, c.igdp, IGDPlus(c.a, c.z), tol, "IGD+(%v; %v)", c.a, c.z)
		})
	}
	// GD of {(1,1),(2,2),(3,3)} to {(0,0),(1,1),(2,2)} = √2/3 (search/front/REFERENCE.md §1.2)
	assert.InDelta(t, math.Sqrt2/3, GD([][]float64{{1, 1}, {2, 2}, {3, 3}}, [][]float64{{0, 0}, {1, 1}, {2, 2}}), 1e-12, "GD of a shifted diagonal")
	// A1 dominates A2, yet IGD ranks A2 first; IGD+ ranks them correctly (search/front/REFERENCE.md §1.2)
	assert.Greater(t, IGD(setA1, setZ5), IGD(setA2, setZ5), "IGD is not Pareto-compliant")
	assert.Less(t, IGDPlus(setA1, setZ5), IGDPlus(setA2, setZ5), "IGD+ is weakly Pareto-compliant")
	assert.True(t, math.IsNaN(IGD(nil, setZ5)), "IGD of an empty set has no value")
}

// TestEpsilonAndCoverage: the tables of search/front/REFERENCE.md §1.3 and §1.4 [derived
// there from the definitions].
func TestEpsilonAndCoverage(t *testing.T) {
	b4 := [][]float64{{1.5, 4}, {2, 2}, {3, 3}, {5, 0.5}}
	a3 := [][]float64{{1, 4}, {2, 2}, {4, 1}}
	cases := []struct {
		name             string
		a, b             [][]float64
		epsAB, epsBA     float64
		covAB, covBA     float64
		checkCov, checkE bool
	}{
		{"two points and their middle", [][]float64{{1, 2}, {2, 1}}, [][]float64{{1.5, 1.5}}, 0.5, 0.5, 0, 0, false, true},
		{"three against four", a3, b4, 0.5, 1, 0.75, 1.0 / 3, true, true},
		// I_eps+(A2, A1) = 2 [derived: (2,4) and (4,2) of A1 need a shift of
		// 2 from (4,4) of A2]
		{"A1 against A2", setA1, setA2, 0, 2, 1, 0, true, true},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			if c.checkE {
				assert.InDelta(t, c.epsAB, EpsilonAdditive(c.a, c.b), 1e-12, "I_eps+(%v, %v)", c.a, c.b)
				assert.InDelta(t, c.epsBA, EpsilonAdditive(c.b, c.a), 1e-12, "I_eps+(%v, %v)", c.b, c.a)
			}
			if c.checkCov {
				assert.InDelta(t, c.covAB, Coverage(c.a, c.b), 1e-12, "C(%v, %v)", c.a, c.b)
				assert.InDelta(t, c.covBA, Coverage(c.b, c.a), 1e-12, "C(%v, %v)", c.b, c.a)
			}
		})
	}
	// A1 dominates A2, so I_eps+(A1, A2) ≤ 0 [definition, search/front/REFERENCE.md §1.3]
	assert.LessOrEqual(t, EpsilonAdditive(setA1, setA2), 0.0, "I_eps+(A1, A2)")
}

// TestNormalizationAndReference: the shared normalisation uses the ideal
// and nadir of the union's non-dominated set, so a dominated outlier of one
// run does not move it (search/front/REFERENCE.md §2); an objective without range maps to
// 0; H follows from the simplex-lattice size C(H+m−1, m−1) [derived; the
// population sizes 91 (m = 3, H = 12) and 210 (m = 5, H = 6) are the usual
// NSGA-III settings, Deb and Jain, IEEE TEC 18(4), 2014, from memory].
func TestNormalizationAndReference(t *testing.T) {
	runA := [][]float64{{0, 10}, {5, 5}}
	runB := [][]float64{{2, 4}, {10, 0}, {20, 20}} // (20, 20) is dominated
	n, err := NewNormalization(runA, runB)
	require.NoError(t, err)
	assert.Equal(t, []float64{0, 0}, n.Ideal, "ideal of the union front")
	assert.Equal(t, []float64{10, 10}, n.Nadir, "nadir of the union front, outlier ignored")
	got := n.Apply([][]float64{{5, 5}, {20, 20}})
	assert.Equal(t, [][]float64{{0.5, 0.5}, {2, 2}}, got, "normalised points")

	flat, err := NewNormalization([][]float64{{1, 3}, {1, 3}})
	require.NoError(t, err)
	assert.Equal(t, 1.0, flat.Span(0), "zero range falls back to span 1")
	assert.Equal(t, [][]float64{{0, 0}}, flat.Apply([][]float64{{1, 3}}), "an objective without range maps to 0")

	_, err = NewNormalization(nil)
	assert.Error(t, err, "nothing to normalise")

	refs := []struct {
		n, m, h int
	}{
		{11, 2, 10}, // 1 + 1/10 = 1.1, the two-objective example of search/front/REFERENCE.md §2
		{100, 2, 99},
		{91, 3, 12},
		{100, 3, 12},
		{210, 5, 6},
		{1, 2, 1}, // guard: at least one division
		{1, 1, 1},
	}
	for _, r := range refs {
		assert.Equal(t, r.h, ReferenceDivisions(r.n, r.m), "H for %d points in %d objectives", r.n, r.m)
	}
}

// item is a design as ParetoFront sees it: an index, objectives and
// feasibility.
type item struct {
	Index    int64
	F        []float64
	Feasible bool
}

func itemPoint(d *item) ([]float64, bool) { return d.F, d.Feasible }

// randomDesigns draws designs with random objectives on a coarse grid (so
// that equal vectors and ties occur), a fifth of them infeasible.
func randomDesigns(rng *rand.Rand, n, m int) []item {
	ds := make([]item, n)
	for i := range ds {
		f := make([]float64, m)
		for k := range f {
			f[k] = float64(rng.IntN(20))
		}
		ds[i] = item{Index: int64(i), F: f, Feasible: rng.IntN(5) != 0}
	}
	return ds
}

// bruteFront is the feasible non-dominated set by the definition of
// search/REFERENCE.md §1.3, first of equal vectors kept, as a set of indices.
func bruteFront(ds []item) []int64 {
	var out []int64
	for i, d := range ds {
		if !d.Feasible {
			continue
		}
		keep := true
		for j, q := range ds {
			if j == i || !q.Feasible {
				continue
			}
			if Dominates(q.F, d.F) || (j < i && slices.Equal(q.F, d.F)) {
				keep = false
				break
			}
		}
		if keep {
			out = append(out, d.Index)
		}
	}
	return out
}

func designIndices(ds []item) []int64 {
	out := make([]int64, len(ds))
	for i, d := range ds {
		out[i] = d.Index
	}
	slices.Sort(out)
	return out
}

// TestMergeSplitFronts: splitting a random set into parts (islands),
// taking each part's front and the front of their union gives the front of
// the whole set [definition of Pareto dominance, search/REFERENCE.md §1.3; the oracle
// is the O(n²) definition].
func TestMergeSplitFronts(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 11))
	for _, m := range []int{2, 3, 4} {
		for trial := range 20 {
			ds := randomDesigns(rng, 60+rng.IntN(140), m)
			want := bruteFront(ds)
			require.Equal(t, want, designIndices(ParetoFront(ds, itemPoint)), "m=%d trial %d: ParetoFront equals the definition", m, trial)
			parts := 2 + rng.IntN(4)
			var merged []item
			for p := range parts {
				var part []item
				for i, d := range ds {
					if i%parts == p {
						part = append(part, d)
					}
				}
				merged = append(merged, ParetoFront(part, itemPoint)...)
			}
			// the merge keeps the first of equal vectors in the order of the
			// whole set, as Merge does with runs in order
			slices.SortFunc(merged, func(a, b item) int { return int(a.Index - b.Index) })
			assert.Equal(t, want, designIndices(ParetoFront(merged, itemPoint)), "m=%d trial %d: front of %d merged part fronts", m, trial, parts)
		}
	}
}

// TestMannWhitney: exact small-sample p-values [derived: the U distribution
// of Mann and Whitney 1947 by enumeration], the published critical values
// of U for a two-sided 5% test [from memory: the usual tables give
// 2 for n1 = n2 = 5, 13 for 8 and 8, 23 for 10 and 10], and the normal
// approximation with ties [derived by hand below].
func TestMannWhitney(t *testing.T) {
	cases := []struct {
		name string
		x, y []float64
		u, p float64
		tol  float64
	}{
		// {1,2,3} below {4,5,6}: U = 0, one of C(6,3) = 20 arrangements each way
		{"separated", []float64{1, 2, 3}, []float64{4, 5, 6}, 0, 0.1, 1e-12},
		{"separated, swapped", []float64{4, 5, 6}, []float64{1, 2, 3}, 9, 0.1, 1e-12},
		// U = 3; counts of U = 0…9 are 1,1,2,3,3,3,3,2,1,1, so P(U ≤ 3) = 7/20
		{"interleaved", []float64{1, 3, 5}, []float64{2, 4, 6}, 3, 0.7, 1e-12},
		// ties: ranks 1.5,1.5,3.5,3.5,5.5,5.5; R_x = 6.5, U = 0.5, var =
		// 9/12·(7 − 18/30) = 4.8, z = (4.5 − 0.5 − 0.5)/√4.8, p = erfc(z/√2)
		{"ties, normal approximation", []float64{1, 1, 2}, []float64{2, 3, 3}, 0.5, 0.11014892418594698, 1e-12},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			u, p := MannWhitney(c.x, c.y)
			assert.Equal(t, c.u, u, "U(%v, %v)", c.x, c.y)
			assert.InDelta(t, c.p, p, c.tol, "p(%v, %v)", c.x, c.y)
		})
	}
	for _, cv := range []struct{ n, crit int }{{5, 2}, {8, 13}, {10, 23}} {
		assert.LessOrEqual(t, 2*mwLowerTail(cv.n, cv.n, cv.crit), 0.05, "n1 = n2 = %d: U = %d is significant", cv.n, cv.crit)
		assert.Greater(t, 2*mwLowerTail(cv.n, cv.n, cv.crit+1), 0.05, "n1 = n2 = %d: U = %d is not", cv.n, cv.crit+1)
	}
	// the recursion against enumeration of every arrangement (4 and 5)
	counts := make([]float64, 21)
	total := 0.0
	for mask := range 1 << 9 {
		if popcount(mask) != 4 {
			continue
		}
		u := 0 // pairs with the first sample above the second
		for i := range 9 {
			if mask&(1<<i) == 0 {
				continue
			}
			for j := range i {
				if mask&(1<<j) == 0 {
					u++
				}
			}
		}
		counts[u]++
		total++
	}
	cum := 0.0
	for k, c := range counts {
		cum += c
		assert.InDelta(t, cum/total, mwLowerTail(4, 5, k), 1e-12, "P(U <= %d) for sizes 4 and 5", k)
	}
	_, p := MannWhitney(nil, []float64{1})
	assert.True(t, math.IsNaN(p), "empty sample")
}

func popcount(x int) int {
	n := 0
	for ; x > 0; x &= x - 1 {
		n++
	}
	return n
}

// BenchmarkParetoFront measures the front of a merged archive: random
// designs (small fronts) and designs all on one front (the worst case of
// the sorted scan, O(n²)).
func BenchmarkParetoFront(b *testing.B) {
	for _, c := range []struct {
		name  string
		n, m  int
		onOne bool
	}{
		{"random/n=10000/m=2", 10000, 2, false},
		{"random/n=100000/m=2", 100000, 2, false},
		{"random/n=100000/m=3", 100000, 3, false},
		{"one-front/n=2000/m=2", 2000, 2, true},
	} {
		b.Run(c.name, func(b *testing.B) {
			rng := rand.New(rand.NewPCG(1, 1))
			ds := make([]item, c.n)
			for i := range ds {
				f := make([]float64, c.m)
				for k := range f {
					f[k] = rng.Float64()
				}
				if c.onOne {
					f[1] = 1 - f[0]
				}
				ds[i] = item{Index: int64(i), F: f, Feasible: true}
			}
			for b.Loop() {
				ParetoFront(ds, itemPoint)
			}
			b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/float64(c.n), "ns/design")
		})
	}
}

// BenchmarkMannWhitneyExact measures the exact test at its largest size
// (30 and 30 without ties).
func BenchmarkMannWhitneyExact(b *testing.B) {
	x, y := make([]float64, 30), make([]float64, 30)
	for i := range x {
		x[i], y[i] = float64(2*i), float64(2*i+1)
	}
	for b.Loop() {
		MannWhitney(x, y)
	}
}
