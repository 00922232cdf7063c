package problems

import (
	"reflect"
	"slices"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
)

// tomlKeys lists the toml tags of a form struct's fields.
func tomlKeys(form any) []string {
	t := reflect.TypeOf(form)
	var keys []string
	for i := range t.NumField() {
		tag, _, _ := strings.Cut(t.Field(i).Tag.Get("toml"), ",")
		if tag != "" && tag != "-" {
			keys = append(keys, tag)
		}
	}
	return keys
}

// TestFormMatchesReaders ties the two schemas of the files together: the
// key lists the readers accept (unknown keys are refused against them) and
// the typed form that Portable, Hash and the written designs are made
// from. A key accepted by a reader but missing from the form would drop
// silently out of the saved problem.toml and the hash; a form key no reader
// accepts could never be read back.
func TestFormMatchesReaders(t *testing.T) {
	union := func(lists ...[]string) []string {
		var out []string
		for _, l := range lists {
			for _, k := range l {
				if !slices.Contains(out, k) {
					out = append(out, k)
				}
			}
		}
		return out
	}
	for _, c := range []struct {
		table  string
		form   any
		reader []string
	}{
		{"design file (top level)", designForm{}, union(topKeys, scatterTopKeys)},
		{"problem file (top level)", problemForm{}, union(topKeys, scatterTopKeys, problemOnlyKeys)},
		{"[[bellows]]", bellowsForm{}, union(commonBellowsKeys, geometryKeys, measuredKeys)},
		{"[[material]]", materialForm{}, materialKeys},
		{"[load]", loadForm{}, loadKeys},
		{"[printer]", printerForm{}, printerKeys},
		{"[workspace]", workspaceForm{}, workspaceKeys},
		{"[[task_point]]", taskForm{}, taskKeys},
		{"[requirements]", requirementsForm{}, requirementKeys},
		{"[[objective]]", objectiveForm{}, objectiveKeys},
		{"[[constraint]]", constraintForm{}, constraintKeys},
		{"[search]", searchForm{}, searchKeys},
		{"[scatter]", scatterForm{}, scatterKeys},
	} {
		form := tomlKeys(c.form)
		for _, k := range c.reader {
			assert.Contains(t, form, k, "%s: key %s is read but not in the form (it would drop out of problem.toml and the hash)", c.table, k)
		}
		for _, k := range form {
			assert.Contains(t, c.reader, k, "%s: form key %s is not accepted by the reader", c.table, k)
		}
		assert.Len(t, form, len(c.reader), "%s: one form field per key", c.table)
	}
}
