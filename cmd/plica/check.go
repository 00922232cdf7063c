package main

import (
	"context"
	"encoding/json"
	"flag"
	"fmt"
	"io"
	"math"
	"os"
	"strings"
	"text/tabwriter"
	"time"

	"plica/objective"
	"plica/problems"
	"plica/results"
)

func init() {
	register(&command{
		name:  "check",
		usage: "DESIGN.toml [-json] [-robust [-samples N]]",
		short: "score one design and check it against its requirements before printing",
		long: `Prints every score with its unit, every requirement with its limit and
PASS or FAIL, the models used, and the cautions. A design whose physics
leaves floating point (say a non-finite tip) fails with the reason. A long
check shows its progress when standard error is a terminal. Exit status 0
when every check passes, 1 when any fails, 2 on bad input, 130 when
interrupted (Ctrl-C or SIGTERM; nothing is printed).

-robust also runs the design's [scatter] table by Monte Carlo (every
sample through the full model): the probability that each check passes,
with its standard error, the probability that all pass, and each score's
mean, standard deviation and 5th, 50th and 95th percentiles. -samples
overrides the table's sample count. The exit status stays that of the
nominal design.`,
		run: runCheck,
	})
}

func runCheck(ctx context.Context, fs *flag.FlagSet, args []string, stdout, stderr io.Writer) error {
	asJSON := fs.Bool("json", false, "print JSON instead of tables")
	robust := fs.Bool("robust", false, "also estimate pass probabilities under the design's [scatter] by Monte Carlo")
	samples := fs.Int("samples", 0, "Monte Carlo samples for -robust (default: the [scatter] table's, else 1000)")
	pos, err := parseArgs(fs, args)
	if err != nil {
		return err
	}
	if len(pos) != 1 {
		return usagef("check: expected one design file, got %d arguments", len(pos))
	}
	if *samples < 0 || *samples > objective.MaxScatterSamples || (*samples > 0 && !*robust) {
		return usagef("check: -samples %d (expected 1 to %d, with -robust)", *samples, objective.MaxScatterSamples)
	}
	d, sc, err := problems.LoadDesign(pos[0])
	if err != nil {
		return err
	}
	prog := newProgressLine(stderr, "check")
	res, err := objective.EvaluateProgress(ctx, d, sc, prog.report)
	prog.clear()
	if err != nil {
		if ctx.Err() != nil {
			return fmt.Errorf("check interrupted, nothing printed: %w", ctx.Err())
		}
		return err
	}
	var rob *objective.Robust
	var scat *objective.Scatter
	if *robust {
		if rob, scat, err = runRobust(ctx, stderr, pos[0], d, sc, *samples); err != nil {
			if ctx.Err() != nil {
				return fmt.Errorf("check interrupted, nothing printed: %w", ctx.Err())
			}
			return err
		}
	}
	if *asJSON {
		enc := json.NewEncoder(stdout)
		enc.SetIndent("", "  ")
		out := newCheckOutput(res)
		if rob != nil {
			out.Robust = newRobustOutput(rob, scat, sc.Requirements.MinPassProbability)
		}
		if err := enc.Encode(out); err != nil {
			return err
		}
	} else {
		name := d.Name
		if name == "" {
			name = pos[0]
		}
		writeCheck(stdout, name, res)
		if rob != nil {
			writeRobust(stdout, rob, scat, sc.Requirements.MinPassProbability)
		}
	}
	if !res.Pass {
		return &failure{}
	}
	return nil
}

// progressLine draws one self-overwriting progress line on a terminal,
// once the work has taken longer than progressDelay; on anything else it
// draws nothing, so that scripts and pipes see only the result.
type progressLine struct {
	w           io.Writer // nil: not a terminal
	verb        string
	start, last time.Time
	drawn       bool
	stage       string
}

const (
	progressDelay    = 500 * time.Millisecond
	progressInterval = 200 * time.Millisecond
)

func newProgressLine(w io.Writer, verb string) *progressLine {
	p := &progressLine{verb: verb, start: time.Now()}
	if isTerminal(w) {
		p.w = w
	}
	return p
}

// isTerminal is true when w is a character device (a terminal).
func isTerminal(w io.Writer) bool {
	f, ok := w.(*os.File)
	if !ok {
		return false
	}
	fi, err := f.Stat()
	return err == nil && fi.Mode()&os.ModeCharDevice != 0
}

func (p *progressLine) report(pr objective.Progress) {
	if p.w == nil || pr.Total <= 0 {
		return
	}
	now := time.Now()
	if now.Sub(p.start) < progressDelay || (pr.Stage == p.stage && now.Sub(p.last) < progressInterval) {
		return
	}
	p.last, p.stage, p.drawn = now, pr.Stage, true
	fmt.Fprintf(p.w, "\r\033[K%s: %s %3.0f %% (%d of %d)", p.verb, pr.Stage, 100*float64(pr.Done)/float64(pr.Total), pr.Done, pr.Total)
}

// clear removes the progress line, if one was drawn.
func (p *progressLine) clear() {
	if p.drawn {
		fmt.Fprint(p.w, "\r\033[K")
		p.drawn = false
	}
}

// num is a float that encodes NaN (a value the model cannot give, such as
// the wall strain of a bellows with measured stiffness) as JSON null.
type num float64

func (x num) MarshalJSON() ([]byte, error) {
	f := float64(x)
	if math.IsNaN(f) || math.IsInf(f, 0) {
		return []byte("null"), nil
	}
	return json.Marshal(round6(f))
}

// round6 keeps six significant digits.
func round6(f float64) float64 {
	if f == 0 {
		return 0
	}
	p := math.Pow(10, 5-math.Floor(math.Log10(math.Abs(f))))
	return math.Round(f*p) / p
}

type checkOutput struct {
	Pass bool `json:"pass"`
	// Scores holds every score of objective.AllScores by name (units in
	// the names), plus the common rotation angles of the worst sag.
	Scores   map[string]any  `json:"scores"`
	Bellows  []bellowsOutput `json:"bellows"`
	Checks   []checkLine     `json:"checks"`
	Models   []string        `json:"models"`
	Warnings []string        `json:"warnings"`
	Caution  string          `json:"caution"`
	Robust   *robustOutput   `json:"robust,omitempty"`
	// TaskPoints gives the closest tip and miss per task point (empty
	// without task points).
	TaskPoints []taskPointLine `json:"task_points"`
	// Limits says, per failed check, what limits the design.
	Limits []string `json:"limits"`
}

type bellowsOutput struct {
	EI                 [2]num `json:"ei_n_mm2"`
	EIxy               num    `json:"ei_xy_n_mm2"`
	GJ                 num    `json:"gj_n_mm2"`
	EA                 num    `json:"ea_n"`
	AxialRate          num    `json:"axial_rate_per_convolution_n_per_mm"`
	LinearDensity      num    `json:"linear_density_kg_per_m"`
	StrainPerCurvature num    `json:"strain_per_curvature_m"`
	Source             string `json:"stiffness_source"`
}

type checkLine struct {
	Name  string `json:"name"`
	Value num    `json:"value"`
	Limit num    `json:"limit"`
	Unit  string `json:"unit"`
	Pass  bool   `json:"pass"`
	Warn  bool   `json:"warn_only,omitempty"`
	Kind  string `json:"kind"`
	Note  string `json:"note,omitempty"`
}

func bellowsRows(st []objective.Stiffness) []bellowsOutput {
	out := make([]bellowsOutput, len(st))
	for i, s := range st {
		b := bellowsOutput{
			EI:            [2]num{num(s.EI[0][0] * 1e6), num(s.EI[1][1] * 1e6)},
			EIxy:          num(s.EI[0][1] * 1e6),
			GJ:            num(s.GJ * 1e6),
			EA:            num(math.NaN()),
			AxialRate:     num(math.NaN()),
			LinearDensity: num(s.LinearDensity),
			Source:        s.Source.String(),
		}
		b.StrainPerCurvature = num(math.NaN())
		if s.Section != nil {
			b.EA = num(s.EA)
			b.AxialRate = num(s.AxialRate * 1e-3)
			b.StrainPerCurvature = num(s.Section.StrainPerCurvature)
		}
		out[i] = b
	}
	return out
}

func newCheckOutput(res *objective.Result) *checkOutput {
	o := &checkOutput{Pass: res.Pass, Models: res.Models, Warnings: res.Warnings, Caution: results.Caution}
	o.Scores = map[string]any{}
	for _, sc := range objective.AllScores() {
		o.Scores[sc.Name] = num(sc.Value(&res.Scores))
	}
	var angles []num
	for _, th := range res.Scores.SagActuation.Theta {
		angles = append(angles, num(math.Mod(th*180/math.Pi+360, 360)))
	}
	o.Scores["sag_angles_deg"] = angles
	o.Bellows = bellowsRows(res.Bellows)
	o.Checks = make([]checkLine, len(res.Checks))
	for i, c := range res.Checks {
		kind := "min"
		if c.Max {
			kind = "max"
		}
		o.Checks[i] = checkLine{Name: c.Name, Value: num(c.Value), Limit: num(c.Limit), Unit: c.Unit, Pass: c.Pass, Warn: c.Warn, Kind: kind, Note: c.Note}
	}
	if o.Warnings == nil {
		o.Warnings = []string{}
	}
	o.TaskPoints = taskPointLines(&res.Scores)
	o.Limits = limitSentences(res)
	if o.Limits == nil {
		o.Limits = []string{}
	}
	return o
}

func fmtNum(x float64) string {
	if math.IsNaN(x) {
		return "n/a"
	}
	return fmt.Sprintf("%.4g", x)
}

func writeCheck(w io.Writer, name string, res *objective.Result) {
	o := newCheckOutput(res)
	fmt.Fprintf(w, "design %s\n\n", name)
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
	fmt.Fprintln(tw, "bellows\tsource\tEI_x N·mm²\tEI_y N·mm²\tGJ N·mm²\tEA N\tk_conv N/mm\tm' kg/m\tstrain per 1/m")
	for i, b := range o.Bellows {
		fmt.Fprintf(tw, "%d\t%s\t%s\t%s\t%s\t%s\t%s\t%s\t%s\n", i+1, b.Source, fmtNum(float64(b.EI[0])), fmtNum(float64(b.EI[1])),
			fmtNum(float64(b.GJ)), fmtNum(float64(b.EA)), fmtNum(float64(b.AxialRate)), fmtNum(float64(b.LinearDensity)), fmtNum(float64(b.StrainPerCurvature)))
	}
	tw.Flush()
	sc := res.Scores
	fmt.Fprintln(w)
	tw = tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
	fmt.Fprintln(tw, "score\tvalue\tunit\tmodel")
	row := func(n string, v float64, unit, model string) {
		fmt.Fprintf(tw, "%s\t%s\t%s\t%s\n", n, fmtNum(v), unit, model)
	}
	row("tip_sag", sc.TipSag*1e3, "mm", "exact rod statics, worst case at angles "+degs(sc.SagActuation.Theta))
	row("tip_sag_linear", sc.TipSagLinear*1e3, "mm", "small-load linear estimate, same configuration")
	row("reach", sc.Reach*1e3, "mm", "largest lateral tip distance")
	row("bend_angle_range", sc.BendAngleRange*180/math.Pi, "deg", fmt.Sprintf("tip angle from the base axis, %.4g to %.4g deg", sc.BendAngleMin*180/math.Pi, sc.BendAngleMax*180/math.Pi))
	if sc.SurfaceArea > 0 {
		row("surface_area", sc.SurfaceArea*1e6, "mm²", "tip surface over relative and common rotation")
	}
	if sc.Volume > 0 {
		row("volume", sc.Volume*1e9, "mm³", fmt.Sprintf("%.3g mm voxels", sc.VoxelSize*1e3))
	}
	row("task_coverage", sc.TaskCoverage, "", "fraction of task points reached")
	if len(sc.TaskMisses) > 0 {
		row("task_miss", sc.TaskMiss*1e3, "mm", "largest miss beyond the tolerance over the task points")
	}
	row("residual_curvature", sc.ResidualCurvature, "1/m", "straightest configuration")
	row("straight_tip_offset", sc.StraightTipOffset*1e3, "mm", "straightest configuration")
	row("straight_tip_angle", sc.StraightTipAngle*180/math.Pi, "deg", "tip tangent from the base axis, straightest configuration")
	row("curvature_range", sc.CurvatureMin, "1/m", fmt.Sprintf("to %.4g 1/m over relative rotation", sc.CurvatureMax))
	row("peak_strain", sc.PeakStrain, "", "meridional wall strain over the workspace")
	row("stability_margin", sc.StabilityMargin, "", "1 − L/L_crit (snap-free when > 0)")
	row("mass", sc.Mass*1e3, "g", "bellows only")
	row("payload_to_weight", sc.PayloadToWeight, "", "")
	tw.Flush()
	fmt.Fprintln(w)
	writeTaskPoints(w, &sc)
	tw = tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
	fmt.Fprintln(tw, "check\tvalue\tlimit\tunit\tresult\tnote")
	failed := []string{}
	for _, c := range res.Checks {
		op := ">="
		if c.Max {
			op = "<="
		}
		verdict := "PASS"
		switch {
		case !c.Pass && c.Warn:
			verdict = "WARN"
		case !c.Pass:
			verdict = "FAIL"
			failed = append(failed, c.Name)
		}
		fmt.Fprintf(tw, "%s\t%s\t%s %s\t%s\t%s\t%s\n", c.Name, fmtNum(c.Value), op, fmtNum(c.Limit), c.Unit, verdict, c.Note)
	}
	tw.Flush()
	fmt.Fprintln(w)
	for _, m := range res.Models {
		fmt.Fprintf(w, "model: %s\n", m)
	}
	for _, m := range res.Warnings {
		fmt.Fprintf(w, "warning: %s\n", m)
	}
	for _, m := range o.Limits {
		fmt.Fprintln(w, m)
	}
	fmt.Fprintf(w, "caution: %s\n\n", results.Caution)
	if len(failed) == 0 {
		fmt.Fprintf(w, "result: PASS (%d checks)\n", len(res.Checks))
	} else {
		fmt.Fprintf(w, "result: FAIL (%d of %d checks failed: %s)\n", len(failed), len(res.Checks), strings.Join(failed, ", "))
	}
}

func degs(th []float64) string {
	parts := make([]string, len(th))
	for i, t := range th {
		parts[i] = fmt.Sprintf("%.1f", math.Mod(t*180/math.Pi+360, 360))
	}
	return strings.Join(parts, ",") + " deg"
}
