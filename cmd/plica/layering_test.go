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
		"plica/surrogate/shell":             {},
		"plica/surrogate/convolution":       {"plica/surrogate/shell", "plica/surrogate/solid"},
		"plica/surrogate/internal/hoopgen":  {"plica/surrogate/convolution", "plica/surrogate/shell", "plica/surrogate/solid", "plica/surrogate/internal/gotable"},
		"plica/surrogate/internal/wallgen":  {"plica/surrogate/convolution", "plica/surrogate/shell", "plica/surrogate/solid", "plica/surrogate/internal/gotable"},
		"plica/surrogate/internal/gotable":  {},
		"plica/surrogate/internal/spinegen": {"plica/surrogate", "plica/surrogate/fecheck", "plica/surrogate/internal/gotable", "plica/surrogate/convolution", "plica/surrogate/shell", "plica/surrogate/solid"},
		"plica/surrogate":                   {"plica/surrogate/convolution", "plica/surrogate/shell", "plica/surrogate/solid"},
		"plica/surrogate/solid":             {},
		"plica/surrogate/fecheck":           {"plica/surrogate", "plica/surrogate/convolution", "plica/surrogate/shell", "plica/surrogate/solid"},
		"plica/objective/kinematics":        {},
		"plica/objective/statics":           {"plica/objective/kinematics"},
		"plica/objective":                   {"plica/surrogate", "plica/surrogate/convolution", "plica/surrogate/shell", "plica/surrogate/solid", "plica/objective/kinematics", "plica/objective/statics"},
		"plica/search/front":                {},
		"plica/search":                      {"plica/search/front"},
		"plica/problems":                    {"plica/objective", "plica/surrogate", "plica/surrogate/convolution", "plica/surrogate/shell", "plica/surrogate/solid", "plica/objective/kinematics", "plica/objective/statics", "plica/search", "plica/search/front"},
		"plica/results":                     {"plica/search", "plica/search/front", "plica/problems", "plica/objective", "plica/surrogate", "plica/surrogate/convolution", "plica/surrogate/shell", "plica/surrogate/solid", "plica/objective/kinematics", "plica/objective/statics"},
		"plica/results/report":              {"plica/results", "plica/search", "plica/search/front", "plica/problems", "plica/objective", "plica/surrogate", "plica/surrogate/convolution", "plica/surrogate/shell", "plica/surrogate/solid", "plica/objective/kinematics", "plica/objective/statics"},
		"plica/results/export":              {"plica/surrogate", "plica/surrogate/convolution", "plica/surrogate/shell", "plica/surrogate/solid"},
		"plica/results/verify":              {"plica/search", "plica/search/front", "plica/surrogate", "plica/surrogate/fecheck", "plica/surrogate/convolution", "plica/surrogate/shell", "plica/surrogate/solid", "plica/objective/kinematics", "plica/objective/statics"},
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
	for _, pkg := range []string{"plica/search", "plica/search/front"} {
		out, err := exec.Command("go", "list", "-deps", pkg).Output()
		require.NoError(t, err)
		assert.NotContains(t, string(out), "github.com/BurntSushi/toml", "%s knows nothing of files", pkg)
	}
}
