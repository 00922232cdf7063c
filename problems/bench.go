package problems

import (
	"bytes"
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"

	"plica/surrogate"
)

// standardGravity converts grams-force to newtons, m/s² [published:
// 3rd General Conference on Weights and Measures (CGPM), 1901; ISO 80000-3].
const standardGravity = 9.80665

// Bench CSV columns (a contract: more columns are allowed and ignored).
const (
	colLoadN      = "load_n"
	colLoadG      = "load_g"
	colDeflection = "deflection_mm"
	colLength     = "free_length_mm"
	colDirection  = "direction"
	colSpecimen   = "specimen"
)

var benchColumns = []string{colLoadN, colLoadG, colDeflection, colLength, colDirection, colSpecimen}

const benchExpected = "columns load_n or load_g, deflection_mm, free_length_mm, direction; optional specimen"

// BenchRow is one measurement of a cantilever bench test, in SI.
type BenchRow struct {
	Line int // line of the row in the file (1-based)
	// Axis is the bellows' own axis the bending is about: 0 for direction
	// "x" (EI_x; the tip load acts along the bellows' own y), 1 for "y".
	Axis       int
	Specimen   string  // "" when the file has no specimen column
	Load       float64 // tip load, N
	Deflection float64 // tip deflection along the load, m
	FreeLength float64 // free length from the clamp to the load, m
}

// Bench is a cantilever bench-test file: tip loads and deflections of a
// printed bellows clamped at one end (surrogate/REFERENCE.md §4.2).
type Bench struct {
	File string
	Rows []BenchRow // file order
	// Unmeasured lists the lines of rows whose deflection_mm cell is empty:
	// rows of a test plan (plica export's bench.csv) not yet measured. They
	// are checked like any row and left out of the fit.
	Unmeasured []int
	// LoadColumn is "load_n" or "load_g" (grams-force, converted with
	// standard gravity 9.80665 m/s²).
	LoadColumn string
	header     int            // line of the header
	width      int            // number of fields in the header
	cols       map[string]int // column name → 0-based field index
}

// LoadBench reads and checks a bench CSV file.
func LoadBench(path string) (*Bench, error) {
	data, err := readInput(path, "bench CSV")
	if err != nil {
		return nil, err
	}
	return ParseBench(data, path)
}

// ParseBench decodes a bench CSV file into SI rows.
//
// Format: comma-separated (semicolons when the header has more semicolons
// than commas), one header row, then one measurement per row. Lines
// starting with # are comments; blank lines and rows whose cells are all
// empty are skipped; a UTF-8 byte-order mark is ignored. Header names are
// matched without case and surrounding spaces. Columns:
//
//	load_n or load_g   tip load in N, or in grams-force (× 9.80665e-3 N/g); >= 0
//	deflection_mm      tip deflection along the load, mm (any sign); an
//	                   empty cell marks a planned row not yet measured
//	                   (listed in Unmeasured, not fitted)
//	free_length_mm     free length from the clamp to the load, mm; > 0
//	direction          x or y: the bellows' own axis the bending is about
//	                   (x: EI_x, load along the bellows' own y)
//	specimen           optional label of the printed specimen
//
// Other columns are ignored. Every problem is reported, each as an *Error
// with the file, the line of the row, the column (1-based index of the
// field; the character column for CSV syntax errors) and the column name as
// key.
func ParseBench(data []byte, file string) (*Bench, error) {
	if err := checkSize(data, file, "bench CSV"); err != nil {
		return nil, err
	}
	if enc := utf16Name(data); enc != "" {
		return nil, &Error{File: file, Line: 1, Col: 1, Msg: fmt.Sprintf("the file is %s encoded (expected UTF-8 or ASCII text; export the CSV as UTF-8)", enc)}
	}
	data = bytes.TrimPrefix(data, []byte("\uFEFF"))
	if line, ok := tabSeparated(data); ok {
		return nil, &Error{File: file, Line: line, Col: 1, Msg: "the header is separated by tabs (expected comma-separated columns, or semicolons; export the table as CSV)"}
	}
	cr := csv.NewReader(bytes.NewReader(data))
	cr.Comment = '#'
	cr.FieldsPerRecord = -1
	cr.TrimLeadingSpace = true
	cr.Comma = sniffComma(data)

	b := &Bench{File: file}
	var errs Errors
	add := func(line, col int, key, format string, args ...any) {
		errs = append(errs, &Error{File: file, Line: line, Col: col, Key: key, Msg: fmt.Sprintf(format, args...)})
	}
	haveHeader := false
	for {
		rec, err := cr.Read()
		if err == io.EOF {
			break
		}
		if err != nil {
			var pe *csv.ParseError
			if errors.As(err, &pe) {
				add(max(pe.Line, 1), max(pe.Column, 1), "", "CSV syntax error: %v", pe.Err)
				continue
			}
			add(1, 1, "", "CSV syntax error: %v", err)
			break
		}
		line, _ := cr.FieldPos(0)
		if blankRecord(rec) {
			continue
		}
		if !haveHeader {
			haveHeader = true
			b.readHeader(rec, line, add)
			if b.cols == nil {
				break // without the required columns no row can be read
			}
			continue
		}
		b.readRow(cr, rec, line, add)
	}
	switch {
	case !haveHeader && len(errs) == 0:
		add(1, 1, "", "empty file (expected a header row with %s)", benchExpected)
	case haveHeader && b.cols != nil && len(b.Rows) == 0 && len(b.Unmeasured) > 0 && len(errs) == 0:
		add(b.Unmeasured[0], b.cols[colDeflection]+1, colDeflection, "no measurements: every deflection_mm cell is empty (expected the measured tip deflections in mm; an empty cell marks a planned row not yet measured)")
	case haveHeader && b.cols != nil && len(b.Rows) == 0 && len(errs) == 0:
		add(b.header, 1, "", "no measurements (expected one row per load below the header)")
	}
	if len(errs) > 0 {
		return nil, errs.sorted()
	}
	return b, nil
}

// sniffComma returns ';' when the first non-comment line has more
// semicolons than commas (a spreadsheet export with decimal commas), else ','.
func sniffComma(data []byte) rune {
	for _, line := range strings.Split(string(data), "\n") {
		t := strings.TrimSpace(line)
		if t == "" || strings.HasPrefix(t, "#") {
			continue
		}
		if strings.Count(t, ";") > strings.Count(t, ",") {
			return ';'
		}
		return ','
	}
	return ','
}

// tabSeparated reports whether the header (the first line that is not a
// comment or blank) holds tabs and neither commas nor semicolons: a
// tab-separated export, whose header would read as one unknown column.
func tabSeparated(data []byte) (int, bool) {
	for i, line := range strings.Split(string(data), "\n") {
		t := strings.TrimSpace(line)
		if t == "" || strings.HasPrefix(t, "#") {
			continue
		}
		return i + 1, strings.Contains(t, "\t") && !strings.ContainsAny(t, ",;")
	}
	return 0, false
}

func blankRecord(rec []string) bool {
	for _, c := range rec {
		if strings.TrimSpace(c) != "" {
			return false
		}
	}
	return true
}

type addFunc func(line, col int, key, format string, args ...any)

func (b *Bench) readHeader(rec []string, line int, add addFunc) {
	b.header, b.width = line, len(rec)
	known := map[string]bool{}
	for _, c := range benchColumns {
		known[c] = true
	}
	cols := map[string]int{}
	var unknown []string
	for i, raw := range rec {
		name := strings.ToLower(strings.TrimSpace(raw))
		if name == "" {
			continue
		}
		if j, dup := cols[name]; dup {
			add(line, i+1, name, "column given twice (first as column %d)", j+1)
			continue
		}
		cols[name] = i
		if !known[name] {
			unknown = append(unknown, name)
		}
	}
	ok := true
	_, hasN := cols[colLoadN]
	_, hasG := cols[colLoadG]
	switch {
	case hasN && hasG:
		add(line, cols[colLoadG]+1, colLoadG, "given together with load_n (expected one load column)")
		ok = false
	case hasN:
		b.LoadColumn = colLoadN
	case hasG:
		b.LoadColumn = colLoadG
	default:
		add(line, 1, colLoadN, "missing column%s (expected %s)", suggest(unknown, colLoadN, colLoadG), benchExpected)
		ok = false
	}
	for _, c := range []string{colDeflection, colLength, colDirection} {
		if _, found := cols[c]; !found {
			add(line, 1, c, "missing column%s (expected %s)", suggest(unknown, c), benchExpected)
			ok = false
		}
	}
	if ok {
		b.cols = cols
	}
}

// suggest names a header cell close to a missing column.
func suggest(unknown []string, missing ...string) string {
	for _, u := range unknown {
		if m := Nearest(u, missing); m != "" {
			return fmt.Sprintf("; found %q, did you mean %q?", u, m)
		}
	}
	return ""
}

func (b *Bench) readRow(cr *csv.Reader, rec []string, line int, add addFunc) {
	if n := b.width; len(rec) > n {
		l, _ := cr.FieldPos(n)
		add(l, n+1, "", "row has %d fields, the header %d (expected one cell per column)", len(rec), n)
		return
	}
	if n := b.width; len(rec) < n {
		// every cell counts, optional columns too: a short row is a cut or
		// mis-separated line, not a row that leaves a column out
		add(line, len(rec)+1, headerName(b.cols, len(rec)), "missing cell: the row has %d fields, the header %d (expected one cell per column)", len(rec), n)
		return
	}
	row := BenchRow{Line: line}
	ok := true
	cell := func(name string) (string, int, int, bool) {
		i := b.cols[name]
		if i >= len(rec) {
			return "", 0, 0, false // an optional column the row leaves out
		}
		l, _ := cr.FieldPos(i)
		s := strings.TrimSpace(rec[i])
		return s, l, i + 1, true
	}
	number := func(name, what string) (float64, int, int, bool) {
		s, l, col, found := cell(name)
		if !found {
			return 0, 0, 0, false
		}
		if s == "" {
			add(l, col, name, "empty cell (expected %s)", what)
			ok = false
			return 0, 0, 0, false
		}
		v, err := strconv.ParseFloat(s, 64)
		switch {
		case errors.Is(err, strconv.ErrRange) && math.IsInf(v, 0):
			add(l, col, name, "%s is out of the finite range (expected %s)", strconv.Quote(s), what)
		case errors.Is(err, strconv.ErrRange):
			return v, l, col, true // below the smallest float: as good as 0
		case err != nil:
			add(l, col, name, "%s is not a number (expected %s)", strconv.Quote(s), what)
		case math.IsNaN(v) || math.IsInf(v, 0):
			add(l, col, name, "%s is not a finite number (expected %s)", strconv.Quote(s), what)
		default:
			return v, l, col, true
		}
		ok = false
		return 0, 0, 0, false
	}

	what := "a tip load in N, >= 0"
	scale := 1.0
	if b.LoadColumn == colLoadG {
		what, scale = "a tip load in g (grams-force), >= 0", 1e-3*standardGravity
	}
	if v, l, col, found := number(b.LoadColumn, what); found {
		if v < 0 {
			add(l, col, b.LoadColumn, "%s is negative (expected %s)", fmtNum(v), what)
			ok = false
		}
		row.Load = v * scale
	}
	unmeasured := false
	if s, _, _, found := cell(colDeflection); found && s == "" {
		unmeasured = true // a planned row not yet measured
	} else if v, _, _, found := number(colDeflection, "a tip deflection in mm"); found {
		row.Deflection = v * mm
	}
	if v, l, col, found := number(colLength, "a free length in mm, > 0"); found {
		if v <= 0 {
			add(l, col, colLength, "%s is out of range (expected a free length in mm, > 0)", fmtNum(v))
			ok = false
		}
		row.FreeLength = v * mm
	}
	if s, l, col, found := cell(colDirection); found {
		switch strings.ToLower(s) {
		case "x":
			row.Axis = 0
		case "y":
			row.Axis = 1
		default:
			add(l, col, colDirection, "%s is not a direction (expected x or y: the bellows' own axis the bending is about)", strconv.Quote(s))
			ok = false
		}
	}
	if _, has := b.cols[colSpecimen]; has {
		if s, _, _, found := cell(colSpecimen); found {
			row.Specimen = s
		}
	}
	switch {
	case ok && unmeasured:
		b.Unmeasured = append(b.Unmeasured, line)
	case ok:
		b.Rows = append(b.Rows, row)
	}
}

func headerName(cols map[string]int, i int) string {
	for k, j := range cols {
		if j == i {
			return k
		}
	}
	return ""
}

// AxisName is "x" or "y".
func AxisName(axis int) string { return string(rune('x' + axis)) }

// Axes returns the bending axes with at least one row, in order.
func (b *Bench) Axes() []int {
	var has [2]bool
	for _, r := range b.Rows {
		has[r.Axis] = true
	}
	var out []int
	for a, h := range has {
		if h {
			out = append(out, a)
		}
	}
	return out
}

// Term switches a term of the cantilever model.
type Term int

const (
	// TermAuto decides from the data: an intercept when some zero-load row
	// of the direction reads a non-zero deflection (the gauge was not
	// zeroed), the clamp compliance when the direction has two or more free
	// lengths.
	TermAuto Term = iota
	TermOn
	TermOff
)

// BenchFit is the cantilever fit of one bending axis of a bench file.
type BenchFit struct {
	Axis    int
	Rows    []BenchRow             // the rows fitted, file order
	Points  []surrogate.BenchPoint // the same rows as fit input
	Setups  []string               // label per setup (specimen and free length)
	Lengths []float64              // different free lengths, m, ascending order of first use
	Options surrogate.FitOptions
	Fit     surrogate.Fit
	// Warnings name the file and line they concern.
	Warnings []string
}

// Model names the fitted model: "through origin", "intercept",
// "clamp compliance" or "intercept + clamp compliance".
func (f *BenchFit) Model() string {
	switch o := f.Options; {
	case o.Intercept && o.ClampCompliance:
		return "intercept + clamp compliance"
	case o.Intercept:
		return "intercept"
	case o.ClampCompliance:
		return "clamp compliance"
	}
	return "through origin"
}

// Fit fits EI about one axis (0: x, 1: y) with surrogate.FitCantilever at
// the 95 % level. A setup is one specimen at one free length; with an
// intercept each setup has its own zero offset. Errors are *Error naming
// the file, the line of the axis' first row and the direction column.
func (b *Bench) Fit(axis int, intercept, clamp Term) (*BenchFit, error) {
	f := &BenchFit{Axis: axis}
	setup := map[string]int{}
	zeroOffset := false
	seenL := map[float64]bool{}
	for _, r := range b.Rows {
		if r.Axis != axis {
			continue
		}
		label := fmt.Sprintf("%s mm", fmtNum(r.FreeLength/mm))
		if r.Specimen != "" {
			label = fmt.Sprintf("%s, %s", r.Specimen, label)
		}
		k, found := setup[label]
		if !found {
			k = len(f.Setups)
			setup[label] = k
			f.Setups = append(f.Setups, label)
		}
		if !seenL[r.FreeLength] {
			seenL[r.FreeLength] = true
			f.Lengths = append(f.Lengths, r.FreeLength)
		}
		if r.Load == 0 && r.Deflection != 0 {
			zeroOffset = true
		}
		f.Rows = append(f.Rows, r)
		f.Points = append(f.Points, surrogate.BenchPoint{Load: r.Load, Deflection: r.Deflection, FreeLength: r.FreeLength, Setup: k})
	}
	dirCol := b.cols[colDirection] + 1
	if len(f.Rows) == 0 {
		return nil, &Error{File: b.File, Line: max(b.header, 1), Col: dirCol, Key: colDirection,
			Msg: fmt.Sprintf("no rows for direction %s (expected rows with direction = %s)", AxisName(axis), AxisName(axis))}
	}
	f.Options.Intercept = intercept == TermOn || (intercept == TermAuto && zeroOffset)
	f.Options.ClampCompliance = clamp == TermOn || (clamp == TermAuto && len(f.Lengths) >= 2)
	fit, err := surrogate.FitCantilever(f.Points, f.Options)
	if err != nil {
		line := f.Rows[0].Line
		msg := err.Error()
		var ie *surrogate.InputError
		if errors.As(err, &ie) {
			msg = ie.Msg
			var n int
			if _, e := fmt.Sscanf(ie.Key, "point %d", &n); e == nil && n >= 1 && n <= len(f.Rows) {
				line = f.Rows[n-1].Line
			}
		}
		return nil, &Error{File: b.File, Line: line, Col: dirCol, Key: colDirection,
			Msg: fmt.Sprintf("direction %s, %s fit: %s", AxisName(axis), f.Model(), msg)}
	}
	f.Fit = fit
	for i, r := range f.Rows {
		d := r.Deflection
		if fit.Offsets != nil {
			d -= fit.Offsets[f.Points[i].Setup]
		}
		if ratio := math.Abs(d) / r.FreeLength; ratio > surrogate.SmallDeflectionLimit {
			f.Warnings = append(f.Warnings, fmt.Sprintf("%s:%d: deflection/free length %.3g exceeds %g: beyond the small-deflection range of the linear cantilever formula, where EI reads high (surrogate/REFERENCE.md §4.1); use smaller loads or drop the row",
				b.File, r.Line, ratio, surrogate.SmallDeflectionLimit))
		}
	}
	if f.Options.ClampCompliance && fit.ClampCompliance < 0 {
		f.Warnings = append(f.Warnings, fmt.Sprintf("%s: direction %s: the fitted clamp compliance is negative (%.3g ± %.2g rad/(N·mm)): no measurable clamp rotation; refit without the clamp term",
			b.File, AxisName(axis), fit.ClampCompliance*1e-3, fit.ClampComplianceSE*1e-3))
	}
	return f, nil
}
