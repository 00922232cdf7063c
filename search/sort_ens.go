package search

import (
	"cmp"
	"slices"
)

// nondominatedSortENS is the efficient non-dominated sort with binary search (ENS-BS) of Zhang,
// Tian, Cheng and Jin (2015; search/REFERENCE.md §2.2), extended to constraint-domination. Feasible
// designs are sorted lexicographically by their objectives (ties by position), so that no design
// can be dominated by one that comes after it. Each design is then placed in the first front none
// of whose members dominates it: a design dominated by a member of front k is dominated by a
// member of every front before k, so that front is found by binary search over the fronts, and
// each front is scanned from its latest member back. A design equal to the previous one gets its
// rank. Infeasible designs follow as in nondominatedSort2. The result is valid until the next call.
func (s *scratch) nondominatedSortENS(ds []*Design, m int) []int {
	n := len(ds)
	rank := resize(s.rank, n)
	s.rank = rank
	order := s.order[:0]
	infeas := s.infeas[:0]
	for i, d := range ds {
		if d.CV == 0 {
			order = append(order, int32(i))
		} else {
			infeas = append(infeas, sortKey2{d.CV, 0, int32(i)})
		}
	}
	if m == 3 { // the common case: keys copied out and sorted with the comparison inlined
		keys := s.keys3[:0]
		for _, i := range order {
			f := ds[i].F
			keys = append(keys, sortKey3{f[0], f[1], f[2], i})
		}
		sortKeys3(keys)
		for j := range keys {
			order[j] = keys[j].i
		}
		s.keys3 = keys
	} else {
		sortLex(ds, order, m)
	} // Flat copy of the sorted objective vectors: f[j*m : j*m+m] is the j-th in order.
	f := resize(s.flatF, len(order)*m)
	for j, i := range order {
		copy(f[j*m:j*m+m], ds[i].F)
	}
	// members[k] lists the positions (in order) of front k.
	members := s.members[:0]
	dominatedBy := func(k, j int) bool { // some member of front k dominates design j
		p := f[j*m : j*m+m]
		mem := members[k]
		if m == 3 { // the common case, without the inner loop: the same comparisons
			p1, p2 := p[1], p[2]
			for t := len(mem) - 1; t >= 0; t-- {
				q := f[int(mem[t])*3 : int(mem[t])*3+3]
				if !(q[1] > p1) && !(q[2] > p2) {
					return true
				}
			}
			return false
		}
		for t := len(mem) - 1; t >= 0; t-- {
			q := f[int(mem[t])*m : int(mem[t])*m+m]
			dom := true
			for c := 1; c < m; c++ { // q precedes p, so q[0] ≤ p[0]; q ≠ p
				if q[c] > p[c] {
					dom = false
					break
				}
			}
			if dom {
				return true
			}
		}
		return false
	}
	prev := -1
	for j, i := range order {
		var k int
		if j > 0 && slices.Equal(f[(j-1)*m:j*m], f[j*m:j*m+m]) {
			k = prev
		} else {
			lo, hi := 0, len(members) // fronts < lo dominate j; fronts ≥ hi do not
			for lo < hi {
				mid := int(uint(lo+hi) >> 1)
				if dominatedBy(mid, j) {
					lo = mid + 1
				} else {
					hi = mid
				}
			}
			k = lo
		}
		if k == len(members) {
			if k < cap(members) {
				members = members[:k+1]
				members[k] = members[k][:0]
			} else {
				members = append(members, nil)
			}
		}
		members[k] = append(members[k], int32(j))
		rank[i] = k
		prev = k
	}
	s.order, s.flatF, s.members = order, f, members
	slices.SortFunc(infeas, func(a, b sortKey2) int {
		if c := cmp.Compare(a.f1, b.f1); c != 0 {
			return c
		}
		return cmp.Compare(a.i, b.i)
	})
	r := len(members) - 1
	for j, p := range infeas {
		if j == 0 || p.f1 != infeas[j-1].f1 {
			r++
		}
		rank[p.i] = r
	}
	s.infeas = infeas
	return rank
}

// nondominatedSortENS with fresh buffers.
func nondominatedSortENS(ds []*Design, m int) []int { return new(scratch).nondominatedSortENS(ds, m) }

// sortLex sorts the design positions of order lexicographically by their first m objectives,
// ties by position (finite values: plain comparisons).
func sortLex(ds []*Design, order []int32, m int) {
	slices.SortFunc(order, func(a, b int32) int {
		fa, fb := ds[a].F, ds[b].F
		for k := range m {
			switch {
			case fa[k] < fb[k]:
				return -1
			case fa[k] > fb[k]:
				return 1
			}
		}
		return int(a - b)
	})
}

// sortKey3 is a design position with its three objectives.
type sortKey3 struct {
	f0, f1, f2 float64
	i          int32
}

// lessKey3 is the lexicographic order of sortLex for three objectives.
func lessKey3(a, b *sortKey3) bool {
	switch {
	case a.f0 < b.f0:
		return true
	case a.f0 > b.f0:
		return false
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

// sortKeys3 is sortKeys2 for sortKey3: the same result as sortLex with m = 3 when the indices are
// distinct (TestSortKeys3).
func sortKeys3(a []sortKey3) {
	for len(a) > 12 {
		n := len(a)
		m := n / 2
		// median of a[0], a[m], a[n−1] moved to a[0] as the pivot
		if lessKey3(&a[m], &a[0]) {
			a[m], a[0] = a[0], a[m]
		}
		if lessKey3(&a[n-1], &a[m]) {
			a[n-1], a[m] = a[m], a[n-1]
			if lessKey3(&a[m], &a[0]) {
				a[m], a[0] = a[0], a[m]
			}
		}
		a[0], a[m] = a[m], a[0]
		p := a[0]
		i, j := 1, n-1
		for {
			for i <= j && lessKey3(&a[i], &p) {
				i++
			}
			for i <= j && lessKey3(&p, &a[j]) {
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
			sortKeys3(a[:j])
			a = a[j+1:]
		} else {
			sortKeys3(a[j+1:])
			a = a[:j]
		}
	}
	for i := 1; i < len(a); i++ {
		for j := i; j > 0 && lessKey3(&a[j], &a[j-1]); j-- {
			a[j], a[j-1] = a[j-1], a[j]
		}
	}
}
