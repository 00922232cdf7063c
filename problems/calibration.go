package problems

import (
	"errors"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"time"

	"github.com/BurntSushi/toml"

	"plica/objective"
	"plica/surrogate"
)

// Calibration is a bench calibration of the bending stiffness of printed
// bellows of one material, printer and profile (surrogate/REFERENCE.md §2.10): per own
// bending axis, the factor c = EI fitted on the bench / EI the surrogate
// predicts without calibration, with its uncertainty. A design bellows
// names the file with calibration_file; its factors then multiply the
// predicted EI as calibration_factor would. Lengths and stiffnesses are SI.
type Calibration struct {
	Material string
	Printer  string // free label of the printer and process; may be ""
	Profile  surrogate.Profile
	// Fidelity is the surrogate fidelity of the prediction.
	Fidelity surrogate.Fidelity
	Date     time.Time // day of the calibration
	// BenchFile and DesignFile are the files it was made from, as given;
	// Bellows is the design's bellows (1-based, innermost first) that the
	// bench specimen reproduces.
	BenchFile, DesignFile string
	Bellows               int

	// Per own bending axis (0: about x, 1: about y):
	Factor      [2]surrogate.Factor // c with SE and 95 % interval
	FittedEI    [2]float64          // N·m²
	FittedSE    [2]float64          // N·m²
	FittedCI    [2][2]float64       // 95 % interval, N·m²
	PredictedEI [2]float64          // uncalibrated, as a cantilever test sees it (surrogate.CantileverEI), N·m²
	Points      [2]int
	Model       [2]string // BenchFit.Model
}

// NewCalibration compares the bench fits about x and y with the
// uncalibrated surrogate prediction for bellows i (0-based) of d, computed
// at the design's fidelity with any calibration of that bellows removed.
// The caller fills Printer, Date, BenchFile and DesignFile. Both axes are
// needed, and each fit's interval must be bounded.
func NewCalibration(d *objective.Design, i int, bench *Bench, fits [2]*BenchFit) (*Calibration, error) {
	if i < 0 || i >= len(d.Bellows) {
		return nil, fmt.Errorf("bellows %d does not exist (expected 1 to %d)", i+1, len(d.Bellows))
	}
	m := d.Bellows[i].Model
	if m == nil {
		return nil, fmt.Errorf("bellows %d has measured stiffness: there is no prediction to calibrate (expected a bellows with geometry and material)", i+1)
	}
	for axis, f := range fits {
		if f == nil {
			return nil, &Error{File: bench.File, Line: max(bench.header, 1), Col: bench.cols[colDirection] + 1, Key: colDirection,
				Msg: fmt.Sprintf("no rows for direction %s (expected rows for both x and y to write a calibration)", AxisName(axis))}
		}
		if math.IsInf(f.Fit.CI[1], 0) {
			return nil, &Error{File: bench.File, Line: f.Rows[0].Line, Col: bench.cols[colDirection] + 1, Key: colDirection,
				Msg: fmt.Sprintf("direction %s: the 95 %% interval of EI has no upper bound (relative standard error %.0f %%; expected more rows or larger loads)", AxisName(axis), 100*f.Fit.SE/f.Fit.EI)}
		}
	}
	plain := *m
	plain.Calibration = [2]float64{}
	sec, err := plain.Section(d.Fidelity)
	if err != nil {
		return nil, &objective.BellowsError{Index: i, Err: err}
	}
	pred := surrogate.CantileverEI(sec.EI)
	c := &Calibration{Material: m.Material.Name, Profile: m.Profile, Fidelity: sec.Fidelity, Bellows: i + 1, PredictedEI: pred}
	for axis, f := range fits {
		fac, err := surrogate.CalibrationFactor(f.Fit, pred[axis])
		if err != nil {
			return nil, fmt.Errorf("bellows %d, direction %s: %w", i+1, AxisName(axis), err)
		}
		c.Factor[axis] = fac
		c.FittedEI[axis], c.FittedSE[axis], c.FittedCI[axis] = f.Fit.EI, f.Fit.SE, f.Fit.CI
		c.Points[axis] = f.Fit.Points
		c.Model[axis] = f.Model()
	}
	return c, nil
}

// calibrationTop lists the keys of a calibration file.
var calibrationTop = []string{"material", "printer", "profile", "fidelity", "date", "bench_file", "design_file", "bellows"}

func axisKeys(a string) []string {
	return []string{"factor_" + a, "factor_" + a + "_se", "factor_" + a + "_ci95",
		"ei_" + a + "_fitted_n_mm2", "ei_" + a + "_fitted_se_n_mm2", "ei_" + a + "_fitted_ci95_n_mm2",
		"ei_" + a + "_predicted_n_mm2", "points_" + a, "fit_" + a}
}

func calibrationKeys() []string {
	return append(append(append([]string{}, calibrationTop...), axisKeys("x")...), axisKeys("y")...)
}

// Format returns the calibration as TOML text. Stiffnesses are written in
// N·mm² with six significant digits, factors with six.
func (c *Calibration) Format() []byte {
	var b strings.Builder
	g := func(x float64) string { return strconv.FormatFloat(x, 'g', 6, 64) }
	fmt.Fprintf(&b, "# plica bending-stiffness calibration from a cantilever bench test (tip load, deflection zeroed\n")
	fmt.Fprintf(&b, "# or fitted as an offset; least squares with 95 %% Student-t intervals).\n")
	fmt.Fprintf(&b, "# factor = EI fitted on the bench / EI the %s surrogate predicts for the design's bellows without\n", c.Fidelity)
	fmt.Fprintf(&b, "# calibration; x and y are the bellows' own bending axes. Reference this file from a [[bellows]]\n")
	fmt.Fprintf(&b, "# table of the same material and profile with calibration_file = \"<path relative to the design>\".\n\n")
	fmt.Fprintf(&b, "material = %s\n", tomlQuote(c.Material))
	fmt.Fprintf(&b, "printer = %s\n", tomlQuote(c.Printer))
	fmt.Fprintf(&b, "profile = %s\n", tomlQuote(c.Profile.String()))
	fmt.Fprintf(&b, "fidelity = %s\n", tomlQuote(c.Fidelity.String()))
	fmt.Fprintf(&b, "date = %s\n", c.Date.Format(time.DateOnly))
	fmt.Fprintf(&b, "bench_file = %s\n", tomlQuote(c.BenchFile))
	fmt.Fprintf(&b, "design_file = %s\n", tomlQuote(c.DesignFile))
	fmt.Fprintf(&b, "bellows = %d                   # 1-based, innermost first\n", c.Bellows)
	for axis := range 2 {
		a := AxisName(axis)
		f := c.Factor[axis]
		fmt.Fprintf(&b, "\n# bending about the bellows' own %s axis\n", a)
		fmt.Fprintf(&b, "factor_%s = %s\n", a, g(f.Value))
		fmt.Fprintf(&b, "factor_%s_se = %s\n", a, g(f.SE))
		fmt.Fprintf(&b, "factor_%s_ci95 = [%s, %s]\n", a, g(f.CI[0]), g(f.CI[1]))
		fmt.Fprintf(&b, "ei_%s_fitted_n_mm2 = %s\n", a, g(c.FittedEI[axis]/nmm2))
		fmt.Fprintf(&b, "ei_%s_fitted_se_n_mm2 = %s\n", a, g(c.FittedSE[axis]/nmm2))
		fmt.Fprintf(&b, "ei_%s_fitted_ci95_n_mm2 = [%s, %s]\n", a, g(c.FittedCI[axis][0]/nmm2), g(c.FittedCI[axis][1]/nmm2))
		fmt.Fprintf(&b, "ei_%s_predicted_n_mm2 = %s\n", a, g(c.PredictedEI[axis]/nmm2))
		fmt.Fprintf(&b, "points_%s = %d\n", a, c.Points[axis])
		fmt.Fprintf(&b, "fit_%s = %s\n", a, tomlQuote(c.Model[axis]))
	}
	return []byte(b.String())
}

// tomlQuote writes a TOML basic string.
func tomlQuote(s string) string {
	var b strings.Builder
	b.WriteByte('"')
	for _, r := range s {
		switch {
		case r == '"' || r == '\\':
			b.WriteByte('\\')
			b.WriteRune(r)
		case r < 0x20 || r == 0x7f:
			fmt.Fprintf(&b, "\\u%04X", r)
		default:
			b.WriteRune(r)
		}
	}
	b.WriteByte('"')
	return b.String()
}

// LoadCalibration reads and checks a calibration file.
func LoadCalibration(path string) (*Calibration, error) {
	data, err := readInput(path, "calibration file")
	if err != nil {
		return nil, err
	}
	return ParseCalibration(data, path)
}

// ParseCalibration decodes a calibration file strictly: every key that
// Format writes is required, unknown keys are errors, factors and
// stiffnesses are positive, each interval contains its value, and each
// factor equals fitted over predicted EI (relative 1e-4, the rounding of
// six written digits). Every problem is reported with file:line:col and
// key.
func ParseCalibration(data []byte, file string) (*Calibration, error) {
	r, root, err := decode(data, file, "calibration file")
	if err != nil {
		return nil, err
	}
	c := &Calibration{}
	req := func(k string) string {
		s, ok := root.text(k)
		if !ok && !root.has(k) {
			r.errorf(k, "missing (expected a string)")
		}
		return s
	}
	c.Material = req("material")
	if root.has("material") && c.Material == "" {
		r.errorf("material", "empty (expected a material name)")
	}
	c.Printer = req("printer")
	if !root.has("profile") {
		r.errorf("profile", "missing (expected one of: %s)", strings.Join(surrogate.ProfileNames(), "|"))
	}
	root.enum("profile", &c.Profile, surrogate.ProfileNames())
	if !root.has("fidelity") {
		r.errorf("fidelity", "missing (expected one of: %s)", strings.Join(surrogate.FidelityNames(), "|"))
	}
	root.enum("fidelity", &c.Fidelity, surrogate.FidelityNames())
	if v, ok := root.get("date"); !ok {
		r.errorf("date", "missing (expected a date such as 2025-01-31)")
	} else if tm, isTime := v.(time.Time); isTime {
		c.Date = tm
	} else {
		r.errorf("date", "found %s (expected a date such as 2025-01-31)", describe(v))
	}
	c.BenchFile = req("bench_file")
	c.DesignFile = req("design_file")
	c.Bellows = root.whole("bellows", "a bellows number from 1, innermost first", 1)
	for axis := range 2 {
		a := AxisName(axis)
		k := axisKeys(a)
		f := &c.Factor[axis]
		f.Value, _ = root.positive(k[0], "a factor > 0", true, false)
		f.SE, _ = root.positive(k[1], "a standard error >= 0", true, true)
		ci, okCI := root.interval(k[2], "[lo, hi], 0 < lo <= hi")
		ei, okEI := root.positive(k[3], "EI in N·mm², > 0", true, false)
		se, _ := root.positive(k[4], "a standard error in N·mm², >= 0", true, true)
		eci, okECI := root.interval(k[5], "[lo, hi] in N·mm², 0 < lo <= hi")
		pred, okP := root.positive(k[6], "EI in N·mm², > 0", true, false)
		c.Points[axis] = root.whole(k[7], "a number of points >= 2", 2)
		c.Model[axis] = root.choice(k[8], fitModels, "through origin")
		if !root.has(k[8]) {
			r.errorf(k[8], "missing (expected one of: %s)", strings.Join(fitModels, "|"))
		}
		f.CI = ci
		c.FittedEI[axis], c.FittedSE[axis], c.FittedCI[axis] = ei*nmm2, se*nmm2, [2]float64{eci[0] * nmm2, eci[1] * nmm2}
		c.PredictedEI[axis] = pred * nmm2
		if okCI && f.Value > 0 && !within(f.Value, ci) {
			r.errorf(k[2], "[%s, %s] does not contain %s = %s", fmtNum(ci[0]), fmtNum(ci[1]), k[0], fmtNum(f.Value))
		}
		if okECI && ei > 0 && !within(ei, eci) {
			r.errorf(k[5], "[%s, %s] does not contain %s = %s", fmtNum(eci[0]), fmtNum(eci[1]), k[3], fmtNum(ei))
		}
		if okEI && okP && f.Value > 0 && math.Abs(f.Value-ei/pred) > 1e-4*f.Value {
			r.errorf(k[0], "%s differs from %s / %s = %s (expected the factor to be fitted over predicted EI)", fmtNum(f.Value), k[3], k[6], fmtNum(ei/pred))
		}
	}
	root.finish(calibrationKeys())
	if len(r.errs) > 0 {
		return nil, r.errs.sorted()
	}
	return c, nil
}

var fitModels = []string{"through origin", "intercept", "clamp compliance", "intercept + clamp compliance"}

// within reports whether x lies in [lo, hi], allowing for the rounding of
// six written digits.
func within(x float64, iv [2]float64) bool {
	return x >= iv[0]*(1-1e-5) && x <= iv[1]*(1+1e-5)
}

// interval reads a required [lo, hi] with 0 < lo <= hi.
func (t *table) interval(k, what string) ([2]float64, bool) {
	v, ok := t.numbers(k, 2, what, true)
	if !ok {
		return [2]float64{}, false
	}
	if !(v[0] > 0 && v[0] <= v[1]) {
		t.r.errorf(t.key(k), "[%s, %s] is out of range (expected %s)", fmtNum(v[0]), fmtNum(v[1]), what)
		return [2]float64{}, false
	}
	return [2]float64{v[0], v[1]}, true
}

// whole reads a required whole number >= lo.
func (t *table) whole(k, what string, lo int64) int {
	v, ok := t.get(k)
	if !ok {
		t.r.errorf(t.key(k), "missing (expected %s)", what)
		return 0
	}
	n, isInt := v.(int64)
	if !isInt || n < lo || n > math.MaxInt32 {
		t.r.errorf(t.key(k), "found %s (expected %s)", describe(v), what)
		return 0
	}
	return int(n)
}

// calibrationFile reads the optional calibration_file key of a [[bellows]]
// table with geometry: the path (relative to the design file) of a
// calibration file whose material and profile match the bellows. Its
// factors become the bellows' Calibration. Problems inside the calibration
// file are reported with that file's own position; the rest at the key.
func (t *table) calibrationFile(mb *surrogate.Bellows) {
	const k = "calibration_file"
	if !t.has(k) {
		return
	}
	rel, ok := t.text(k)
	if !ok {
		return
	}
	if t.has("calibration_factor") {
		t.r.errorf(t.key(k), "given together with calibration_factor (expected one of them)")
		return
	}
	if rel == "" {
		t.r.errorf(t.key(k), "empty (expected the path of a calibration file, relative to this design file)")
		return
	}
	path := rel
	if !filepath.IsAbs(path) {
		path = filepath.Join(filepath.Dir(t.r.file), rel)
	}
	if sameFile(path, t.r.file) {
		t.r.errorf(t.key(k), "%s names this file itself (expected a calibration file written by plica calibrate -o, path relative to this file)", strconv.Quote(rel))
		return
	}
	c, err := t.r.cals.read(path)
	if err != nil {
		var ce *calibrationError
		if errors.As(err, &ce) && ce.design {
			t.r.errorf(t.key(k), "%s is a design or problem file, not a calibration file (expected a calibration file written by plica calibrate -o)", strconv.Quote(rel))
			return
		}
		if errors.As(err, &ce) {
			t.r.errs = append(t.r.errs, ce.errs...)
			t.r.errorf(t.key(k), "%s is not a valid calibration file (see its errors)", strconv.Quote(path))
			return
		}
		t.r.errorf(t.key(k), "cannot read %s: %v (expected a calibration file written by plica calibrate, path relative to this design file)", strconv.Quote(path), err)
		return
	}
	if mb.Material.Name != "" && (c.Material != mb.Material.Name || c.Profile != mb.Profile) {
		t.r.errorf(t.key(k), "%s calibrates material %q, profile %q (expected material %q, profile %q as in this bellows)",
			strconv.Quote(rel), c.Material, c.Profile, mb.Material.Name, mb.Profile)
		return
	}
	mb.Calibration = [2]float64{c.Factor[0].Value, c.Factor[1].Value}
}

// calibrations are the calibration files one file names, read once when
// the file is parsed and kept by path (as resolved against the file): a
// calibration file edited afterwards changes nothing, and a search reads
// no file. Only one goroutine parses.
type calibrations map[string]*calibrationFile

type calibrationFile struct {
	data []byte
	cal  *Calibration
	err  error // a read failure, or a *calibrationError
}

// calibrationError is a calibration file that was read but is not valid;
// its problems carry the calibration file's own positions.
type calibrationError struct {
	errs   Errors
	design bool // the file has [[bellows]] tables: a design or problem file
}

// sameFile reports whether two paths name one file.
func sameFile(a, b string) bool {
	if filepath.Clean(a) == filepath.Clean(b) {
		return true
	}
	fa, errA := os.Stat(a)
	fb, errB := os.Stat(b)
	return errA == nil && errB == nil && os.SameFile(fa, fb)
}

// hasBellowsTables reports whether TOML text has [[bellows]] tables.
func hasBellowsTables(data []byte) bool {
	var top map[string]any
	if _, err := toml.Decode(string(data), &top); err != nil {
		return false
	}
	_, ok := top["bellows"].([]map[string]any)
	return ok
}

func (e *calibrationError) Error() string { return e.errs.Error() }

// lookup returns the calibration read at path, without reading; safe for
// concurrent use once parsing is over.
func (cs calibrations) lookup(path string) (*Calibration, error) {
	f, ok := cs[path]
	if !ok {
		return nil, fmt.Errorf("%s was not read with the file", path)
	}
	return f.cal, f.err
}

// read returns the calibration at path, reading and parsing it the first
// time.
func (cs calibrations) read(path string) (*Calibration, error) {
	if f, ok := cs[path]; ok {
		return f.cal, f.err
	}
	f := &calibrationFile{}
	cs[path] = f
	data, err := readBounded(path, "calibration file") // a device or a huge file fails cleanly
	if err != nil {
		f.err = err
		return nil, err
	}
	f.data = data
	c, err := ParseCalibration(data, path)
	if err != nil {
		var es Errors
		var e *Error
		switch {
		case errors.As(err, &es):
			f.err = &calibrationError{es, hasBellowsTables(data)}
		case errors.As(err, &e):
			f.err = &calibrationError{Errors{e}, false} // not decoded: too large, too deep or a syntax error
		default:
			f.err = err
		}
		return nil, f.err
	}
	f.cal = c
	return c, nil
}

// CalibrationFiles lists the calibration files a design or problem file
// names with calibration_file, as written (relative to the file) and in
// file order without repeats; a syntax error is returned as *Error. A run
// folder that keeps a copy of the file must keep these beside it, at the
// same relative paths, for the copy to load.
func CalibrationFiles(data []byte, file string) ([]string, error) {
	_, root, err := decode(data, file, "TOML file")
	if err != nil {
		return nil, err
	}
	var out []string
	seen := map[string]bool{}
	v := root.m["bellows"]
	var tables []map[string]any
	switch x := v.(type) {
	case []map[string]any:
		tables = x
	case []any:
		for _, e := range x {
			if m, ok := e.(map[string]any); ok {
				tables = append(tables, m)
			}
		}
	}
	for _, m := range tables {
		if s, ok := m["calibration_file"].(string); ok && s != "" && !seen[s] {
			seen[s] = true
			out = append(out, s)
		}
	}
	return out, nil
}
