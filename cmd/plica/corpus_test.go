package main

import (
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// TestBadInputCorpus runs every malformed design, problem and bench file of
// the corpus through the command line: exit status 2, the expected messages
// (the goldens next to each file, one line per problem, each naming file,
// line, column and key) on standard error, nothing on standard output, and
// no file created.
func TestBadInputCorpus(t *testing.T) {
	root := "../../problems/"
	n := 0
	for _, c := range []struct {
		dir, pattern string
		args         func(file, out string) []string
	}{
		{"testdata/design-errors", "*.toml", func(f, out string) []string { return []string{"check", f} }},
		{"testdata/design-errors", "*.toml", func(f, out string) []string { return []string{"pose", f, "-angles-deg", "0,0"} }},
		{"testdata/problem-errors", "*.toml", func(f, out string) []string { return []string{"search", f, "-o", out, "-quiet"} }},
		{"testdata/bench", "bad-*.csv", func(f, out string) []string {
			return []string{"calibrate", f, "-design", "../../problems/examples/boom-geometry.toml", "-o", out, "-plot", out + ".svg"}
		}},
	} {
		files, err := filepath.Glob(filepath.Join(root, c.dir, c.pattern))
		require.NoError(t, err)
		for _, f := range files {
			rel := strings.TrimPrefix(f, root)
			out := filepath.Join(t.TempDir(), "run")
			args := c.args(f, out)
			t.Run(args[0]+"/"+filepath.Base(f), func(t *testing.T) {
				n++
				code, stdout, stderr := runCLI(t, args...)
				assert.Equal(t, 2, code, "exit status for %s", rel)
				assert.Empty(t, stdout, "nothing on standard output for %s", rel)
				golden, err := os.ReadFile(strings.TrimSuffix(f, filepath.Ext(f)) + ".golden")
				require.NoError(t, err)
				var want []string
				for _, line := range strings.Split(strings.TrimSpace(string(golden)), "\n") {
					want = append(want, "plica: "+line)
				}
				// goldens name paths relative to the problems package
				got := strings.ReplaceAll(stderr, root, "")
				assert.Equal(t, strings.Join(want, "\n")+"\n", got, "messages for %s", rel)
				assert.NoFileExists(t, out, "nothing written for %s", rel)
				assert.NoDirExists(t, out, "no run folder for %s", rel)
				assert.NoFileExists(t, out+".svg", "no plot for %s", rel)
			})
		}
	}
	assert.GreaterOrEqual(t, n, 30, "at least 30 malformed inputs")
}
