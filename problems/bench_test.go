package problems

import (
	"bytes"
	"encoding/csv"
	"errors"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"plica/surrogate"
)

// TestBenchErrorsGolden checks the exact messages for every malformed bench
// file in testdata/bench/bad-*.csv: one line per problem, each naming file,
// line, column (field index) and column name. Rewrite with -update.
func TestBenchErrorsGolden(t *testing.T) {
	goldenErrors(t, "testdata/bench/bad-*.csv", func(f string) error { _, err := LoadBench(f); return err })
}

// TestBenchErrorPositions checks four error kinds field by
// field: the line is the CSV row's line, the column the 1-based field
// index, the key the column name.
func TestBenchErrorPositions(t *testing.T) {
	cases := []struct {
		name, csv string
		line, col int
		key, msg  string
	}{
		{"missing column", "load_n,deflection_mm,direction\n0.1,1,x\n", 1, 1, "free_length_mm", "missing column"},
		{"misspelt column", "load_n,deflection,free_length_mm,direction\n0.1,1,100,x\n", 1, 1, "deflection_mm", `did you mean "deflection_mm"?`},
		{"non-numeric cell", "# c\nload_n,deflection_mm,free_length_mm,direction\n0.1,1,100,x\n0.2,1.5,abc,x\n", 4, 3, "free_length_mm", `"abc" is not a number`},
		{"negative load", "load_n,deflection_mm,free_length_mm,direction\n\n-0.1,1,100,x\n", 3, 1, "load_n", "-0.1 is negative"},
		{"unknown direction", "direction,load_n,deflection_mm,free_length_mm\nz,0.1,1,100\n", 2, 1, "direction", `"z" is not a direction (expected x or y`},
		{"multi-line quoted cell", "load_n,specimen,deflection_mm,free_length_mm,direction\n0.1,\"two\nlines\",1,100,w\n", 3, 5, "direction", `"w" is not a direction`},
		{"infinite value", "load_n,deflection_mm,free_length_mm,direction\n0.1,Inf,100,x\n", 2, 2, "deflection_mm", `"Inf" is not a finite number`},
		{"beyond float range", "load_n,deflection_mm,free_length_mm,direction\n0.1,1e400,100,x\n", 2, 2, "deflection_mm", `"1e400" is out of the finite range (expected a tip deflection in mm)`},
		{"short row, optional column", "load_n,deflection_mm,free_length_mm,direction,specimen\n0.1,1,100,x,A\n0.2,1,100,x\n", 3, 5, "specimen", "missing cell: the row has 4 fields, the header 5"},
		{"short row, unknown column", "load_n,deflection_mm,free_length_mm,direction,note\n0.2,1,100,x\n", 2, 5, "note", "missing cell: the row has 4 fields, the header 5"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			_, err := ParseBench([]byte(c.csv), "b.csv")
			var e *Error
			require.True(t, errors.As(err, &e), "%s: want *Error, got %v", c.name, err)
			assert.Equal(t, "b.csv", e.File, c.name)
			assert.Equal(t, c.line, e.Line, "%s: line", c.name)
			assert.Equal(t, c.col, e.Col, "%s: column", c.name)
			assert.Equal(t, c.key, e.Key, "%s: key", c.name)
			assert.Contains(t, e.Msg, c.msg, c.name)
			assert.NotContains(t, e.Error(), "\n", "%s: one line", c.name)
		})
	}
}

func TestBenchErrorsCollected(t *testing.T) {
	_, err := LoadBench("testdata/bench/bad-many.csv")
	var es Errors
	require.True(t, errors.As(err, &es), "bad-many.csv gives an Errors list, got %T", err)
	assert.Len(t, es, 5, "every problem reported at once")
	for i := 1; i < len(es); i++ {
		assert.LessOrEqual(t, es[i-1].Line, es[i].Line, "errors in line order")
	}
}

// TestBenchUnits checks the conversion to SI: grams-force with standard
// gravity 9.80665 m/s² (3rd CGPM, 1901) and mm to m; and the tolerant
// header (byte-order mark, semicolons, case, spaces, extra columns, an
// all-empty row).
func TestBenchUnits(t *testing.T) {
	b, err := LoadBench("testdata/bench/semicolon.csv")
	require.NoError(t, err)
	require.Len(t, b.Rows, 6, "the all-empty row is skipped")
	assert.Equal(t, "load_g", b.LoadColumn)
	r := b.Rows[0]
	assert.InEpsilon(t, 0.100*9.80665, r.Load, 1e-15, "100 g-force in N")
	assert.InEpsilon(t, 1.0e-3, r.Deflection, 1e-15, "1.0 mm in m")
	assert.InEpsilon(t, 0.120, r.FreeLength, 1e-15, "120 mm in m")
	assert.Equal(t, 0, r.Axis, "x")
	assert.Equal(t, "A", r.Specimen)
	assert.Equal(t, 2, r.Line, "the BOM does not shift lines")
	assert.Equal(t, 0, b.Rows[2].Axis, "upper-case X is x")
	assert.Equal(t, 1, b.Rows[3].Axis, "y")
	assert.Equal(t, []int{0, 1}, b.Axes())
}

// TestBenchFitVector98 runs the cantilever-fit vector of surrogate/REFERENCE.md §5.4 (derived from
// surrogate/REFERENCE.md §4.2) through the file reader and the fit: the same EI as package surrogate's calibration
// verification case, which fits the vector written in code and holds the published value, with
// 95 % interval [40 387, 41 807] N·mm².
func TestBenchFitVector98(t *testing.T) {
	b, err := LoadBench("testdata/bench/vector98.csv")
	require.NoError(t, err)
	f, err := b.Fit(0, TermAuto, TermAuto)
	require.NoError(t, err)
	assert.Equal(t, "through origin", f.Model(), "zeroed gauge, one length")
	var fromCode []float64
	for _, c := range surrogate.VerificationCases() {
		if c.Area == "calibration" {
			ei, err := c.Compute()
			require.NoError(t, err, c.Name)
			fromCode = append(fromCode, ei)
		}
	}
	require.Len(t, fromCode, 1, "one calibration case in surrogate.VerificationCases")
	assert.InEpsilon(t, fromCode[0], f.Fit.EI*1e6, 1e-12, "EI, N·mm², read from the file and from the code")
	assert.InEpsilon(t, 40387, f.Fit.CI[0]*1e6, 1e-4, "interval low (surrogate/REFERENCE.md §5.4)")
	assert.InEpsilon(t, 41807, f.Fit.CI[1]*1e6, 1e-4, "interval high (surrogate/REFERENCE.md §5.4)")
	assert.Equal(t, []string{"100 mm"}, f.Setups)
	assert.Empty(t, f.Warnings)

	_, err = b.Fit(1, TermAuto, TermAuto)
	var e *Error
	require.True(t, errors.As(err, &e), "no y rows: *Error, got %v", err)
	assert.Contains(t, e.Msg, "no rows for direction y")
	assert.Equal(t, "direction", e.Key)
}

// TestBenchFitAuto checks the automatic model choice: an intercept when a
// zero-load row reads a deflection, the clamp term with two or more free
// lengths; the noiseless two-length file (derived from δ = PL³/(3EI) +
// PL²/k_θ, Roark Table 8.1 case 1a plus a rigid clamp rotation) gives back
// EI = 50 000 N·mm² and k_θ = 30 000 N·mm/rad.
func TestBenchFitAuto(t *testing.T) {
	b, err := LoadBench("testdata/bench/offset.csv")
	require.NoError(t, err)
	f, err := b.Fit(0, TermAuto, TermAuto)
	require.NoError(t, err)
	assert.Equal(t, "intercept", f.Model(), "zero-load row reads 0.35 mm")
	require.Len(t, f.Fit.Offsets, 1)
	assert.InDelta(t, 0.35e-3, f.Fit.Offsets[0], 0.03e-3, "offset near the zero-load reading")
	assert.Equal(t, []string{"A, 100 mm"}, f.Setups)
	g, err := b.Fit(0, TermOff, TermAuto)
	require.NoError(t, err)
	assert.Equal(t, "through origin", g.Model(), "intercept forced off")
	assert.Greater(t, g.Fit.S, f.Fit.S, "the offset shows up as misfit without an intercept")

	b, err = LoadBench("testdata/bench/two-lengths.csv")
	require.NoError(t, err)
	f, err = b.Fit(1, TermAuto, TermAuto)
	require.NoError(t, err)
	assert.Equal(t, "clamp compliance", f.Model(), "three free lengths")
	assert.InEpsilon(t, 50000, f.Fit.EI*1e6, 1e-9, "EI, N·mm²")
	assert.InEpsilon(t, 1.0/30000, f.Fit.ClampCompliance*1e-3, 1e-9, "1/k_θ, rad/(N·mm)")
	g, err = b.Fit(1, TermAuto, TermOff)
	require.NoError(t, err)
	assert.Less(t, g.Fit.EI, f.Fit.EI, "ignoring the clamp rotation reads EI low")
}

func TestBenchFitErrorLine(t *testing.T) {
	b, err := ParseBench([]byte("load_n,deflection_mm,free_length_mm,direction\n0.1,1,100,y\n0.2,2,100,x\n"), "b.csv")
	require.NoError(t, err)
	_, err = b.Fit(0, TermAuto, TermAuto)
	var e *Error
	require.True(t, errors.As(err, &e), "one x row cannot be fitted: %v", err)
	assert.Equal(t, 3, e.Line, "names the line of the direction's first row")
	assert.Equal(t, 4, e.Col, "the direction column")
	assert.Contains(t, e.Msg, "direction x, through origin fit")
	assert.Contains(t, e.Msg, "expected at least 2 points")
}

func TestBenchLargeDeflectionWarning(t *testing.T) {
	b, err := ParseBench([]byte("load_n,deflection_mm,free_length_mm,direction\n1,5,100,x\n2,10,100,x\n3,16,100,x\n"), "b.csv")
	require.NoError(t, err)
	f, err := b.Fit(0, TermAuto, TermAuto)
	require.NoError(t, err)
	require.Len(t, f.Warnings, 1, "δ/L = 0.16 > 0.1 (surrogate/REFERENCE.md §4.1)")
	assert.True(t, strings.HasPrefix(f.Warnings[0], "b.csv:4: "), "warning names file and line: %s", f.Warnings[0])
}

// FuzzBenchCSV: the reader never panics; errors are *Error lines with a
// line inside the input; accepted files hold finite SI rows that survive a
// write → read round trip.
func FuzzBenchCSV(f *testing.F) {
	files, _ := filepath.Glob("testdata/bench/*.csv")
	for _, p := range files {
		data, err := os.ReadFile(p)
		if err == nil {
			f.Add(data)
		}
	}
	examples, _ := filepath.Glob("examples/*.csv")
	for _, p := range examples {
		if data, err := os.ReadFile(p); err == nil {
			f.Add(data)
		}
	}
	f.Fuzz(func(t *testing.T, data []byte) {
		b, err := ParseBench(data, "f.csv")
		lines := bytes.Count(data, []byte("\n")) + 1
		if err != nil {
			var es Errors
			var e *Error
			switch {
			case errors.As(err, &es):
				require.NotEmpty(t, es)
				for _, x := range es {
					checkFuzzError(t, x, lines)
				}
			case errors.As(err, &e):
				checkFuzzError(t, e, lines)
			default:
				t.Fatalf("error of type %T: %v", err, err)
			}
			return
		}
		require.NotEmpty(t, b.Rows, "accepted file has rows")
		for _, r := range b.Rows {
			require.True(t, r.Load >= 0 && !math.IsInf(r.Load, 0), "load %v", r.Load)
			require.False(t, math.IsNaN(r.Deflection) || math.IsInf(r.Deflection, 0), "deflection %v", r.Deflection)
			require.True(t, r.FreeLength > 0 && !math.IsInf(r.FreeLength, 0), "length %v", r.FreeLength)
			require.True(t, r.Axis == 0 || r.Axis == 1, "axis %d", r.Axis)
			require.True(t, r.Line >= 1 && r.Line <= lines, "line %d of %d", r.Line, lines)
		}
		// Round trip in N and mm.
		var out bytes.Buffer
		w := csv.NewWriter(&out)
		require.NoError(t, w.Write([]string{"load_n", "deflection_mm", "free_length_mm", "direction", "specimen"}))
		for _, r := range b.Rows {
			require.NoError(t, w.Write([]string{g17(r.Load), g17(r.Deflection / mm), g17(r.FreeLength / mm), AxisName(r.Axis), r.Specimen}))
		}
		w.Flush()
		b2, err := ParseBench(out.Bytes(), "round-trip.csv")
		require.NoError(t, err, "round trip of\n%s", out.String())
		require.Len(t, b2.Rows, len(b.Rows))
		for i, r := range b.Rows {
			r2 := b2.Rows[i]
			assert.InDelta(t, r.Load, r2.Load, 1e-12*math.Abs(r.Load), "load row %d", i)
			assert.InDelta(t, r.Deflection, r2.Deflection, 1e-12*math.Abs(r.Deflection), "deflection row %d", i)
			assert.InDelta(t, r.FreeLength, r2.FreeLength, 1e-12*r.FreeLength, "length row %d", i)
			assert.Equal(t, r.Axis, r2.Axis, "axis row %d", i)
			assert.Equal(t, strings.TrimSpace(r.Specimen), r2.Specimen, "specimen row %d", i)
		}
	})
}

func checkFuzzError(t *testing.T, e *Error, lines int) {
	t.Helper()
	require.Equal(t, "f.csv", e.File)
	require.True(t, e.Line >= 1 && e.Line <= lines+1, "error line %d of %d: %v", e.Line, lines, e)
	require.True(t, e.Col >= 1, "error column %d: %v", e.Col, e)
	require.NotContains(t, e.Error(), "\n", "one line per error")
}

func g17(x float64) string { return strconv.FormatFloat(x, 'g', 17, 64) }
