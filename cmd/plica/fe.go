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
	"plica/surrogate"
	"plica/surrogate/fecheck"
)

func init() {
	register(&command{
		name:  "fe",
		usage: "DESIGN.toml [-o DIR] [-fine] [-bellows N] [-calibration CAL.toml] [-json]",
		short: "cross-check each bellows with CalculiX finite elements beside the surrogate",
		long: `For each bellows given by geometry, writes CalculiX decks of the real wall
into DIR (a 3-D S8R shell model of 8 convolutions with rigid end rings under
axial force, torque and bending about x and y; an axisymmetric CAX8 solid of
one pitch under extension), runs ccx from PATH, reads the results and prints
them beside the uncalibrated surrogate at the design's fidelity: EI_x, EI_y,
GJ, axial rate, peak strain per unit curvature, their relative difference,
the mesh, the two-mesh convergence figure and the run time. Each mesh is
solved with the next coarser one too (coarse: a draft mesh; -fine: the
coarse mesh) for the convergence figure. About 5 s of one core per
bellows, 12 s with a spine (-fine: about 15 s, 40 s with a spine).

DIR must not exist (default: runs/DESIGN-fe, numbered when taken); it
appears whole at the end, or not at all. -calibration writes the FE bending
stiffness as a calibration file (source "fe") that [[bellows]] tables of the
same material and profile name with calibration_file, like a bench
calibration. Without ccx the decks are written and the verb says how to run
them. Progress goes to standard error. Exit status 0 on success, 1 when ccx
is missing or fails, 2 on bad input, 130 when interrupted (ccx is stopped,
nothing is written).`,
		run: runFE,
	})
}

type feOptions struct {
	out, cal string
	fine     bool
	bellows  int
	json     bool
}

func runFE(ctx context.Context, fs *flag.FlagSet, args []string, stdout, stderr io.Writer) error {
	var o feOptions
	fs.StringVar(&o.out, "o", "", "run `folder` to create (default: runs/DESIGN-fe)")
	fs.BoolVar(&o.fine, "fine", false, "solve the fine mesh (convergence from the coarse one); about 15 s of one core per bellows, 40 s with a spine")
	fs.IntVar(&o.bellows, "bellows", 0, "check only bellows `N` (from 1, innermost first; default: every bellows with geometry)")
	fs.StringVar(&o.cal, "calibration", "", "write the FE bending stiffness as a calibration `file` (source fe; one bellows)")
	fs.BoolVar(&o.json, "json", false, "print JSON instead of tables")
	pos, err := parseArgs(fs, args)
	if err != nil {
		return err
	}
	if len(pos) != 1 {
		return usagef("fe: expected one design file, got %d arguments", len(pos))
	}
	design := pos[0]
	d, _, err := problems.LoadDesign(design)
	if err != nil {
		return err
	}
	picked, err := feBellowsOf(d, o)
	if err != nil {
		return err
	}
	if o.cal != "" {
		if fi, err := os.Stat(filepath.Dir(o.cal)); err != nil || !fi.IsDir() {
			return usagef("-calibration: the folder of %s does not exist (expected a file in an existing folder)", o.cal)
		}
		if fi, err := os.Stat(o.cal); err == nil && fi.IsDir() {
			return usagef("-calibration: %s is a folder (expected a calibration file name)", o.cal)
		}
	}
	dir, err := feDir(design, o.out)
	if err != nil {
		return err
	}
	mesh, from := fecheck.Coarse, "draft"
	if o.fine {
		mesh, from = fecheck.Fine, "coarse"
	}

	// Everything goes into a hidden staging folder beside DIR that is
	// renamed to DIR once complete, and removed on any failure.
	parent := filepath.Dir(dir)
	_, statErr := os.Stat(parent)
	if err := os.MkdirAll(parent, 0o755); err != nil {
		return fmt.Errorf("fe: cannot create %s: %w", parent, errors.Unwrap(err))
	}
	kept := false
	defer func() {
		if !kept && statErr != nil {
			os.Remove(parent) // made here (runs/): removed again if still empty
		}
	}()
	stage, err := os.MkdirTemp(parent, "."+filepath.Base(dir)+".partial-")
	if err != nil {
		return fmt.Errorf("fe: cannot create the run folder: %w", errors.Unwrap(err))
	}
	defer func() {
		if !kept {
			os.RemoveAll(stage)
		}
	}()
	if err := os.Chmod(stage, 0o755); err != nil {
		return err
	}
	publish := func() error {
		if _, err := os.Lstat(dir); err == nil {
			return fmt.Errorf("fe: %s appeared while the decks were solved (nothing written; choose another -o)", dir)
		}
		if err := os.Rename(stage, dir); err != nil {
			return fmt.Errorf("fe: cannot create %s: %w", dir, errors.Unwrap(err))
		}
		kept = true
		return nil
	}

	if !fecheck.HaveCCX("") {
		var where []string
		for _, i := range picked {
			sub := filepath.Join(feSub(i), mesh.String())
			if err := os.MkdirAll(filepath.Join(stage, sub), 0o755); err != nil {
				return err
			}
			write := func(name string, w func(io.Writer) error) error {
				return results.WriteAtomicStream(filepath.Join(stage, sub, name), w)
			}
			if _, err := fecheck.WriteDecks(write, *d.Bellows[i].Model, mesh); err != nil {
				return &objective.BellowsError{Index: i, Err: err}
			}
			where = append(where, filepath.Join(dir, sub))
		}
		if err := publish(); err != nil {
			return err
		}
		msg := fmt.Sprintf("fe: %v\nfe: wrote the CalculiX decks (%s mesh) to %s; run them with `ccx -i shell` and `ccx -i solid` in %s",
			fecheck.ErrNoCCX, mesh, dir, strings.Join(where, " and in "))
		if o.cal != "" {
			msg += "\nfe: no calibration written (it needs the FE results)"
		}
		return &failure{msg: msg}
	}

	start := time.Now()
	out := &feOutput{DesignFile: design, Design: d.Name, Dir: dir, Mesh: mesh.String(), ConvergenceMesh: from,
		Fidelity: d.Fidelity.String(), Bellows: []feBellowsOutput{}, Skipped: []feSkipped{}, Caution: feCaution}
	for i, b := range d.Bellows {
		if b.Model == nil && (o.bellows == 0 || o.bellows == i+1) {
			out.Skipped = append(out.Skipped, feSkipped{Bellows: i + 1, Reason: "measured stiffness: no geometry to model"})
		}
	}
	solved := make(map[int]*fecheck.Result, len(picked))
	for k, i := range picked {
		label := fmt.Sprintf("bellows %d (%d of %d)", i+1, k+1, len(picked))
		opt := fecheck.Options{Mesh: mesh, Convergence: true, Fidelity: d.Fidelity, Dir: filepath.Join(stage, feSub(i)),
			Progress: func(p fecheck.Progress) {
				if !p.Solving {
					fmt.Fprintf(stderr, "plica fe: %s: %s mesh, %s model (%d load case%s): running ccx\n", label, p.Mesh, p.Model, len(p.Cases), plural(len(p.Cases)))
					return
				}
				fmt.Fprintf(stderr, "plica fe: %s: %s mesh, %s model: solving %s\n", label, p.Mesh, p.Model, strings.Join(p.Cases, ", "))
			}}
		res, err := fecheck.Run(ctx, *d.Bellows[i].Model, opt)
		if err != nil {
			if ctx.Err() != nil || errors.Is(err, context.Canceled) {
				return fmt.Errorf("fe interrupted, ccx stopped, nothing written: %w", context.Canceled)
			}
			var ie *surrogate.InputError
			if errors.As(err, &ie) {
				return &objective.BellowsError{Index: i, Err: err}
			}
			return fmt.Errorf("fe: bellows %d: %v (nothing written)", i+1, err)
		}
		fmt.Fprintf(stderr, "plica fe: %s: done in %.1f s\n", label, res.RunTimeS)
		solved[i] = res
		out.Bellows = append(out.Bellows, newFEBellows(i, d.Bellows[i].Model, res, filepath.Join(dir, feSub(i))))
	}

	var cal *problems.Calibration
	if o.cal != "" {
		i := picked[0]
		sh, cv := solved[i].Shell, solved[i].Convergence
		tensor := [2][2]float64{{sh.EIxNm2, sh.EIxyNm2}, {sh.EIxyNm2, sh.EIyNm2}}
		cal, err = problems.NewFECalibration(d, i, tensor, [2]float64{cv.EIx, cv.EIy}, mesh.String())
		if err != nil {
			return fmt.Errorf("fe: -calibration: %w (nothing written)", err)
		}
		cal.Date = time.Now()
		cal.FEDir, cal.DesignFile = relativeTo(o.cal, dir), relativeTo(o.cal, design)
		out.Calibration = newFECalibrationOutput(o.cal, cal)
	}
	out.RunTime = num(time.Since(start).Seconds())

	// Everything is computed: render, keep the record in the folder, then
	// publish the folder and write the calibration.
	var text, js bytes.Buffer
	writeFE(&text, out)
	enc := json.NewEncoder(&js)
	enc.SetIndent("", "  ")
	if err := enc.Encode(out); err != nil {
		return err
	}
	for name, data := range map[string][]byte{"fe.json": js.Bytes(), "fe.txt": text.Bytes()} {
		if err := results.WriteAtomic(filepath.Join(stage, name), data); err != nil {
			return err
		}
	}
	if err := publish(); err != nil {
		return err
	}
	if o.json {
		stdout.Write(js.Bytes())
	} else {
		stdout.Write(text.Bytes())
	}
	fmt.Fprintf(stderr, "plica: wrote %s\n", dir)
	if cal != nil {
		if err := results.WriteAtomic(o.cal, cal.Format()); err != nil {
			return fmt.Errorf("fe: -calibration: %w (the FE run is saved in %s)", err, dir)
		}
		fmt.Fprintf(stderr, "plica: wrote %s\n", o.cal)
	}
	return nil
}

func plural(n int) string {
	if n == 1 {
		return ""
	}
	return "s"
}

// feCaution is printed with every FE cross-check.
const feCaution = "The FE values are model estimates too (linear elastic, ideal geometry and material, S8R shells on the midsurface, rigid end rings): they check the surrogate, not the printed part. Verify on a printed prototype before relying on a design."

// feBellowsOf returns the bellows to check (0-based): every bellows with
// geometry, or the one -bellows names; -calibration needs exactly one.
func feBellowsOf(d *objective.Design, o feOptions) ([]int, error) {
	if o.bellows != 0 || o.cal != "" {
		i, err := pickBellows(d, o.bellows)
		if err != nil {
			if o.bellows == 0 {
				return nil, usagef("-calibration: %v", err)
			}
			return nil, err
		}
		return []int{i}, nil
	}
	var out []int
	for i, b := range d.Bellows {
		if b.Model != nil {
			out = append(out, i)
		}
	}
	if len(out) == 0 {
		return nil, usagef("fe: no bellows has geometry and material (expected at least one to model; measured stiffness has nothing to cross-check)")
	}
	return out, nil
}

// feDir returns the run folder to create: out, which must not exist, or
// runs/DESIGN-fe, numbered -2, -3, … when taken.
func feDir(design, out string) (string, error) {
	if out != "" {
		if _, err := os.Lstat(out); err == nil {
			return "", usagef("-o: %s already exists (fe never overwrites: choose another -o)", out)
		}
		return out, nil
	}
	base := filepath.Join("runs", strings.TrimSuffix(filepath.Base(design), filepath.Ext(design))+"-fe")
	for n := 1; ; n++ {
		dir := base
		if n > 1 {
			dir = fmt.Sprintf("%s-%d", base, n)
		}
		if _, err := os.Lstat(dir); errors.Is(err, os.ErrNotExist) {
			return dir, nil
		}
	}
}

// feSub is the subfolder of bellows i (0-based) in a run folder.
func feSub(i int) string { return fmt.Sprintf("bellows-%d", i+1) }

// relativeTo returns path relative to the folder of file (a calibration
// file names its sources relative to itself), or path as given.
func relativeTo(file, path string) string {
	dir, err1 := filepath.Abs(filepath.Dir(file))
	abs, err2 := filepath.Abs(path)
	if err1 != nil || err2 != nil {
		return path
	}
	if rel, err := filepath.Rel(dir, abs); err == nil {
		return filepath.ToSlash(rel)
	}
	return path
}

// feOutput is the JSON contract of "plica fe -json" (also fe.json in the
// run folder). Units are in the keys; every quantity is in the unit its
// key names.
type feOutput struct {
	DesignFile      string            `json:"design_file"`
	Design          string            `json:"design_name"`
	Dir             string            `json:"dir"`
	Mesh            string            `json:"mesh"`
	ConvergenceMesh string            `json:"convergence_mesh"`
	Fidelity        string            `json:"surrogate_fidelity"`
	RunTime         num               `json:"run_time_s"`
	Bellows         []feBellowsOutput `json:"bellows"`
	Skipped         []feSkipped       `json:"skipped"`
	Calibration     *feCalOutput      `json:"calibration,omitempty"`
	Caution         string            `json:"caution"`
}

type feSkipped struct {
	Bellows int    `json:"bellows"`
	Reason  string `json:"reason"`
}

type feBellowsOutput struct {
	Bellows    int          `json:"bellows"`
	Material   string       `json:"material"`
	Profile    string       `json:"profile"`
	Winding    string       `json:"winding"`
	Dir        string       `json:"dir"`
	Mesh       feMesh       `json:"mesh"`
	EIxy       num          `json:"fe_ei_xy_n_mm2"`
	Quantities feQuantities `json:"quantities"`
	RunTime    num          `json:"run_time_s"`
}

type feMesh struct {
	Name            string `json:"name"`
	ConvergenceMesh string `json:"convergence_mesh"`
	ShellElements   int    `json:"shell_s8r_elements"`
	ShellNodes      int    `json:"shell_nodes"`
	Convolutions    int    `json:"shell_convolutions"`
	Measured        int    `json:"shell_measured_convolutions"`
	SolidElements   int    `json:"solid_cax8_elements"`
	ThroughWall     int    `json:"solid_elements_through_wall"`
	ShellRunTime    num    `json:"shell_run_time_s"`
	SolidRunTime    num    `json:"solid_run_time_s"`
}

// feQuantities are the compared quantities, each in the unit of its key.
type feQuantities struct {
	EIx                feRow `json:"ei_x_n_mm2"`
	EIy                feRow `json:"ei_y_n_mm2"`
	GJ                 feRow `json:"gj_n_mm2"`
	AxialRate          feRow `json:"axial_rate_per_convolution_n_per_mm"`
	StrainPerCurvature feRow `json:"strain_per_curvature_m"`
	SolidAxialRate     feRow `json:"solid_axial_rate_per_convolution_n_per_mm"`
	SolidStrainPerExt  feRow `json:"solid_strain_per_extension_per_mm"`
}

// feRow is one quantity, FE beside the surrogate.
type feRow struct {
	FE         num `json:"fe"`
	Surrogate  num `json:"surrogate"`
	RelDiff    num `json:"rel_diff"`        // surrogate/FE − 1
	MeshChange num `json:"mesh_change_rel"` // (FE − FE on the convergence mesh)/FE
}

// feQuantity ties a fecheck comparison to its output field, label, scale
// from SI and convergence figure.
type feQuantity struct {
	quantity, label string
	scale           float64
	field           func(*feQuantities) *feRow
	change          func(*fecheck.Convergence) float64
}

var feQuantityTable = []feQuantity{
	{"ei_x", "EI_x N·mm²", 1e6, func(q *feQuantities) *feRow { return &q.EIx }, func(c *fecheck.Convergence) float64 { return c.EIx }},
	{"ei_y", "EI_y N·mm²", 1e6, func(q *feQuantities) *feRow { return &q.EIy }, func(c *fecheck.Convergence) float64 { return c.EIy }},
	{"gj", "GJ N·mm²", 1e6, func(q *feQuantities) *feRow { return &q.GJ }, func(c *fecheck.Convergence) float64 { return c.GJ }},
	{"axial_rate_per_convolution", "axial rate per convolution N/mm", 1e-3, func(q *feQuantities) *feRow { return &q.AxialRate },
		func(c *fecheck.Convergence) float64 { return c.AxialRate }},
	{"strain_per_curvature", "peak strain per curvature m (shell)", 1, func(q *feQuantities) *feRow { return &q.StrainPerCurvature },
		func(c *fecheck.Convergence) float64 { return c.StrainPerCurvature }},
	{"solid_axial_rate_per_convolution", "axial rate per convolution N/mm (solid)", 1e-3, func(q *feQuantities) *feRow { return &q.SolidAxialRate },
		func(c *fecheck.Convergence) float64 { return c.SolidAxialRate }},
	{"solid_strain_per_extension", "peak strain per extension 1/mm (solid)", 1e-3, func(q *feQuantities) *feRow { return &q.SolidStrainPerExt },
		func(c *fecheck.Convergence) float64 { return c.SolidStrainPerExtent }},
}

func newFEBellows(i int, m *surrogate.Bellows, r *fecheck.Result, dir string) feBellowsOutput {
	wind := surrogate.Revolved
	if m.Helical {
		wind = surrogate.Helical
	}
	o := feBellowsOutput{Bellows: i + 1, Material: m.Material.Name, Profile: m.Profile.String(), Winding: wind.String(),
		Dir: dir, RunTime: num(r.RunTimeS)}
	o.Mesh = feMesh{Name: r.Mesh}
	if r.Convergence != nil {
		o.Mesh.ConvergenceMesh = r.Convergence.FromMesh
	}
	if sh := r.Shell; sh != nil {
		o.Mesh.ShellElements, o.Mesh.ShellNodes, o.Mesh.Convolutions, o.Mesh.Measured = sh.Elements, sh.Nodes, sh.Convolutions, sh.MeasuredConvolutions
		o.Mesh.ShellRunTime = num(sh.RunTimeS)
		o.EIxy = num(sh.EIxyNm2 * 1e6)
	}
	if so := r.Solid; so != nil {
		o.Mesh.SolidElements, o.Mesh.ThroughWall, o.Mesh.SolidRunTime = so.Elements, so.ThroughWall, num(so.RunTimeS)
	}
	for _, c := range r.Comparison {
		for _, q := range feQuantityTable {
			if q.quantity != c.Quantity {
				continue
			}
			row := q.field(&o.Quantities)
			*row = feRow{FE: num(c.FE * q.scale), Surrogate: num(c.Surrogate * q.scale), RelDiff: num(c.RelDiff), MeshChange: num(math.NaN())}
			if r.Convergence != nil {
				row.MeshChange = num(q.change(r.Convergence))
			}
		}
	}
	return o
}

type feCalOutput struct {
	File     string          `json:"file"`
	Bellows  int             `json:"bellows"`
	Material string          `json:"material"`
	Profile  string          `json:"profile"`
	Factors  []feCalDirOuput `json:"factors"`
}

type feCalDirOuput struct {
	Direction   string `json:"direction"`
	Factor      num    `json:"factor"`
	SE          num    `json:"se"`
	FEEI        num    `json:"ei_fe_n_mm2"`
	PredictedEI num    `json:"ei_predicted_n_mm2"`
	MeshChange  num    `json:"ei_mesh_change_rel"`
}

func newFECalibrationOutput(file string, c *problems.Calibration) *feCalOutput {
	o := &feCalOutput{File: file, Bellows: c.Bellows, Material: c.Material, Profile: c.Profile.String()}
	for axis := range 2 {
		o.Factors = append(o.Factors, feCalDirOuput{Direction: problems.AxisName(axis), Factor: num(c.Factor[axis].Value),
			SE: num(c.Factor[axis].SE), FEEI: num(c.FittedEI[axis] * 1e6), PredictedEI: num(c.PredictedEI[axis] * 1e6),
			MeshChange: num(c.FEChange[axis])})
	}
	return o
}

func pct(x num) string {
	f := float64(x)
	if f != f {
		return "n/a"
	}
	return fmt.Sprintf("%+.2f %%", 100*f)
}

// writeFE prints the cross-check as tables.
func writeFE(w io.Writer, o *feOutput) {
	name := o.Design
	if name == "" {
		name = o.DesignFile
	}
	fmt.Fprintf(w, "FE cross-check of %s (%s) with CalculiX\n", name, o.DesignFile)
	fmt.Fprintf(w, "%s mesh, convergence from the %s mesh; surrogate at %s fidelity without calibration\n", o.Mesh, o.ConvergenceMesh, o.Fidelity)
	fmt.Fprintf(w, "run folder %s\n", o.Dir)
	for _, b := range o.Bellows {
		m := b.Mesh
		fmt.Fprintf(w, "\nbellows %d: %s, %s, %s; %.1f s\n", b.Bellows, b.Material, b.Profile, b.Winding, float64(b.RunTime))
		fmt.Fprintf(w, "  shell: %d S8R elements, %d nodes, %d convolutions (%d measured), %.1f s\n",
			m.ShellElements, m.ShellNodes, m.Convolutions, m.Measured, float64(m.ShellRunTime))
		fmt.Fprintf(w, "  solid: %d CAX8 elements, %d through the wall, %.1f s\n", m.SolidElements, m.ThroughWall, float64(m.SolidRunTime))
		tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
		fmt.Fprintln(tw, "  quantity\tFE\tsurrogate\tdifference\tmesh change\t")
		for _, q := range feQuantityTable {
			r := q.field(&b.Quantities)
			fmt.Fprintf(tw, "  %s\t%s\t%s\t%s\t%s\t\n", q.label, fmtEI(float64(r.FE)), fmtEI(float64(r.Surrogate)), pct(r.RelDiff), pct(r.MeshChange))
		}
		tw.Flush()
		fmt.Fprintf(w, "  FE EI_xy %s N·mm² (coupling of the bending axes)\n", fmtNum(float64(b.EIxy)))
	}
	for _, s := range o.Skipped {
		fmt.Fprintf(w, "\nbellows %d: not modelled (%s)\n", s.Bellows, s.Reason)
	}
	fmt.Fprintf(w, "\ndifference: surrogate/FE − 1. mesh change: (FE − FE on the %s mesh)/FE, the two-mesh convergence figure.\n", o.ConvergenceMesh)
	if c := o.Calibration; c != nil {
		fmt.Fprintf(w, "\ncalibration (source fe) of bellows %d (%s, profile %s) for %s\n", c.Bellows, c.Material, c.Profile, c.File)
		tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
		fmt.Fprintln(tw, "direction\tEI FE N·mm²\tEI predicted N·mm²\tfactor\tSE\t")
		for _, f := range c.Factors {
			fmt.Fprintf(tw, "%s\t%s\t%s\t%.4f\t%.4f\t\n", f.Direction, fmtEI(float64(f.FEEI)), fmtEI(float64(f.PredictedEI)), float64(f.Factor), float64(f.SE))
		}
		tw.Flush()
	}
	fmt.Fprintf(w, "\ncaution: %s\ntotal run time %.1f s\n", o.Caution, float64(o.RunTime))
}
