package results

import (
	"context"
	"encoding/json"
	"fmt"
	"math"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"plica/objective"
	"plica/problems"
	"plica/surrogate"
)

// synthetic builds an evaluation result with the given reach (m) and
// check values, for the explainer's unit tests.
func synthetic(reach float64, checks ...objective.Check) *objective.Result {
	res := &objective.Result{Checks: checks}
	res.Scores.Reach = reach
	return res
}

// TestExplainerSentences: a hand-made run of three constraints. The task
// points need 40 mm (a point 42 mm off the axis less its 2 mm tolerance:
// hypot(42, 0) − 2, elementary), the evaluations meeting the strain reach
// at most 17 mm and those meeting the sag 30 mm, so the strain is named as
// the limit with 17 mm; a check nothing met says its best value against
// its limit, in its unit. The sentences do not depend on the order the
// evaluations arrive in (workers finish in any order).
func TestExplainerSentences(t *testing.T) {
	names := []string{"task_miss", "peak_strain[1]", "tip_sag", "overhang[1]"}
	miss := func(v float64) objective.Check {
		return objective.Check{Name: "task_miss", Value: v, Limit: 0, Unit: "mm", Max: true}
	}
	strain := func(v float64) objective.Check {
		return objective.Check{Name: "peak_strain[1]", Value: v, Limit: 0.02, Max: true}
	}
	sag := func(v float64) objective.Check {
		return objective.Check{Name: "tip_sag", Value: v, Limit: 4, Unit: "mm", Max: true}
	}
	over := func(v float64) objective.Check {
		return objective.Check{Name: "overhang[1]", Value: v, Limit: 45, Unit: "deg", Max: true}
	}
	type eval struct {
		reach float64
		res   *objective.Result
		g     []float64
	}
	evals := []eval{
		{0.017, synthetic(0.017, miss(23), strain(0.019), sag(5), over(50)), []float64{23, -0.05, 0.25, 0.11}},
		{0.030, synthetic(0.030, miss(21), strain(0.04), sag(3), over(47)), []float64{21, 1, -0.25, 0.044}},
		{0.035, synthetic(0.035, miss(20.5), strain(0.05), sag(6), over(46)), []float64{20.5, 1.5, 0.5, 0.022}},
	}
	build := func(order []int) []string {
		ex := &explainer{names: names, needReach: math.Hypot(0.042, 0) - 0.002,
			reachMeeting: make([]reachRecord, len(names)), best: make([]checkRecord, len(names))}
		for _, i := range order {
			ex.add(int64(i), evals[i].res, evals[i].g)
			ex.commit(int64(i), false)
		}
		return ex.sentences([]BlockingConstraint{{Name: "task_miss", BestMargin: 20.5}, {Name: "overhang[1]", BestMargin: 0.022},
			{Name: "tip_sag", BestMargin: -0.25}})
	}
	got := build([]int{0, 1, 2})
	assert.Equal(t, []string{
		"task_miss: best miss 20.5 mm (evaluation 2); the task points need a reach of 40 mm, but no evaluation reached beyond 35 mm (evaluation 2); reach limited by peak_strain[1]: best reach 17 mm among the evaluations meeting it (evaluation 0) against 40 mm needed",
		"overhang[1]: no evaluation met it; the best was 46 deg against at most 45 deg (evaluation 2)",
	}, got, "explanations")
	assert.Equal(t, got, build([]int{2, 0, 1}), "same sentences in another order")

	// a reach that is there once the other constraints are met: the
	// sentence says reach is not what blocks
	ex := &explainer{names: names[:1], needReach: 0.01, reachMeeting: make([]reachRecord, 1), best: make([]checkRecord, 1)}
	ex.add(0, synthetic(0.02, miss(3)), []float64{3})
	ex.commit(0, false)
	s := ex.sentences([]BlockingConstraint{{Name: "task_miss", BestMargin: 3}})
	require.Len(t, s, 1)
	assert.Contains(t, s[0], "reach is not what blocks", "reach beyond the need")

	// a non-finite margin is a failed evaluation: not recorded
	ex.add(1, synthetic(0.5, miss(1)), []float64{math.NaN()})
	ex.commit(1, false)
	assert.Equal(t, s, ex.sentences([]BlockingConstraint{{Name: "task_miss", BestMargin: 3}}), "failed evaluation ignored")

	// an evaluation of a generation the search abandoned (Ctrl-C) is
	// never committed, and one the search counts as failed is forgotten:
	// neither is recorded, so the explainer holds what a checkpoint holds
	ex.add(2, synthetic(0.5, miss(0.5)), []float64{0.5})
	ex.add(3, synthetic(0.6, miss(0.4)), []float64{0.4})
	ex.commit(3, true)
	assert.Equal(t, s, ex.sentences([]BlockingConstraint{{Name: "task_miss", BestMargin: 3}}), "uncommitted evaluations ignored")
	assert.Equal(t, int64(1), ex.evals)
	assert.NotContains(t, ex.pending, int64(3), "a failed evaluation is forgotten")
	ex.commit(2, false)
	assert.NotEqual(t, s, ex.sentences([]BlockingConstraint{{Name: "task_miss", BestMargin: 3}}), "committed: recorded")
	var none *explainer
	assert.Nil(t, none.sentences(nil), "no explainer, no sentences")
}

// blockedRun runs 200 evaluations of the shipped blocked demo with the given
// number of workers into a fresh run folder and returns the problem, the
// folder and its run.json, which holds a diagnosis.
func blockedRun(t *testing.T, workers int) (*problems.Spec, string, RunInfo) {
	t.Helper()
	spec, err := problems.LoadProblem("../problems/examples/boom-blocked.toml")
	require.NoError(t, err)
	dir := filepath.Join(t.TempDir(), "run")
	_, err = runTo(t, spec, dir, 200, workers, context.Background(), false)
	require.NoError(t, err)
	var info RunInfo
	require.NoError(t, json.Unmarshal([]byte(readFile(t, filepath.Join(dir, RunFile))), &info))
	require.NotNil(t, info.Diagnosis)
	return spec, dir, info
}

// TestBlockedDemoExplanation: on the shipped blocked demo, the explanation
// of task_miss agrees with what evaluations.csv says, scanned here on its
// own: the smallest task_miss_mm, the largest reach_mm, and for the named
// limit the largest reach_mm among the rows meeting it (g ≤ 0), which must
// be the smallest such best over the constraints other than task_miss. The
// reach the points need is the demo's 60 mm off-axis points less their
// 2 mm tolerance (problem file; hand calculation).
func TestBlockedDemoExplanation(t *testing.T) {
	spec, dir, info := blockedRun(t, 2)
	require.NotEmpty(t, info.Diagnosis.Explanations)
	s := info.Diagnosis.Explanations[0]
	m := regexp.MustCompile(`^task_miss: best miss (\S+) mm \(evaluation \d+\); the task points need a reach of 58 mm, but no evaluation reached beyond (\S+) mm \(evaluation \d+\); reach limited by (.+?): best reach (\S+) mm among`).FindStringSubmatch(s)
	require.NotNil(t, m, "explanation: %s", s)

	f, err := Open(dir)
	require.NoError(t, err)
	header, rows, err := f.ReadCSV(EvaluationsFile)
	require.NoError(t, err)
	col := map[string]int{}
	for i, h := range header {
		col[h] = i
	}
	value := func(row []string, name string) float64 {
		v, err := strconv.ParseFloat(row[col[name]], 64)
		require.NoError(t, err, "%s", name)
		return v
	}
	bestMiss, bestReach := math.Inf(1), math.Inf(-1)
	meeting := map[string]float64{}
	for _, row := range rows {
		if row[col["failure"]] != "" {
			continue
		}
		bestMiss = math.Min(bestMiss, value(row, "task_miss_mm"))
		reach := value(row, "reach_mm")
		bestReach = math.Max(bestReach, reach)
		for _, h := range header {
			if strings.HasPrefix(h, "g_") && h != "g_task_miss" && value(row, h) <= 0 {
				if r, ok := meeting[h]; !ok || reach > r {
					meeting[h] = reach
				}
			}
		}
	}
	least := math.Inf(1)
	for _, r := range meeting {
		if r < bestReach {
			least = math.Min(least, r)
		}
	}
	var limits []string // in constraint order (the columns' order), ties kept
	for _, h := range header {
		if r, ok := meeting[h]; ok && r == least {
			limits = append(limits, strings.TrimPrefix(h, "g_"))
		}
	}
	require.NotEmpty(t, limits, "some constraint caps the reach")
	limit := limits[0]
	if len(limits) > 1 {
		limit += " (and equally " + strings.Join(limits[1:], ", ") + ")"
	}
	g3 := func(x float64) string { return fmt.Sprintf("%.3g", x) }
	assert.Equal(t, g3(bestMiss), m[1], "best miss")
	assert.Equal(t, g3(bestReach), m[2], "best reach")
	assert.Equal(t, limit, m[3], "the limiting constraint")
	assert.Equal(t, g3(least), m[4], "best reach meeting the limit")

	// same seed, one worker: the same explanations (evaluation order does not matter)
	dir1 := filepath.Join(t.TempDir(), "run1")
	_, err = runTo(t, spec, dir1, 200, 1, context.Background(), false)
	require.NoError(t, err)
	var info1 RunInfo
	require.NoError(t, json.Unmarshal([]byte(readFile(t, filepath.Join(dir1, RunFile))), &info1))
	require.NotNil(t, info1.Diagnosis)
	assert.Equal(t, info.Diagnosis.Explanations, info1.Diagnosis.Explanations, "explanations whatever the worker count")
}

// TestExplainerSpineStrain: a validated_range check nothing met whose note
// names the wall strain's spine limit (every spined bellows lies outside
// it: its wall strain has no validated model, the surrogate reading −75 …
// +35 % of CalculiX's 3-D shell model, surrogate/REFERENCE.md §6.4) gets a
// clause saying so and what to do; one outside another limit does not.
func TestExplainerSpineStrain(t *testing.T) {
	names := []string{"validated_range[1]", "validated_range[2]"}
	vr := func(i int, v float64, note string) objective.Check {
		return objective.Check{Name: fmt.Sprintf("validated_range[%d]", i), Value: v, Limit: 0, Max: true, Warn: true, Note: note}
	}
	ex := &explainer{names: names, reachMeeting: make([]reachRecord, 2), best: make([]checkRecord, 2)}
	spined := "outside: " + surrogate.QuantitySpineStrain + " (warns; a search constraint)"
	ex.add(0, synthetic(0.02, vr(1, 10, spined), vr(2, 0.3, "outside: t/w (warns; a search constraint)")), []float64{10, 0.3})
	ex.commit(0, false)
	got := ex.sentences([]BlockingConstraint{{Name: "validated_range[1]", BestMargin: 10}, {Name: "validated_range[2]", BestMargin: 0.3}})
	require.Len(t, got, 2)
	assert.Equal(t, "validated_range[1]: no evaluation met it; the best was 10 against at most 0 (evaluation 0); its bellows has a spine, "+
		"and the wall strain of a spined bellows has no validated model: drop the spine, or set [requirements] within_validated_range = false "+
		"and check the chosen design's strain with plica fe and a prototype", got[0])
	assert.Equal(t, "validated_range[2]: no evaluation met it; the best was 0.3 against at most 0 (evaluation 0)", got[1])
}
