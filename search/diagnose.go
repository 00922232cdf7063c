package search

import (
	"math"
	"sort"
)

// ConstraintStat summarises one constraint g_j ≤ 0 over the evaluations a
// Diagnoser has seen (failed evaluations excluded).
type ConstraintStat struct {
	// Violating counts the evaluations with g_j > 0.
	Violating int64
	// SmallestViolation is the smallest g_j > 0 seen (+Inf when none
	// violates).
	SmallestViolation float64
	// Best is the smallest g_j seen, violating or not.
	Best float64
}

// Diagnoser collects, from every evaluation of a run, what blocks the
// constraints: per constraint the count violating and the smallest
// violation, and the least-infeasible designs (smallest CV among the
// infeasible ones). It knows nothing of what the constraints mean.
type Diagnoser struct {
	// Keep is the number of least-infeasible designs kept (0: 5).
	Keep int

	Evaluations int64 // successful evaluations seen
	Feasible    int64
	Stats       []ConstraintStat
	// Least holds the least-infeasible designs, smallest CV first.
	Least []Design
}

// Add records one evaluated design.
func (g *Diagnoser) Add(d *Design) {
	if d.Failed != "" {
		return
	}
	g.Evaluations++
	if g.Stats == nil {
		g.Stats = make([]ConstraintStat, len(d.G))
		for j := range g.Stats {
			g.Stats[j] = ConstraintStat{SmallestViolation: math.Inf(1), Best: math.Inf(1)}
		}
	}
	for j, v := range d.G {
		s := &g.Stats[j]
		s.Best = math.Min(s.Best, v)
		if v > 0 {
			s.Violating++
			s.SmallestViolation = math.Min(s.SmallestViolation, v)
		}
	}
	if d.CV <= 0 {
		g.Feasible++
		return
	}
	keep := g.Keep
	if keep == 0 {
		keep = 5
	}
	if len(g.Least) == keep && d.CV >= g.Least[keep-1].CV {
		return
	}
	c := Design{Index: d.Index, CV: d.CV, X: append([]float64(nil), d.X...), F: append([]float64(nil), d.F...), G: append([]float64(nil), d.G...)}
	g.Least = append(g.Least, c)
	sort.SliceStable(g.Least, func(a, b int) bool {
		if g.Least[a].CV != g.Least[b].CV {
			return g.Least[a].CV < g.Least[b].CV
		}
		return g.Least[a].Index < g.Least[b].Index
	})
	if len(g.Least) > keep {
		g.Least = g.Least[:keep]
	}
}

// AtBound lists, per variable, whether most (at least three quarters) of
// the given designs sit within tol·(upper − lower) of the same bound: −1 at
// the lower, +1 at the upper, 0 otherwise. Fixed and categorical variables
// give 0.
func AtBound(p *Problem, ds []Design, tol float64) []int {
	out := make([]int, p.Dim)
	if len(ds) == 0 {
		return out
	}
	for i := 0; i < p.Dim; i++ {
		if p.Categorical != nil && p.Categorical[i] > 0 {
			continue
		}
		span := p.Upper[i] - p.Lower[i]
		if !(span > 0) || math.IsInf(span, 0) {
			continue
		}
		lo, hi := 0, 0
		for _, d := range ds {
			switch {
			case d.X[i]-p.Lower[i] <= tol*span:
				lo++
			case p.Upper[i]-d.X[i] <= tol*span:
				hi++
			}
		}
		switch {
		case 4*lo >= 3*len(ds):
			out[i] = -1
		case 4*hi >= 3*len(ds):
			out[i] = 1
		}
	}
	return out
}
