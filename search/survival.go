package search

import (
	"cmp"
	"slices"
)

// survival selects the next population from parents and children. It sets Rank and Crowding on
// the survivors, which the crowded tournament then reads; a reference-point niching survival
// (NSGA-III) would be another implementation.
type survival interface {
	// survive returns n designs of r (n ≤ len(r)) in a deterministic order. The slice returned
	// may be reused by the next call.
	survive(r []*Design, n int) []*Design
}

// crowdingSurvival is the NSGA-II survival (Deb et al. 2002, Sec. III-C): fronts of the
// constrained non-dominated sort are taken whole while they fit; the first front that does not
// fit is sorted by decreasing crowding distance, computed on the whole front before truncation,
// ties kept in their order in r.
type crowdingSurvival struct {
	m   int
	s   scratch
	out []*Design // the survivors, reused by the next call
}

func (c *crowdingSurvival) survive(r []*Design, n int) []*Design {
	rank := c.s.nondominatedSort(r, c.m)
	out := slices.Grow(c.out[:0], n)
	dist := resize(c.s.dist, len(r))
	c.s.dist = dist
	fronts := c.s.frontsOf(rank)
	var byF1 [][]int32
	if c.m == 2 {
		byF1 = c.s.sortedFronts(len(r))
	}
	for fr, front := range fronts {
		if len(out) >= n {
			break
		}
		d := dist[:len(front)]
		if c.m == 2 && r[front[0]].CV == 0 {
			c.s.crowdingDistance2(r, front, byF1[fr], d)
		} else {
			c.s.crowdingDistance(r, front, c.m, d)
		}
		for j, i := range front {
			r[i].Rank = fr
			r[i].Crowding = d[j]
		}
		if len(out)+len(front) <= n {
			for _, i := range front {
				out = append(out, r[i])
			}
			continue
		}
		slices.SortFunc(front, func(a, b int32) int { // decreasing crowding, ties by position
			if c := cmp.Compare(r[b].Crowding, r[a].Crowding); c != 0 {
				return c
			}
			return int(a - b)
		})
		for _, i := range front[:n-len(out)] {
			out = append(out, r[i])
		}
	}
	c.out = out
	return out
}

// scalarSurvival is the (μ+λ) truncation of GA: feasible designs first, by increasing Scalar;
// then infeasible designs by increasing CV (Deb 2000, feasibility-first comparison); ties kept
// in their order in r. Rank is the position in that order and Crowding is 0.
type scalarSurvival struct{}

func (scalarSurvival) survive(r []*Design, n int) []*Design {
	out := slices.Clone(r)
	slices.SortStableFunc(out, compareScalar)
	out = out[:n]
	for i, d := range out {
		d.Rank, d.Crowding = i, 0
	}
	return out
}

// compareScalar is the feasibility-first order of Deb (2000): a feasible design precedes an
// infeasible one, feasible designs compare by Scalar, infeasible ones by CV.
func compareScalar(a, b *Design) int {
	af, bf := a.CV == 0, b.CV == 0
	switch {
	case af && bf:
		return cmp.Compare(a.Scalar, b.Scalar)
	case af:
		return -1
	case bf:
		return 1
	}
	return cmp.Compare(a.CV, b.CV)
}
