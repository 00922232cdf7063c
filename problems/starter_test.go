package problems

import (
	"regexp"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// TestStarterParses: the starter problem of plica init is a valid problem
// with design variables, two objectives and a budget that ends.
func TestStarterParses(t *testing.T) {
	s, err := ParseProblem(Starter(), "plica-problem.toml")
	require.NoError(t, err)
	assert.NotEmpty(t, s.Variables)
	assert.Len(t, s.Objectives, 2)
	assert.NotZero(t, s.Search.Evaluations)
	assert.NotZero(t, s.Search.Time)
}

// TestStarterExplainsEveryTable: every table a problem file can hold is in
// the starter, as a header or a commented-out example, and a comment block
// right above it explains it; every header in use has such a block too.
func TestStarterExplainsEveryTable(t *testing.T) {
	lines := strings.Split(string(Starter()), "\n")
	header := regexp.MustCompile(`^(# )?\[\[?([a-z_]+)\]\]?\s*(#.*)?$`)
	explained, seen := map[string]bool{}, map[string]bool{}
	for i, line := range lines {
		m := header.FindStringSubmatch(line)
		if m == nil {
			continue
		}
		name := m[2]
		if seen[name] {
			continue // a repeated [[table]]: explained at its first
		}
		seen[name] = true
		var block []string // the comment block right above the header
		for j := i - 1; j >= 0 && strings.HasPrefix(lines[j], "#"); j-- {
			block = append(block, lines[j])
		}
		require.NotEmpty(t, block, "line %d: [%s] has no comment right above it", i+1, name)
		if strings.Contains(strings.Join(block, "\n"), name) {
			explained[name] = true
		}
	}
	tables := []string{"material", "bellows", "load", "printer", "workspace", "task_point", "requirements", "objective", "constraint", "search"}
	for _, name := range tables {
		assert.True(t, explained[name], "the starter explains [%s] in a comment above it", name)
	}
	// The top-level keys are explained too.
	assert.Regexp(t, `(?m)^# Top level:.*\n(#.*\n)*name = `, string(Starter()))
	// Every table the reader knows is in the list above.
	for _, k := range append(append([]string{}, topKeys...), problemOnlyKeys...) {
		if k == "name" || k == "fidelity" {
			continue
		}
		assert.Contains(t, tables, k, "table %s of the file format is covered by this test", k)
	}
}
