package main

import (
	"os/exec"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// TestLayering enforces the import table of DEVELOPERS.md: imports point
// down only, and search knows nothing of bellows.
func TestLayering(t *testing.T) {
	allowed := map[string][]string{
		"plica/surrogate/shell":            {},
		"plica/surrogate/convolution":      {"plica/surrogate/shell", "plica/surrogate/solid"},
		"plica/surrogate/internal/hoopgen": {"plica/surrogate/convolution", "plica/surrogate/shell", "plica/surrogate/solid"},
		"plica/surrogate/internal/wallgen": {"plica/surrogate/convolution", "plica/surrogate/shell", "plica/surrogate/solid"},
		"plica/surrogate":                  {"plica/surrogate/convolution", "plica/surrogate/shell", "plica/surrogate/solid"},
		"plica/objective/kinematics":       {},
		"plica/objective":                  {"plica/surrogate", "plica/surrogate/convolution", "plica/surrogate/shell", "plica/objective/kinematics", "plica/surrogate/solid"},
		"plica/search":                     {},
		"plica/problems":                   {"plica/objective", "plica/surrogate", "plica/surrogate/convolution", "plica/surrogate/shell", "plica/objective/kinematics", "plica/search", "plica/surrogate/solid"},
		"plica/results":                    {"plica/search", "plica/problems", "plica/objective", "plica/surrogate", "plica/surrogate/convolution", "plica/surrogate/shell", "plica/objective/kinematics", "plica/surrogate/solid"},
		"plica/surrogate/solid":            {},
		"plica/surrogate/fecheck":          {"plica/surrogate", "plica/surrogate/convolution", "plica/surrogate/shell", "plica/surrogate/solid"},
	}
	for pkg, ok := range allowed {
		out, err := exec.Command("go", "list", "-deps", pkg).Output()
		if err != nil {
			// a package that does not exist yet has no imports to check
			continue
		}
		for _, dep := range strings.Fields(string(out)) {
			if !strings.HasPrefix(dep, "plica/") || dep == pkg {
				continue
			}
			assert.Contains(t, ok, dep, "%s must not import %s (see DEVELOPERS.md, layout)", pkg, dep)
		}
	}
	out, err := exec.Command("go", "list", "-deps", "plica/search").Output()
	require.NoError(t, err)
	assert.NotContains(t, string(out), "github.com/BurntSushi/toml", "search knows nothing of files")
}
