package problems

import (
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// TestWithinValidatedRangeKey: the shipped search gives every bellows a
// validated_range check slot; [requirements] within_validated_range =
// false removes the slots (so a search may leave the range) and the
// evaluation's model lines say the range is not enforced.
func TestWithinValidatedRangeKey(t *testing.T) {
	on, err := LoadProblem("examples/boom-search.toml")
	require.NoError(t, err)
	assert.Contains(t, on.Checks, "validated_range[1]")
	assert.Contains(t, on.Checks, "validated_range[2]")

	data, err := os.ReadFile("examples/boom-search.toml")
	require.NoError(t, err)
	src := strings.Replace(string(data), "[requirements]\n", "[requirements]\nwithin_validated_range = false\n", 1)
	path := filepath.Join(t.TempDir(), "off.toml")
	require.NoError(t, os.WriteFile(path, []byte(src), 0o644))
	off, err := LoadProblem(path)
	require.NoError(t, err)
	assert.NotContains(t, off.Checks, "validated_range[1]")
	assert.Equal(t, len(on.Checks)-2, len(off.Checks))

	x := make([]float64, len(off.Variables))
	for i, v := range off.Variables {
		x[i] = (v.Lower + v.Upper) / 2
	}
	res, err := off.Evaluate(x)
	require.NoError(t, err)
	found := false
	for _, m := range res.Models {
		found = found || strings.Contains(m, "not enforced")
	}
	assert.True(t, found, "model lines %q say the range is not enforced", res.Models)
}
