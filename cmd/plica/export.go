package main

import (
	"bytes"
	"context"
	"encoding/json"
	"flag"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"

	"plica/objective"
	"plica/problems"
	"plica/results/export"
)

func init() {
	register(&command{
		name:  "export",
		usage: "DESIGN.toml -o DIR [-collar-mm L] [-segments N] [-jig-clearance-mm C] [-filament-mm D] [-json]",
		short: "write printable bellows meshes (binary STL, mm) and export.json",
		long: `Writes bellows-N.stl for each bellows given by geometry: the wall printed
straight along +z from z = 0, whole convolutions over the straight plus
curved length, the wall offset by half its thickness both ways from the
centreline, plain collars of -collar-mm at both ends; a helical bellows
(lead = pitch, right-handed) has a run-out of one pitch between its
full-depth turns and each collar. -segments sets the
polygon sides about the axis (3 to 4096; the k-gon carries the area factor
k·sin(2π/k)/(2π)). Each pre-curved bellows also gets jig-N.stl, a rod to
heat-set it on: centreline radius 1/(κ0·setting_overbend), diameter the
bore less twice -jig-clearance-mm (default 0.3), a straight handle.
bench.csv plans the tip-load test for plica calibrate; print.txt gives the
printer settings, orientation, mass and filament length (-filament-mm,
default 1.75) per part and the printability checks. A bellows in measured form has no geometry and is
skipped with a note. DIR must not exist or be empty; the files appear
together or not at all. Exit status 0, or 2 on bad input.`,
		run: runExport,
	})
}

// meshPart is what export.json gives for every mesh it writes.
type meshPart struct {
	VolumeMM3 float64    `json:"volume_mm3"`
	MassG     float64    `json:"mass_g"`
	BoxMinMM  [3]float64 `json:"bbox_min_mm"`
	BoxMaxMM  [3]float64 `json:"bbox_max_mm"`
	Triangles int        `json:"triangles"`
}

func newMeshPart(m export.Mesh, density float64) meshPart {
	lo, hi := m.Bounds()
	v := m.Volume()
	return meshPart{VolumeMM3: v, MassG: v * 1e-9 * density * 1e3, BoxMinMM: lo, BoxMaxMM: hi, Triangles: len(m.T)}
}

type exportPart struct {
	Bellows      int    `json:"bellows"`
	File         string `json:"file"`
	Convolutions int    `json:"convolutions"`
	meshPart
	ODmm     float64    `json:"outer_diameter_mm"`
	DepthMM  float64    `json:"depth_mm"`
	PitchMM  float64    `json:"pitch_mm"`
	WallMM   float64    `json:"wall_mm"`
	CollarMM float64    `json:"collar_mm"`
	Sides    int        `json:"segments"`
	Profile  string     `json:"profile"`
	Winding  string     `json:"winding"`
	Helix    *helixPart `json:"helix,omitempty"`
	Spine    *spinePart `json:"spine,omitempty"`
	Jig      *jigPart   `json:"jig,omitempty"`
}

// helixPart is the thread of a helical bellows (results/export/REFERENCE.md
// §5): a run-out of runout_mm at each end, between the full-depth turns
// and the collar, where the depth grows from zero.
type helixPart struct {
	LeadMM    float64 `json:"lead_mm"`
	Hand      string  `json:"hand"`
	RunoutMM  float64 `json:"runout_mm"`
	FullTurns int     `json:"full_depth_turns"`
	HeightMM  float64 `json:"height_mm"`
}

// spinePart is the spine as the mass model has it (surrogate/REFERENCE.md
// §2.8): plain wall on the mean radius over an arc about the axis.
type spinePart struct {
	WidthMM  float64 `json:"width_mm"`
	ArcDeg   float64 `json:"arc_deg"`
	AngleDeg float64 `json:"angle_deg"`
	RadiusMM float64 `json:"radius_mm"`
	WallMM   float64 `json:"wall_mm"`
}

// jigGripMM is the straight handle beyond the bellows' base collar, mm.
const jigGripMM = 40

type jigPart struct {
	File string `json:"file"`
	meshPart
	RadiusMM        float64 `json:"centreline_radius_mm"`
	ArcDeg          float64 `json:"arc_deg"`
	RodDiameterMM   float64 `json:"rod_diameter_mm"`
	BoreMM          float64 `json:"bellows_bore_mm"`
	ClearanceMM     float64 `json:"radial_clearance_mm"`
	SettingOverbend float64 `json:"setting_overbend"`
	HandleMM        float64 `json:"handle_mm"`
}

type exportOutput struct {
	Design  string       `json:"design"`
	Parts   []exportPart `json:"parts"`
	Files   []string     `json:"files,omitempty"`
	Skipped []string     `json:"skipped,omitempty"`
}

func runExport(ctx context.Context, fs *flag.FlagSet, args []string, stdout, stderr io.Writer) error {
	dir := fs.String("o", "", "output folder (must not exist or be empty)")
	collar := fs.Float64("collar-mm", 5, "plain collar length at each end, mm (0: none)")
	sides := fs.Int("segments", export.DefaultSides, "polygon sides about the axis")
	filament := fs.Float64("filament-mm", 1.75, "filament diameter for the print sheet's filament lengths, mm")
	clearance := fs.Float64("jig-clearance-mm", 0.3, "radial clearance of the heat-setting rod in the bellows' bore, mm")
	asJSON := fs.Bool("json", false, "print JSON instead of a table")
	pos, err := parseArgs(fs, args)
	if err != nil {
		return err
	}
	if len(pos) != 1 {
		return usagef("export: expected one design file, got %d arguments", len(pos))
	}
	if *dir == "" {
		return usagef("export: -o DIR is required")
	}
	if *sides < 3 || *sides > export.MaxSides {
		return usagef("export: -segments %d is out of range (expected 3 to %d)", *sides, export.MaxSides)
	}
	if !(*collar >= 0 && *collar <= 1000) {
		return usagef("export: -collar-mm %g is out of range (expected 0 to 1000 mm)", *collar)
	}
	if !(*filament >= 0.5 && *filament <= 5) {
		return usagef("export: -filament-mm %g is out of range (expected 0.5 to 5 mm)", *filament)
	}
	if !(*clearance >= 0 && *clearance <= 100) {
		return usagef("export: -jig-clearance-mm %g is out of range (expected 0 to 100 mm)", *clearance)
	}
	if ents, err := os.ReadDir(*dir); err == nil && len(ents) > 0 {
		return usagef("export: -o %s exists and is not empty", *dir)
	} else if err != nil && !os.IsNotExist(err) {
		return usagef("export: -o %s: %v", *dir, err)
	}
	d, sc, err := problems.LoadDesign(pos[0])
	if err != nil {
		return err
	}
	stiff, err := d.Stiffness()
	if err != nil {
		return err
	}
	var samples [][]objective.Stiffness
	banded := sc != nil && sc.Scatter.Active()
	if banded {
		prog := newProgressLine(stderr, "export")
		samples, err = objective.StiffnessSamples(ctx, d, sc.Scatter, prog.report)
		prog.clear()
		if err != nil {
			return err
		}
		banded = len(samples) > 0
	}
	var plan []problems.PlanRow
	parent := filepath.Dir(filepath.Clean(*dir))
	tmp, err := os.MkdirTemp(parent, ".plica-export-")
	if err != nil {
		return usagef("export: -o %s cannot be written: %v", *dir, err)
	}
	defer os.RemoveAll(tmp)
	if err := os.Chmod(tmp, 0o755); err != nil {
		return err
	}
	out := exportOutput{Design: pos[0]}
	helicalParts := false
	for i, b := range d.Bellows {
		if b.Model == nil {
			out.Skipped = append(out.Skipped, fmt.Sprintf("bellows %d: measured form, no geometry to export", i+1))
			continue
		}
		if err := ctx.Err(); err != nil {
			return err
		}
		g := b.Model.Geometry
		m, n, err := export.Bellows(g, b.StraightLength+b.CurvedLength, *collar*1e-3, *sides)
		if err != nil {
			return fmt.Errorf("%s: bellows %d: %w", pos[0], i+1, err)
		}
		if err := m.Check(); err != nil {
			return fmt.Errorf("%s: bellows %d: mesh is not closed: %w", pos[0], i+1, err)
		}
		name := fmt.Sprintf("bellows-%d.stl", i+1)
		var buf bytes.Buffer
		if err := m.WriteSTL(&buf, fmt.Sprintf("plica bellows %d, mm", i+1)); err != nil {
			return err
		}
		if err := os.WriteFile(filepath.Join(tmp, name), buf.Bytes(), 0o644); err != nil {
			return err
		}
		part := exportPart{Bellows: i + 1, File: name, Convolutions: n, meshPart: newMeshPart(m, b.Model.Material.Density),
			ODmm: g.OuterDiameter * 1e3, DepthMM: g.Depth * 1e3, PitchMM: g.Pitch * 1e3, WallMM: g.Wall * 1e3,
			CollarMM: *collar, Sides: *sides, Profile: g.Profile.String(), Winding: "revolved"}
		runout := 0.0
		if g.Helical {
			helicalParts = true
			runout = g.Pitch
			part.Winding = "helical"
			part.Helix = &helixPart{LeadMM: g.Pitch * 1e3, Hand: "right", RunoutMM: runout * 1e3, FullTurns: n,
				HeightMM: float64(n+2)*g.Pitch*1e3 + 2*(*collar)}
		}
		if g.SpineWidth > 0 {
			part.Spine = &spinePart{WidthMM: g.SpineWidth * 1e3, ArcDeg: g.SpineWidth / g.MeanRadius() * 180 / math.Pi,
				AngleDeg: g.SpineAngle * 180 / math.Pi, RadiusMM: g.MeanRadius() * 1e3, WallMM: g.Wall * 1e3}
		}
		if k0 := math.Hypot(b.Precurvature[0], b.Precurvature[1]); k0 > 0 && b.CurvedLength > 0 {
			jp, jm, err := heatSettingJig(b, k0, *collar+runout*1e3, *clearance, *sides)
			if err != nil {
				return usagef("%s: bellows %d: heat-setting jig: %v", pos[0], i+1, err)
			}
			jp.File = fmt.Sprintf("jig-%d.stl", i+1)
			var buf bytes.Buffer
			if err := jm.WriteSTL(&buf, fmt.Sprintf("plica jig %d, mm", i+1)); err != nil {
				return err
			}
			if err := os.WriteFile(filepath.Join(tmp, jp.File), buf.Bytes(), 0o644); err != nil {
				return err
			}
			part.Jig = jp
		}
		for axis := 0; axis < 2; axis++ {
			var ks []float64
			for _, st := range samples {
				ks = append(ks, problems.EffectiveEI(st[i].EI, axis))
			}
			plan = append(plan, problems.PlanBench(fmt.Sprintf("bellows-%d", i+1), axis,
				problems.EffectiveEI(stiff[i].EI, axis), float64(n)*g.Pitch, ks)...)
		}
		out.Parts = append(out.Parts, part)
	}
	if len(plan) > 0 {
		var buf bytes.Buffer
		comments := benchComments(banded)
		if helicalParts {
			comments = append(comments[:len(comments)-1], "helical bellows: a run-out turn at each end (depth growing from zero) lies between the full-depth turns and the collars;",
				"free_length_mm and the predictions count the full-depth turns only, so the run-outs add compliance the prediction leaves out", comments[len(comments)-1])
		}
		if err := problems.WriteBenchPlan(&buf, comments, plan, banded); err != nil {
			return err
		}
		if err := os.WriteFile(filepath.Join(tmp, "bench.csv"), buf.Bytes(), 0o644); err != nil {
			return err
		}
		out.Files = append(out.Files, "bench.csv")
	}
	if len(out.Parts) > 0 {
		var buf bytes.Buffer
		if err := printSheet(pos[0], d, sc, out.Parts, *filament).Write(&buf); err != nil {
			return err
		}
		if err := os.WriteFile(filepath.Join(tmp, "print.txt"), buf.Bytes(), 0o644); err != nil {
			return err
		}
		out.Files = append(out.Files, "print.txt")
	}
	js, err := json.MarshalIndent(out, "", "  ")
	if err != nil {
		return err
	}
	if err := os.WriteFile(filepath.Join(tmp, "export.json"), append(js, '\n'), 0o644); err != nil {
		return err
	}
	if err := os.Remove(*dir); err != nil && !os.IsNotExist(err) {
		return usagef("export: -o %s: %v", *dir, err)
	}
	if err := os.Rename(tmp, *dir); err != nil {
		return usagef("export: -o %s cannot be written: %v", *dir, err)
	}
	if *asJSON {
		_, err := stdout.Write(append(js, '\n'))
		return err
	}
	for _, p := range out.Parts {
		fmt.Fprintf(stdout, "%s  %d convolutions  %.1f mm³  %.2f g  %d triangles\n", filepath.Join(*dir, p.File), p.Convolutions, p.VolumeMM3, p.MassG, p.Triangles)
	}
	for _, p := range out.Parts {
		if j := p.Jig; j != nil {
			fmt.Fprintf(stdout, "%s  rod %.2f mm on a %.1f mm centreline radius, %.1f°  %.1f mm³  %d triangles\n", filepath.Join(*dir, j.File), j.RodDiameterMM, j.RadiusMM, j.ArcDeg, j.VolumeMM3, j.Triangles)
		}
	}
	for _, s := range out.Skipped {
		fmt.Fprintln(stdout, "note:", s)
	}
	return nil
}

// benchComments heads bench.csv: how to run the test and what the
// predictions are.
func benchComments(banded bool) []string {
	c := []string{
		"plica bench plan: tip-load cantilever test of each printed bellows, read by plica calibrate",
		"clamp the bottom collar rigidly, bellows horizontal; hang each load where the convolutions meet the top collar;",
		"free_length_mm is from the clamp to the load (the convolutions); zero the gauge at load 0;",
		"direction x bends about the bellows' own x axis (load along its own y), y the other way: turn the specimen 90 degrees;",
		"test before heat-setting (the predictions are for a straight specimen); fill in deflection_mm (tip deflection along the load, mm); rows left empty are not yet measured and are skipped.",
		"loads keep the predicted deflection within 10 % of the free length, the small-deflection range of",
		"delta = P L^3 / (3 EI) (Roark Table 8.1 case 1a; surrogate/REFERENCE.md section 4.1)",
	}
	if banded {
		c = append(c, "predicted_deflection_mm is nominal; predicted_p5_mm and predicted_p95_mm bound 90 % of the design's [scatter] draws")
	} else {
		c = append(c, "predicted_deflection_mm is nominal (the design gives no [scatter], so no band)")
	}
	return append(c, "model estimates only: verify on prototypes before use; payloads near people need applicable standards and qualified review")
}

// heatSettingJig meshes the rod the bellows is heat-set on: a straight
// handle through the base collar and the straight part plus a grip, an arc
// of centreline radius 1/(κ0·setting_overbend) over the curved length, and
// a straight tip through the top collar; its diameter is the bellows'
// bore less twice the radial clearance.
func heatSettingJig(b objective.Bellows, k0, collarMM, clearanceMM float64, sides int) (*jigPart, export.Mesh, error) {
	ob := b.SettingOverbend
	if ob == 0 {
		ob = 1
	}
	bore, err := export.Bore(b.Model.Geometry)
	if err != nil {
		return nil, export.Mesh{}, err
	}
	d := bore - 2*clearanceMM*1e-3
	if d <= 0 {
		return nil, export.Mesh{}, fmt.Errorf("the bore %.3g mm leaves no rod at a radial clearance of %g mm (expected -jig-clearance-mm below %.3g)", bore*1e3, clearanceMM, bore*1e3/2)
	}
	path := export.JigPath{Handle: (jigGripMM+collarMM)*1e-3 + b.StraightLength, Radius: 1 / (k0 * ob), Arc: b.CurvedLength, Tip: collarMM * 1e-3}
	m, err := export.Jig(path, d, sides)
	if err != nil {
		return nil, export.Mesh{}, err
	}
	if err := m.Check(); err != nil {
		return nil, export.Mesh{}, fmt.Errorf("mesh is not closed: %w", err)
	}
	return &jigPart{meshPart: newMeshPart(m, b.Model.Material.Density),
		RadiusMM: path.Radius * 1e3, ArcDeg: path.Angle() * 180 / math.Pi, RodDiameterMM: d * 1e3, BoreMM: bore * 1e3,
		ClearanceMM: clearanceMM, SettingOverbend: ob, HandleMM: path.Handle * 1e3}, m, nil
}

// printSheet gathers print.txt: the design's printer with its defaults,
// the parts, and the evaluator's own printability checks.
func printSheet(design string, d *objective.Design, sc *objective.Scenario, parts []exportPart, filamentMM float64) export.PrintSheet {
	var pr objective.Printer
	if sc != nil {
		pr = sc.Printer
	}
	p := pr.Resolved()
	s := export.PrintSheet{Design: design, Process: p.Process.String(), NozzleMM: p.Nozzle * 1e3, LineWidthMM: p.LineWidth * 1e3,
		LayerHeightMM: p.LayerHeight * 1e3, OverhangDeg: p.OverhangLimit * 180 / math.Pi, MinWallMM: p.MinWall * 1e3, FilamentMM: filamentMM}
	for _, q := range parts {
		s.Parts = append(s.Parts, export.PrintPart{File: q.File, VolumeMM3: q.VolumeMM3, MassG: q.MassG, Orientation: "upright, collar on the bed", WallMM: q.WallMM})
		if j := q.Jig; j != nil {
			s.Parts = append(s.Parts, export.PrintPart{File: j.File, VolumeMM3: j.VolumeMM3, MassG: j.MassG, Orientation: "flat, supported"})
		}
	}
	for _, c := range objective.PrintabilityChecks(d, pr) {
		s.Checks = append(s.Checks, export.PrintCheck{Name: c.Name, Value: c.Value, Limit: c.Limit, Unit: c.Unit, Max: c.Max, Pass: c.Pass, Note: c.Note})
	}
	return s
}
