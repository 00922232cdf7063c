package main

import (
	"encoding/csv"
	"encoding/json"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// robustProblemFile is the small demo search with print scatter, a chance
// constraint and a quantile objective.
func robustProblemFile(t *testing.T, dir string) string {
	t.Helper()
	p := smallProblemFile(t, dir)
	text, err := os.ReadFile(p)
	require.NoError(t, err)
	s := string(text)
	for _, r := range [][2]string{
		{"min_clearance_mm = 0.5", "min_clearance_mm = 0.5\nmin_pass_probability = 0.9"},
		{"score = \"tip_sag_mm\"\ngoal = \"minimize\"", "score = \"tip_sag_mm\"\ngoal = \"minimize\"\nquantile = 0.95"},
		{"[search]", "[scatter]\nmodulus_pct = 10\nwall_pct = 5\nsamples = 30\n\n[search]"},
	} {
		require.Contains(t, s, r[0])
		s = strings.Replace(s, r[0], r[1], 1)
	}
	require.NoError(t, os.WriteFile(p, []byte(s), 0o644))
	return p
}

// TestRobustSearchDeterministic: a robust search gives the same front,
// robust columns included, with 1 and 2 workers, and a run stopped early
// and resumed ends with the front of the run that was not stopped. The
// front carries Monte Carlo columns and says which numbers are first
// order (search_estimate) and which Monte Carlo (robust_method).
func TestRobustSearchDeterministic(t *testing.T) {
	dir := t.TempDir()
	prob := robustProblemFile(t, dir)
	a, b, c := filepath.Join(dir, "a"), filepath.Join(dir, "b"), filepath.Join(dir, "c")
	code, out, errOut := runCLI(t, "search", prob, "-o", a, "-quiet", "-evals", "48", "-workers", "1")
	require.Equal(t, 0, code, "search: %s %s", out, errOut)
	code, _, errOut = runCLI(t, "search", prob, "-o", b, "-quiet", "-evals", "48", "-workers", "2")
	require.Equal(t, 0, code, errOut)
	fa, _ := os.ReadFile(filepath.Join(a, "front.csv"))
	fb, _ := os.ReadFile(filepath.Join(b, "front.csv"))
	assert.Equal(t, string(fa), string(fb), "same seed, same robust front for 1 and 2 workers")

	code, _, errOut = runCLI(t, "search", prob, "-o", c, "-quiet", "-evals", "24", "-workers", "2")
	require.Equal(t, 0, code, errOut)
	code, _, errOut = runCLI(t, "resume", c, "-quiet", "-evals", "48")
	require.Equal(t, 0, code, errOut)
	fc, _ := os.ReadFile(filepath.Join(c, "front.csv"))
	assert.Equal(t, string(fa), string(fc), "stopped at 24 and resumed to 48: the front of a run to 48")

	r := csv.NewReader(strings.NewReader(string(fa)))
	recs, err := r.ReadAll()
	require.NoError(t, err)
	require.GreaterOrEqual(t, len(recs), 2)
	col := map[string]int{}
	for i, h := range recs[0] {
		col[h] = i
	}
	for _, h := range []string{"robust_method", "robust_samples", "pass_probability", "pass_probability_se", "pass_probability_tip_sag",
		"tip_sag_mm_p05", "tip_sag_mm_p50", "tip_sag_mm_p95", "reach_mm_p05", "search_estimate", "tip_sag_mm_q95"} {
		require.Contains(t, col, h)
	}
	row := recs[1]
	assert.Equal(t, "monte_carlo", row[col["robust_method"]])
	assert.Equal(t, "30", row[col["robust_samples"]])
	assert.Equal(t, "first_order", row[col["search_estimate"]])

	// The report shows each shown design's odds and score quantiles, and
	// the front figure the 5–95 % range of each objective.
	html, err := os.ReadFile(filepath.Join(a, "report.html"))
	require.NoError(t, err)
	assert.Contains(t, string(html), "Under print scatter")
	assert.Contains(t, string(html), "Monte Carlo, 30 samples")
	assert.Contains(t, string(html), "ranked candidates by the first-order estimate")
	assert.Contains(t, string(html), "min_pass_probability 0.9: lowest check")
	assert.Contains(t, string(html), "Bars: the 5–95 % range")
	assert.Contains(t, string(html), "tip sag, 95 % quantile")
	svg, err := os.ReadFile(filepath.Join(a, "plots", "front.svg"))
	require.NoError(t, err)
	assert.Contains(t, string(svg), "stroke:#456DC7", "range bars drawn")

	// check -robust on a front design repeats the front row's numbers: the
	// design file's [scatter] carries the run's seed.
	code, out, errOut = runCLI(t, "check", filepath.Join(a, "designs", "front-001.toml"), "-robust", "-json")
	require.Contains(t, []int{0, 1}, code, errOut)
	var chk struct {
		Robust struct {
			Seed            uint64  `json:"seed"`
			PassProbability float64 `json:"pass_probability"`
		} `json:"robust"`
	}
	require.NoError(t, json.Unmarshal([]byte(out), &chk), out)
	assert.Equal(t, uint64(1), chk.Robust.Seed, "the problem's search seed")
	assert.Equal(t, row[col["pass_probability"]], strconv.FormatFloat(chk.Robust.PassProbability, 'g', -1, 64))

	// pick -where filters on the robust columns like on any other.
	code, out, errOut = runCLI(t, "pick", a, "-where", "pass_probability>=0.5", "-where", "tip_sag_mm_p95<1000")
	require.Equal(t, 0, code, "pick: %s %s", out, errOut)
	assert.Contains(t, out, "tip_sag_mm_q95 (min)", "pick names the quantile objective it ranks by")
	assert.Contains(t, out, "filters: pass_probability>=0.5")
	code, out, _ = runCLI(t, "pick", a, "-where", "pass_probability>1.5")
	assert.NotContains(t, out, "pick-001.toml", "no design has a probability above 1")

	var info struct {
		Objectives []string `json:"objectives"`
		Robust     struct {
			Search  string `json:"search"`
			Front   string `json:"front"`
			Samples int    `json:"samples"`
			PerCand int    `json:"evaluations_per_candidate"`
		} `json:"robust"`
	}
	data, err := os.ReadFile(filepath.Join(a, "run.json"))
	require.NoError(t, err)
	require.NoError(t, json.Unmarshal(data, &info))
	assert.Equal(t, []string{"reach_mm", "tip_sag_mm_q95"}, info.Objectives)
	assert.Equal(t, "first_order", info.Robust.Search)
	assert.Equal(t, "monte_carlo", info.Robust.Front)
	assert.Equal(t, 30, info.Robust.Samples)
	assert.Equal(t, 5, info.Robust.PerCand, "nominal + modulus and wall of two bellows")
	assert.LessOrEqual(t, info.Robust.PerCand, 20, "the issue's budget: about 20 nominal evaluations per candidate")
}
