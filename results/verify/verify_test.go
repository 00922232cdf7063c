package verify

import (
	"context"
	"fmt"
	"go/scanner"
	"go/token"
	"io/fs"
	"maps"
	"math"
	"os"
	"path/filepath"
	"regexp"
	"slices"
	"strconv"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// TestVerificationCases runs the same built-in cases that plica verify
// prints; each carries its published value and source.
func TestVerificationCases(t *testing.T) {
	cases, err := Run(context.Background(), testing.Short())
	require.NoError(t, err)
	assert.GreaterOrEqual(t, len(cases), 15)
	for _, c := range cases {
		assert.NoError(t, c.Err, "%s: %s", c.Area, c.Name)
		assert.True(t, c.Pass(), "%s: %s: computed %.12g, published %.12g, tolerance %g (relative %v), source %s",
			c.Area, c.Name, c.Computed, c.Published, c.Tolerance, c.Relative, c.Source)
		assert.NotEmpty(t, c.Source, "%s has a source", c.Name)
	}
}

// TestCaseList checks the gathered list: every area is one plica verify
// knows (so the listing order is defined), names are unique, and -quick
// leaves out exactly the slow cases.
func TestCaseList(t *testing.T) {
	names := map[string]bool{}
	slow := 0
	for _, d := range defs() {
		assert.Contains(t, areas, d.Area, "%s: area", d.Name)
		assert.False(t, names[d.Name], "%s: name used twice", d.Name)
		names[d.Name] = true
		assert.NotNil(t, d.Compute, "%s: Compute", d.Name)
		if d.Slow {
			slow++
		}
	}
	assert.Positive(t, slow, "the NSGA-II run is slow")
	quick, err := Run(context.Background(), true)
	require.NoError(t, err)
	assert.Len(t, quick, len(defs())-slow, "-quick leaves out the slow cases")
}

// Pass against hand-made outcomes: relative and absolute tolerances, errors and NaN.
func TestPass(t *testing.T) {
	assert.True(t, Case{Computed: 1.0001, Published: 1, Tolerance: 1e-3, Relative: true}.Pass())
	assert.False(t, Case{Computed: 100.2, Published: 100, Tolerance: 1e-3, Relative: true}.Pass())
	assert.True(t, Case{Computed: 100.2, Published: 100, Tolerance: 0.5}.Pass())
	assert.False(t, Case{Computed: math.NaN(), Published: 0, Tolerance: 1}.Pass())
	assert.False(t, Case{Computed: 0, Published: 0, Tolerance: 1, Err: os.ErrNotExist}.Pass())
}

// numberRe finds decimal numbers in comment text.
var numberRe = regexp.MustCompile(`[0-9][0-9_]*(?:\.[0-9_]*)?(?:[eE][-+]?[0-9]+)?`)

// TestPublishedValuesWrittenOnce fails when a published value of a verification case is written
// in more than one Go file of the module: each lives in its package's verification.go, and unit
// tests that check it further refer to the case instead of repeating the number. It reads every
// numeric literal and every number in a comment, and compares it with the published values that
// have at least three significant digits (smaller ones such as 0, 1, 6 or 0.1 are too common to
// tell apart). Example outputs (the comment lines after "// Output:") are exempt: they show what an
// example prints. A number spelt differently (grouped with spaces, converted to other units) is
// not found.
func TestPublishedValuesWrittenOnce(t *testing.T) {
	root, err := filepath.Abs(filepath.Join("..", ".."))
	require.NoError(t, err)
	_, err = os.Stat(filepath.Join(root, "go.mod"))
	require.NoError(t, err, "module root two levels above results/verify")

	published := map[float64][]string{}
	for _, d := range defs() {
		digits := strings.TrimLeft(strings.Split(strconv.FormatFloat(math.Abs(d.Published), 'e', -1, 64), "e")[0], "0")
		if len(strings.ReplaceAll(digits, ".", "")) >= 3 {
			published[d.Published] = append(published[d.Published], d.Name)
		}
	}
	require.NotEmpty(t, published)

	files := map[float64]map[string]bool{}
	note := func(v float64, file string) {
		if _, ok := published[v]; ok {
			if files[v] == nil {
				files[v] = map[string]bool{}
			}
			files[v][file] = true
		}
	}
	parse := func(s string) (float64, bool) {
		v, err := strconv.ParseFloat(strings.ReplaceAll(s, "_", ""), 64)
		return v, err == nil
	}
	err = filepath.WalkDir(root, func(p string, d fs.DirEntry, err error) error {
		if err != nil {
			return err
		}
		if d.IsDir() {
			if p != root && (strings.HasPrefix(d.Name(), ".") || d.Name() == "testdata") {
				return filepath.SkipDir
			}
			return nil
		}
		if !strings.HasSuffix(p, ".go") {
			return nil
		}
		src, err := os.ReadFile(p)
		if err != nil {
			return err
		}
		rel, _ := filepath.Rel(root, p)
		fset := token.NewFileSet()
		var s scanner.Scanner
		s.Init(fset.AddFile(p, -1, len(src)), src, nil, scanner.ScanComments)
		inOutput := false
		for {
			_, tok, lit := s.Scan()
			if tok == token.EOF {
				break
			}
			switch tok {
			case token.FLOAT, token.INT:
				inOutput = false
				if v, ok := parse(lit); ok {
					note(v, rel)
				}
			case token.COMMENT:
				text := strings.TrimSpace(strings.TrimPrefix(lit, "//"))
				if text == "Output:" || text == "Unordered output:" || strings.HasPrefix(text, "Output: ") {
					inOutput = true
					continue
				}
				if inOutput {
					continue
				}
				for _, m := range numberRe.FindAllString(lit, -1) {
					if v, ok := parse(m); ok {
						note(v, rel)
					}
				}
			case token.SEMICOLON:
			default:
				inOutput = false
			}
		}
		return nil
	})
	require.NoError(t, err)

	for v, names := range published {
		where := slices.Sorted(maps.Keys(files[v]))
		assert.LessOrEqual(t, len(where), 1, "published value %v of %q is written in %d files: %v; refer to the case instead",
			v, names, len(where), where)
	}
}

// TestRunInterrupted cancels the context inside the second of five cases:
// Run returns context.Canceled and no cases, and the cases after it never
// start (counted, not timed).
func TestRunInterrupted(t *testing.T) {
	ctx, cancel := context.WithCancel(context.Background())
	defer cancel()
	started := 0
	block := make(chan struct{})
	defer close(block)
	var all []caseDef
	for i := range 5 {
		all = append(all, caseDef{Area: "search", Name: fmt.Sprint("case ", i), Compute: func() (float64, error) {
			started++
			if i == 1 {
				cancel()
				<-block // a slow case: Run must not wait for it
			}
			return 1, nil
		}})
	}
	cases, err := run(ctx, all, false)
	assert.ErrorIs(t, err, context.Canceled)
	assert.Empty(t, cases)
	assert.Equal(t, 2, started, "the cases after the interrupt never start")
}
