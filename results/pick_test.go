package results

import (
	"errors"
	"fmt"
	"strconv"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// TestParseCondition: the -where expressions and their errors.
func TestParseCondition(t *testing.T) {
	ok := []struct {
		in          string
		col, op, vl string
	}{
		{"tip_sag_mm<2", "tip_sag_mm", "<", "2"},
		{"reach_mm>=10", "reach_mm", ">=", "10"},
		{" reach_mm >= 1e1 ", "reach_mm", ">=", "1e1"},
		{"pass==true", "pass", "==", "true"},
		{"pass=true", "pass", "==", "true"},
		{"bellows1_material!=petg", "bellows1_material", "!=", "petg"},
		{"mass_g<=-0.5", "mass_g", "<=", "-0.5"},
		{"check_peak_strain[1]<0.02", "check_peak_strain[1]", "<", "0.02"},
	}
	for _, c := range ok {
		got, err := ParseCondition(c.in)
		require.NoError(t, err, "ParseCondition(%q)", c.in)
		assert.Equal(t, []string{c.col, c.op, c.vl}, []string{got.Column, got.Op, got.Value}, "ParseCondition(%q)", c.in)
	}
	bad := []struct {
		in, msg string
	}{
		{"", "empty expression"},
		{"tip_sag_mm 2", "has no comparison"},
		{"<2", "no column"},
		{"tip_sag_mm<", "no value"},
		{"tip_sag_mm=<2", "did you mean <="},
		{"tip_sag_mm=>2", "did you mean >="},
		{"1<tip_sag_mm<2", "more than one comparison"},
		{"tip_sag_mm!2", "is not an operator"},
		{"tip sag<2", "is not a column name"},
		{"tip_sag_mm<2mm?", "is not a value"},
	}
	for _, c := range bad {
		_, err := ParseCondition(c.in)
		require.Error(t, err, "ParseCondition(%q)", c.in)
		assert.Contains(t, err.Error(), c.msg, "ParseCondition(%q)", c.in)
		var ie *InputError
		assert.True(t, errors.As(err, &ie), "ParseCondition(%q) is an input error", c.in)
	}
}

// syntheticFront is a front of the demo problem (reach_mm maximised,
// tip_sag_mm minimised) with hand-made rows: reach and sag on a line with
// one bulge, design 3.
func syntheticFront(t *testing.T) *RunFront {
	spec := smallProblem(t)
	rf := &RunFront{Dir: "demo", Info: &RunInfo{}, Spec: spec,
		Header: []string{"id", "reach_mm", "tip_sag_mm", "pass", "bellows1_material"}}
	pts := [][2]float64{{10, 1}, {20, 1.8}, {32, 2.2}, {40, 4}, {50, 5}}
	for i, p := range pts {
		id := i + 1
		rf.Rows = append(rf.Rows, []string{strconv.Itoa(id), fmt.Sprint(p[0]), fmt.Sprint(p[1]), "true", []string{"petg", "pla"}[i%2]})
		rf.IDs = append(rf.IDs, id)
		rf.F = append(rf.F, []float64{-p[0], p[1]})
	}
	return rf
}

func pickedIDs(r *PickResult) []int {
	var ids []int
	for _, p := range r.Picked {
		ids = append(ids, p.ID)
	}
	return ids
}

// TestPick: filters are ANDed, the knee is the bulge, weights pick ends
// or the middle; unknown columns and wrong weights are input errors.
func TestPick(t *testing.T) {
	rf := syntheticFront(t)
	cond := func(s string) Condition {
		c, err := ParseCondition(s)
		require.NoError(t, err, s)
		return c
	}
	cases := []struct {
		name string
		opt  PickOptions
		want []int
	}{
		{"filter", PickOptions{Where: []Condition{cond("tip_sag_mm<4"), cond("reach_mm>=20")}}, []int{2, 3}},
		{"filter on words", PickOptions{Where: []Condition{cond("bellows1_material==pla")}}, []int{2, 4}},
		{"knee", PickOptions{Method: PickKnee}, []int{3}},
		{"knee, two best", PickOptions{Method: PickKnee, Count: 2}, []int{3, 2}},
		{"knee after filter", PickOptions{Method: PickKnee, Where: []Condition{cond("reach_mm>=20")}}, []int{3}},
		{"pseudo-weights, reach only", PickOptions{Method: PickPseudoWeights, Weights: []float64{1, 0}}, []int{5}},
		{"pseudo-weights, sag only", PickOptions{Method: PickPseudoWeights, Weights: []float64{0, 2}}, []int{1}},
		{"compromise, equal", PickOptions{Method: PickCompromise, Weights: []float64{1, 1}}, []int{3}},
		{"nothing passes", PickOptions{Where: []Condition{cond("tip_sag_mm<0")}}, nil},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			r, err := rf.Pick(c.opt)
			require.NoError(t, err)
			assert.Equal(t, c.want, pickedIDs(r), "picked ids (%s)", r.Method)
		})
	}
	r, err := rf.Pick(PickOptions{Method: PickKnee})
	require.NoError(t, err)
	assert.Equal(t, []float64{32, 2.2}, r.Picked[0].Objectives, "objectives in score units and signs")

	errs := []struct {
		name string
		opt  PickOptions
		msg  string
	}{
		{"unknown column", PickOptions{Where: []Condition{cond("tip_sag<2")}}, `did you mean "tip_sag_mm"`},
		{"words compared as numbers", PickOptions{Where: []Condition{cond("bellows1_material<2")}}, "holds words"},
		{"number column, word value", PickOptions{Where: []Condition{cond("reach_mm>far")}}, "holds numbers"},
		{"weight count", PickOptions{Method: PickPseudoWeights, Weights: []float64{1}}, "1 weights for 2 objectives"},
		{"negative weight", PickOptions{Method: PickCompromise, Weights: []float64{1, -1}}, "expected weights >= 0"},
		{"zero weights", PickOptions{Method: PickCompromise, Weights: []float64{0, 0}}, "all 0"},
	}
	for _, c := range errs {
		_, err := rf.Pick(c.opt)
		require.Error(t, err, c.name)
		assert.Contains(t, err.Error(), c.msg, c.name)
		var ie *InputError
		assert.True(t, errors.As(err, &ie), "%s is an input error", c.name)
	}
}
