package main

import (
	"context"
	"encoding/json"
	"flag"
	"fmt"
	"io"
	"math"
	"strings"
	"text/tabwriter"

	"plica/objective/kinematics"
	"plica/problems"
)

func init() {
	register(&command{
		name:  "pose",
		usage: "DESIGN.toml -angles-deg a1,a2,... [-insert-mm b1,b2,...] [-step-mm S] [-json]",
		short: "print the shape of a design at one actuation: tip pose, links, backbone",
		long: `Angles and insertions are listed innermost bellows first. An insertion
b <= 0 mm puts the bellows' base |b| mm behind the base plane. Positions are in
the base frame with z along insertion; the rotation maps the tip frame to the
base frame (row-major).`,
		run: runPose,
	})
}

// maxBackboneSamples bounds the backbone that pose prints, so that a tiny
// -step-mm is a usage error rather than an out-of-memory crash.
const maxBackboneSamples = 1000000

// maxAngleDeg bounds a base rotation: a million turns, far beyond any use,
// and far inside what converts to radians and back without overflow.
const maxAngleDeg = 3.6e8

type poseOptions struct {
	angles, inserts string
	step            float64
	json            bool
	loaded          bool
}

func runPose(ctx context.Context, fs *flag.FlagSet, args []string, stdout, stderr io.Writer) error {
	var o poseOptions
	fs.StringVar(&o.angles, "angles-deg", "", "base rotation of each bellows in `degrees`, innermost first (required)")
	fs.StringVar(&o.inserts, "insert-mm", "", "insertion of each bellows in `mm`, innermost first (default all 0)")
	fs.Float64Var(&o.step, "step-mm", 5, "largest backbone sample spacing in `mm`")
	fs.BoolVar(&o.json, "json", false, "print JSON instead of tables")
	fs.BoolVar(&o.loaded, "loaded", false, "the shape under the design's [load] (exact rod model) instead of the unloaded one")
	pos, err := parseArgs(fs, args)
	if err != nil {
		return err
	}
	if len(pos) != 1 {
		return usagef("pose: expected one design file, got %d arguments", len(pos))
	}
	if !(o.step > 0) {
		return usagef("-step-mm: %g is out of range (expected > 0)", o.step)
	}
	d, scen, err := problems.LoadDesign(pos[0])
	if err != nil {
		return err
	}
	robot, st, err := d.Robot()
	if err != nil {
		return err
	}
	a, err := actuation(len(robot.Tubes), o.angles, o.inserts)
	if err != nil {
		return err
	}
	if err := robot.CheckActuation(a); err != nil {
		return usagef("%s", problems.BellowsWording(err))
	}
	longest := 0.0
	for _, t := range robot.Tubes {
		longest = math.Max(longest, t.Length())
	}
	if n := longest / (o.step * 1e-3); n > maxBackboneSamples {
		return usagef("-step-mm: %g gives %.3g backbone samples over %g mm (expected at most %d: a larger step)", o.step, n, longest*1e3, maxBackboneSamples)
	}
	links, err := robot.Links(a, nil)
	if err != nil {
		return err
	}
	tip, err := robot.Tip(a)
	if err != nil {
		return err
	}
	ss, poses, err := robot.Backbone(a, o.step*1e-3)
	if err != nil {
		return err
	}
	if o.loaded {
		if tip, ss, poses, err = loadedPose(links, scen, o.step*1e-3); err != nil {
			return err
		}
	}
	if what := nonFinitePose(tip, links, poses); what != "" {
		// NaN is no position: refuse rather than print it.
		return fmt.Errorf("pose: %s at angles_deg %s is not finite (the design is beyond what the model computes: lengths, curvatures or stiffnesses too large or too small)",
			what, joinFloats(a.Theta, 180/math.Pi))
	}
	if err := ctx.Err(); err != nil {
		return fmt.Errorf("pose interrupted, nothing printed: %w", err)
	}
	out := newPoseOutput(tip, links, poses)
	if o.json {
		enc := json.NewEncoder(stdout)
		enc.SetIndent("", "  ")
		return enc.Encode(out)
	}
	sources := make([]string, len(st))
	for i, s := range st {
		sources[i] = s.Source.String()
	}
	name := d.Name
	if name == "" {
		name = pos[0]
	}
	fmt.Fprintf(stdout, "design %s: %d bellows, stiffness from %s\n", name, len(robot.Tubes), strings.Join(sources, ", "))
	fmt.Fprintf(stdout, "angles_deg %s, insert_mm %s\n\n", joinFloats(a.Theta, 180/math.Pi), joinFloats(a.Beta, 1e3))
	fmt.Fprintf(stdout, "tip position_mm  [%.4f, %.4f, %.4f]\n", z4(out.Tip.Position[0]), z4(out.Tip.Position[1]), z4(out.Tip.Position[2]))
	for i, row := range out.Tip.Rotation {
		label := "               "
		if i == 0 {
			label = "tip rotation   "
		}
		fmt.Fprintf(stdout, "%s  [%9.6f, %9.6f, %9.6f]\n", label, z6(row[0]), z6(row[1]), z6(row[2]))
	}
	fmt.Fprintln(stdout)
	tw := tabwriter.NewWriter(stdout, 0, 0, 2, ' ', tabwriter.AlignRight)
	fmt.Fprintln(tw, "link\tstart_mm\tend_mm\tux_per_m\tuy_per_m\tuz_per_m\tcurvature_per_m\t")
	for i, l := range out.Links {
		k := math.Hypot(l.Curvature[0], l.Curvature[1])
		fmt.Fprintf(tw, "%d\t%.3f\t%.3f\t%.4f\t%.4f\t%.4f\t%.4f\t\n", i+1, l.Start, l.End, z4(l.Curvature[0]), z4(l.Curvature[1]), z4(l.Curvature[2]), k)
	}
	tw.Flush()
	fmt.Fprintln(stdout)
	tw = tabwriter.NewWriter(stdout, 0, 0, 2, ' ', tabwriter.AlignRight)
	fmt.Fprintln(tw, "s_mm\tx_mm\ty_mm\tz_mm\t")
	for i, p := range out.Backbone {
		fmt.Fprintf(tw, "%.3f\t%.4f\t%.4f\t%.4f\t\n", ss[i]*1e3, z4(p[0]), z4(p[1]), z4(p[2]))
	}
	return tw.Flush()
}

// nonFinitePose names the first non-finite quantity of a shape, "" if
// none.
func nonFinitePose(tip kinematics.Pose, links []kinematics.Link, poses []kinematics.Pose) string {
	bad := func(x float64) bool { return math.IsNaN(x) || math.IsInf(x, 0) }
	for i := range 3 {
		if bad(tip.P[i]) {
			return "the tip position"
		}
		for j := range 3 {
			if bad(tip.R[i][j]) {
				return "the tip orientation"
			}
		}
	}
	for k, l := range links {
		if bad(l.Start) || bad(l.End) || bad(l.U[0]) || bad(l.U[1]) || bad(l.U[2]) {
			return fmt.Sprintf("link %d", k+1)
		}
	}
	for _, p := range poses {
		if bad(p.P[0]) || bad(p.P[1]) || bad(p.P[2]) {
			return "the backbone"
		}
	}
	return ""
}

// actuation converts the command-line lists to SI.
func actuation(n int, angles, inserts string) (kinematics.Actuation, error) {
	th, err := floatList("angles-deg", angles)
	if err != nil {
		return kinematics.Actuation{}, err
	}
	if len(th) != n {
		return kinematics.Actuation{}, usagef("-angles-deg: %d values for %d bellows (expected one angle per bellows, innermost first)", len(th), n)
	}
	be, err := floatList("insert-mm", inserts)
	if err != nil {
		return kinematics.Actuation{}, err
	}
	if be == nil {
		be = make([]float64, n)
	}
	if len(be) != n {
		return kinematics.Actuation{}, usagef("-insert-mm: %d values for %d bellows (expected one insertion per bellows, innermost first)", len(be), n)
	}
	a := kinematics.Actuation{Theta: make([]float64, n), Beta: make([]float64, n)}
	for i := range th {
		if math.Abs(th[i]) > maxAngleDeg {
			return kinematics.Actuation{}, usagef("-angles-deg: %g is out of range (expected angles in degrees of at most %g in magnitude)", th[i], float64(maxAngleDeg))
		}
		a.Theta[i] = th[i] * math.Pi / 180
		a.Beta[i] = be[i] * 1e-3
	}
	return a, nil
}

// poseOutput is the JSON contract of "plica pose -json".
type poseOutput struct {
	Tip struct {
		Position [3]float64    `json:"position_mm"`
		Rotation [3][3]float64 `json:"rotation"`
	} `json:"tip"`
	Links []struct {
		Start     float64    `json:"start_mm"`
		End       float64    `json:"end_mm"`
		Curvature [3]float64 `json:"curvature_per_m"`
	} `json:"links"`
	Backbone [][3]float64 `json:"backbone_mm"`
}

func newPoseOutput(tip kinematics.Pose, links []kinematics.Link, poses []kinematics.Pose) *poseOutput {
	o := &poseOutput{}
	for i := range 3 {
		o.Tip.Position[i] = clean(tip.P[i] * 1e3)
		for j := range 3 {
			o.Tip.Rotation[i][j] = clean(tip.R[i][j])
		}
	}
	o.Links = make([]struct {
		Start     float64    `json:"start_mm"`
		End       float64    `json:"end_mm"`
		Curvature [3]float64 `json:"curvature_per_m"`
	}, len(links))
	for i, l := range links {
		o.Links[i].Start = clean(l.Start * 1e3)
		o.Links[i].End = clean(l.End * 1e3)
		for j := range 3 {
			o.Links[i].Curvature[j] = clean(l.U[j])
		}
	}
	o.Backbone = make([][3]float64, len(poses))
	for i, p := range poses {
		for j := range 3 {
			o.Backbone[i][j] = clean(p.P[j] * 1e3)
		}
	}
	return o
}

// clean turns -0 into 0 so outputs compare and read cleanly.
func clean(x float64) float64 {
	if x == 0 {
		return 0
	}
	return x
}

func joinFloats(v []float64, scale float64) string {
	parts := make([]string, len(v))
	for i, x := range v {
		parts[i] = fmt.Sprintf("%g", clean(math.Round(x*scale*1e9)/1e9))
	}
	return strings.Join(parts, ",")
}

// z4 and z6 turn values that print as -0 at 4 or 6 decimals into 0.
func z4(x float64) float64 {
	if math.Abs(x) < 5e-5 {
		return 0
	}
	return x
}

func z6(x float64) float64 {
	if math.Abs(x) < 5e-7 {
		return 0
	}
	return x
}
