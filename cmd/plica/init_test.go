package main

import (
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"plica/problems"
)

// TestInitWritesStarterThatSearches: plica init writes the commented
// starter problem, and plica search runs on it unchanged.
func TestInitWritesStarterThatSearches(t *testing.T) {
	dir := t.TempDir()
	file := filepath.Join(dir, "p.toml")
	code, stdout, stderr := runCLI(t, "init", file)
	require.Equal(t, 0, code, stderr)
	assert.Contains(t, stdout, "wrote "+file)
	got, err := os.ReadFile(file)
	require.NoError(t, err)
	assert.Equal(t, string(problems.Starter()), string(got))
	demo, err := os.ReadFile("../../problems/examples/boom-search.toml")
	require.NoError(t, err)
	assert.NotEqual(t, string(demo), string(got), "the starter is not the demo problem")

	out := filepath.Join(dir, "run")
	code, _, stderr = runCLI(t, "search", file, "-o", out, "-evals", "80", "-workers", "2", "-quiet")
	require.Equal(t, 0, code, stderr)
	assert.FileExists(t, filepath.Join(out, "front.csv"))

	code, _, stderr = runCLI(t, "init", file)
	assert.Equal(t, 2, code, "an existing file is never overwritten")
	assert.Contains(t, stderr, "exists")
}

// TestInitEmptyName: init "" is a usage error (exit 2) that writes nothing.
func TestInitEmptyName(t *testing.T) {
	dir := t.TempDir()
	wd, err := os.Getwd()
	require.NoError(t, err)
	require.NoError(t, os.Chdir(dir))
	defer os.Chdir(wd)
	for _, name := range []string{"", " "} {
		code, stdout, stderr := runCLI(t, "init", name)
		assert.Equal(t, 2, code)
		assert.Empty(t, stdout)
		assert.Equal(t, "plica: init: argument 1 is an empty name (expected a path)", strings.TrimSpace(stderr))
	}
	entries, err := os.ReadDir(dir)
	require.NoError(t, err)
	assert.Empty(t, entries, "nothing written")
}
