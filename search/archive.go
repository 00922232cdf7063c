package search

import (
	"cmp"
	"math"
	"slices"
	"sort"

	"plica/search/front"
)

// archive is the external archive: the feasible, mutually non-dominated designs seen so far, at
// most one per objective vector (a design weakly dominated by a member is rejected, so the first
// of equal objective vectors stays). With two objectives the members are kept sorted by f1
// (f2 then strictly decreases); otherwise in insertion order. When capacity ≥ 0 and the archive
// holds more, truncate removes the member of smallest crowding distance (Deb et al. 2002,
// Sec. III-B, computed over the archive) one at a time, recomputing the distances of its
// neighbours after each removal; among equal distances the latest member goes first.
type archive struct {
	m        int
	capacity int // < 0: unbounded
	items    []*Design
	trunc    truncator
}

// add offers d to the archive; infeasible designs are ignored.
func (a *archive) add(d *Design) {
	if !d.Feasible() {
		return
	}
	if a.m == 2 {
		a.add2(d)
		return
	}
	for _, q := range a.items {
		if front.WeaklyDominates(q.F, d.F) {
			return
		}
	}
	a.items = slices.DeleteFunc(a.items, func(q *Design) bool { return front.Dominates(d.F, q.F) })
	a.items = append(a.items, d)
}

// add2 inserts d into the two-objective archive, sorted by f1 ascending.
func (a *archive) add2(d *Design) {
	f1, f2 := d.F[0], d.F[1]
	pos := sort.Search(len(a.items), func(i int) bool { return a.items[i].F[0] > f1 })
	lo := pos
	if pos > 0 {
		p := a.items[pos-1].F
		if p[1] <= f2 {
			return // weakly dominated by the member with the largest f1 ≤ d's f1
		}
		if p[0] == f1 {
			lo = pos - 1 // same f1, larger f2: dominated by d
		}
	}
	hi := pos
	for hi < len(a.items) && a.items[hi].F[1] >= f2 {
		hi++
	}
	a.items = slices.Replace(a.items, lo, hi, d)
}

// addAll offers every design of ds, in order; the result is the same as calling add on each.
// With two objectives the feasible designs are sorted and merged with the archive in one pass:
// in (f1, f2) order, older first among equals, a design is kept when its f2 is below every f2
// before it.
func (a *archive) addAll(ds []*Design) {
	if a.m != 2 {
		for _, d := range ds {
			a.add(d)
		}
		return
	}
	cand := make([]*Design, 0, len(ds))
	for _, d := range ds {
		if d.Feasible() {
			cand = append(cand, d)
		}
	}
	if len(cand) == 0 {
		return
	}
	less := func(p, q *Design) bool { // p before q in (f1, f2) order
		return p.F[0] < q.F[0] || (p.F[0] == q.F[0] && p.F[1] < q.F[1])
	}
	slices.SortFunc(cand, func(p, q *Design) int { // ties by evaluation index, i.e. in order
		switch {
		case less(p, q):
			return -1
		case less(q, p):
			return 1
		}
		return cmp.Compare(p.Index, q.Index)
	})
	out := make([]*Design, 0, len(a.items)+len(cand))
	best := math.Inf(1)
	keep := func(d *Design) {
		if d.F[1] < best {
			out = append(out, d)
			best = d.F[1]
		}
	}
	i, j := 0, 0
	for i < len(a.items) || j < len(cand) {
		if j == len(cand) || (i < len(a.items) && !less(cand[j], a.items[i])) {
			keep(a.items[i])
			i++
		} else {
			keep(cand[j])
			j++
		}
	}
	a.items = out
}

// truncate reduces the archive to its capacity.
func (a *archive) truncate() {
	if a.capacity < 0 || len(a.items) <= a.capacity {
		return
	}
	keep := a.trunc.run(a.items, a.m, len(a.items)-a.capacity, a.m == 2)
	out := a.items[:0]
	for i, d := range a.items {
		if keep[i] {
			out = append(out, d)
		}
	}
	clear(a.items[len(out):])
	a.items = out
}

// truncator removes designs by iterated smallest crowding distance; it keeps its buffers between
// calls.
type truncator struct {
	keep       []bool
	prev, next []int32   // prev[i*m+k], next[i*m+k]: neighbours of design i in objective k, −1 at an end
	part       []float64 // part[i*m+k]: contribution of objective k to the distance of design i
	span       []float64
	dist       []float64
	version    []int32
	order      []int32
	keys       []crowdKey
	heap       crowdHeap
}

// run removes excess designs from ds and returns which are kept (valid until the next call).
// Removing an interior design changes the distance of its neighbour on each side in each
// objective only, so the distances are updated locally and a heap finds the next one, giving the
// same result as recomputing crowdingDistance over the remaining designs after every removal. If
// the smallest distance is +Inf (only ends remain), everything is recomputed. sorted2 says that
// m = 2 and ds is sorted by f1 with f2 strictly decreasing, so that the sorts can be skipped.
func (t *truncator) run(ds []*Design, m, excess int, sorted2 bool) []bool {
	n := len(ds)
	t.keep = resize(t.keep, n)
	for i := range t.keep {
		t.keep[i] = true
	}
	t.prev, t.next = resize(t.prev, n*m), resize(t.next, n*m)
	t.part, t.span = resize(t.part, n*m), resize(t.span, m)
	t.dist, t.version = resize(t.dist, n), resize(t.version, n)
	clear(t.version)
	keep, prev, next, part, span, dist, version := t.keep, t.prev, t.next, t.part, t.span, t.dist, t.version
	t.build(ds, m, sorted2)
	for removed := 0; removed < excess; {
		e := t.heap.pop()
		if !keep[e.i] || e.version != version[e.i] {
			continue
		}
		if math.IsInf(e.dist, 1) {
			// Only ends are left: the ranges change with this removal, so start afresh on
			// the same rule (latest of the equally crowded first).
			keep[e.i] = false
			removed++
			if removed < excess {
				t.build(ds, m, sorted2)
			}
			continue
		}
		i := int(e.i)
		keep[i] = false
		removed++
		for k := range m {
			p, q := prev[i*m+k], next[i*m+k]
			if p >= 0 {
				next[int(p)*m+k] = q
			}
			if q >= 0 {
				prev[int(q)*m+k] = p
			}
		}
		for k := range m {
			if !(span[k] > 0) {
				continue
			}
			for _, j := range [2]int32{prev[i*m+k], next[i*m+k]} {
				if j >= 0 {
					part[int(j)*m+k] = crowdPart(ds, prev, next, m, int(j), k, span[k])
				}
			}
		}
		for k := range m {
			for _, j := range [2]int32{prev[i*m+k], next[i*m+k]} {
				if j < 0 || !keep[j] {
					continue
				}
				if d := sumParts(part[int(j)*m : int(j)*m+m]); d != dist[j] {
					dist[j] = d
					version[j]++
					t.heap.push(crowdEntry{dist: d, i: j, version: version[j]})
				}
			}
		}
	}
	return keep
}

// build computes neighbours, contributions and distances of the kept designs from scratch.
func (t *truncator) build(ds []*Design, m int, sorted2 bool) {
	n := len(ds)
	prev, next, part, span := t.prev, t.next, t.part, t.span
	order := t.order[:0]
	for i := range n {
		if t.keep[i] {
			order = append(order, int32(i))
		}
	}
	t.order = order
	l := len(order)
	clear(part)
	for k := range m {
		if sorted2 {
			if k == 1 {
				slices.Reverse(order)
			}
		} else {
			t.keys = sortByObjective(ds, order, k, t.keys)
		}
		for j, i := range order {
			prev[int(i)*m+k], next[int(i)*m+k] = -1, -1
			if j > 0 {
				prev[int(i)*m+k] = order[j-1]
			}
			if j < l-1 {
				next[int(i)*m+k] = order[j+1]
			}
		}
		span[k] = ds[order[l-1]].F[k] - ds[order[0]].F[k]
		if l <= 2 {
			for _, i := range order {
				part[int(i)*m+k] = math.Inf(1)
			}
			continue
		}
		if !(span[k] > 0) {
			continue
		}
		for _, i := range order {
			part[int(i)*m+k] = crowdPart(ds, prev, next, m, int(i), k, span[k])
		}
	}
	t.heap = t.heap[:0]
	for _, i := range order {
		t.dist[i] = sumParts(part[int(i)*m : int(i)*m+m])
		t.version[i]++
		t.heap = append(t.heap, crowdEntry{dist: t.dist[i], i: i, version: t.version[i]})
	}
	t.heap.init()
}

// resize returns s with length n, reallocated only when its capacity is too small.
func resize[T any](s []T, n int) []T {
	if cap(s) < n {
		return make([]T, n)
	}
	return s[:n]
}

// sortByObjective sorts the design indices of order by (f_k, index), using keys as scratch, which
// it returns.
func sortByObjective(ds []*Design, order []int32, k int, keys []crowdKey) []crowdKey {
	keys = keys[:0]
	for _, i := range order {
		keys = append(keys, crowdKey{ds[i].F[k], i})
	}
	slices.SortFunc(keys, func(a, b crowdKey) int {
		if c := cmp.Compare(a.v, b.v); c != 0 {
			return c
		}
		return cmp.Compare(a.i, b.i)
	})
	for j, key := range keys {
		order[j] = key.i
	}
	return keys
}

// crowdPart is objective k's contribution to the crowding distance of design i, given the
// neighbour links: +Inf at an end, else (f[next] − f[prev]) / span.
func crowdPart(ds []*Design, prev, next []int32, m, i, k int, span float64) float64 {
	p, q := prev[i*m+k], next[i*m+k]
	if p < 0 || q < 0 {
		return math.Inf(1)
	}
	return (ds[q].F[k] - ds[p].F[k]) / span
}

// sumParts adds the per-objective contributions in objective order, as crowdingDistance does.
func sumParts(parts []float64) float64 {
	var d float64
	for _, v := range parts {
		d += v
	}
	return d
}

type crowdKey struct {
	v float64
	i int32
}

type crowdEntry struct {
	dist    float64
	i       int32
	version int32
}

// crowdHeap is a binary min-heap on distance; among equal distances the latest design comes
// first.
type crowdHeap []crowdEntry

func (h crowdHeap) less(a, b int) bool {
	if h[a].dist != h[b].dist {
		return h[a].dist < h[b].dist
	}
	return h[a].i > h[b].i
}

func (h crowdHeap) init() {
	for i := len(h)/2 - 1; i >= 0; i-- {
		h.down(i)
	}
}

func (h *crowdHeap) push(e crowdEntry) {
	*h = append(*h, e)
	s := *h
	for j := len(s) - 1; j > 0; {
		p := (j - 1) / 2
		if !s.less(j, p) {
			break
		}
		s[j], s[p] = s[p], s[j]
		j = p
	}
}

func (h *crowdHeap) pop() crowdEntry {
	s := *h
	e := s[0]
	s[0] = s[len(s)-1]
	*h = s[:len(s)-1]
	h.down(0)
	return e
}

func (h crowdHeap) down(i int) {
	for {
		l := 2*i + 1
		if l >= len(h) {
			return
		}
		j := l
		if r := l + 1; r < len(h) && h.less(r, l) {
			j = r
		}
		if !h.less(j, i) {
			return
		}
		h[i], h[j] = h[j], h[i]
		i = j
	}
}
