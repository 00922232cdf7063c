package main

import (
	"encoding/csv"
	"os"
	"path/filepath"
	"strconv"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// TestArmDemo: the shipped arm demo (problems/examples/arm-search.toml, a
// demo scenario with invented numbers) parses, its search at the shipped
// budget ends with feasible designs, its best design bends and reaches
// clearly further than the desk boom's (about 19 degrees and 17 mm, as the
// README says), and the first front design passes plica check.
func TestArmDemo(t *testing.T) {
	dir := t.TempDir()
	rdir := filepath.Join(dir, "arm")
	code, out, errOut := runCLI(t, "search", examples+"arm-search.toml", "-o", rdir, "-quiet", "-workers", "2")
	require.Equal(t, 0, code, errOut)
	assert.NotContains(t, out, "front: 0 designs")

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
		reach = max(reach, num(row, "reach_mm"))
		bend = max(bend, num(row, "bend_angle_max_deg"))
	}
	assert.Greater(t, reach, 30.0, "best reach (mm)")
	assert.Greater(t, bend, 30.0, "largest bend (deg)")

	code, out, errOut = runCLI(t, "check", filepath.Join(rdir, "designs", "front-001.toml"))
	assert.Equal(t, 0, code, "front-001 passes check:\n%s%s", out, errOut)
}
