package search

import (
	"cmp"
	"math"
	"slices"
	"sort"

	"plica/search/front"
)

// constrainedDominates reports whether a constrained-dominates b (Deb et al. 2002, Sec. VI): a is
// feasible and b is not; both are infeasible and CV_a < CV_b; or both are feasible and a ≺ b.
func constrainedDominates(a, b *Design) bool {
	af, bf := a.CV == 0, b.CV == 0
	switch {
	case af && bf:
		return front.Dominates(a.F, b.F)
	case af:
		return true
	case bf:
		return false
	}
	return a.CV < b.CV
}

// nondominatedSortNaive returns the constrained non-domination rank (from 0) of each design: the
// fast non-dominated sort of Deb et al. (2002, Sec. III-A), O(M N²). It is the oracle for the
// faster sorts.
func nondominatedSortNaive(ds []*Design) []int {
	n := len(ds)
	rank := make([]int, n)
	count := make([]int, n)
	dominated := make([][]int32, n)
	var front []int
	for p := range n {
		for q := range n {
			if q == p {
				continue
			}
			if constrainedDominates(ds[p], ds[q]) {
				dominated[p] = append(dominated[p], int32(q))
			} else if constrainedDominates(ds[q], ds[p]) {
				count[p]++
			}
		}
		if count[p] == 0 {
			front = append(front, p)
		}
	}
	for r := 0; len(front) > 0; r++ {
		var next []int
		for _, p := range front {
			rank[p] = r
			for _, q := range dominated[p] {
				count[q]--
				if count[q] == 0 {
					next = append(next, int(q))
				}
			}
		}
		front = next
	}
	return rank
}

// scratch holds the buffers of the sorts, reused from one generation to the next.
type scratch struct {
	rank         []int
	feas, infeas []sortKey2
	last         []float64
	keys         []crowdKey
	start        []int
	flat         []int32
	fronts       [][]int32
	dist         []float64
	order        []int32
	flatF        []float64
	members      [][]int32
	sortedFlat   []int32
	sorted       [][]int32
	pos          []int32
	keys3        []sortKey3
}

type sortKey2 struct {
	f1, f2 float64
	i      int32
}

// nondominatedSort returns the constrained non-domination rank of each design, using the
// O(N log N) sweep for two objectives and the efficient non-dominated sort otherwise. The result
// is valid until the next call.
func (s *scratch) nondominatedSort(ds []*Design, m int) []int {
	if m == 2 {
		return s.nondominatedSort2(ds)
	}
	return s.nondominatedSortENS(ds, m)
}

// nondominatedSort2 is the O(N log N) non-dominated sort for two objectives (after Jensen, IEEE
// Trans. Evol. Comput. 7(5), 2003; sweep of search/REFERENCE.md §2.3, derived). Feasible designs are sorted
// by (f1, f2); last[k] is the f2 of the latest design put in front k, non-decreasing in k, and a
// design joins the first front whose last f2 exceeds its own. Exact duplicates share a front.
// Infeasible designs follow all feasible fronts in groups of equal CV, ascending. Feasible
// designs must have finite objectives.
func (s *scratch) nondominatedSort2(ds []*Design) []int {
	rank := resize(s.rank, len(ds))
	s.rank = rank
	feas, infeas := s.feas[:0], s.infeas[:0] // infeasible: f1 holds CV
	for i, d := range ds {
		if d.CV == 0 {
			feas = append(feas, sortKey2{d.F[0], d.F[1], int32(i)})
		} else {
			infeas = append(infeas, sortKey2{d.CV, 0, int32(i)})
		}
	}
	s.feas, s.infeas = feas, infeas
	sortKeys2(feas)
	last := s.last[:0]
	for j, p := range feas {
		if j > 0 && feas[j-1].f1 == p.f1 && feas[j-1].f2 == p.f2 {
			rank[p.i] = rank[feas[j-1].i]
			continue
		}
		k := sort.Search(len(last), func(k int) bool { return last[k] > p.f2 })
		if k == len(last) {
			last = append(last, p.f2)
		} else {
			last[k] = p.f2
		}
		rank[p.i] = k
	}
	s.last = last
	slices.SortFunc(infeas, func(a, b sortKey2) int {
		if c := cmp.Compare(a.f1, b.f1); c != 0 {
			return c
		}
		return cmp.Compare(a.i, b.i)
	})
	r := len(last) - 1
	for j, p := range infeas {
		if j == 0 || p.f1 != infeas[j-1].f1 {
			r++
		}
		rank[p.i] = r
	}
	return rank
}

// crowdingDistance writes into dist the crowding distance of each design of one front (Deb et
// al. 2002, Sec. III-B): per objective, the front is sorted by f_m (stable, ties by position in
// front); the two ends get +Inf and each interior design adds (f_m[next] − f_m[prev]) /
// (f_m^max − f_m^min), extremes taken over the front. Edge cases (search/REFERENCE.md §2.4): a front of at
// most two designs is all +Inf; an objective with zero range is skipped; a front holding a
// non-finite objective (failed evaluations) gets all zeros.
func (s *scratch) crowdingDistance(ds []*Design, front []int32, m int, dist []float64) {
	l := len(front)
	for i := range dist[:l] {
		dist[i] = 0
	}
	for _, i := range front {
		for _, v := range ds[i].F {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				return
			}
		}
	}
	if l <= 2 {
		for i := range dist[:l] {
			dist[i] = math.Inf(1)
		}
		return
	}
	order := resize(s.keys, l)
	s.keys = order
	for k := range m {
		for j, i := range front {
			order[j] = crowdKey{ds[i].F[k], int32(j)}
		}
		sortCrowdKeys(order)
		span := order[l-1].v - order[0].v
		if !(span > 0) {
			continue
		}
		dist[order[0].i] = math.Inf(1)
		dist[order[l-1].i] = math.Inf(1)
		for j := 1; j < l-1; j++ {
			dist[order[j].i] += (order[j+1].v - order[j-1].v) / span
		}
	}
}

// crowdingDistance2 is crowdingDistance for a front of two objectives whose designs are feasible
// and mutually non-dominated (a feasible front of the sort). byF1 holds the front's designs in
// the (f1, f2, index) order of nondominatedSort2 (see sortedFronts). Within such a front equal f1
// means equal vectors, which the index orders as their position in front does, so byF1 is the
// (f1, position) order that crowdingDistance sorts into, and no sort is needed. Sorted so, the
// front has f2 non-increasing, with equal f2 only among equal vectors; so the (f2, position)
// order is that order reversed run by run of equal vectors, each run kept as it is. The sums are
// formed in the same order, so the distances are the same numbers (TestCrowding2MatchesGeneral).
func (s *scratch) crowdingDistance2(ds []*Design, front, byF1 []int32, dist []float64) {
	l := len(front)
	if l <= 2 {
		for i := range dist[:l] {
			dist[i] = math.Inf(1)
		}
		return
	}
	o1 := resize(s.keys, 2*l)
	s.keys = o1
	o1, o2 := o1[:l], o1[l:]
	for j, i := range byF1 {
		o1[j] = crowdKey{ds[i].F[0], s.pos[i]}
	}
	f2 := func(k crowdKey) float64 { return ds[front[k.i]].F[1] }
	for end, n := l, 0; end > 0; {
		start := end - 1
		for start > 0 && o1[start-1].v == o1[end-1].v && f2(o1[start-1]) == f2(o1[end-1]) {
			start--
		}
		for _, k := range o1[start:end] {
			o2[n] = crowdKey{f2(k), k.i}
			n++
		}
		end = start
	}
	for i := range dist[:l] {
		dist[i] = 0
	}
	for _, order := range [2][]crowdKey{o1, o2} {
		span := order[l-1].v - order[0].v
		if !(span > 0) {
			continue
		}
		dist[order[0].i] = math.Inf(1)
		dist[order[l-1].i] = math.Inf(1)
		for j := 1; j < l-1; j++ {
			dist[order[j].i] += (order[j+1].v - order[j-1].v) / span
		}
	}
}

// frontsOf groups design positions by rank, in position order within each front. The result is
// valid until the next call.
func (s *scratch) frontsOf(rank []int) [][]int32 {
	nf := 0
	for _, r := range rank {
		nf = max(nf, r+1)
	}
	start := resize(s.start, nf+1)
	clear(start)
	for _, r := range rank {
		start[r+1]++
	}
	for r := range nf {
		start[r+1] += start[r]
	}
	flat := resize(s.flat, len(rank))
	fronts := resize(s.fronts, nf)
	for r := range fronts {
		fronts[r] = flat[start[r]:start[r]:start[r+1]]
	}
	for i, r := range rank {
		fronts[r] = append(fronts[r], int32(i))
	}
	s.start, s.flat, s.fronts = start, flat, fronts
	return fronts
}

// sortedFronts returns, after nondominatedSort2 and frontsOf on the same designs, the feasible
// fronts with their designs in (f1, f2, index) order, and sets pos[i] to the position of design
// i in its front of frontsOf. The result is valid until the next call.
func (s *scratch) sortedFronts(n int) [][]int32 {
	nf := len(s.last)
	flat := resize(s.sortedFlat, len(s.feas))
	out := resize(s.sorted, nf)
	for r := range out {
		out[r] = flat[s.start[r]:s.start[r]:s.start[r+1]] // feasible ranks come first
	}
	for _, p := range s.feas {
		r := s.rank[p.i]
		out[r] = append(out[r], p.i)
	}
	pos := resize(s.pos, n)
	for _, front := range s.fronts {
		for j, i := range front {
			pos[i] = int32(j)
		}
	}
	s.sortedFlat, s.sorted, s.pos = flat, out, pos
	return out
}

// nondominatedSort2 with fresh buffers.
func nondominatedSort2(ds []*Design) []int { return new(scratch).nondominatedSort2(ds) }

// crowdingDistance with fresh buffers.
func crowdingDistance(ds []*Design, front []int32, m int, dist []float64) {
	new(scratch).crowdingDistance(ds, front, m, dist)
}

// compareCanonical orders designs by (rank, −crowding, F, X, index): the crowded-comparison order
// of Deb et al. (2002, Sec. III-C) completed to a total order, so that nothing depends on the
// order in which a host hands the population over.
func compareCanonical(a, b *Design) int {
	if c := cmp.Compare(a.Rank, b.Rank); c != 0 {
		return c
	}
	if c := cmp.Compare(b.Crowding, a.Crowding); c != 0 {
		return c
	}
	if c := slices.Compare(a.F, b.F); c != 0 {
		return c
	}
	if c := slices.Compare(a.X, b.X); c != 0 {
		return c
	}
	return cmp.Compare(a.Index, b.Index)
}

// lessKey2 is the (f1, f2, index) order of nondominatedSort2 (finite values: plain comparisons).
func lessKey2(a, b *sortKey2) bool {
	switch {
	case a.f1 < b.f1:
		return true
	case a.f1 > b.f1:
		return false
	case a.f2 < b.f2:
		return true
	case a.f2 > b.f2:
		return false
	}
	return a.i < b.i
}

// sortKeys2 sorts keys by lessKey2: a quicksort (median of three, the smaller side recursed into)
// finishing runs of up to 12 keys by insertion, with the comparison inlined, which
// slices.SortFunc's call through a function value is not. The indices are distinct, so the
// order is total and the result is the same as any other sort's (TestSortKeys2).
func sortKeys2(a []sortKey2) {
	for len(a) > 12 {
		n := len(a)
		m := n / 2
		// median of a[0], a[m], a[n−1] moved to a[0] as the pivot
		if lessKey2(&a[m], &a[0]) {
			a[m], a[0] = a[0], a[m]
		}
		if lessKey2(&a[n-1], &a[m]) {
			a[n-1], a[m] = a[m], a[n-1]
			if lessKey2(&a[m], &a[0]) {
				a[m], a[0] = a[0], a[m]
			}
		}
		a[0], a[m] = a[m], a[0]
		p := a[0]
		i, j := 1, n-1
		for {
			for i <= j && lessKey2(&a[i], &p) {
				i++
			}
			for i <= j && lessKey2(&p, &a[j]) {
				j--
			}
			if i >= j {
				break
			}
			a[i], a[j] = a[j], a[i]
			i++
			j--
		}
		a[0], a[j] = a[j], a[0] // a[:j] < p = a[j] < a[j+1:]
		if j < n-1-j {
			sortKeys2(a[:j])
			a = a[j+1:]
		} else {
			sortKeys2(a[j+1:])
			a = a[:j]
		}
	}
	for i := 1; i < len(a); i++ {
		for j := i; j > 0 && lessKey2(&a[j], &a[j-1]); j-- {
			a[j], a[j-1] = a[j-1], a[j]
		}
	}
}

// lessCrowdKey is compareCrowdKeys(*a, *b) < 0.
func lessCrowdKey(a, b *crowdKey) bool {
	switch {
	case a.v < b.v:
		return true
	case a.v > b.v:
		return false
	}
	return a.i < b.i
}

// sortCrowdKeys is sortKeys2 for crowdKey: it sorts keys into the order of compareCrowdKeys, the
// same result as slices.SortFunc(keys, compareCrowdKeys) when the indices are distinct
// (TestSortCrowdKeys).
func sortCrowdKeys(a []crowdKey) {
	for len(a) > 12 {
		n := len(a)
		m := n / 2
		// median of a[0], a[m], a[n−1] moved to a[0] as the pivot
		if lessCrowdKey(&a[m], &a[0]) {
			a[m], a[0] = a[0], a[m]
		}
		if lessCrowdKey(&a[n-1], &a[m]) {
			a[n-1], a[m] = a[m], a[n-1]
			if lessCrowdKey(&a[m], &a[0]) {
				a[m], a[0] = a[0], a[m]
			}
		}
		a[0], a[m] = a[m], a[0]
		p := a[0]
		i, j := 1, n-1
		for {
			for i <= j && lessCrowdKey(&a[i], &p) {
				i++
			}
			for i <= j && lessCrowdKey(&p, &a[j]) {
				j--
			}
			if i >= j {
				break
			}
			a[i], a[j] = a[j], a[i]
			i++
			j--
		}
		a[0], a[j] = a[j], a[0] // a[:j] < p = a[j] < a[j+1:]
		if j < n-1-j {
			sortCrowdKeys(a[:j])
			a = a[j+1:]
		} else {
			sortCrowdKeys(a[j+1:])
			a = a[:j]
		}
	}
	for i := 1; i < len(a); i++ {
		for j := i; j > 0 && lessCrowdKey(&a[j], &a[j-1]); j-- {
			a[j], a[j-1] = a[j-1], a[j]
		}
	}
}
