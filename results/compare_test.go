package results

import (
	"bytes"
	"context"
	"errors"
	"math"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// handFront is a front of the demo problem (reach_mm maximised, tip_sag_mm
// minimised) given as (reach, sag) pairs.
func handFront(t *testing.T, dir string, pts [][2]float64) *RunFront {
	spec := smallProblem(t)
	rf := &RunFront{Dir: dir, Info: &RunInfo{ProblemName: "demo"}, Spec: spec}
	for i, p := range pts {
		rf.IDs = append(rf.IDs, i+1)
		rf.F = append(rf.F, []float64{-p[0], p[1]})
	}
	return rf
}

// TestCompareHandChecked: two fronts whose indicators follow by hand from
// the definitions of search/front/REFERENCE.md §1 and §2 [derived]. A = {(20, 3), (10, 1)},
// B = {(15, 1.5), (20, 4)} as (reach, sag); union front (20, 3), (15, 1.5),
// (10, 1): ideal (reach 20, sag 1), nadir (10, 3). Normalised (maximised
// reach negated): A = {(0, 1), (1, 0)}, B = {(0.5, 0.25), (0, 1.5)}. The
// largest front has 2 points, so H = 1 and the reference point is 2.
// HV(A) = 2·1 + 1·1 = 3; HV(B) = 2·0.5 + 1.5·1.25 = 2.875; HV(union) =
// 2 + 1.5·0.75 + 1·0.25 = 3.375. IGD+(A) = (0 + 0.5 + 0)/3, IGD+(B) =
// (0.5 + 0 + 0.25)/3. I_ε+(A, B) = I_ε+(B, A) = 0.5; C(A, B) = 0.5 (only
// (0, 1.5) is covered), C(B, A) = 0.
func TestCompareHandChecked(t *testing.T) {
	a := handFront(t, "A", [][2]float64{{20, 3}, {10, 1}})
	b := handFront(t, "B", [][2]float64{{15, 1.5}, {20, 4}})
	note, err := SameObjectives([]*RunFront{a, b})
	require.NoError(t, err)
	assert.Empty(t, note, "same problem hash")
	c, err := Compare(context.Background(), []*RunFront{a, b}, CompareOptions{})
	require.NoError(t, err)
	assert.Equal(t, []float64{2, 2}, c.Reference, "reference 1 + 1/H with H = 1")
	assert.Contains(t, c.ReferenceReason, "H = 1")
	assert.Equal(t, ComparedObjective{Score: "reach_mm", Goal: "maximize", Ideal: 20, Nadir: 10}, c.Objectives[0], "reach normalisation")
	assert.Equal(t, ComparedObjective{Score: "tip_sag_mm", Goal: "minimize", Ideal: 1, Nadir: 3}, c.Objectives[1], "sag normalisation")
	assert.Equal(t, 3, c.UnionFront)
	assert.InDelta(t, 3.375, float64(c.UnionHypervolume), 1e-12, "HV(union)")
	want := []struct {
		hv, igdp float64
		contrib  int
	}{{3, 0.5 / 3, 2}, {2.875, 0.75 / 3, 1}}
	for i, w := range want {
		r := c.Runs[i]
		assert.InDelta(t, w.hv, float64(r.Hypervolume), 1e-12, "HV(%s)", r.Run)
		assert.InDelta(t, w.igdp, float64(r.IGDPlus), 1e-12, "IGD+(%s)", r.Run)
		assert.Equal(t, w.contrib, r.Contributed, "union-front points of %s", r.Run)
	}
	require.Len(t, c.Pairs, 1)
	p := c.Pairs[0]
	assert.InDelta(t, 0.5, float64(p.EpsAB), 1e-12, "I_eps+(A, B)")
	assert.InDelta(t, 0.5, float64(p.EpsBA), 1e-12, "I_eps+(B, A)")
	assert.InDelta(t, 0.5, float64(p.CAB), 1e-12, "C(A, B)")
	assert.InDelta(t, 0, float64(p.CBA), 1e-12, "C(B, A)")
	assert.Contains(t, p.Sentence, "neither covers the other")
	assert.Equal(t, []FrontRegion{{Runs: []string{"A"}, From: 20, To: 20, Points: 1}, {Runs: []string{"B"}, From: 15, To: 15, Points: 1},
		{Runs: []string{"A"}, From: 10, To: 10, Points: 1}}, c.Regions, "who holds the union front along reach")

	// a user reference point: HV(A) at 1.1 = 1.1·0.1 + 0.1·1 = 0.21 [derived]
	c, err = Compare(context.Background(), []*RunFront{a, b}, CompareOptions{Reference: 1.1})
	require.NoError(t, err)
	assert.InDelta(t, 0.21, float64(c.Runs[0].Hypervolume), 1e-12, "HV(A) at 1.1")
	var buf bytes.Buffer
	require.NoError(t, WriteComparison(&buf, c))
	assert.Contains(t, buf.String(), "0.21 (ref 1.1)", "every hypervolume is printed with its reference point")

	// a run that covers another
	dom := handFront(t, "D", [][2]float64{{20, 1}})
	c, err = Compare(context.Background(), []*RunFront{dom, a}, CompareOptions{})
	require.NoError(t, err)
	assert.Contains(t, c.Pairs[0].Sentence, "D covers A", "plain sentence")

	// groups: one label per run; the test needs both groups
	c, err = Compare(context.Background(), []*RunFront{a, b, dom, a}, CompareOptions{Groups: []string{"x", "y", "x", "y"}})
	require.NoError(t, err)
	require.Len(t, c.Groups, 2)
	assert.Equal(t, 2, c.Groups[0].Runs)
	require.Len(t, c.GroupTests, 2)
	assert.False(t, math.IsNaN(float64(c.GroupTests[0].P)), "p-value of the U test")

	for _, opt := range []CompareOptions{{Groups: []string{"x"}}, {Reference: 0.9}} {
		_, err := Compare(context.Background(), []*RunFront{a, b}, opt)
		var ie *InputError
		assert.True(t, errors.As(err, &ie), "bad options %+v are input errors (got %v)", opt, err)
	}
	empty := handFront(t, "E", nil)
	c, err = Compare(context.Background(), []*RunFront{a, empty}, CompareOptions{})
	require.NoError(t, err, "a run without feasible designs is compared")
	assert.True(t, math.IsNaN(float64(c.Runs[1].IGDPlus)), "IGD+ of an empty front has no value")
	assert.Contains(t, c.Pairs[0].Sentence, "E has no feasible front design")
	_, err = Compare(context.Background(), []*RunFront{empty}, CompareOptions{})
	assert.Error(t, err, "nothing to compare")
}
