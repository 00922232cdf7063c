package main

import (
	"bytes"
	"context"
	"encoding/json"
	"errors"
	"flag"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"strings"
	"text/tabwriter"
	"time"

	"plica/objective"
	"plica/problems"
	"plica/results"

	"plica/results/report"
)

func init() {
	register(&command{
		name:  "calibrate",
		usage: "BENCH.csv [-design DESIGN.toml [-bellows N] [-printer LABEL] [-o CAL.toml]] [-plot FIT.svg] [-json]",
		short: "fit bending stiffness EI to cantilever bench tests and write a calibration file",
		long: `BENCH.csv has one row per tip load with the columns load_n (or load_g),
deflection_mm, free_length_mm, direction (x or y: the bellows' own axis the
bending is about) and optionally specimen; lines starting with # are comments.
EI is fitted per direction by least squares with a 95 % Student-t interval:
through the origin when the gauge was zeroed, with one zero offset per
specimen and length when a zero-load row reads a deflection (-intercept), and
with the clamp rotation when there are two or more free lengths (-clamp).
With -design the fit is compared with the surrogate's uncalibrated EI for one
bellows of the design; -o then writes the factors to a calibration file that
[[bellows]] tables of the same material and profile name with
calibration_file. Exit status 0 on success, 2 on bad input.`,
		run: runCalibrate,
	})
}

type calibrateOptions struct {
	design, printer, out, plot string
	intercept, clamp           string
	bellows                    int
	json                       bool
}

func runCalibrate(ctx context.Context, fs *flag.FlagSet, args []string, stdout, stderr io.Writer) error {
	var o calibrateOptions
	fs.StringVar(&o.design, "design", "", "compare with the surrogate's EI for a bellows of this design `file`")
	fs.IntVar(&o.bellows, "bellows", 0, "the design's bellows the specimen reproduces, `N` from 1, innermost first (default: the only one with geometry)")
	fs.StringVar(&o.printer, "printer", "", "printer and process `label` recorded in the calibration file")
	fs.StringVar(&o.out, "o", "", "write the calibration to this TOML `file` (needs -design)")
	fs.StringVar(&o.plot, "plot", "", "write an SVG plot of the fit to this `file`")
	fs.StringVar(&o.intercept, "intercept", "auto", "fit a zero offset per specimen and length: auto|on|off (`mode`)")
	fs.StringVar(&o.clamp, "clamp", "auto", "fit the clamp compliance: auto|on|off (`mode`; auto: with two or more free lengths)")
	fs.BoolVar(&o.json, "json", false, "print JSON instead of tables")
	pos, err := parseArgs(fs, args)
	if err != nil {
		return err
	}
	if len(pos) != 1 {
		return usagef("calibrate: expected one bench CSV file, got %d arguments", len(pos))
	}
	intercept, err := termFlag("intercept", o.intercept)
	if err != nil {
		return err
	}
	clamp, err := termFlag("clamp", o.clamp)
	if err != nil {
		return err
	}
	if o.out != "" && o.design == "" {
		return usagef("-o: a calibration file needs -design (the prediction the factors are relative to)")
	}
	// The outputs are checked before any work: never one of the inputs,
	// never each other, and writable.
	if err := emptyFlags(fs, "o", "plot", "design"); err != nil {
		return err
	}
	inputs := []string{pos[0]}
	if o.design != "" {
		inputs = append(inputs, o.design)
	}
	outputs := map[string]string{"-o": o.out, "-plot": o.plot}
	for _, flagName := range []string{"-o", "-plot"} {
		path := outputs[flagName]
		if path == "" {
			continue
		}
		if err := results.CheckOutput(flagName, path, nil, inputs); err != nil {
			return err
		}
		if err := results.ProbeOutput(flagName, path); err != nil {
			return err
		}
	}
	if o.out != "" && results.SamePath(o.out, o.plot) {
		return usagef("-o and -plot name the same file %s (expected two files)", o.out)
	}
	bench, err := problems.LoadBench(pos[0])
	if err != nil {
		return err
	}
	var fits [2]*problems.BenchFit
	var errs problems.Errors
	for _, axis := range bench.Axes() {
		// Each stage looks at ctx: Ctrl-C stops before the next one, with
		// nothing written.
		if err := ctx.Err(); err != nil {
			return err
		}
		f, err := bench.Fit(axis, intercept, clamp)
		if err != nil {
			var e *problems.Error
			if !errors.As(err, &e) {
				return err
			}
			errs = append(errs, e)
			continue
		}
		fits[axis] = f
	}
	if len(errs) > 0 {
		return errs
	}

	if err := ctx.Err(); err != nil {
		return err
	}
	var cal *problems.Calibration
	if o.design != "" {
		if cal, err = calibrateAgainst(o, bench, fits); err != nil {
			return err
		}
	}
	// Everything is computed; now render, then write files.
	if err := ctx.Err(); err != nil {
		return err
	}
	var plot bytes.Buffer
	if o.plot != "" {
		if err := report.CalibrationSVG(&plot, "cantilever bench fit: "+filepath.Base(bench.File), plotPanels(fits)); err != nil {
			return err
		}
	}
	// Both files or neither.
	var paths []string
	var data [][]byte
	if o.plot != "" {
		paths, data = append(paths, o.plot), append(data, plot.Bytes())
	}
	if o.out != "" {
		paths, data = append(paths, o.out), append(data, cal.Format())
	}
	if err := ctx.Err(); err != nil {
		return err
	}
	if err := results.WriteAtomicAll(paths, data); err != nil {
		return err
	}
	out := newCalibrateOutput(bench, fits, cal)
	if o.json {
		enc := json.NewEncoder(stdout)
		enc.SetIndent("", "  ")
		if err := enc.Encode(out); err != nil {
			return err
		}
	} else {
		writeCalibrate(stdout, out)
	}
	for _, p := range paths {
		fmt.Fprintf(stderr, "plica: wrote %s\n", p)
	}
	return nil
}

func termFlag(name, v string) (problems.Term, error) {
	switch v {
	case "auto":
		return problems.TermAuto, nil
	case "on":
		return problems.TermOn, nil
	case "off":
		return problems.TermOff, nil
	}
	return 0, usagef("-%s: %q is not a mode (expected: auto|on|off)", name, v)
}

// calibrateAgainst loads the design, picks the bellows and builds the
// calibration.
func calibrateAgainst(o calibrateOptions, bench *problems.Bench, fits [2]*problems.BenchFit) (*problems.Calibration, error) {
	d, _, err := problems.LoadDesign(o.design)
	if err != nil {
		return nil, err
	}
	if o.out != "" {
		// -o must not replace a calibration file the design reads.
		text, err := os.ReadFile(o.design)
		if err != nil {
			return nil, err
		}
		inputs, err := inputFiles(text, o.design)
		if err != nil {
			return nil, err
		}
		if err := results.CheckOutput("-o", o.out, nil, inputs); err != nil {
			return nil, err
		}
	}
	i, err := pickBellows(d, o.bellows)
	if err != nil {
		return nil, err
	}
	cal, err := problems.NewCalibration(d, i, bench, fits)
	if err != nil {
		return nil, err
	}
	cal.Printer = o.printer
	cal.Date = time.Now()
	cal.BenchFile, cal.DesignFile = bench.File, o.design
	if o.out != "" {
		// Record the inputs relative to the calibration file, as a design
		// names the calibration file relative to itself.
		for _, p := range []*string{&cal.BenchFile, &cal.DesignFile} {
			dir, err1 := filepath.Abs(filepath.Dir(o.out))
			abs, err2 := filepath.Abs(*p)
			if err1 != nil || err2 != nil {
				continue
			}
			if rel, err := filepath.Rel(dir, abs); err == nil {
				*p = filepath.ToSlash(rel)
			}
		}
	}
	return cal, nil
}

func pickBellows(d *objective.Design, n int) (int, error) {
	var geo []string
	only := -1
	for i, b := range d.Bellows {
		if b.Model != nil {
			geo = append(geo, fmt.Sprint(i+1))
			only = i
		}
	}
	switch {
	case n == 0 && len(geo) == 1:
		return only, nil
	case n == 0 && len(geo) == 0:
		return 0, usagef("-design: no bellows with geometry and material (expected one to compare the bench fit with)")
	case n == 0:
		return 0, usagef("-bellows: the design has %d bellows with geometry (expected -bellows N with N one of %s)", len(geo), strings.Join(geo, ", "))
	case n < 1 || n > len(d.Bellows):
		return 0, usagef("-bellows: %d is out of range (expected 1 to %d, innermost first)", n, len(d.Bellows))
	case d.Bellows[n-1].Model == nil:
		return 0, usagef("-bellows: bellows %d has measured stiffness (expected one with geometry: %s)", n, strings.Join(geo, ", "))
	}
	return n - 1, nil
}

func plotPanels(fits [2]*problems.BenchFit) []report.CalibrationPanel {
	var ps []report.CalibrationPanel
	for axis, f := range fits {
		if f == nil {
			continue
		}
		ps = append(ps, report.CalibrationPanel{Title: "bending about " + problems.AxisName(axis) + " (" + f.Model() + ")",
			Points: f.Points, Setups: f.Setups, Fit: &f.Fit})
	}
	return ps
}

// calibrateOutput is the JSON contract of "plica calibrate -json".
type calibrateOutput struct {
	BenchFile   string             `json:"bench_file"`
	LoadColumn  string             `json:"load_column"`
	Fits        []fitOutput        `json:"fits"`
	Calibration *calibrationOutput `json:"calibration,omitempty"`
	Warnings    []string           `json:"warnings"`
}

type fitOutput struct {
	Direction          string           `json:"direction"`
	EI                 num              `json:"ei_n_mm2"`
	SE                 num              `json:"se_n_mm2"`
	CI95               [2]num           `json:"ci95_n_mm2"`
	Points             int              `json:"points"`
	Model              string           `json:"model"`
	FreeLengths        []num            `json:"free_lengths_mm"`
	DOF                int              `json:"degrees_of_freedom"`
	T                  num              `json:"t_quantile"`
	R2                 num              `json:"r2"`
	ResidualSD         num              `json:"residual_sd_mm"`
	MaxDeflectionRatio num              `json:"max_deflection_per_length"`
	ClampCompliance    *[2]num          `json:"clamp_compliance_rad_per_n_mm,omitempty"` // value, SE
	Offsets            []offsetOutput   `json:"offsets,omitempty"`
	Residuals          []residualOutput `json:"residuals"`
}

type offsetOutput struct {
	Setup  string `json:"setup"`
	Offset num    `json:"offset_mm"`
	SE     num    `json:"se_mm"`
}

type residualOutput struct {
	Line       int    `json:"line"`
	Specimen   string `json:"specimen"`
	Load       num    `json:"load_n"`
	FreeLength num    `json:"free_length_mm"`
	Deflection num    `json:"deflection_mm"`
	Fitted     num    `json:"fitted_mm"`
	Residual   num    `json:"residual_mm"`
}

type calibrationOutput struct {
	Material   string         `json:"material"`
	Printer    string         `json:"printer"`
	Profile    string         `json:"profile"`
	Fidelity   string         `json:"fidelity"`
	DesignFile string         `json:"design_file"`
	Bellows    int            `json:"bellows"`
	Factors    []factorOutput `json:"factors"`
}

type factorOutput struct {
	Direction   string `json:"direction"`
	Factor      num    `json:"factor"`
	SE          num    `json:"se"`
	CI95        [2]num `json:"ci95"`
	FittedEI    num    `json:"ei_fitted_n_mm2"`
	PredictedEI num    `json:"ei_predicted_n_mm2"`
}

func newCalibrateOutput(b *problems.Bench, fits [2]*problems.BenchFit, cal *problems.Calibration) *calibrateOutput {
	o := &calibrateOutput{BenchFile: b.File, LoadColumn: b.LoadColumn, Fits: []fitOutput{}, Warnings: []string{}}
	if n := len(b.Unmeasured); n > 0 {
		o.Warnings = append(o.Warnings, fmt.Sprintf("%s:%d: %d row(s) with an empty deflection_mm left out as not yet measured (first on this line)", b.File, b.Unmeasured[0], n))
	}
	for axis, bf := range fits {
		if bf == nil {
			continue
		}
		f := &bf.Fit
		fo := fitOutput{Direction: problems.AxisName(axis), EI: num(f.EI * 1e6), SE: num(f.SE * 1e6),
			CI95: [2]num{num(f.CI[0] * 1e6), num(f.CI[1] * 1e6)}, Points: f.Points, Model: bf.Model(),
			DOF: f.DOF, T: num(f.T), R2: num(f.R2), ResidualSD: num(f.S * 1e3), MaxDeflectionRatio: num(f.MaxDeflectionRatio)}
		for _, l := range bf.Lengths {
			fo.FreeLengths = append(fo.FreeLengths, num(l*1e3))
		}
		if bf.Options.ClampCompliance {
			fo.ClampCompliance = &[2]num{num(f.ClampCompliance * 1e-3), num(f.ClampComplianceSE * 1e-3)}
		}
		for k, a := range f.Offsets {
			fo.Offsets = append(fo.Offsets, offsetOutput{Setup: bf.Setups[k], Offset: num(a * 1e3), SE: num(f.OffsetsSE[k] * 1e3)})
		}
		for i, r := range bf.Rows {
			fo.Residuals = append(fo.Residuals, residualOutput{Line: r.Line, Specimen: r.Specimen, Load: num(r.Load),
				FreeLength: num(r.FreeLength * 1e3), Deflection: num(r.Deflection * 1e3),
				Fitted: num(f.Fitted[i] * 1e3), Residual: num(f.Residuals[i] * 1e3)})
		}
		o.Fits = append(o.Fits, fo)
		o.Warnings = append(o.Warnings, bf.Warnings...)
	}
	if cal != nil {
		co := &calibrationOutput{Material: cal.Material, Printer: cal.Printer, Profile: cal.Profile.String(),
			Fidelity: cal.Fidelity.String(), DesignFile: cal.DesignFile, Bellows: cal.Bellows}
		for axis := range 2 {
			fa := cal.Factor[axis]
			co.Factors = append(co.Factors, factorOutput{Direction: problems.AxisName(axis), Factor: num(fa.Value), SE: num(fa.SE),
				CI95: [2]num{num(fa.CI[0]), num(fa.CI[1])}, FittedEI: num(cal.FittedEI[axis] * 1e6), PredictedEI: num(cal.PredictedEI[axis] * 1e6)})
		}
		o.Calibration = co
	}
	return o
}

func writeCalibrate(w io.Writer, o *calibrateOutput) {
	load := "N"
	if o.LoadColumn == "load_g" {
		load = "g, converted to N with standard gravity 9.80665 m/s²"
	}
	fmt.Fprintf(w, "bench %s (loads in %s)\n\n", o.BenchFile, load)
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
	fmt.Fprintln(tw, "direction\tpoints\tfree_length_mm\tmodel\tEI N·mm²\tSE N·mm²\t95 % interval N·mm²\tR²\ts mm")
	for _, f := range o.Fits {
		ls := make([]string, len(f.FreeLengths))
		for i, l := range f.FreeLengths {
			ls[i] = fmtNum(float64(l))
		}
		fmt.Fprintf(tw, "%s\t%d\t%s\t%s\t%s\t%s (%.2g %%)\t[%s, %s]\t%.5f\t%s\n", f.Direction, f.Points, strings.Join(ls, ","), f.Model,
			fmtEI(float64(f.EI)), fmtNum(float64(f.SE)), 100*float64(f.SE)/float64(f.EI), fmtEI(float64(f.CI95[0])), fmtEI(float64(f.CI95[1])),
			float64(f.R2), fmtNum(float64(f.ResidualSD)))
	}
	tw.Flush()
	for _, f := range o.Fits {
		if f.ClampCompliance != nil {
			c := f.ClampCompliance
			k := "none measurable"
			if c[0] > 0 {
				k = fmtNum(1/float64(c[0])) + " N·mm/rad"
			}
			fmt.Fprintf(w, "direction %s: clamp compliance %s ± %s rad/(N·mm) (clamp stiffness %s)\n", f.Direction,
				fmtNum(float64(c[0])), fmtNum(float64(c[1])), k)
		}
		for _, a := range f.Offsets {
			fmt.Fprintf(w, "direction %s: zero offset %s ± %s mm (%s)\n", f.Direction, fmtNum(float64(a.Offset)), fmtNum(float64(a.SE)), a.Setup)
		}
	}
	fmt.Fprintln(w)
	tw = tabwriter.NewWriter(w, 0, 0, 2, ' ', tabwriter.AlignRight)
	fmt.Fprintln(tw, "line\tdirection\tspecimen\tload_n\tfree_length_mm\tdeflection_mm\tfitted_mm\tresidual_mm\t")
	for _, f := range o.Fits {
		for _, r := range f.Residuals {
			spec := r.Specimen
			if spec == "" {
				spec = "-"
			}
			fmt.Fprintf(tw, "%d\t%s\t%s\t%.4g\t%.4g\t%.3f\t%.3f\t%+.3f\t\n", r.Line, f.Direction, spec, float64(r.Load),
				float64(r.FreeLength), float64(r.Deflection), float64(r.Fitted), clean(math.Round(float64(r.Residual)*1e3)/1e3))
		}
	}
	tw.Flush()
	if c := o.Calibration; c != nil {
		fmt.Fprintf(w, "\ncalibration against bellows %d of %s (%s, profile %s, %s surrogate without calibration)\n", c.Bellows, c.DesignFile, c.Material, c.Profile, c.Fidelity)
		tw = tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
		fmt.Fprintln(tw, "direction\tEI fitted N·mm²\tEI predicted N·mm²\tfactor\tSE\t95 % interval")
		for _, f := range c.Factors {
			fmt.Fprintf(tw, "%s\t%s\t%s\t%.4f\t%.4f\t[%.4f, %.4f]\n", f.Direction, fmtEI(float64(f.FittedEI)), fmtEI(float64(f.PredictedEI)),
				float64(f.Factor), float64(f.SE), float64(f.CI95[0]), float64(f.CI95[1]))
		}
		tw.Flush()
	}
	fmt.Fprintln(w)
	for _, m := range o.Warnings {
		fmt.Fprintf(w, "warning: %s\n", m)
	}
	fmt.Fprintf(w, "note: the fit assumes a linear, small-deflection cantilever (surrogate/REFERENCE.md §4.1); the interval covers bench scatter only, not model error or print-to-print variation beyond the specimens tested.\n")
}

// fmtEI prints a stiffness with at least five significant digits and no
// exponent in the usual range; an interval
// bound that the data leave open prints as "unbounded".
func fmtEI(x float64) string {
	if math.IsInf(x, 1) || math.IsNaN(x) {
		return "unbounded"
	}
	if a := math.Abs(x); a >= 1e5 && a < 1e12 {
		return fmt.Sprintf("%.0f", x)
	}
	return fmt.Sprintf("%.5g", x)
}
