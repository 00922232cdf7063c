package problems

import (
	"context"
	"math"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"plica/objective"
)

func TestShippedProblemLoads(t *testing.T) {
	s, err := LoadProblem("examples/boom-search.toml")
	require.NoError(t, err)
	assert.Len(t, s.Variables, 9, "ranges in the demo problem")
	assert.Len(t, s.Objectives, 2)
	assert.True(t, s.Objectives[0].Maximize)
	assert.Contains(t, s.Checks, "tip_sag")
	p := s.SearchProblem()
	assert.Equal(t, 9, p.Dim)
	x := make([]float64, p.Dim)
	for i := range x {
		x[i] = (p.Lower[i] + p.Upper[i]) / 2
	}
	f := make([]float64, p.NumObjectives)
	g := make([]float64, p.NumConstraints)
	require.NoError(t, p.Evaluate(context.Background(), 0, x, f, g), "centre of the box")
	assert.Less(t, f[0], 0.0, "maximised reach is negated")
	assert.Greater(t, f[1], 0.0, "sag")
	for j, v := range g {
		assert.False(t, math.IsNaN(v), "constraint %d", j)
	}
}

// TestDesignTOMLRoundTrip: a candidate written as a design file loads as a
// design and scores the same as the candidate itself.
func TestDesignTOMLRoundTrip(t *testing.T) {
	s, err := LoadProblem("examples/boom-search.toml")
	require.NoError(t, err)
	p := s.SearchProblem()
	x := make([]float64, p.Dim)
	for i := range x {
		x[i] = p.Lower[i] + 0.37*(p.Upper[i]-p.Lower[i])
	}
	text, err := s.DesignTOML(x, "candidate 7\nfrom a test")
	require.NoError(t, err)
	d, sc, err := ParseDesign(text, "candidate.toml")
	require.NoError(t, err, "written design:\n%s", text)
	want, err := s.Evaluate(x)
	require.NoError(t, err)
	got, err := objectiveEvaluate(d, sc)
	require.NoError(t, err)
	assert.InEpsilon(t, want.Scores.Reach, got.Scores.Reach, 1e-7, "reach")
	assert.InEpsilon(t, want.Scores.TipSag, got.Scores.TipSag, 1e-7, "sag")
}

func TestProblemErrors(t *testing.T) {
	cases := []struct {
		name, text, want string
	}{
		{"lo above hi", "[[bellows]]\nwall_mm = [0.8, 0.4]\n", "bellows[1].wall_mm: range [0.8, 0.4] has lo > hi"},
		{"no objectives", "[[bellows]]\nstraight_length_mm = 100.0\ncurved_length_mm = 50.0\nprecurvature_per_m = [1.0, 2.0]\nbending_stiffness_n_mm2 = [1e6, 1e6]\ntorsional_stiffness_n_mm2 = 5e7\nlinear_density_kg_per_m = 0.05\n", "no objectives"},
		{"unknown score", "[[objective]]\nscore = \"beauty\"\n", `"beauty" is not a score`},
		{"bad option", "[[bellows]]\nprofile = [\"sinusoid\", \"zigzag\"]\n", `option "zigzag" is not allowed`},
		{"bad time", "[search]\ntime = \"soon\"\n", `"soon" is not a duration`},
		{"negative bound", "[[objective]]\nscore = \"mass_g\"\n[[bellows]]\nstraight_length_mm = 100.0\ncurved_length_mm = 50.0\nprecurvature_per_m = 1.0\nbending_stiffness_n_mm2 = [1e6, 1e6]\ntorsional_stiffness_n_mm2 = 5e7\nlinear_density_kg_per_m = 0.05\nouter_diameter_mm = [-1.0, 2.0]\n", "outer_diameter_mm: -1 is out of range"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			_, err := ParseProblem([]byte(c.text), "p.toml")
			require.Error(t, err)
			assert.True(t, IsInputError(err))
			assert.Contains(t, err.Error(), c.want)
			assert.Regexp(t, `^p\.toml:\d+:\d+: `, err.Error())
		})
	}
}

var objectiveEvaluate = objective.Evaluate
