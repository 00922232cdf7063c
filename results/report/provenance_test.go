package report

import (
	"context"
	"fmt"
	"path/filepath"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"plica/results"
)

// TestReportMergedProvenance: the report of a merged run lists each island
// with its seed, population, evaluations and the hypervolume of its own
// front at the merged reference point (run.json merged_from), and the
// searches behind it; a run's warnings (run.json warnings) lead the page
// beside the diagnosis, and a run without any shows no warnings block.
func TestReportMergedProvenance(t *testing.T) {
	a := fixtureRun(t, 120)
	b := fixtureRun(t, 120, [2]string{"seed = 1", "seed = 2"})
	out := filepath.Join(t.TempDir(), "merged")
	m, err := results.Merge(context.Background(), []string{a.Dir, b.Dir}, out, "test")
	require.NoError(t, err)
	rep, err := Build(context.Background(), m.Folder, Options{})
	require.NoError(t, err)
	page := string(rep.HTML)
	els := parseReport(t, rep.HTML)
	assertSelfContained(t, page, els)
	require.True(t, findID(els, "islands-table"), "a merged report has the islands table")
	require.True(t, findID(els, "sources-table"), "and the searches behind it")
	table := page[strings.Index(page, `id="islands-table"`):]
	table = table[:strings.Index(table, "</table>")]
	for i, isl := range m.Info.MergedFrom {
		row := fmt.Sprintf("<tr><td><code>%s</code></td><td>%s</td><td>%s</td><td class=\"num\">%d</td><td class=\"num\">12</td><td class=\"num\">%d</td><td class=\"num\">%d</td><td class=\"num\">%s</td>",
			isl.Run, isl.Method, isl.Status, i+1, isl.Evaluations, isl.FrontSize, num(isl.Hypervolume))
		assert.Contains(t, table, row, "island %d: seed, population 12 (fixture), evaluations, own front, hypervolume", i+1)
		assert.Greater(t, isl.Hypervolume, 0.0, "island %d found feasible designs", i+1)
	}
	assert.False(t, findID(els, "warnings") && len(m.Info.Warnings) == 0, "no warnings block without warnings")
	// the hypervolume per island as a figure: one labelled bar per island
	var islands *Figure
	for i := range rep.Figures {
		if rep.Figures[i].Name == "islands.svg" {
			islands = &rep.Figures[i]
		}
	}
	require.NotNil(t, islands, "a merged report draws the hypervolume per island")
	assert.True(t, findID(els, "fig-islands"), "and shows it")
	for _, isl := range m.Info.MergedFrom {
		assert.Contains(t, string(islands.SVG), fmt.Sprintf("%s (seed %d)", filepath.Base(isl.Run), isl.Seed), "bar label of %s", isl.Run)
	}
	assert.Contains(t, islands.Caption, "merged run's reference point")

	// a single run's report: no islands; its warnings shown
	one, err := Build(context.Background(), a, Options{})
	require.NoError(t, err)
	oels := parseReport(t, one.HTML)
	assert.False(t, findID(oels, "islands-table"), "a single run has no islands table")
	assert.False(t, findID(oels, "fig-islands"), "nor the islands figure")
	info, err := a.ReadInfo()
	require.NoError(t, err)
	require.NotNil(t, info.Warnings, "run.json warnings read back")
	info.Warnings = append(info.Warnings, results.Warning{Kind: results.WarnAtBound, Message: "TEST WARNING bellows1_wall_mm at its upper bound"})
	require.NoError(t, a.WriteInfo(info))
	warned, err := Build(context.Background(), a, Options{})
	require.NoError(t, err)
	wp := string(warned.HTML)
	require.True(t, findID(parseReport(t, warned.HTML), "warnings"), "warnings block")
	assert.Contains(t, wp, "warning: TEST WARNING bellows1_wall_mm at its upper bound")
	assert.Less(t, strings.Index(wp, `id="warnings"`), strings.Index(wp, `id="summary"`), "warnings lead the page")
}
