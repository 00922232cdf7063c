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
//
// A calibration may instead come from a finite-element cross-check
// (Source SourceFE, written by plica fe): the "fitted" EI is then the EI of
// the FE model as a cantilever test would see it, its standard error the
// change of that EI from the next coarser mesh (discretisation only), and
// FEDir, FEMesh and FEChange replace BenchFile, Points and Model. A design
// references either kind the same way.
type Calibration struct {
	// Source is SourceBench or SourceFE; a file without a source key is a
	// bench calibration.
	Source   CalibrationSource
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

	// Source SourceFE only: the FE run folder (as given, like BenchFile),
	// its mesh (coarse or fine) and per axis the relative change of EI
	// from the next coarser mesh, (EI − EI_coarser)/EI.
	FEDir    string
	FEMesh   FEMesh
	FEChange [2]float64
}

// MaxFEChange is the largest two-mesh change of an FE stiffness that a
// calibration accepts: beyond it the FE value is not converged enough to
// calibrate with (the stiffnesses of the coarse mesh change by well under
// 1 %).
const MaxFEChange = 0.1

// NewCalibration compares the bench fits about x and y with the
// uncalibrated surrogate prediction for bellows i (0-based) of d, computed
// at the design's fidelity with any calibration of that bellows removed.
// The caller fills Printer, Date, BenchFile and DesignFile. Both axes are
// needed, and each fit's interval must be bounded.
func NewCalibration(d *objective.Design, i int, bench *Bench, fits [2]*BenchFit) (*Calibration, error) {
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
	c, err := newCalibration(d, i)
	if err != nil {
		return nil, err
	}
	c.Source = SourceBench
	pred := c.PredictedEI
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

// newCalibration starts a calibration of bellows i (0-based) of d: the
// uncalibrated surrogate prediction at the design's fidelity, as a
// cantilever test sees it.
func newCalibration(d *objective.Design, i int) (*Calibration, error) {
	if i < 0 || i >= len(d.Bellows) {
		return nil, fmt.Errorf("bellows %d does not exist (expected 1 to %d)", i+1, len(d.Bellows))
	}
	m := d.Bellows[i].Model
	if m == nil {
		return nil, fmt.Errorf("bellows %d has measured stiffness: there is no prediction to calibrate (expected a bellows with geometry and material)", i+1)
	}
	plain := *m
	plain.Calibration = [2]float64{}
	sec, err := plain.Section(d.Fidelity)
	if err != nil {
		return nil, &objective.BellowsError{Index: i, Err: err}
	}
	return &Calibration{Material: m.Material.Name, Profile: m.Profile, Fidelity: sec.Fidelity, Bellows: i + 1,
		PredictedEI: surrogate.CantileverEI(sec.EI)}, nil
}

// NewFECalibration compares the EI tensor fe (N·m², about the bellows' own
// axes) of a finite-element model of bellows i (0-based) of d with the
// uncalibrated surrogate prediction, as NewCalibration does with a bench
// fit: per axis, factor = the FE EI a cantilever test would see /
// the predicted one. change holds the relative change of EI_x and EI_y
// from the next coarser mesh; it is taken as the standard error of the FE
// value (the interval is ±2 standard errors), so it covers discretisation
// only. mesh names the FE mesh. The caller fills Date, FEDir and
// DesignFile.
func NewFECalibration(d *objective.Design, i int, fe [2][2]float64, change [2]float64, mesh string) (*Calibration, error) {
	var m FEMesh
	if err := m.UnmarshalText([]byte(mesh)); err != nil {
		return nil, fmt.Errorf("FE mesh %q is not one of %s", mesh, strings.Join(feMeshNames, "|"))
	}
	c, err := newCalibration(d, i)
	if err != nil {
		return nil, err
	}
	c.Source, c.FEMesh, c.FEChange = SourceFE, m, change
	ei := surrogate.CantileverEI(fe)
	for axis := range 2 {
		a := AxisName(axis)
		if !(ei[axis] > 0) {
			return nil, fmt.Errorf("bellows %d: the FE EI tensor [[%g, %g], [%g, %g]] N·m² is not positive definite", i+1, fe[0][0], fe[0][1], fe[1][0], fe[1][1])
		}
		d := math.Abs(change[axis])
		if !(d < MaxFEChange) {
			return nil, fmt.Errorf("bellows %d, direction %s: the FE EI changed by %.3g %% from the coarser mesh (expected less than %g %% to calibrate with; use a finer mesh)", i+1, a, 100*d, 100*MaxFEChange)
		}
		c.FittedEI[axis], c.FittedSE[axis] = ei[axis], d*ei[axis]
		c.FittedCI[axis] = [2]float64{ei[axis] * (1 - 2*d), ei[axis] * (1 + 2*d)}
		p := c.PredictedEI[axis]
		c.Factor[axis] = surrogate.Factor{Value: ei[axis] / p, SE: c.FittedSE[axis] / p,
			CI: [2]float64{c.FittedCI[axis][0] / p, c.FittedCI[axis][1] / p}}
	}
	return c, nil
}

// calibrationTop lists the top-level keys of a calibration file of each
// source; "source" itself is optional and absent from bench files.
func calibrationTop(source CalibrationSource) []string {
	if source == SourceFE {
		return []string{"source", "material", "printer", "profile", "fidelity", "date", "fe_dir", "fe_mesh", "design_file", "bellows"}
	}
	return []string{"source", "material", "printer", "profile", "fidelity", "date", "bench_file", "design_file", "bellows"}
}

// axisKeys lists the keys of one bending axis: the factor, the bench-fitted
// (or FE) EI, the prediction, then the bench fit's points and model (or
// the FE two-mesh change).
func axisKeys(a string, source CalibrationSource) []string {
	if source == SourceFE {
		return []string{"factor_" + a, "factor_" + a + "_se", "factor_" + a + "_ci95",
			"ei_" + a + "_fe_n_mm2", "ei_" + a + "_fe_se_n_mm2", "ei_" + a + "_fe_ci95_n_mm2",
			"ei_" + a + "_predicted_n_mm2", "ei_" + a + "_fe_mesh_change"}
	}
	return []string{"factor_" + a, "factor_" + a + "_se", "factor_" + a + "_ci95",
		"ei_" + a + "_fitted_n_mm2", "ei_" + a + "_fitted_se_n_mm2", "ei_" + a + "_fitted_ci95_n_mm2",
		"ei_" + a + "_predicted_n_mm2", "points_" + a, "fit_" + a}
}

func calibrationKeys(source CalibrationSource) []string {
	return append(append(calibrationTop(source), axisKeys("x", source)...), axisKeys("y", source)...)
}

// Format returns the calibration as TOML text. Stiffnesses are written in
// N·mm² with six significant digits, factors with six.
func (c *Calibration) Format() []byte {
	var b strings.Builder
	// x + 0 turns a negative zero into 0: TOML reads "-0" back as the
	// integer 0, and the file must read back to what was written
	g := func(x float64) string { return strconv.FormatFloat(x+0, 'g', 6, 64) }
	if c.Source == SourceFE {
		c.formatFE(&b, g)
		return []byte(b.String())
	}
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

// formatFE writes a calibration of source SourceFE.
func (c *Calibration) formatFE(b *strings.Builder, g func(float64) string) {
	fmt.Fprintf(b, "# plica bending-stiffness calibration from a finite-element cross-check (plica fe: CalculiX\n")
	fmt.Fprintf(b, "# S8R shell model of the bellows wall, rigid end rings, EI measured away from the ends).\n")
	fmt.Fprintf(b, "# factor = EI of the FE model, as a cantilever test would see it / EI the %s surrogate predicts for\n", c.Fidelity)
	fmt.Fprintf(b, "# the design's bellows without calibration; x and y are the bellows' own bending axes. The standard\n")
	fmt.Fprintf(b, "# error is the change of EI from the next coarser mesh: discretisation only, not the error of the\n")
	fmt.Fprintf(b, "# shell model nor print-to-print variation. The FE model is an estimate too: verify on a prototype.\n")
	fmt.Fprintf(b, "# Reference this file from a [[bellows]] table of the same material and profile with\n")
	fmt.Fprintf(b, "# calibration_file = \"<path relative to the design>\".\n\n")
	fmt.Fprintf(b, "source = %s\n", tomlQuote(SourceFE.String()))
	fmt.Fprintf(b, "material = %s\n", tomlQuote(c.Material))
	fmt.Fprintf(b, "printer = %s\n", tomlQuote(c.Printer))
	fmt.Fprintf(b, "profile = %s\n", tomlQuote(c.Profile.String()))
	fmt.Fprintf(b, "fidelity = %s\n", tomlQuote(c.Fidelity.String()))
	fmt.Fprintf(b, "date = %s\n", c.Date.Format(time.DateOnly))
	fmt.Fprintf(b, "fe_dir = %s\n", tomlQuote(c.FEDir))
	fmt.Fprintf(b, "fe_mesh = %s\n", tomlQuote(c.FEMesh.String()))
	fmt.Fprintf(b, "design_file = %s\n", tomlQuote(c.DesignFile))
	fmt.Fprintf(b, "bellows = %d                   # 1-based, innermost first\n", c.Bellows)
	for axis := range 2 {
		a := AxisName(axis)
		f := c.Factor[axis]
		fmt.Fprintf(b, "\n# bending about the bellows' own %s axis\n", a)
		fmt.Fprintf(b, "factor_%s = %s\n", a, g(f.Value))
		fmt.Fprintf(b, "factor_%s_se = %s\n", a, g(f.SE))
		fmt.Fprintf(b, "factor_%s_ci95 = [%s, %s]\n", a, g(f.CI[0]), g(f.CI[1]))
		fmt.Fprintf(b, "ei_%s_fe_n_mm2 = %s\n", a, g(c.FittedEI[axis]/nmm2))
		fmt.Fprintf(b, "ei_%s_fe_se_n_mm2 = %s\n", a, g(c.FittedSE[axis]/nmm2))
		fmt.Fprintf(b, "ei_%s_fe_ci95_n_mm2 = [%s, %s]\n", a, g(c.FittedCI[axis][0]/nmm2), g(c.FittedCI[axis][1]/nmm2))
		fmt.Fprintf(b, "ei_%s_predicted_n_mm2 = %s\n", a, g(c.PredictedEI[axis]/nmm2))
		// all digits: a change just under MaxFEChange must not round up to it
		fmt.Fprintf(b, "ei_%s_fe_mesh_change = %s   # (EI − EI on the next coarser mesh) / EI\n", a, strconv.FormatFloat(c.FEChange[axis]+0, 'g', -1, 64))
	}
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
	root.enum("source", &c.Source, calibrationSourceNames) // absent: SourceBench
	fe := c.Source == SourceFE
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
	if fe {
		c.FEDir = req("fe_dir")
		if !root.has("fe_mesh") {
			r.errorf("fe_mesh", "missing (expected one of: %s)", strings.Join(feMeshNames, "|"))
		}
		root.enum("fe_mesh", &c.FEMesh, feMeshNames)
	} else {
		c.BenchFile = req("bench_file")
	}
	c.DesignFile = req("design_file")
	c.Bellows = root.whole("bellows", "a bellows number from 1, innermost first", 1)
	for axis := range 2 {
		a := AxisName(axis)
		k := axisKeys(a, c.Source)
		f := &c.Factor[axis]
		f.Value, _ = root.positive(k[0], "a factor > 0", true, false)
		f.SE, _ = root.positive(k[1], "a standard error >= 0", true, true)
		ci, okCI := root.interval(k[2], "[lo, hi], 0 < lo <= hi")
		ei, okEI := root.positive(k[3], "EI in N·mm², > 0", true, false)
		se, _ := root.positive(k[4], "a standard error in N·mm², >= 0", true, true)
		eci, okECI := root.interval(k[5], "[lo, hi] in N·mm², 0 < lo <= hi")
		pred, okP := root.positive(k[6], "EI in N·mm², > 0", true, false)
		if fe {
			what := fmt.Sprintf("a relative change of EI between meshes, |change| < %g", MaxFEChange)
			if ch, ok := root.number(k[7], what, true); ok {
				if math.Abs(ch) >= MaxFEChange {
					r.errorf(k[7], "%s is out of range (expected %s)", fmtNum(ch), what)
				}
				c.FEChange[axis] = ch
			}
		} else {
			c.Points[axis] = root.whole(k[7], "a number of points >= 2", 2)
			c.Model[axis] = root.choice(k[8], fitModels, "through origin")
			if !root.has(k[8]) {
				r.errorf(k[8], "missing (expected one of: %s)", strings.Join(fitModels, "|"))
			}
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
			what := "fitted"
			if fe {
				what = "FE"
			}
			r.errorf(k[0], "%s differs from %s / %s = %s (expected the factor to be %s over predicted EI)", fmtNum(f.Value), k[3], k[6], fmtNum(ei/pred), what)
		}
	}
	root.finish(calibrationKeys(c.Source))
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
	t.r.recordCalibrationSE(t.path, c)
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
