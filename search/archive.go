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

	spare []*Design // addAll's merge buffer (two objectives)

	// buffers of addAll and addAllM
	sort     scratch
	cand     []*Design
	first    []int32
	byF1     []crowdKey
	flatF    []float64
	dead     []bool
	deadItem []bool
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
		a.addAllM(ds)
		return
	}
	cand := a.cand[:0]
	for _, d := range ds {
		if d.Feasible() {
			cand = append(cand, d)
		}
	}
	a.cand = cand
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
	// The merge goes into the spare buffer, which then swaps with items.
	out := slices.Grow(a.spare[:0], len(a.items)+len(cand))
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
	clear(a.items)
	a.items, a.spare = out, a.items[:0]
	clear(cand)
}

// addAllM is addAll for one or three or more objectives. Offering designs one at a time keeps
// exactly the designs of the archive and the batch that nothing among them dominates, the first
// of equal vectors, in the order archive then batch (dominance is transitive, so a design
// rejected or removed stays out whatever follows). So the batch is first reduced to its own
// non-dominated designs by the efficient sort (search/REFERENCE.md §2.2); each of those is then
// rejected if a member weakly dominates it, and members a kept newcomer dominates are removed.
// The members are visited by increasing f1 (a weak dominator of d has f1 ≤ d's f1, a member d
// dominates has f1 ≥ d's f1), so each comparison runs one way only.
func (a *archive) addAllM(ds []*Design) {
	m := a.m
	cand := a.cand[:0]
	for _, d := range ds {
		if d.Feasible() {
			cand = append(cand, d)
		}
	}
	if len(cand) == 0 {
		return
	}
	// Non-dominated designs of the batch, first of equal vectors (ranks of the lexicographic
	// sort: rank 0, and for duplicates the one with the smallest position).
	rank := a.sort.nondominatedSortENS(cand, m)
	kept := cand[:0]
	seen := a.sort.order // the sorted order of the last sort: equal vectors are adjacent
	first := a.first[:0]
	for j, i := range seen {
		if rank[i] != 0 {
			continue
		}
		if j > 0 && rank[seen[j-1]] == 0 && slices.Equal(cand[seen[j-1]].F, cand[i].F) {
			continue // a later copy (the sort breaks ties by position)
		}
		first = append(first, i)
	}
	slices.Sort(first) // batch order
	for _, i := range first {
		kept = append(kept, cand[i])
	}
	// Members by increasing f1, their objectives copied into one flat array in that order.
	byF1 := a.byF1[:0]
	for i, q := range a.items {
		byF1 = append(byF1, crowdKey{q.F[0], int32(i)})
	}
	sortCrowdKeys(byF1)
	af := resize(a.flatF, len(byF1)*m)
	for j, e := range byF1 {
		copy(af[j*m:j*m+m], a.items[e.i].F)
	}
	deadAt := resize(a.dead, len(byF1)) // by position in byF1
	clear(deadAt)
	out := a.items
	for _, d := range kept {
		f := d.F
		f0 := f[0]
		pos := sort.Search(len(byF1), func(j int) bool { return byF1[j].v > f0 })
		rejected := false
	weak:
		for j := range pos { // members with f1 ≤ d's f1: does one weakly dominate d?
			if deadAt[j] {
				continue
			}
			q := af[j*m : j*m+m]
			if m == 3 { // the common case, without the inner loop: the same comparisons
				if q[1] > f[1] || q[2] > f[2] {
					continue weak
				}
			} else {
				for k := 1; k < m; k++ {
					if q[k] > f[k] {
						continue weak
					}
				}
			}
			rejected = true
			break
		}
		if rejected {
			continue
		}
		lo := pos
		for lo > 0 && byF1[lo-1].v == f0 {
			lo--
		}
	dom:
		for j := lo; j < len(byF1); j++ { // members with f1 ≥ d's f1: which does d dominate?
			if deadAt[j] {
				continue
			}
			q := af[j*m : j*m+m]
			if m == 3 {
				if f[1] > q[1] || f[2] > q[2] {
					continue dom
				}
			} else {
				for k := 1; k < m; k++ {
					if f[k] > q[k] {
						continue dom
					}
				}
			}
			deadAt[j] = true // d ⪯ q and d was not weakly dominated, so d ≠ q: d ≺ q
		}
		out = append(out, d)
	}
	dead := resize(a.deadItem, len(a.items))
	clear(dead)
	for j, e := range byF1 {
		dead[e.i] = deadAt[j]
	}
	// Newcomers never dominate one another, and none is weakly dominated by a surviving member,
	// so only the old members can be dead.
	items := out[:0]
	for i, q := range out {
		if i < len(dead) && dead[i] {
			continue
		}
		items = append(items, q)
	}
	clear(out[len(items):])
	a.items = items
	clear(cand[:cap(cand)]) // drop the references to the batch
	a.cand, a.first, a.byF1, a.dead, a.deadItem, a.flatF = cand[:0], first, byF1, deadAt, dead, af
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
	sortCrowdKeys(keys)
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

// compareCrowdKeys orders keys by value, then by index (a total order for
// the finite values of feasible designs and archive members: plain
// comparisons, no NaN handling).
func compareCrowdKeys(a, b crowdKey) int {
	switch {
	case a.v < b.v:
		return -1
	case a.v > b.v:
		return 1
	}
	return int(a.i - b.i)
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
