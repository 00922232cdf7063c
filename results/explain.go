package results

import (
	"fmt"
	"maps"
	"math"
	"slices"
	"strings"
	"sync"

	"plica/objective"
	"plica/problems"
	"plica/surrogate"
)

// An explainer gathers, from every successful evaluation of a search, what
// the diagnosis needs to say in a designer's terms why a constraint blocks:
// the best value of each check in its own unit, and the best reach among
// the evaluations meeting each constraint, so that a reach the task points
// or the reach requirement need can be traced to the constraint that caps
// it. search's Diagnoser sees only margins; this is the bellows side.
//
// Aggregates are maxima and minima with ties broken by the smaller
// evaluation index, so the result does not depend on the worker count.
type explainer struct {
	mu    sync.Mutex
	names []string // constraint names (the checks first)
	// needReach is the lateral reach the task points need (m): the largest
	// distance of a point from the base axis less its tolerance; 0 when
	// the problem has no task points.
	needReach float64
	// minReach is the reach requirement (m); 0 when none.
	minReach float64

	reachAll reachRecord
	// reachMeeting[j] is the best reach among the evaluations meeting
	// constraint j; reachOthers the best among those meeting every
	// constraint but the ones that ask for reach (task_miss, task_coverage
	// and reach).
	reachMeeting []reachRecord
	reachOthers  reachRecord
	// best[j] is check j's best value (smallest for an upper limit,
	// largest for a lower one).
	best []checkRecord
	// evals counts the evaluations recorded, misordered[i] those whose
	// pair of bellows i+1 and i+2 was objective.Result.MisorderedPairs.
	evals      int64
	misordered map[int]int64
	// pending holds the evaluations add saw and commit has not recorded.
	pending map[int64]*pendingEval
}

type reachRecord struct {
	Reach float64 // m
	Index int64
	OK    bool
}

func (r *reachRecord) offer(reach float64, index int64) {
	if !r.OK || reach > r.Reach || (reach == r.Reach && index < r.Index) {
		*r = reachRecord{Reach: reach, Index: index, OK: true}
	}
}

type checkRecord struct {
	Check objective.Check
	Index int64
	OK    bool
}

// reachNames are the constraints that ask for reach.
var reachNames = map[string]bool{"task_miss": true, "task_coverage": true, "reach": true}

// newExplainer prepares an explainer for a problem; nil when the problem's
// scenario cannot be built (the diagnosis then has no explanations).
func newExplainer(spec *problems.Spec) *explainer {
	_, sc, err := spec.Design(spec.Midpoint())
	if err != nil {
		return nil
	}
	ex := &explainer{names: spec.ConstraintNames(), minReach: sc.Requirements.MinReach}
	for _, t := range sc.Tasks {
		tol := t.Tolerance
		if tol == 0 {
			tol = 1e-3 // objective.TaskPoint: zero means 1 mm
		}
		ex.needReach = math.Max(ex.needReach, math.Hypot(t.Position[0], t.Position[1])-tol)
	}
	ex.reachMeeting = make([]reachRecord, len(ex.names))
	ex.best = make([]checkRecord, len(spec.Checks))
	return ex
}

// pendingEval is what add keeps of one evaluation until the search
// records it (commit): the evaluations of a generation the search
// abandons (Ctrl-C) are never committed, so the explainer holds exactly
// the evaluations a checkpoint holds.
type pendingEval struct {
	reach      float64
	haveReach  bool
	g          []float64
	checks     []objective.Check
	misordered []int
}

// add keeps one evaluation (problems.Spec.ObservedSearchProblem's
// observer) until commit records it.
func (ex *explainer) add(index int64, res *objective.Result, g []float64) {
	if len(g) != len(ex.names) || len(res.Checks) != len(ex.best) {
		return
	}
	for _, v := range g {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return // the search counts it as failed
		}
	}
	reach := res.Scores.Reach
	p := &pendingEval{reach: reach, haveReach: !math.IsNaN(reach) && !math.IsInf(reach, 0),
		g: slices.Clone(g), checks: slices.Clone(res.Checks), misordered: slices.Clone(res.MisorderedPairs)}
	ex.mu.Lock()
	defer ex.mu.Unlock()
	if ex.pending == nil {
		ex.pending = map[int64]*pendingEval{}
	}
	ex.pending[index] = p
}

// commit records the evaluation index (when failed is false) that add kept, if
// any, and forgets it (the search's Evaluated hook, for every evaluation
// it records; a design the search counts as failed is forgotten only).
func (ex *explainer) commit(index int64, failed bool) {
	if ex == nil {
		return
	}
	ex.mu.Lock()
	defer ex.mu.Unlock()
	p, ok := ex.pending[index]
	delete(ex.pending, index)
	if !ok || failed {
		return
	}
	ex.evals++
	for _, i := range p.misordered {
		if ex.misordered == nil {
			ex.misordered = map[int]int64{}
		}
		ex.misordered[i]++
	}
	others := true
	for j, v := range p.g {
		if v <= 0 && p.haveReach {
			ex.reachMeeting[j].offer(p.reach, index)
		}
		if v > 0 && !reachNames[ex.names[j]] {
			others = false
		}
	}
	if p.haveReach {
		ex.reachAll.offer(p.reach, index)
		if others {
			ex.reachOthers.offer(p.reach, index)
		}
	}
	for j, c := range p.checks {
		if math.IsNaN(c.Value) {
			continue
		}
		b := &ex.best[j]
		better := !b.OK || (c.Max && c.Value < b.Check.Value) || (!c.Max && c.Value > b.Check.Value) ||
			(c.Value == b.Check.Value && index < b.Index)
		if better {
			*b = checkRecord{Check: c, Index: index, OK: true}
		}
	}
}

// sentences gives one sentence per blocking constraint it can explain in
// units, in the order of blocking.
func (ex *explainer) sentences(blocking []BlockingConstraint) []string {
	if ex == nil {
		return nil
	}
	ex.mu.Lock()
	defer ex.mu.Unlock()
	index := map[string]int{}
	for j, n := range ex.names {
		index[n] = j
	}
	var out []string
	for _, b := range blocking {
		j, ok := index[b.Name]
		if !ok {
			continue
		}
		switch b.Name {
		case "task_miss", "task_coverage":
			if ex.needReach <= 0 {
				continue
			}
			s := ""
			if j < len(ex.best) && ex.best[j].OK {
				c := ex.best[j].Check
				if b.Name == "task_miss" {
					s = fmt.Sprintf("%s: best miss %.3g mm (evaluation %d); ", b.Name, c.Value, ex.best[j].Index)
				} else {
					s = fmt.Sprintf("%s: best coverage %.3g against %.3g needed (evaluation %d); ", b.Name, c.Value, c.Limit, ex.best[j].Index)
				}
			}
			out = append(out, s+ex.reachClause(ex.needReach, "the task points"))
		case "reach":
			if ex.minReach <= 0 {
				continue
			}
			out = append(out, "reach: "+ex.reachClause(ex.minReach, "min_reach_mm"))
		default:
			if b.BestMargin <= 0 || j >= len(ex.best) || !ex.best[j].OK {
				continue // met by some evaluation: the generic sentence says so
			}
			c := ex.best[j].Check
			op := "at most"
			if !c.Max {
				op = "at least"
			}
			out = append(out, fmt.Sprintf("%s: no evaluation met it; the best was %s against %s %s (evaluation %d)",
				b.Name, withUnit(c.Value, c.Unit), op, withUnit(c.Limit, c.Unit), ex.best[j].Index)+spineStrainClause(b.Name, c.Note))
		}
	}
	return out
}

// spineStrainClause says, for a validated_range check whose note names
// the wall strain's spine limit (surrogate.QuantitySpineStrain: every
// spined bellows lies outside it, surrogate/REFERENCE.md §6.4), why the
// check cannot be met and what the designer can do; "" otherwise.
func spineStrainClause(name, note string) string {
	if !strings.HasPrefix(name, "validated_range[") || !strings.Contains(note, surrogate.QuantitySpineStrain) {
		return ""
	}
	return "; its bellows has a spine, and the wall strain of a spined bellows has no validated model: drop the spine, " +
		"or set [requirements] within_validated_range = false and check the chosen design's strain with plica fe and a prototype"
}

// reachClause says what caps the reach need (m) of who: the constraint
// whose satisfying evaluations reach least, when they fall short of it.
func (ex *explainer) reachClause(need float64, who string) string {
	mm := func(x float64) string { return fmt.Sprintf("%.3g mm", x*1e3) }
	if !ex.reachAll.OK {
		return fmt.Sprintf("%s need a reach of %s; no evaluation had one", who, mm(need))
	}
	if ex.reachAll.Reach < need {
		s := fmt.Sprintf("%s need a reach of %s, but no evaluation reached beyond %s (evaluation %d)", who, mm(need), mm(ex.reachAll.Reach), ex.reachAll.Index)
		return s + ex.limiter(need)
	}
	s := fmt.Sprintf("%s need a reach of %s; the best reach seen is %s (evaluation %d)", who, mm(need), mm(ex.reachAll.Reach), ex.reachAll.Index)
	switch {
	case !ex.reachOthers.OK:
		return s + "; no evaluation met the other constraints" + ex.limiter(need)
	case ex.reachOthers.Reach < need:
		return s + fmt.Sprintf(", but only %s while meeting every other constraint", mm(ex.reachOthers.Reach)) + ex.limiter(need)
	default:
		return s + fmt.Sprintf(", and %s while meeting every other constraint: reach is not what blocks, the shape or direction is", mm(ex.reachOthers.Reach))
	}
}

// limiter names the constraint (not one asking for reach) whose satisfying
// evaluations reach least, when that falls short of need.
func (ex *explainer) limiter(need float64) string {
	worst, at := -1, math.Inf(1)
	for j, r := range ex.reachMeeting {
		if reachNames[ex.names[j]] || !r.OK {
			continue
		}
		if r.Reach < at && r.Reach < ex.reachAll.Reach {
			worst, at = j, r.Reach
		}
	}
	if worst < 0 || at >= need {
		return ""
	}
	name := ex.names[worst]
	var also []string // constraints that cap the reach just as much
	for j, r := range ex.reachMeeting {
		if j != worst && !reachNames[ex.names[j]] && r.OK && r.Reach == at {
			also = append(also, ex.names[j])
		}
	}
	if len(also) > 0 {
		name += " (and equally " + strings.Join(also, ", ") + ")"
	}
	return fmt.Sprintf("; reach limited by %s: best reach %.3g mm among the evaluations meeting it (evaluation %d) against %.3g mm needed",
		name, at*1e3, ex.reachMeeting[worst].Index, need*1e3)
}

func withUnit(v float64, unit string) string {
	if unit == "" {
		return fmt.Sprintf("%.3g", v)
	}
	return fmt.Sprintf("%.3g %s", v, unit)
}

// misorderedShare is the share of the evaluations at or above which a pair
// whose clearance fails by more than the wall is reported as a likely
// ordering mistake (a designer's choice: most evaluations, not a few
// outliers of a wide range).
const misorderedShare = 0.8

// orderWarning is the WarnBellowsOrder warning when, in at least
// misorderedShare of the evaluations, a neighbouring pair's clearance
// failed by more than the outer wall; false otherwise.
func (ex *explainer) orderWarning() (Warning, bool) {
	if ex == nil {
		return Warning{}, false
	}
	ex.mu.Lock()
	defer ex.mu.Unlock()
	if ex.evals == 0 {
		return Warning{}, false
	}
	var pairs []string
	worst := 0.0
	for _, i := range slices.Sorted(maps.Keys(ex.misordered)) {
		n := ex.misordered[i]
		if share := float64(n) / float64(ex.evals); n > 0 && share >= misorderedShare {
			pairs = append(pairs, fmt.Sprintf("clearance[%d-%d]", i, i+1))
			worst = math.Max(worst, share)
		}
	}
	if len(pairs) == 0 {
		return Warning{}, false
	}
	return Warning{Kind: WarnBellowsOrder, Message: fmt.Sprintf("%s failed by more than the outer bellows' wall in up to %.0f %% of the evaluations: bellows are listed innermost first ([[bellows]] 1 is the innermost, each next one goes around it); if the first bellows is meant to be the outer one, reverse the order of the [[bellows]] tables",
		strings.Join(pairs, ", "), 100*worst)}, true
}
