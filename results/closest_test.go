package results

import (
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"plica/objective"
	"plica/problems"
)

// TestClosestDesignFiles: a blocked search writes its least-infeasible
// designs as design files, named in run.json; each parses back as a design
// and, evaluated again, gives the margins recorded in run.json and in its
// own comment header (the design's numbers are written to 9 significant
// digits, so the margins agree to 1e-6 relative; the round trip is the
// reference, the search's own evaluation of the same candidate).
func TestClosestDesignFiles(t *testing.T) {
	spec, dir, info := blockedRun(t, 1)
	least := info.Diagnosis.LeastInfeasible
	require.NotEmpty(t, least)
	names := spec.ConstraintNames()
	for n, l := range least {
		require.Equal(t, ClosestFileName(n+1), l.DesignFile, "least-infeasible design %d names its file", n+1)
		assert.Contains(t, info.Files, l.DesignFile, "run.json lists %s", l.DesignFile)
		path := filepath.Join(dir, l.DesignFile)
		text := readFile(t, path)
		assert.Contains(t, text, "least-infeasible design", "%s says what it is", l.DesignFile)
		d, sc, err := problems.LoadDesign(path)
		require.NoError(t, err, "%s parses as a design", l.DesignFile)
		res, err := objective.Evaluate(d, sc)
		require.NoError(t, err, "%s evaluates", l.DesignFile)
		f := make([]float64, len(spec.Objectives))
		g := make([]float64, len(names))
		require.NoError(t, spec.Fill(res, f, g))
		violated := false
		for j, name := range names {
			want := l.Margins[name]
			assert.InDelta(t, want, g[j], 1e-6*math.Max(1, math.Abs(want)), "%s: margin %s re-evaluated", l.DesignFile, name)
			assert.Contains(t, text, "g_"+name+" = ", "%s header holds margin %s", l.DesignFile, name)
			violated = violated || g[j] > 0
		}
		assert.True(t, violated, "%s violates some constraint", l.DesignFile)
		assert.False(t, res.Pass, "%s fails its checks", l.DesignFile)
	}
	assert.NoFileExists(t, filepath.Join(dir, ClosestFileName(len(least)+1)), "only the kept designs are written")
	entries, err := os.ReadDir(filepath.Join(dir, ClosestDir))
	require.NoError(t, err)
	for _, e := range entries {
		assert.False(t, strings.HasPrefix(e.Name(), "."), "no temporary file left: %s", e.Name())
	}
}

// TestRemoveStaleClosest: a resumed run removes least-infeasible design
// files an earlier session wrote and this one did not, and keeps those it
// rewrote and every other file.
func TestRemoveStaleClosest(t *testing.T) {
	dir := t.TempDir()
	f := &Folder{Dir: dir}
	require.NoError(t, os.MkdirAll(filepath.Join(dir, ClosestDir), 0o755))
	for _, name := range []string{ClosestFileName(1), ClosestFileName(2), FrontFile} {
		require.NoError(t, os.WriteFile(filepath.Join(dir, name), []byte("x"), 0o644))
	}
	f.wrote(ClosestFileName(1))
	require.NoError(t, removeStaleClosest(f, []string{ClosestFileName(1), ClosestFileName(2), FrontFile, ClosestFileName(3)}))
	assert.FileExists(t, filepath.Join(dir, ClosestFileName(1)), "rewritten this session")
	assert.NoFileExists(t, filepath.Join(dir, ClosestFileName(2)), "stale")
	assert.FileExists(t, filepath.Join(dir, FrontFile), "not a closest file")
}
