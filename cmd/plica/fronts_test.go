package main

import (
	"encoding/csv"
	"encoding/json"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// tinyIsland runs a 96-evaluation search of the small demo problem into
// dir/name with the given seed.
func tinyIsland(t *testing.T, prob, dir, name string, seed int) string {
	t.Helper()
	out := filepath.Join(dir, name)
	code, stdout, stderr := runCLI(t, "search", prob, "-o", out, "-quiet", "-evals", "96", "-workers", "1", "-seed", strconv.Itoa(seed))
	require.Equal(t, 0, code, "search seed %d: %s %s", seed, stdout, stderr)
	return out
}

// readTable reads a CSV file into its header and rows.
func readTable(t *testing.T, path string) ([]string, [][]string) {
	t.Helper()
	f, err := os.Open(path)
	require.NoError(t, err)
	defer f.Close()
	recs, err := csv.NewReader(f).ReadAll()
	require.NoError(t, err, path)
	require.NotEmpty(t, recs, path)
	return recs[0], recs[1:]
}

func col(t *testing.T, header []string, name string) int {
	t.Helper()
	k := slices.Index(header, name)
	require.GreaterOrEqual(t, k, 0, "column %s in %v", name, header)
	return k
}

// objectivesOf reads (−reach_mm, tip_sag_mm), the demo problem's
// objectives as minimised, from the rows of a CSV file; with feasibleOnly,
// only the rows whose feasible column is true.
func objectivesOf(t *testing.T, path string, feasibleOnly bool) [][]float64 {
	t.Helper()
	h, rows := readTable(t, path)
	r, s := col(t, h, "reach_mm"), col(t, h, "tip_sag_mm")
	fc := -1
	if feasibleOnly {
		fc = col(t, h, "feasible")
	}
	var out [][]float64
	for _, row := range rows {
		if fc >= 0 && row[fc] != "true" {
			continue
		}
		reach, err1 := strconv.ParseFloat(row[r], 64)
		sag, err2 := strconv.ParseFloat(row[s], 64)
		require.NoError(t, err1)
		require.NoError(t, err2)
		out = append(out, []float64{-reach, sag})
	}
	return out
}

// paretoByDefinition is the set of distinct non-dominated vectors of pts by
// the definition of Pareto dominance (search/REFERENCE.md §1.3), O(n²), sorted.
func paretoByDefinition(pts [][]float64) [][]float64 {
	var out [][]float64
	for i, p := range pts {
		dominated := false
		for j, q := range pts {
			if j != i && q[0] <= p[0] && q[1] <= p[1] && (q[0] < p[0] || q[1] < p[1]) {
				dominated = true
				break
			}
		}
		if !dominated && !slices.ContainsFunc(out, func(o []float64) bool { return slices.Equal(o, p) }) {
			out = append(out, p)
		}
	}
	slices.SortFunc(out, func(a, b []float64) int { return slices.Compare(a, b) })
	return out
}

// TestCompareMergePick drives compare, merge and pick on two tiny islands
// of the demo problem: the merged front is the non-dominated feasible set
// of the union of both evaluation archives (definition of Pareto
// dominance, search/REFERENCE.md §1.3, checked independently here); compare says the
// merged run covers each island (C = 1, I_eps+ ≤ 0, by definition of the
// indicators, search/front/REFERENCE.md §1.3–1.4); picked designs round-trip into check
// (same scores as front.csv, to the six significant digits check -json
// prints), pose and refine.
func TestCompareMergePick(t *testing.T) {
	dir := t.TempDir()
	prob := smallProblemFile(t, dir)
	a := tinyIsland(t, prob, dir, "island-1", 1)
	b := tinyIsland(t, prob, dir, "island-2", 2)

	// compare: tables, the reference point next to every hypervolume, JSON, plot
	code, out, errOut := runCLI(t, "compare", a, b, "-plot", filepath.Join(dir, "overlay.svg"))
	require.Equal(t, 0, code, "compare: %s", errOut)
	for _, want := range []string{"reference point: ", "1 + 1/H", "union-front points", "I_eps+(A,B)", "C(B,A)", "(ref ", "along reach_mm"} {
		assert.Contains(t, out, want, "compare output")
	}
	svg, err := os.ReadFile(filepath.Join(dir, "overlay.svg"))
	require.NoError(t, err, "overlay plot written")
	assert.True(t, strings.HasPrefix(string(svg), "<?xml"), "overlay plot is SVG")
	assert.Contains(t, string(svg), "island-1", "legend names the runs")

	// merge
	m := filepath.Join(dir, "merged")
	code, out, errOut = runCLI(t, "merge", a, b, "-o", m)
	require.Equal(t, 0, code, "merge: %s %s", out, errOut)
	assert.Contains(t, out, "merged 2 runs")
	want := paretoByDefinition(append(objectivesOf(t, filepath.Join(a, "evaluations.csv"), true), objectivesOf(t, filepath.Join(b, "evaluations.csv"), true)...))
	got := objectivesOf(t, filepath.Join(m, "front.csv"), false)
	slices.SortFunc(got, func(x, y []float64) int { return slices.Compare(x, y) })
	assert.Equal(t, want, got, "merged front = non-dominated feasible set of the union of the archives")
	h, rows := readTable(t, filepath.Join(m, "evaluations.csv"))
	require.Len(t, rows, 192, "every evaluation of both runs")
	src, idx := col(t, h, "source_run"), col(t, h, "index")
	for i, row := range rows {
		require.Equal(t, strconv.Itoa(i), row[idx], "renumbered index")
		wantSrc := a
		if i >= 96 {
			wantSrc = b
		}
		require.Equal(t, wantSrc, row[src], "source_run of row %d", i)
	}
	var info struct {
		Method     string `json:"method"`
		MergedFrom []struct {
			Run  string `json:"run"`
			Seed uint64 `json:"seed"`
		} `json:"merged_from"`
	}
	raw, err := os.ReadFile(filepath.Join(m, "run.json"))
	require.NoError(t, err)
	require.NoError(t, json.Unmarshal(raw, &info))
	assert.Equal(t, "merge", info.Method)
	require.Len(t, info.MergedFrom, 2)
	assert.Equal(t, []uint64{1, 2}, []uint64{info.MergedFrom[0].Seed, info.MergedFrom[1].Seed}, "merged_from seeds")
	for i := 1; i <= len(got); i++ {
		assert.FileExists(t, filepath.Join(m, "designs", fmt.Sprintf("front-%03d.toml", i)))
	}

	// compare -json: the merged run covers each island
	code, out, errOut = runCLI(t, "compare", m, a, b, "-json", "-groups", "merged,island,island")
	require.Equal(t, 0, code, "compare -json: %s", errOut)
	var c struct {
		Reference []float64 `json:"reference"`
		Runs      []struct {
			Run         string   `json:"run"`
			Contributed int      `json:"union_front_points"`
			Hypervolume *float64 `json:"hypervolume"`
		} `json:"runs"`
		Pairs []struct {
			A, B  string
			EpsAB *float64 `json:"eps_ab"` // null when B has no feasible design
			CAB   *float64 `json:"c_ab"`
		} `json:"pairs"`
		UnionFront int `json:"union_front"`
		GroupTests []struct {
			Indicator string `json:"indicator"`
		} `json:"group_tests"`
	}
	require.NoError(t, json.Unmarshal([]byte(out), &c), "compare -json output")
	require.Len(t, c.Runs, 3)
	assert.Equal(t, c.UnionFront, c.Runs[0].Contributed, "the merged run holds the whole union front")
	require.Len(t, c.Pairs, 3)
	covered := 0
	for i, p := range c.Pairs[:2] {
		if c.Runs[1+i].Contributed == 0 && p.CAB == nil {
			continue // an island without a feasible design
		}
		require.NotNil(t, p.CAB, "C(merged, %s)", p.B)
		assert.Equal(t, 1.0, *p.CAB, "C(merged, %s)", p.B)
		assert.LessOrEqual(t, *p.EpsAB, 0.0, "I_eps+(merged, %s)", p.B)
		covered++
	}
	require.Positive(t, covered, "at least one island has a feasible front")
	for _, r := range c.Runs[1:] {
		assert.LessOrEqual(t, *r.Hypervolume, *c.Runs[0].Hypervolume, "HV(%s) <= HV(merged)", r.Run)
	}
	assert.Len(t, c.GroupTests, 2, "Mann-Whitney on hypervolume and IGD+")
	assert.Greater(t, c.Reference[0], 1.0, "reference point above the nadir")

	// pick: knee → check, pose, refine
	code, out, errOut = runCLI(t, "pick", m, "-knee")
	require.Equal(t, 0, code, "pick -knee: %s %s", out, errOut)
	files, err := filepath.Glob(filepath.Join(m, "picked", "pick-*.toml"))
	require.NoError(t, err)
	require.Len(t, files, 1, "one knee written")
	id, err := strconv.Atoi(strings.TrimSuffix(strings.TrimPrefix(filepath.Base(files[0]), "pick-"), ".toml"))
	require.NoError(t, err)
	assert.Contains(t, out, "refine "+m+" -design "+strconv.Itoa(id))

	code, out, errOut = runCLI(t, "check", "-json", files[0])
	require.Equal(t, 0, code, "check accepts the picked design and it passes: %s", errOut)
	var chk struct {
		Scores map[string]any `json:"scores"`
	}
	require.NoError(t, json.Unmarshal([]byte(out), &chk))
	fh, frows := readTable(t, filepath.Join(m, "front.csv"))
	var row []string
	for _, r := range frows {
		if r[0] == strconv.Itoa(id) {
			row = r
		}
	}
	require.NotNil(t, row, "front.csv row %d", id)
	compared := 0
	for name, v := range chk.Scores {
		f, isNum := v.(float64)
		k := slices.Index(fh, name)
		if !isNum || k < 0 {
			continue
		}
		csvVal, err := strconv.ParseFloat(row[k], 64)
		require.NoError(t, err)
		// check -json keeps six significant digits; the design file keeps nine
		assert.InDelta(t, csvVal, f, 1e-5*math.Max(math.Abs(csvVal), 1e-3), "score %s of design %d: check vs front.csv", name, id)
		compared++
	}
	assert.GreaterOrEqual(t, compared, 10, "scores compared")
	code, _, errOut = runCLI(t, "pose", files[0], "-angles-deg", "0,90")
	assert.Equal(t, 0, code, "pose accepts the picked design: %s", errOut)
	code, _, errOut = runCLI(t, "refine", m, "-design", strconv.Itoa(id), "-evals", "20")
	assert.Equal(t, 0, code, "refine accepts the picked id: %s", errOut)

	// pick -where and -weights into another folder
	other := filepath.Join(dir, "chosen")
	code, out, errOut = runCLI(t, "pick", m, "-where", "tip_sag_mm<1e9", "-where", "pass==true", "-o", other)
	require.Equal(t, 0, code, "pick -where: %s", errOut)
	written, _ := filepath.Glob(filepath.Join(other, "pick-*.toml"))
	assert.Len(t, written, len(got), "every front design passes a loose filter")
	code, _, errOut = runCLI(t, "pick", m, "-weights", "1,0", "-json", "-o", other)
	require.Equal(t, 0, code, "pick -weights: %s", errOut)
	code, _, _ = runCLI(t, "pick", m, "-where", "tip_sag_mm<0")
	assert.Equal(t, 1, code, "no design passes")

	errs := []struct {
		name string
		args []string
		msg  string
	}{
		{"unknown column", []string{"pick", m, "-where", "tip_sag<2"}, `did you mean "tip_sag_mm"`},
		{"bad syntax", []string{"pick", m, "-where", "tip_sag_mm=>2"}, "did you mean >="},
		{"no comparison", []string{"pick", m, "-where", "tip_sag_mm"}, "has no comparison"},
		{"knee and weights", []string{"pick", m, "-knee", "-weights", "1,1"}, "exclude each other"},
		{"weight count", []string{"pick", m, "-weights", "1"}, "1 weights for 2 objectives"},
		{"nothing asked", []string{"pick", m}, "expected -knee, -weights or -where"},
		{"not a run", []string{"pick", dir, "-knee"}, "is not a run folder"},
		{"existing output", []string{"merge", a, b, "-o", m}, "already holds a run"},
		{"merge without -o", []string{"merge", a, b}, "-o"},
		{"resume a merged run", []string{"resume", m, "-quiet"}, "cannot be resumed"},
	}
	for _, e := range errs {
		t.Run(e.name, func(t *testing.T) { refused(t, e.msg, e.args...) })
	}
}

// TestMergeAndCompareRefuseOtherProblems: islands whose problem files
// differ only in [search] merge; a changed fixed value (the payload) is
// another problem for merge; other objectives are refused by compare.
func TestMergeAndCompareRefuseOtherProblems(t *testing.T) {
	dir := t.TempDir()
	prob := smallProblemFile(t, dir)
	a := tinyIsland(t, prob, dir, "a", 1)
	text, err := os.ReadFile(prob)
	require.NoError(t, err)
	variant := func(name, from, to string) string {
		require.Contains(t, string(text), from)
		p := filepath.Join(dir, name+".toml")
		require.NoError(t, os.WriteFile(p, []byte(strings.Replace(string(text), from, to, 1)), 0o644))
		return p
	}
	seedOnly := tinyIsland(t, variant("seed", "seed = 1", "seed = 5"), dir, "seed-only", 5)
	payload := tinyIsland(t, variant("payload", "payload_g = 20", "payload_g = 30"), dir, "payload", 1)
	mass := tinyIsland(t, variant("mass", `score = "tip_sag_mm"`, `score = "mass_g"`), dir, "mass", 1)

	code, out, errOut := runCLI(t, "merge", a, seedOnly, "-o", filepath.Join(dir, "m1"))
	assert.Equal(t, 0, code, "a different [search] seed is the same problem: %s %s", out, errOut)

	code, _, errOut = runCLI(t, "merge", a, payload, "-o", filepath.Join(dir, "m2"))
	assert.Equal(t, 2, code, "another payload is another problem")
	assert.Contains(t, errOut, "runs of different problems")
	assert.NoFileExists(t, filepath.Join(dir, "m2", "run.json"), "nothing merged")

	code, out, errOut = runCLI(t, "compare", a, payload)
	assert.Equal(t, 0, code, "compare accepts other problems with the same objectives: %s", errOut)
	assert.Contains(t, out, "the problem files differ", "compare says the problems differ")

	code, _, errOut = runCLI(t, "compare", a, mass)
	assert.Equal(t, 2, code, "other objectives cannot be compared")
	assert.Contains(t, errOut, "runs of different problems")
	assert.Contains(t, errOut, "mass_g (min)")
	code, _, errOut = runCLI(t, "merge", a, mass, "-o", filepath.Join(dir, "m3"))
	assert.Equal(t, 2, code, "merge refuses other objectives")
	assert.Contains(t, errOut, "the objectives differ")
}
