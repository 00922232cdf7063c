package problems

import (
	"context"
	"math"
	"os"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
	"gonum.org/v1/gonum/stat/distuv"

	"plica/objective"
)

// robustProblem is the demo search with a print scatter, a chance
// constraint and a quantile objective added.
func robustProblem(t testing.TB, edits ...[2]string) ([]byte, *Spec, error) {
	t.Helper()
	data, err := os.ReadFile("examples/boom-search.toml")
	require.NoError(t, err)
	s := string(data)
	all := append([][2]string{
		{"min_clearance_mm = 0.5", "min_clearance_mm = 0.5\nmin_pass_probability = 0.9"},
		{"score = \"tip_sag_mm\"\ngoal = \"minimize\"", "score = \"tip_sag_mm\"\ngoal = \"minimize\"\nquantile = 0.95"},
		{"[search]", "[scatter]\nmodulus_pct = 10\nwall_pct = 5\nsamples = 50\n\n[search]"},
	}, edits...)
	for _, e := range all {
		require.Contains(t, s, e[0])
		s = strings.Replace(s, e[0], e[1], 1)
	}
	spec, err := ParseProblem([]byte(s), "p.toml")
	return []byte(s), spec, err
}

func TestRobustProblem(t *testing.T) {
	_, s, err := robustProblem(t)
	require.NoError(t, err)
	require.True(t, s.Robust())
	assert.Equal(t, 0.9, s.MinPassProbability)
	assert.Equal(t, objective.Scatter{ModulusPct: 10, WallPct: 5, Samples: 50}, *s.Scatter)
	assert.Equal(t, "tip_sag_mm_q95", s.Objectives[1].Column())
	assert.Equal(t, "reach_mm", s.Objectives[0].Column())
	assert.Equal(t, uint64(7), s.ScatterSeeded(7).Seed, "no [scatter] seed: the run's")
	_, s, err = robustProblem(t, [2]string{"samples = 50", "samples = 50\nseed = 3"})
	require.NoError(t, err)
	assert.Equal(t, uint64(3), s.ScatterSeeded(7).Seed, "the file's seed wins")

	// A scatter without quantiles or a chance constraint: the search stays
	// nominal (the front is still re-scored by Monte Carlo).
	_, s, err = robustProblem(t, [2]string{"min_pass_probability = 0.9", ""}, [2]string{"quantile = 0.95", ""})
	require.NoError(t, err)
	assert.False(t, s.Robust())
	assert.NotNil(t, s.ScatterSeeded(1))
}

func TestRobustProblemErrors(t *testing.T) {
	for _, c := range []struct {
		edit [2]string
		want string
	}{
		{[2]string{"quantile = 0.95", "quantile = 1.0"}, `^p.toml:\d+:\d+: objective\[2\].quantile: 1 is out of range \(expected a probability strictly between 0 and 1`},
		{[2]string{"quantile = 0.95", "quantile = 0"}, `objective\[2\].quantile: 0 is out of range`},
		{[2]string{"quantile = 0.95", "quantile = \"high\""}, `objective\[2\].quantile: .*expected a probability`},
		{[2]string{"min_pass_probability = 0.9", "min_pass_probability = 1.5"}, `^p.toml:\d+:\d+: requirements.min_pass_probability: 1.5 is out of range \(expected a probability strictly between 0 and 1`},
		{[2]string{"min_pass_probability = 0.9", "min_pass_probability = -0.1"}, `requirements.min_pass_probability: -0.1 is out of range`},
		{[2]string{"modulus_pct = 10\nwall_pct = 5", "modulus_pct = 0"}, `requirements.min_pass_probability: a pass probability needs print scatter but the file has \[scatter\] scatters nothing`},
		{[2]string{"modulus_pct = 10", "modulus_pct = -1"}, `scatter.modulus_pct: -1 is out of range`},
		{[2]string{"samples = 50", "samples = 0"}, `scatter.samples: .*expected a whole number of Monte Carlo samples from 1 to 1000000`},
	} {
		_, _, err := robustProblem(t, c.edit)
		require.Error(t, err, c.edit[1])
		assert.Regexp(t, c.want, err.Error(), c.edit[1])
		assert.True(t, IsInputError(err))
	}
	data, err := os.ReadFile("examples/boom-search.toml")
	require.NoError(t, err)
	_, err = ParseProblem([]byte(strings.Replace(string(data), "goal = \"minimize\"", "goal = \"minimize\"\nquantile = 0.9", 1)), "p.toml")
	require.Error(t, err)
	assert.Regexp(t, `objective\[2\].quantile: a quantile needs print scatter but the file has no \[scatter\] table`, err.Error())
}

// TestFillRobustNormal: with a check value x normal with mean μ and sd σ
// and an upper limit L, the chance constraint P(x ≤ L) ≥ p holds exactly
// when μ + Φ⁻¹(p)·σ ≤ L, and the q-quantile of a normal score is
// μ + Φ⁻¹(q)·σ (normal distribution; quantiles from gonum distuv.Normal).
// FillRobust must put the margin's sign change at that boundary and the
// objective at that quantile.
func TestFillRobustNormal(t *testing.T) {
	_, s, err := robustProblem(t)
	require.NoError(t, err)
	res, err := s.Evaluate(s.Midpoint())
	require.NoError(t, err)
	const sigma = 0.3e-3 // m, tip sag sd
	rob := &objective.Robust{Scores: map[string]objective.ScoreStats{}}
	for _, c := range res.Checks {
		rob.Checks = append(rob.Checks, objective.RobustCheck{Name: c.Name, Value: c.Value, SD: 0})
	}
	sagScore, _ := objective.LookupScore("tip_sag_mm")
	mu := sagScore.Value(&res.Scores)
	rob.Scores["tip_sag_mm"] = objective.ScoreStats{Mean: mu, SD: 0.4}
	reach, _ := objective.LookupScore("reach_mm")
	rob.Scores["reach_mm"] = objective.ScoreStats{Mean: reach.Value(&res.Scores), SD: 1}
	f, g := make([]float64, 2), make([]float64, s.NumConstraints())
	i := 0 // tip_sag is the first check
	require.Equal(t, "tip_sag", res.Checks[i].Name)
	limit := res.Checks[i].Limit
	zp := distuv.Normal{Mu: 0, Sigma: 1}.Quantile(0.9)
	for _, c := range []struct {
		value  float64
		feasib bool
	}{{limit - zp*sigma*1.01, true}, {limit - zp*sigma*0.99, false}} {
		res.Checks[i].Value = c.value
		rob.Checks[i].SD = sigma
		require.NoError(t, s.FillRobust(res, rob, f, g))
		assert.Equal(t, c.feasib, g[i] <= 0, "P(pass) = %.4f against 0.9", distuv.Normal{Mu: c.value, Sigma: sigma}.CDF(limit))
	}
	q95 := distuv.Normal{Mu: mu, Sigma: 0.4}.Quantile(0.95)
	assert.InDelta(t, q95, f[1], 1e-12, "tip_sag_mm_q95")
	assert.Equal(t, -reach.Value(&res.Scores), f[0], "reach_mm nominal, maximised")
	// With no scatter on a check the chance constraint is the nominal check.
	g0 := make([]float64, len(g))
	require.NoError(t, s.Fill(res, make([]float64, 2), g0))
	for k := 1; k < len(s.Checks); k++ {
		assert.Equal(t, g0[k], g[k], s.Checks[k])
	}
	assert.False(t, math.IsNaN(g[0]))
}

// BenchmarkRobustCandidate measures one search evaluation of the demo
// problem scored nominally and under scatter by the first-order estimate
// (chance constraint and quantile objective): model evaluations per
// candidate, ns per candidate and the cost relative to the nominal one.
func BenchmarkRobustCandidate(b *testing.B) {
	_, robust, err := robustProblem(b)
	if err != nil {
		b.Fatal(err)
	}
	data, err := os.ReadFile("examples/boom-search.toml")
	if err != nil {
		b.Fatal(err)
	}
	nominal, err := ParseProblem(data, "p.toml")
	if err != nil {
		b.Fatal(err)
	}
	run := func(b *testing.B, s *Spec) float64 {
		p := s.SearchProblem()
		x := s.Midpoint()
		f, g := make([]float64, p.NumObjectives), make([]float64, p.NumConstraints)
		b.ResetTimer()
		for i := 0; i < b.N; i++ {
			if err := p.Evaluate(context.Background(), int64(i), x, f, g); err != nil {
				b.Fatal(err)
			}
		}
		ns := float64(b.Elapsed().Nanoseconds()) / float64(b.N)
		b.ReportMetric(ns, "ns/candidate")
		return ns
	}
	var nominalNS float64
	b.Run("nominal", func(b *testing.B) {
		nominalNS = run(b, nominal)
		b.ReportMetric(1, "evaluations/candidate")
	})
	b.Run("first-order", func(b *testing.B) {
		ns := run(b, robust)
		d, _, err := robust.Design(robust.Midpoint())
		if err != nil {
			b.Fatal(err)
		}
		b.ReportMetric(float64(objective.FirstOrderEvaluations(d, robust.Scatter)), "evaluations/candidate")
		if nominalNS > 0 {
			b.ReportMetric(ns/nominalNS, "x-nominal")
		}
	})
}
