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
	cases, err := Run(context.Background(), Options{Quick: testing.Short()})
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
	quick, err := Run(context.Background(), Options{Quick: true})
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
	// an asymmetric band, −5 % … +10 % of 1
	band := Case{Published: 1, Tolerance: 0.10, Below: 0.05, Relative: true}
	for v, want := range map[float64]bool{0.94: false, 0.96: true, 1.09: true, 1.11: false} {
		band.Computed = v
		assert.Equal(t, want, band.Pass(), "%g in −5 %% … +10 %%", v)
		assert.Equal(t, !want, band.Failed())
	}
	assert.Equal(t, "−0.05/+0.1 rel", band.Row()[4])
	// a skipped case neither passes nor fails
	skip := Case{Computed: 1, Published: 1, Tolerance: 1, Skipped: NoCCX}
	assert.False(t, skip.Pass())
	assert.False(t, skip.Failed())
	assert.Equal(t, "SKIP", skip.Row()[6])
	assert.Equal(t, "skipped: ccx not found (Debian package calculix-ccx)", skip.Row()[2])
}

// TestRunFE: FE cases are skipped with the reason given (ccx absent) and
// otherwise run with the context, after the model packages' cases; -quick
// does not leave them out.
func TestRunFE(t *testing.T) {
	ran := 0
	all := []entry{
		{caseDef: caseDef{Area: "surrogate", Name: "model", Published: 2, Tolerance: 0.1, Compute: func() (float64, error) { return 2, nil }}},
		{caseDef: caseDef{Area: "fe", Name: "fe", Published: 1, Tolerance: 0.1, Relative: true}, below: 0.05, fe: true,
			ctxed: func(ctx context.Context) (float64, error) { ran++; return 0.97, ctx.Err() }},
	}
	cases, err := run(context.Background(), all, true, NoCCX)
	require.NoError(t, err)
	require.Len(t, cases, 2)
	assert.True(t, cases[0].Pass())
	assert.Equal(t, NoCCX, cases[1].Skipped)
	assert.Zero(t, ran, "a skipped case does not run")

	cases, err = run(context.Background(), all, true, "")
	require.NoError(t, err)
	require.Len(t, cases, 2)
	assert.Equal(t, 1, ran)
	assert.Empty(t, cases[1].Skipped)
	assert.True(t, cases[1].Pass(), "0.97 is inside −5 %% … +10 %%")
	assert.Equal(t, 0.05, cases[1].Below)

	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	_, err = run(ctx, all[1:], false, "")
	assert.ErrorIs(t, err, context.Canceled)
}

// TestRunOptions: the FE cases come only with Options.FE, and then all of
// them, either run or skipped (without running ccx here: PATH is emptied).
func TestRunOptions(t *testing.T) {
	t.Setenv("PATH", "")
	plain, err := Run(context.Background(), Options{Quick: true})
	require.NoError(t, err)
	withFE, err := Run(context.Background(), Options{Quick: true, FE: true})
	require.NoError(t, err)
	require.Len(t, withFE, len(plain)+len(feDefs()))
	for _, c := range plain {
		assert.NotEqual(t, "fe", c.Area)
	}
	for _, c := range withFE[len(plain):] {
		assert.Equal(t, "fe", c.Area)
		assert.Equal(t, NoCCX, c.Skipped, c.Name)
	}
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
	all := defs()
	for _, e := range feDefs() {
		all = append(all, e.caseDef)
	}
	for _, d := range all {
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
	var all []entry
	for i := range 5 {
		all = append(all, entry{caseDef: caseDef{Area: "search", Name: fmt.Sprint("case ", i), Compute: func() (float64, error) {
			started++
			if i == 1 {
				cancel()
				<-block // a slow case: Run must not wait for it
			}
			return 1, nil
		}}})
	}
	cases, err := run(ctx, all, false, "")
	assert.ErrorIs(t, err, context.Canceled)
	assert.Empty(t, cases)
	assert.Equal(t, 2, started, "the cases after the interrupt never start")
}
