package main

import (
	"bytes"
	"encoding/binary"
	"encoding/json"
	"os"
	"path/filepath"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// TestExportWritesClosedSTLAndJSON exports the shipped geometry design at a
// coarse resolution: every file is a binary STL of 84 + 50·count bytes
// (common practice), its height is the convolutions plus both collars,
// and a second export gives the same bytes.
func TestExportWritesClosedSTLAndJSON(t *testing.T) {
	dir := t.TempDir()
	a, b := filepath.Join(dir, "a"), filepath.Join(dir, "b")
	for _, d := range []string{a, b} {
		code, _, errOut := runCLI(t, "export", examples+"boom-geometry.toml", "-o", d, "-segments", "24", "-collar-mm", "4")
		require.Equal(t, 0, code, errOut)
	}
	js, err := os.ReadFile(filepath.Join(a, "export.json"))
	require.NoError(t, err)
	var out exportOutput
	require.NoError(t, json.Unmarshal(js, &out))
	require.NotEmpty(t, out.Parts)
	for _, p := range out.Parts {
		x, err := os.ReadFile(filepath.Join(a, p.File))
		require.NoError(t, err)
		y, err := os.ReadFile(filepath.Join(b, p.File))
		require.NoError(t, err)
		assert.Equal(t, x, y, "deterministic bytes")
		require.Len(t, x, 84+50*p.Triangles)
		assert.Equal(t, uint32(p.Triangles), binary.LittleEndian.Uint32(x[80:84]))
		assert.InDelta(t, float64(p.Convolutions)*p.PitchMM+2*4, p.BoxMaxMM[2]-p.BoxMinMM[2], 1e-6)
		assert.InDelta(t, 0, p.BoxMinMM[2], 1e-9)
		assert.Greater(t, p.VolumeMM3, 0.0)
	}
}

// TestExportRefusesBadInput: status 2, one line, nothing written.
func TestExportRefusesBadInput(t *testing.T) {
	dir := t.TempDir()
	full := filepath.Join(dir, "full")
	require.NoError(t, os.MkdirAll(full, 0o755))
	require.NoError(t, os.WriteFile(filepath.Join(full, "x"), []byte("x"), 0o644))
	for name, args := range map[string][]string{
		"non-empty -o": {"export", examples + "boom-geometry.toml", "-o", full},
		"segments":     {"export", examples + "boom-geometry.toml", "-o", filepath.Join(dir, "s"), "-segments", "100000"},
		"collar":       {"export", examples + "boom-geometry.toml", "-o", filepath.Join(dir, "c"), "-collar-mm", "-1"},
		"no -o":        {"export", examples + "boom-geometry.toml"},
		"missing file": {"export", filepath.Join(dir, "none.toml"), "-o", filepath.Join(dir, "m")},
	} {
		code, _, errOut := runCLI(t, args...)
		assert.Equal(t, 2, code, name)
		assert.Equal(t, 1, bytes.Count([]byte(errOut), []byte("\n")), "%s: one line, got %q", name, errOut)
	}
	ents, err := os.ReadDir(dir)
	require.NoError(t, err)
	assert.Len(t, ents, 1, "only the pre-made folder remains")
}
