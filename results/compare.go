package results

import (
	"context"
	"encoding/json"
	"fmt"
	"io"
	"math"
	"slices"
	"strings"
	"text/tabwriter"

	"gonum.org/v1/gonum/stat"

	"plica/search/front"

	"plica/problems"
)

// jsonNum is a float that encodes NaN and ±Inf (an indicator without a
// value, such as IGD+ of an empty front) as JSON null.
type jsonNum float64

func (x jsonNum) MarshalJSON() ([]byte, error) {
	f := float64(x)
	if math.IsNaN(f) || math.IsInf(f, 0) {
		return []byte("null"), nil
	}
	return json.Marshal(f)
}

// CompareOptions controls Compare. The zero value is ready to use.
type CompareOptions struct {
	// Reference is the hypervolume reference point in the normalised
	// space, the same in every objective (e.g. 1.1). Zero means 1 + 1/H
	// (ReferenceDivisions of the largest front).
	Reference float64
	// Groups labels each run (one label per run, in order), e.g. the
	// settings of a batch of seeds; runs with one label form a group.
	// With two or more groups, Compare adds the median and interquartile
	// range of each indicator per group and Mann–Whitney U tests between
	// groups (search/front/REFERENCE.md §2). Nil means no groups.
	Groups []string
}

// Comparison is the outcome of Compare: indicators of every run on one
// normalisation, pairwise dominance indicators, where each run holds the
// union front, and plain sentences.
type Comparison struct {
	Problem    string              `json:"problem"`
	Objectives []ComparedObjective `json:"objectives"`
	// Normalization says how the objectives were normalised.
	Normalization string `json:"normalization"`
	// Reference is the hypervolume reference point in the normalised space.
	Reference       []float64 `json:"reference"`
	ReferenceReason string    `json:"reference_reason"`
	// UnionFront is the number of points of the non-dominated set of the
	// union of the fronts; UnionHypervolume its hypervolume at Reference.
	UnionFront       int            `json:"union_front"`
	UnionHypervolume jsonNum        `json:"union_hypervolume"`
	Runs             []ComparedRun  `json:"runs"`
	Pairs            []ComparedPair `json:"pairs"`
	// Regions walk the union front along the first objective and say which
	// runs hold each stretch.
	Regions    []FrontRegion `json:"regions"`
	Groups     []GroupStats  `json:"groups,omitempty"`
	GroupTests []GroupTest   `json:"group_tests,omitempty"`
	Verdict    []string      `json:"verdict"`
	Notes      []string      `json:"notes,omitempty"`
}

// ComparedObjective is one objective with the ideal and nadir points of the
// normalisation, in the score's own sign and unit.
type ComparedObjective struct {
	Score string  `json:"score"`
	Goal  string  `json:"goal"`
	Ideal float64 `json:"ideal"`
	Nadir float64 `json:"nadir"`
}

// ComparedRun holds one run's indicators on the shared normalisation.
type ComparedRun struct {
	Run         string  `json:"run"`
	Seed        uint64  `json:"seed"`
	Method      string  `json:"method"`
	Evaluations int64   `json:"evaluations"`
	FrontSize   int     `json:"front_size"`
	Contributed int     `json:"union_front_points"`
	Hypervolume jsonNum `json:"hypervolume"`
	IGD         jsonNum `json:"igd"`
	IGDPlus     jsonNum `json:"igd_plus"`
}

// ComparedPair holds the dominance indicators of two runs, both ways.
type ComparedPair struct {
	A        string  `json:"a"`
	B        string  `json:"b"`
	EpsAB    jsonNum `json:"eps_ab"`
	EpsBA    jsonNum `json:"eps_ba"`
	CAB      jsonNum `json:"c_ab"`
	CBA      jsonNum `json:"c_ba"`
	Sentence string  `json:"sentence"`
}

// FrontRegion is a stretch of the union front, along the first objective
// (score units), held by the same runs.
type FrontRegion struct {
	Runs   []string `json:"runs"`
	From   float64  `json:"from"`
	To     float64  `json:"to"`
	Points int      `json:"points"`
}

// GroupStats summarises the runs of one group.
type GroupStats struct {
	Group         string  `json:"group"`
	Runs          int     `json:"runs"`
	HVMedian      jsonNum `json:"hypervolume_median"`
	HVIQR         jsonNum `json:"hypervolume_iqr"`
	IGDPlusMedian jsonNum `json:"igd_plus_median"`
	IGDPlusIQR    jsonNum `json:"igd_plus_iqr"`
}

// GroupTest is a two-sided Mann–Whitney U test between two groups on one
// indicator.
type GroupTest struct {
	A         string  `json:"a"`
	B         string  `json:"b"`
	Indicator string  `json:"indicator"`
	U         jsonNum `json:"u"`
	P         jsonNum `json:"p"`
	// Better is the group with the better median (larger hypervolume,
	// smaller IGD+).
	Better string `json:"better"`
}

// Compare computes, for runs of one problem (check them with
// SameObjectives first), the indicators of search/front/REFERENCE.md §2 on one
// normalisation: the ideal and nadir points of the non-dominated set of
// the union of the fronts. Each run gets its normalised hypervolume at the
// common reference point, IGD and IGD+ to the union front, and the number
// of union-front points it holds; each pair gets I_ε+ and C both ways.
// It looks at ctx between indicators and every CheckEvery points, and
// stops with ctx.Err() once ctx is done.
func Compare(ctx context.Context, fronts []*RunFront, opt CompareOptions) (*Comparison, error) {
	if len(fronts) == 0 {
		return nil, inputErrorf("no runs to compare")
	}
	if opt.Groups != nil && len(opt.Groups) != len(fronts) {
		return nil, inputErrorf("%d group labels for %d runs (expected one label per run)", len(opt.Groups), len(fronts))
	}
	if opt.Reference != 0 && !(opt.Reference > 1) {
		return nil, inputErrorf("reference point %g (expected a number above 1, e.g. 1.1: the nadir point maps to 1)", opt.Reference)
	}
	spec := fronts[0].Spec
	m := len(spec.Objectives)
	var sets [][][]float64
	largest := 0
	for _, f := range fronts {
		sets = append(sets, f.F)
		largest = max(largest, len(f.F))
	}
	norm, err := front.NewNormalization(sets...)
	if err != nil {
		return nil, fmt.Errorf("no run has a feasible front design: nothing to compare")
	}
	c := &Comparison{Problem: fronts[0].Info.ProblemName}
	if c.Problem == "" {
		c.Problem = fronts[0].Info.ProblemFile
	}
	for k, o := range spec.Objectives {
		co := ComparedObjective{Score: o.Score, Goal: o.Goal().String(), Ideal: o.Natural(norm.Ideal[k]), Nadir: o.Natural(norm.Nadir[k])}
		c.Objectives = append(c.Objectives, co)
	}
	var union [][]float64
	owner := []int{}
	nf := make([][][]float64, len(fronts))
	for r, f := range fronts {
		nf[r] = norm.Apply(f.F)
		union = append(union, nf[r]...)
		for range f.F {
			owner = append(owner, r)
		}
	}
	ufIdx := front.NonDominated(union)
	z := make([][]float64, len(ufIdx))
	for i, k := range ufIdx {
		z[i] = union[k]
	}
	if err := ctx.Err(); err != nil {
		return nil, err
	}
	c.UnionFront = len(z)
	c.Normalization = fmt.Sprintf("each objective mapped to [0, 1] between the ideal and the nadir point of the non-dominated set of the union of the %d fronts (%d points), the same for every run; maximised scores are negated first", len(fronts), len(z))
	ref := opt.Reference
	if ref == 0 {
		h := front.ReferenceDivisions(largest, m)
		ref = 1 + 1/float64(h)
		c.ReferenceReason = fmt.Sprintf("1 + 1/H with H = %d: the largest front (%d points) fills a %d-objective simplex lattice of H = %d divisions (Ishibuchi et al., Evol. Comput. 26(3), 2018)", h, largest, m, h)
	} else {
		c.ReferenceReason = "set with -ref"
	}
	c.Reference = make([]float64, m)
	for k := range c.Reference {
		c.Reference[k] = ref
	}
	c.UnionHypervolume = jsonNum(front.Hypervolume(z, c.Reference))
	for r, f := range fronts {
		cr := ComparedRun{Run: f.Dir, Seed: f.Info.Seed, Method: f.Info.Method, Evaluations: f.Info.Evaluations, FrontSize: len(f.F)}
		if err := ctx.Err(); err != nil {
			return nil, err
		}
		cr.Hypervolume = jsonNum(front.Hypervolume(nf[r], c.Reference))
		if err := ctx.Err(); err != nil {
			return nil, err
		}
		cr.IGD = jsonNum(front.IGD(nf[r], z))
		if err := ctx.Err(); err != nil {
			return nil, err
		}
		cr.IGDPlus = jsonNum(front.IGDPlus(nf[r], z))
		for i, q := range nf[r] {
			if i%CheckEvery == 0 {
				if err := ctx.Err(); err != nil {
					return nil, err
				}
			}
			on := true
			for _, p := range z {
				if front.Dominates(p, q) {
					on = false
					break
				}
			}
			if on {
				cr.Contributed++
			}
		}
		c.Runs = append(c.Runs, cr)
		if f.Skipped > 0 {
			c.Notes = append(c.Notes, fmt.Sprintf("%s: %d front designs without readable objectives left out", f.Dir, f.Skipped))
		}
	}
	for a := range fronts {
		for b := a + 1; b < len(fronts); b++ {
			if err := ctx.Err(); err != nil {
				return nil, err
			}
			p := ComparedPair{A: fronts[a].Dir, B: fronts[b].Dir,
				EpsAB: jsonNum(front.EpsilonAdditive(nf[a], nf[b])), EpsBA: jsonNum(front.EpsilonAdditive(nf[b], nf[a])),
				CAB: jsonNum(front.Coverage(nf[a], nf[b])), CBA: jsonNum(front.Coverage(nf[b], nf[a]))}
			p.Sentence = pairSentence(p, len(nf[a]), len(nf[b]))
			c.Pairs = append(c.Pairs, p)
		}
	}
	if err := ctx.Err(); err != nil {
		return nil, err
	}
	c.Regions = frontRegions(fronts, nf, z, spec.Objectives[0], norm)
	c.Verdict = verdict(c)
	if opt.Groups != nil {
		c.Groups, c.GroupTests = groupStats(c.Runs, opt.Groups)
		for _, t := range c.GroupTests {
			c.Verdict = append(c.Verdict, groupSentence(t))
		}
	}
	return c, nil
}

// pairSentence says in words whether one run covers the other.
func pairSentence(p ComparedPair, na, nb int) string {
	switch {
	case na == 0 && nb == 0:
		return fmt.Sprintf("neither %s nor %s has a feasible front design", p.A, p.B)
	case na == 0:
		return fmt.Sprintf("%s has no feasible front design; %s has %d", p.A, p.B, nb)
	case nb == 0:
		return fmt.Sprintf("%s has no feasible front design; %s has %d", p.B, p.A, na)
	case p.CAB == 1 && p.CBA == 1:
		return fmt.Sprintf("%s and %s reach the same front: each weakly dominates every design of the other", p.A, p.B)
	case p.CAB == 1:
		return fmt.Sprintf("%s covers %s: every design of %s is weakly dominated by one of %s (I_eps+(%s, %s) = %.3g <= 0)", p.A, p.B, p.B, p.A, p.A, p.B, float64(p.EpsAB))
	case p.CBA == 1:
		return fmt.Sprintf("%s covers %s: every design of %s is weakly dominated by one of %s (I_eps+(%s, %s) = %.3g <= 0)", p.B, p.A, p.A, p.B, p.B, p.A, float64(p.EpsBA))
	}
	closer := p.A
	if p.EpsBA < p.EpsAB {
		closer = p.B
	}
	return fmt.Sprintf("neither covers the other: %s weakly dominates %.0f%% of %s and %s %.0f%% of %s; %s must move by %.3g (normalised) in every objective to cover %s, %s by %.3g to cover %s, so %s is closer to covering the other",
		p.A, 100*float64(p.CAB), p.B, p.B, 100*float64(p.CBA), p.A, p.A, float64(p.EpsAB), p.B, p.B, float64(p.EpsBA), p.A, closer)
}

// frontRegions labels each union-front point with the runs that hold it
// (an equal objective vector) and joins neighbours along the first
// objective with the same label.
func frontRegions(fronts []*RunFront, nf [][][]float64, z [][]float64, first problems.Objective, norm front.Normalization) []FrontRegion {
	pts := slices.Clone(z)
	slices.SortStableFunc(pts, func(a, b []float64) int { return slices.Compare(a, b) })
	var out []FrontRegion
	for _, p := range pts {
		var runs []string
		for r := range fronts {
			for _, q := range nf[r] {
				if slices.Equal(p, q) {
					runs = append(runs, fronts[r].Dir)
					break
				}
			}
		}
		v := first.Natural(norm.Ideal[0] + p[0]*norm.Span(0))
		if n := len(out); n > 0 && slices.Equal(out[n-1].Runs, runs) {
			out[n-1].To = v
			out[n-1].Points++
			continue
		}
		out = append(out, FrontRegion{Runs: runs, From: v, To: v, Points: 1})
	}
	return out
}

// verdict sums up the comparison in plain sentences.
func verdict(c *Comparison) []string {
	var out []string
	best, most := 0, 0
	for i, r := range c.Runs {
		if r.Hypervolume > c.Runs[best].Hypervolume {
			best = i
		}
		if r.Contributed > c.Runs[most].Contributed {
			most = i
		}
	}
	if len(c.Runs) > 1 {
		out = append(out, fmt.Sprintf("largest hypervolume: %s (%.4g at reference %.4g; the union front has %.4g)",
			c.Runs[best].Run, float64(c.Runs[best].Hypervolume), c.Reference[0], float64(c.UnionHypervolume)))
		out = append(out, fmt.Sprintf("most union-front points: %s (%d of %d)", c.Runs[most].Run, c.Runs[most].Contributed, c.UnionFront))
	}
	for _, p := range c.Pairs {
		out = append(out, p.Sentence)
	}
	if len(c.Regions) > 0 && len(c.Runs) > 1 {
		var parts []string
		for _, g := range c.Regions {
			parts = append(parts, fmt.Sprintf("%.4g to %.4g: %s (%d)", g.From, g.To, strings.Join(g.Runs, "+"), g.Points))
		}
		const shown = 8
		more := ""
		if len(parts) > shown {
			more = fmt.Sprintf("; and %d more stretches", len(parts)-shown)
			parts = parts[:shown]
		}
		out = append(out, fmt.Sprintf("along %s the union front comes from %s%s", c.Objectives[0].Score, strings.Join(parts, "; "), more))
	}
	return out
}

// groupStats gives the median and interquartile range of each group's
// indicators and the Mann–Whitney U tests between groups.
func groupStats(runs []ComparedRun, labels []string) ([]GroupStats, []GroupTest) {
	var order []string
	hv, igd := map[string][]float64{}, map[string][]float64{}
	for i, l := range labels {
		if _, ok := hv[l]; !ok {
			order = append(order, l)
		}
		hv[l] = append(hv[l], float64(runs[i].Hypervolume))
		if v := float64(runs[i].IGDPlus); !math.IsNaN(v) {
			igd[l] = append(igd[l], v)
		} else {
			igd[l] = append(igd[l], math.Inf(1)) // an empty front is the worst
		}
	}
	var gs []GroupStats
	for _, l := range order {
		hm, hq := medianIQR(hv[l])
		im, iq := medianIQR(igd[l])
		gs = append(gs, GroupStats{Group: l, Runs: len(hv[l]), HVMedian: jsonNum(hm), HVIQR: jsonNum(hq), IGDPlusMedian: jsonNum(im), IGDPlusIQR: jsonNum(iq)})
	}
	var ts []GroupTest
	for a := range order {
		for b := a + 1; b < len(order); b++ {
			for _, ind := range []struct {
				name string
				v    map[string][]float64
			}{{"hypervolume", hv}, {"igd_plus", igd}} {
				u, p := front.MannWhitney(ind.v[order[a]], ind.v[order[b]])
				ma, _ := medianIQR(ind.v[order[a]])
				mb, _ := medianIQR(ind.v[order[b]])
				better := order[a]
				if (ind.name == "hypervolume") == (mb > ma) {
					better = order[b]
				}
				if ma == mb {
					better = ""
				}
				ts = append(ts, GroupTest{A: order[a], B: order[b], Indicator: ind.name, U: jsonNum(u), P: jsonNum(p), Better: better})
			}
		}
	}
	if len(order) < 2 {
		ts = nil
	}
	return gs, ts
}

// medianIQR returns the median and the interquartile range (empirical
// quantiles, gonum stat.Quantile).
func medianIQR(x []float64) (float64, float64) {
	if len(x) == 0 {
		return math.NaN(), math.NaN()
	}
	s := slices.Clone(x)
	slices.Sort(s)
	med := stat.Quantile(0.5, stat.Empirical, s, nil)
	iqr := stat.Quantile(0.75, stat.Empirical, s, nil) - stat.Quantile(0.25, stat.Empirical, s, nil)
	if math.IsNaN(iqr) {
		iqr = math.Inf(1)
	}
	return med, iqr
}

func groupSentence(t GroupTest) string {
	if t.P <= 0.05 && t.Better != "" {
		return fmt.Sprintf("groups %s and %s differ in %s at the 5%% level (Mann-Whitney U = %g, p = %.3g): %s has the better median", t.A, t.B, t.Indicator, float64(t.U), float64(t.P), t.Better)
	}
	return fmt.Sprintf("no significant difference between groups %s and %s in %s (Mann-Whitney U = %g, p = %.3g)", t.A, t.B, t.Indicator, float64(t.U), float64(t.P))
}

// WriteComparison prints a comparison as tables and sentences.
func WriteComparison(w io.Writer, c *Comparison) error {
	name := c.Problem
	if name == "" {
		name = "the problem"
	}
	fmt.Fprintf(w, "comparing %d runs of %s\n\n", len(c.Runs), name)
	fmt.Fprintf(w, "normalisation: %s\n", c.Normalization)
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
	fmt.Fprintln(tw, "objective\tgoal\tideal\tnadir")
	for _, o := range c.Objectives {
		fmt.Fprintf(tw, "%s\t%s\t%.6g\t%.6g\n", o.Score, o.Goal, o.Ideal, o.Nadir)
	}
	tw.Flush()
	fmt.Fprintf(w, "reference point: %.4g in every normalised objective, %s\n\n", c.Reference[0], c.ReferenceReason)
	fmt.Fprintln(tw, "run\tseed\tevaluations\tfront\tunion-front points\thypervolume\tIGD\tIGD+")
	for _, r := range c.Runs {
		fmt.Fprintf(tw, "%s\t%d\t%d\t%d\t%d of %d\t%s (ref %.4g)\t%s\t%s\n", r.Run, r.Seed, r.Evaluations, r.FrontSize, r.Contributed, c.UnionFront,
			fmtIndicator(r.Hypervolume), c.Reference[0], fmtIndicator(r.IGD), fmtIndicator(r.IGDPlus))
	}
	fmt.Fprintf(tw, "union front\t\t\t%d\t\t%s (ref %.4g)\t0\t0\n", c.UnionFront, fmtIndicator(c.UnionHypervolume), c.Reference[0])
	tw.Flush()
	if len(c.Pairs) > 0 {
		fmt.Fprintln(w)
		fmt.Fprintln(tw, "A\tB\tI_eps+(A,B)\tI_eps+(B,A)\tC(A,B)\tC(B,A)")
		for _, p := range c.Pairs {
			fmt.Fprintf(tw, "%s\t%s\t%s\t%s\t%s\t%s\n", p.A, p.B, fmtIndicator(p.EpsAB), fmtIndicator(p.EpsBA), fmtIndicator(p.CAB), fmtIndicator(p.CBA))
		}
		tw.Flush()
	}
	if len(c.Groups) > 0 {
		fmt.Fprintln(w)
		fmt.Fprintln(tw, "group\truns\thypervolume median\tIQR\tIGD+ median\tIQR")
		for _, g := range c.Groups {
			fmt.Fprintf(tw, "%s\t%d\t%s\t%s\t%s\t%s\n", g.Group, g.Runs, fmtIndicator(g.HVMedian), fmtIndicator(g.HVIQR), fmtIndicator(g.IGDPlusMedian), fmtIndicator(g.IGDPlusIQR))
		}
		tw.Flush()
	}
	fmt.Fprintln(w)
	for _, s := range c.Verdict {
		fmt.Fprintf(w, "- %s\n", s)
	}
	for _, s := range c.Notes {
		fmt.Fprintf(w, "note: %s\n", s)
	}
	fmt.Fprintln(w, "(hypervolume: larger is better; IGD, IGD+, I_eps+: smaller is better; C(A,B): share of B weakly dominated by A)")
	return nil
}

func fmtIndicator(x jsonNum) string {
	f := float64(x)
	if math.IsNaN(f) {
		return "n/a"
	}
	return fmt.Sprintf("%.4g", f)
}
