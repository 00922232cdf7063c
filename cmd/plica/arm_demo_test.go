package main

import (
	"encoding/csv"
	"encoding/json"
	"html"
	"os"
	"path/filepath"
	"strconv"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// TestArmDemo: the shipped arm demo (problems/examples/arm-search.toml, a
// demo scenario with invented numbers) parses, its search at the shipped
// budget ends with feasible designs that turn straight (tip on the axis
// within 2 mm and pointing along it within 5 degrees), its best design
// bends and reaches further than the desk boom's (about 19 degrees and
// 17 mm, as the README says), the first front design passes plica check,
// and the summary, run.json and the report say what limits the front.
func TestArmDemo(t *testing.T) {
	dir := t.TempDir()
	rdir := filepath.Join(dir, "arm")
	code, out, errOut := runCLI(t, "search", examples+"arm-search.toml", "-o", rdir, "-quiet", "-workers", "2")
	require.Equal(t, 0, code, errOut)
	assert.NotContains(t, out, "front: 0 designs")
	assert.Contains(t, out, "limits: reach_mm, highest in front-001 (")
	assert.Contains(t, out, "limits: tip_sag_mm, lowest in front-")

	f, err := os.Open(filepath.Join(rdir, "front.csv"))
	require.NoError(t, err)
	defer f.Close()
	rows, err := csv.NewReader(f).ReadAll()
	require.NoError(t, err)
	require.Greater(t, len(rows), 1, "front.csv has designs")
	col := map[string]int{}
	for i, h := range rows[0] {
		col[h] = i
	}
	num := func(row []string, name string) float64 {
		i, ok := col[name]
		require.True(t, ok, "front.csv has column %s", name)
		v, err := strconv.ParseFloat(row[i], 64)
		require.NoError(t, err, name)
		return v
	}
	var reach, bend float64
	for _, row := range rows[1:] {
		assert.LessOrEqual(t, num(row, "tip_sag_mm"), 5.0, "front designs meet max_tip_sag_mm")
		assert.LessOrEqual(t, num(row, "strain_ratio"), 1.0, "front designs meet the wall strain limit")
		assert.LessOrEqual(t, num(row, "straight_tip_offset_mm"), 2.0, "front designs straighten: tip on the axis")
		assert.LessOrEqual(t, num(row, "straight_tip_angle_deg"), 5.0, "front designs straighten: tip along the axis")
		assert.LessOrEqual(t, num(row, "bend_angle_min_deg"), 5.0, "front designs turn to within 5 degrees of straight")
		reach = max(reach, num(row, "reach_mm"))
		bend = max(bend, num(row, "bend_angle_max_deg"))
	}
	assert.Greater(t, reach, 35.0, "best reach (mm)")
	assert.Greater(t, bend, 35.0, "largest bend (deg)")

	code, out, errOut = runCLI(t, "check", filepath.Join(rdir, "designs", "front-001.toml"))
	assert.Equal(t, 0, code, "front-001 passes check:\n%s%s", out, errOut)

	var info struct {
		FrontLimits []struct {
			Objective string `json:"objective"`
			Sentence  string `json:"sentence"`
		} `json:"front_limits"`
		Warnings []struct {
			Kind string `json:"kind"`
		} `json:"warnings"`
	}
	b, err := os.ReadFile(filepath.Join(rdir, "run.json"))
	require.NoError(t, err)
	require.NoError(t, json.Unmarshal(b, &info))
	require.Len(t, info.FrontLimits, 2, "one front limit per objective")
	assert.Equal(t, "reach_mm", info.FrontLimits[0].Objective)
	report, err := os.ReadFile(filepath.Join(rdir, "report.html"))
	require.NoError(t, err)
	assert.Contains(t, string(report), `<div id="front-limits">`)
	assert.Contains(t, string(report), html.EscapeString(info.FrontLimits[0].Sentence))
	if len(info.Warnings) > 0 {
		assert.Contains(t, string(report), `<div id="warnings">`, "the report shows the run's warnings")
	}
}
