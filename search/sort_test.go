package search

import (
	"context"
	"fmt"
	"math"
	"math/rand/v2"
	"slices"
	"sort"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"plica/search/front"
)

// randomDesigns draws n designs with m objectives on a coarse integer grid (many ties and exact
// duplicates), a fraction of them infeasible (CV from a small set, so CV ties occur) and some
// failed (CV = +Inf, NaN objectives).
func randomDesigns(rng *rand.Rand, n, m int, infeasible, failed float64) []*Design {
	ds := make([]*Design, n)
	for i := range ds {
		d := &Design{Index: int64(i), F: make([]float64, m), X: []float64{float64(i)}}
		for k := range d.F {
			d.F[k] = float64(rng.IntN(8))
		}
		switch u := rng.Float64(); {
		case u < failed:
			d.CV, d.Failed = math.Inf(1), "failed"
			d.F[0] = math.NaN()
		case u < failed+infeasible:
			d.CV = float64(1 + rng.IntN(4))
		}
		if i > 0 && rng.Float64() < 0.1 {
			copy(d.F, ds[i-1].F)
			d.CV, d.Failed = ds[i-1].CV, ds[i-1].Failed
		}
		ds[i] = d
	}
	return ds
}

// TestFastSortMatchesOracle checks the O(N log N) two-objective sort against the O(M N²) fast
// non-dominated sort of Deb et al. (2002, Sec. III-A) with constraint-domination (Sec. VI), on
// random sets with ties, duplicates, infeasible and failed designs.
func TestFastSortMatchesOracle(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	for trial := range 300 {
		n := 1 + rng.IntN(60)
		ds := randomDesigns(rng, n, 2, 0.3*rng.Float64(), 0.1*rng.Float64())
		want := nondominatedSortNaive(ds)
		got := nondominatedSort2(ds)
		require.Equal(t, want, got, "trial %d: ranks of %d designs", trial, n)
	}
}

// TestNaiveSortProperties checks the oracle itself on three objectives: no design dominates one
// of a lower or equal rank, and each design of rank r > 0 is dominated by one of rank r − 1
// (definition of the fronts, Deb et al. 2002, Sec. III-A).
func TestNaiveSortProperties(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 4))
	for trial := range 100 {
		ds := randomDesigns(rng, 1+rng.IntN(40), 3, 0.2, 0.05)
		rank := nondominatedSortNaive(ds)
		for i, a := range ds {
			hasParent := rank[i] == 0
			for j, b := range ds {
				if constrainedDominates(a, b) {
					assert.Less(t, rank[i], rank[j], "trial %d: design %d dominates %d", trial, i, j)
				}
				if constrainedDominates(b, a) && rank[j] == rank[i]-1 {
					hasParent = true
				}
			}
			assert.True(t, hasParent, "trial %d: design %d of rank %d has no dominator one rank up", trial, i, rank[i])
		}
	}
}

func TestFastSortHandCase(t *testing.T) {
	// Fronts by hand: {(1,4),(2,2),(4,1)}, then {(2,4),(3,3)} and the duplicate (3,3), then
	// (5,5); infeasible CV 0.5 before CV 2.
	f := [][]float64{{3, 3}, {1, 4}, {5, 5}, {2, 2}, {3, 3}, {4, 1}, {2, 4}, {0, 0}, {0, 0}}
	cv := []float64{0, 0, 0, 0, 0, 0, 0, 2, 0.5}
	ds := make([]*Design, len(f))
	for i := range f {
		ds[i] = &Design{F: f[i], CV: cv[i]}
	}
	assert.Equal(t, []int{1, 0, 2, 0, 1, 0, 1, 4, 3}, nondominatedSort2(ds), "two-objective sort")
	assert.Equal(t, []int{1, 0, 2, 0, 1, 0, 1, 4, 3}, nondominatedSortNaive(ds), "oracle")
}

// crowdingOracle is the crowding distance of Deb et al. (2002, Sec. III-B) written directly from
// the definition, with the edge cases of search/REFERENCE.md §2.4.
func crowdingOracle(fs [][]float64) []float64 {
	l := len(fs)
	d := make([]float64, l)
	for _, f := range fs {
		for _, v := range f {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				return d
			}
		}
	}
	if l <= 2 {
		for i := range d {
			d[i] = math.Inf(1)
		}
		return d
	}
	for k := range fs[0] {
		idx := make([]int, l)
		for i := range idx {
			idx[i] = i
		}
		sort.SliceStable(idx, func(a, b int) bool { return fs[idx[a]][k] < fs[idx[b]][k] })
		lo, hi := fs[idx[0]][k], fs[idx[l-1]][k]
		if hi == lo {
			continue
		}
		d[idx[0]], d[idx[l-1]] = math.Inf(1), math.Inf(1)
		for j := 1; j < l-1; j++ {
			d[idx[j]] += (fs[idx[j+1]][k] - fs[idx[j-1]][k]) / (hi - lo)
		}
	}
	return d
}

func TestCrowdingMatchesOracle(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 6))
	for trial := range 300 {
		m := 2 + rng.IntN(3)
		ds := randomDesigns(rng, 1+rng.IntN(30), m, 0, 0.02)
		front := make([]int32, 0, len(ds))
		var fs [][]float64
		for i, d := range ds {
			if rng.Float64() < 0.7 {
				front = append(front, int32(i))
				fs = append(fs, d.F)
			}
		}
		got := make([]float64, len(front))
		crowdingDistance(ds, front, m, got)
		assert.Equal(t, crowdingOracle(fs), got, "trial %d: crowding of %v", trial, fs)
	}
}

func TestCrowdingHandCases(t *testing.T) {
	inf := math.Inf(1)
	cases := []struct {
		name string
		f    [][]float64
		want []float64
	}{
		{"single", [][]float64{{1, 2}}, []float64{inf}},
		{"two", [][]float64{{1, 2}, {2, 1}}, []float64{inf, inf}},
		// Interior (2,2): (3−1)/(3−1) + (3−1)/(3−1) = 2.
		{"three", [][]float64{{1, 3}, {2, 2}, {3, 1}}, []float64{inf, 2, inf}},
		// Zero range in f2: objective skipped, ends come from f1 only.
		{"flat objective", [][]float64{{1, 5}, {2, 5}, {4, 5}}, []float64{inf, 1, inf}},
		// Duplicates: the interior copy gets (2−2)/2 + (2−2)/2 = 0 (stable order).
		{"duplicates", [][]float64{{1, 3}, {2, 2}, {2, 2}, {3, 1}}, []float64{inf, 1, 1, inf}},
		{"all equal", [][]float64{{1, 1}, {1, 1}, {1, 1}}, []float64{0, 0, 0}},
	}
	for _, c := range cases {
		ds := make([]*Design, len(c.f))
		front := make([]int32, len(c.f))
		for i := range c.f {
			ds[i] = &Design{F: c.f[i]}
			front[i] = int32(i)
		}
		got := make([]float64, len(c.f))
		crowdingDistance(ds, front, 2, got)
		assert.Equal(t, c.want, got, "%s: crowding of %v", c.name, c.f)
		assert.Equal(t, crowdingOracle(c.f), got, "%s: oracle", c.name)
	}
}

// TestSurvivalMatchesDefinition checks the NSGA-II survival of Deb et al. (2002, Sec. III-C)
// against a direct implementation on the oracle sort: whole fronts while they fit, then the
// split front by decreasing crowding (stable).
func TestSurvivalMatchesDefinition(t *testing.T) {
	rng := rand.New(rand.NewPCG(8, 9))
	for trial := range 200 {
		m := 2 + rng.IntN(2)
		ds := randomDesigns(rng, 4+rng.IntN(40), m, 0.2, 0.05)
		n := 1 + rng.IntN(len(ds))
		rank := nondominatedSortNaive(ds)
		var want []int64
		for r := 0; len(want) < n; r++ {
			var front []int32
			var fs [][]float64
			for i := range ds {
				if rank[i] == r {
					front = append(front, int32(i))
					fs = append(fs, ds[i].F)
				}
			}
			d := crowdingOracle(fs)
			pos := make([]int, len(front))
			for i := range pos {
				pos[i] = i
			}
			sort.SliceStable(pos, func(a, b int) bool { return d[pos[a]] > d[pos[b]] })
			if len(want)+len(front) <= n {
				pos = pos[:len(front)]
				slices.Sort(pos)
			}
			for _, j := range pos {
				if len(want) == n {
					break
				}
				want = append(want, ds[front[j]].Index)
			}
		}
		out := (&crowdingSurvival{m: m}).survive(ds, n)
		got := make([]int64, len(out))
		for i, d := range out {
			got[i] = d.Index
		}
		require.Equal(t, want, got, "trial %d: survivors of %d designs, n = %d", trial, len(ds), n)
	}
}

// truncateOracle removes designs one at a time, each time recomputing the crowding distance over
// the remaining ones (definition of the archive truncation).
func truncateOracle(ds []*Design, m, excess int) []bool {
	keep := make([]bool, len(ds))
	for i := range keep {
		keep[i] = true
	}
	for range excess {
		var front []int32
		for i, k := range keep {
			if k {
				front = append(front, int32(i))
			}
		}
		d := make([]float64, len(front))
		crowdingDistance(ds, front, m, d)
		worst := 0
		for j := range front {
			if d[j] <= d[worst] {
				worst = j
			}
		}
		keep[front[worst]] = false
	}
	return keep
}

func TestArchiveTruncationMatchesOracle(t *testing.T) {
	rng := rand.New(rand.NewPCG(10, 11))
	for trial := range 200 {
		m := 2 + rng.IntN(2)
		// Mutually non-dominated points: on the simplex Σ f = 1 (three objectives) or the line
		// f1 + f2 = 1, with coarse values so that distances tie.
		n := 3 + rng.IntN(40)
		a := archive{m: m, capacity: -1}
		for i := range n {
			f := make([]float64, m)
			rest := 1.0
			for k := range m - 1 {
				f[k] = math.Round(rest*rng.Float64()*16) / 16
				rest -= f[k]
			}
			f[m-1] = rest
			a.add(&Design{Index: int64(i), F: f, X: []float64{0}})
		}
		excess := rng.IntN(len(a.items))
		want := truncateOracle(a.items, m, excess)
		var tr truncator
		got := tr.run(a.items, m, excess, m == 2)
		require.Equal(t, want, got, "trial %d: %d objectives, remove %d of %d", trial, m, excess, len(a.items))
	}
}

// TestArchiveAdd checks the archive invariants: feasible, mutually non-dominated, first of equal
// objective vectors kept, and the batch merge equal to one-at-a-time insertion (one to four
// objectives, several batches).
func TestArchiveAdd(t *testing.T) {
	rng := rand.New(rand.NewPCG(12, 13))
	for trial := range 1000 {
		m := []int{1, 2, 3, 4}[rng.IntN(4)]
		ds := randomDesigns(rng, 1+rng.IntN(80), m, 0.2, 0.05)
		one := archive{m: m, capacity: -1}
		batch := archive{m: m, capacity: -1}
		for rest := ds; len(rest) > 0; {
			cut := 1 + rng.IntN(len(rest))
			for _, d := range rest[:cut] {
				one.add(d)
			}
			batch.addAll(rest[:cut])
			rest = rest[cut:]
			require.Equal(t, indices(one.items), indices(batch.items), "trial %d: add vs addAll", trial)
		}
		for _, d := range ds {
			if !d.Feasible() {
				continue
			}
			covered := false
			for _, q := range one.items {
				if front.WeaklyDominates(q.F, d.F) {
					covered = true
					assert.False(t, slices.Equal(q.F, d.F) && q.Index > d.Index, "trial %d: later duplicate %d kept over %d", trial, q.Index, d.Index)
				}
			}
			assert.True(t, covered, "trial %d: design %d %v not covered by the archive", trial, d.Index, d.F)
		}
		for _, p := range one.items {
			assert.True(t, p.Feasible(), "trial %d: infeasible member %d", trial, p.Index)
			for _, q := range one.items {
				assert.False(t, front.Dominates(q.F, p.F), "trial %d: member %d dominated by %d", trial, p.Index, q.Index)
			}
		}
	}
}

func indices(ds []*Design) []int64 {
	out := make([]int64, len(ds))
	for i, d := range ds {
		out[i] = d.Index
	}
	return out
}

func TestCompareCanonicalIsTotal(t *testing.T) {
	a := &Design{Rank: 0, Crowding: math.Inf(1), F: []float64{1, 2}, X: []float64{0.5}, Index: 3}
	b := &Design{Rank: 0, Crowding: math.Inf(1), F: []float64{1, 2}, X: []float64{0.5}, Index: 4}
	c := &Design{Rank: 0, Crowding: 2, F: []float64{0, 2}, X: []float64{0.5}, Index: 1}
	d := &Design{Rank: 1, Crowding: math.Inf(1), F: []float64{math.NaN(), 2}, X: []float64{0.5}, Index: 0}
	for _, tc := range []struct {
		name string
		x, y *Design
		want int
	}{
		{"index breaks full ties", a, b, -1},
		{"larger crowding first", a, c, -1},
		{"lower rank first", c, d, -1},
		{"NaN objectives compare", d, d, 0},
	} {
		assert.Equal(t, tc.want, compareCanonical(tc.x, tc.y), fmt.Sprintf("%s: compare(%v, %v)", tc.name, *tc.x, *tc.y))
		assert.Equal(t, -tc.want, compareCanonical(tc.y, tc.x), "%s: reversed", tc.name)
	}
}

// TestENSSortMatchesOracle checks the efficient non-dominated sort (search/REFERENCE.md §2.2)
// against the O(M N²) fast non-dominated sort of Deb et al. (2002, Sec. III-A) with
// constraint-domination (Sec. VI), for one to five objectives, on random sets on a coarse grid
// (many ties and exact duplicates) with infeasible and failed designs, over many seeds.
func TestENSSortMatchesOracle(t *testing.T) {
	for seed := range uint64(20) {
		rng := rand.New(rand.NewPCG(seed, 77))
		for trial := range 100 {
			m := []int{1, 2, 3, 3, 4, 5}[rng.IntN(6)]
			n := 1 + rng.IntN(120)
			ds := randomDesigns(rng, n, m, 0.3*rng.Float64(), 0.1*rng.Float64())
			want := nondominatedSortNaive(ds)
			require.Equal(t, want, nondominatedSortENS(ds, m), "seed %d trial %d: ranks of %d designs, %d objectives", seed, trial, n, m)
		}
	}
	// Continuous values (no ties) and a reused scratch.
	var s scratch
	rng := rand.New(rand.NewPCG(21, 22))
	for trial := range 200 {
		m := 3 + rng.IntN(2)
		ds := make([]*Design, 1+rng.IntN(200))
		for i := range ds {
			ds[i] = &Design{Index: int64(i), F: make([]float64, m)}
			for k := range ds[i].F {
				ds[i].F[k] = rng.Float64()
			}
		}
		require.Equal(t, nondominatedSortNaive(ds), slices.Clone(s.nondominatedSortENS(ds, m)), "trial %d", trial)
	}
}

// layeredFront evaluates p at points whose first free variables are drawn at random and whose
// distance variables are shifted by sqrt(gs[layer]) from their optimum at 0 (ZDT1) or 0.5
// (DTLZ2), giving len(gs) nested copies of the Pareto front; it returns the designs, shuffled, and
// the layer of each.
func layeredFront(t *testing.T, rng *rand.Rand, p Problem, free int, opt float64, gs []float64, perLayer int) ([]*Design, []int) {
	var ds []*Design
	var layer []int
	dirs := make([][]float64, perLayer) // the same free variables in every copy
	for j := range dirs {
		dirs[j] = make([]float64, free)
		for i := range dirs[j] {
			dirs[j][i] = rng.Float64()
		}
	}
	for l, g := range gs {
		for j := range perLayer {
			x := make([]float64, p.Dim)
			for i := range x {
				x[i] = opt
			}
			copy(x, dirs[j])
			x[free] = opt + math.Sqrt(g)
			if opt == 0 { // ZDT1: g = 1 + 9 Σ x_i/(n − 1)
				x[free] = (g - 1) * float64(p.Dim-1) / 9
			}
			f := make([]float64, p.NumObjectives)
			require.NoError(t, p.Evaluate(context.Background(), 0, x, f, nil))
			ds = append(ds, &Design{Index: int64(len(ds)), F: f, X: x})
			layer = append(layer, l)
		}
	}
	perm := rng.Perm(len(ds))
	outD, outL := make([]*Design, len(ds)), make([]int, len(ds))
	for i, j := range perm {
		outD[i], outL[i] = ds[j], layer[j]
	}
	return outD, outL
}

// TestSortsOnKnownFronts ranks nested copies of known Pareto fronts: ZDT1 (Zitzler, Deb and Thiele
// 2000) with g = 1, 1.3, 1.6, 2, whose front f2 = g − √(g f1) rises with g at fixed f1, and DTLZ2
// (Deb, Thiele, Laumanns and Zitzler 2002) with M = 3 and 4 on spheres of radius 1 + g; the
// point of a copy is dominated by the same point of every inner copy and by nothing of its own or
// an outer copy, so the rank of each design is the index of its copy (derived from the
// definitions; fronts of Deb et al. 2002, Sec. III-A).
func TestSortsOnKnownFronts(t *testing.T) {
	rng := rand.New(rand.NewPCG(31, 32))
	zdt, zl := layeredFront(t, rng, ZDT1(10), 1, 0, []float64{1, 1.3, 1.6, 2}, 40)
	assert.Equal(t, zl, nondominatedSortNaive(zdt), "ZDT1 oracle")
	assert.Equal(t, zl, nondominatedSort2(zdt), "ZDT1 two-objective sweep")
	assert.Equal(t, zl, nondominatedSortENS(zdt, 2), "ZDT1 efficient sort")
	for _, m := range []int{3, 4} {
		ds, l := layeredFront(t, rng, DTLZ2(m, m+9), m-1, 0.5, []float64{0, 0.01, 0.04, 0.1, 0.25}, 40)
		for i, d := range ds { // the front is the unit sphere (Deb, Thiele, Laumanns and Zitzler 2002)
			if l[i] == 0 {
				var r2 float64
				for _, v := range d.F {
					r2 += v * v
				}
				assert.InDelta(t, 1, r2, 1e-12, "DTLZ2 M=%d: Σ f² of a front point", m)
			}
		}
		assert.Equal(t, l, nondominatedSortNaive(ds), "DTLZ2 M=%d oracle", m)
		assert.Equal(t, l, nondominatedSortENS(ds, m), "DTLZ2 M=%d efficient sort", m)
	}
}

// TestCrowding2MatchesGeneral checks the one-sort crowding distance of feasible two-objective
// fronts against crowdingDistance (the definition of Deb et al. 2002, Sec. III-B, checked above
// against crowdingOracle), bit for bit, on the fronts of random sets with ties and duplicates.
func TestCrowding2MatchesGeneral(t *testing.T) {
	rng := rand.New(rand.NewPCG(41, 42))
	var s scratch
	for trial := range 500 {
		ds := randomDesigns(rng, 1+rng.IntN(80), 2, 0.2, 0.05)
		if trial%2 == 1 { // continuous values as well as the coarse grid
			for _, d := range ds {
				if d.Failed == "" {
					d.F[0], d.F[1] = rng.Float64(), rng.Float64()
				}
			}
		}
		rank := s.nondominatedSort2(ds)
		fronts := s.frontsOf(rank)
		byF1 := s.sortedFronts(len(ds))
		for fr, front := range fronts {
			if ds[front[0]].CV != 0 {
				continue
			}
			want := make([]float64, len(front))
			got := make([]float64, len(front))
			crowdingDistance(ds, front, 2, want)
			s.crowdingDistance2(ds, front, byF1[fr], got)
			require.Equal(t, want, got, "trial %d: front %v", trial, front)
		}
	}
}

// TestSortKeys2 checks the specialised sort of nondominatedSort2 against slices.SortFunc with
// the same (f1, f2, index) order, on lengths around the insertion-sort cut-off and beyond, with
// many ties in f1 and f2 (values from a few levels), already sorted and reversed inputs, and
// signed zeros (−0 and +0 compare equal, so their index decides) [derived: any correct sort of a
// total order gives the same sequence].
func TestSortKeys2(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 8))
	ref := func(a, b sortKey2) int {
		switch {
		case a.f1 < b.f1:
			return -1
		case a.f1 > b.f1:
			return 1
		case a.f2 < b.f2:
			return -1
		case a.f2 > b.f2:
			return 1
		}
		return int(a.i - b.i)
	}
	for _, n := range []int{0, 1, 2, 3, 11, 12, 13, 14, 25, 100, 200, 513} {
		for _, levels := range []int{1, 2, 5, 1000} {
			for _, shape := range []string{"random", "sorted", "reversed"} {
				keys := make([]sortKey2, n)
				for j := range keys {
					keys[j] = sortKey2{float64(rng.IntN(levels)), float64(rng.IntN(levels)), int32(j)}
					if keys[j].f1 == 0 && rng.IntN(2) == 0 {
						keys[j].f1 = math.Copysign(0, -1)
					}
				}
				rng.Shuffle(n, func(a, b int) { keys[a], keys[b] = keys[b], keys[a] })
				switch shape {
				case "sorted":
					slices.SortFunc(keys, ref)
				case "reversed":
					slices.SortFunc(keys, func(a, b sortKey2) int { return ref(b, a) })
				}
				want := slices.Clone(keys)
				slices.SortFunc(want, ref)
				sortKeys2(keys)
				for j := range want { // bit patterns, so that −0 and +0 are told apart
					require.Equal(t, math.Float64bits(want[j].f1), math.Float64bits(keys[j].f1), "n %d levels %d %s: key %d", n, levels, shape, j)
					require.Equal(t, want[j].i, keys[j].i, "n %d levels %d %s: key %d", n, levels, shape, j)
				}
			}
		}
	}
}

// TestSortCrowdKeys checks sortCrowdKeys against slices.SortFunc with compareCrowdKeys, as
// TestSortKeys2 does for sortKeys2 [derived: any correct sort of a total order gives the same
// sequence].
func TestSortCrowdKeys(t *testing.T) {
	rng := rand.New(rand.NewPCG(9, 10))
	for _, n := range []int{0, 1, 2, 3, 11, 12, 13, 14, 25, 100, 200, 513} {
		for _, levels := range []int{1, 2, 5, 1000} {
			keys := make([]crowdKey, n)
			for j := range keys {
				keys[j] = crowdKey{float64(rng.IntN(levels)), int32(j)}
				if keys[j].v == 0 && rng.IntN(2) == 0 {
					keys[j].v = math.Copysign(0, -1)
				}
			}
			rng.Shuffle(n, func(a, b int) { keys[a], keys[b] = keys[b], keys[a] })
			want := slices.Clone(keys)
			slices.SortFunc(want, compareCrowdKeys)
			sortCrowdKeys(keys)
			for j := range want {
				require.Equal(t, math.Float64bits(want[j].v), math.Float64bits(keys[j].v), "n %d levels %d: key %d", n, levels, j)
				require.Equal(t, want[j].i, keys[j].i, "n %d levels %d: key %d", n, levels, j)
			}
		}
	}
}

// TestSortKeys3 checks the three-objective sort of nondominatedSortENS (sortKeys3) against the
// general lexicographic sort (sortLex) on designs with many ties in each objective [derived: any
// correct sort of a total order gives the same sequence].
func TestSortKeys3(t *testing.T) {
	rng := rand.New(rand.NewPCG(11, 12))
	for _, n := range []int{0, 1, 2, 13, 14, 100, 200, 513} {
		for _, levels := range []int{1, 2, 5, 1000} {
			ds := make([]*Design, n)
			keys := make([]sortKey3, n)
			order := make([]int32, n)
			for j := range ds {
				f := []float64{float64(rng.IntN(levels)), float64(rng.IntN(levels)), float64(rng.IntN(levels))}
				ds[j] = &Design{F: f}
				keys[j] = sortKey3{f[0], f[1], f[2], int32(j)}
				order[j] = int32(j)
			}
			rng.Shuffle(n, func(a, b int) { keys[a], keys[b] = keys[b], keys[a] })
			sortLex(ds, order, 3)
			sortKeys3(keys)
			for j := range order {
				require.Equal(t, order[j], keys[j].i, "n %d levels %d: position %d", n, levels, j)
			}
		}
	}
}
