package report

import (
	"fmt"
	"strconv"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"plica/problems"
	"plica/results"
	"plica/search/front"
)

// TestPickAndReportShareTheKnee: plica pick -knee and the report name the
// same knee (front.FindKnee), on regular and degenerate fronts alike. Where
// the report names no knee, pick still picks a design and says why in its
// notes. Fronts are (reach_mm, tip_sag_mm) pairs of the demo problem, reach
// maximised.
func TestPickAndReportShareTheKnee(t *testing.T) {
	spec, err := problems.LoadProblem("../../problems/examples/boom-search.toml")
	require.NoError(t, err)
	cases := []struct {
		name  string
		pts   [][2]float64
		found bool
	}{
		{"regular", [][2]float64{{10, 1}, {20, 1.8}, {32, 2.2}, {40, 4}, {50, 5}}, true},
		{"one point", [][2]float64{{10, 1}}, false},
		{"two points", [][2]float64{{10, 1}, {20, 2}}, false},
		{"duplicate points", [][2]float64{{10, 1}, {25, 1.2}, {25, 1.2}, {40, 4}}, true},
		{"all points equal", [][2]float64{{10, 1}, {10, 1}, {10, 1}}, false},
		{"flat objective", [][2]float64{{10, 1}, {20, 1}, {30, 1}}, false},
		{"straight front", [][2]float64{{10, 1}, {20, 2}, {30, 3}}, false},
		{"concave front", [][2]float64{{10, 1}, {20, 3.5}, {30, 4}}, false},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			rf := &results.RunFront{Dir: "run", Info: &results.RunInfo{}, Spec: spec, Header: []string{"id", "reach_mm", "tip_sag_mm"}}
			data := &Data{Folder: &results.Folder{Dir: "run"}, Info: &results.RunInfo{}, Spec: spec}
			var minimised [][]float64
			for i, p := range c.pts {
				id := i + 1
				rf.Rows = append(rf.Rows, []string{strconv.Itoa(id), fmt.Sprint(p[0]), fmt.Sprint(p[1])})
				rf.IDs = append(rf.IDs, id)
				f := spec.Minimised([]float64{p[0], p[1]})
				rf.F = append(rf.F, f)
				minimised = append(minimised, f)
				data.Front = append(data.Front, Row{ID: id, F: []float64{p[0], p[1]}})
			}
			knee := front.FindKnee(minimised)
			require.Equal(t, c.found, knee.Found, "knee of %v: %+v", c.pts, knee)

			res, err := rf.Pick(results.PickOptions{Method: results.PickKnee})
			require.NoError(t, err)
			require.Len(t, res.Picked, 1)
			picked := res.Picked[0].ID
			assert.Equal(t, knee.Index+1, picked, "pick -knee picks front.FindKnee's design")

			var named []int
			for id, why := range data.reasons(nil, false) {
				if strings.Contains(why, "knee of the front") {
					named = append(named, id)
				}
			}
			shown := Representative(minimised)
			if c.found {
				assert.Equal(t, []int{picked}, named, "the report names the design pick picked as the knee")
				assert.Contains(t, shown, picked-1, "the report shows the knee")
			} else {
				assert.Empty(t, named, "the report names no knee")
				assert.NotEmpty(t, res.Notes, "pick says why there is no knee")
			}
		})
	}
}
