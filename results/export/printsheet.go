package export

import (
	"fmt"
	"io"
	"math"
	"strings"
	"text/tabwriter"
)

// PrintSheet is the content of print.txt: the printer settings, one line
// per part and the checks that apply. Lengths in mm, angles in degrees.
type PrintSheet struct {
	Design        string
	Process       string // "fff", "resin" or "powder"
	NozzleMM      float64
	LineWidthMM   float64
	LayerHeightMM float64
	OverhangDeg   float64 // 0: no limit (resin, powder)
	MinWallMM     float64
	FilamentMM    float64 // filament diameter (FFF)
	Parts         []PrintPart
	Checks        []PrintCheck
}

// PrintPart is one exported file.
type PrintPart struct {
	File        string
	VolumeMM3   float64
	MassG       float64
	Orientation string
	WallMM      float64 // the bellows wall; 0 for a jig
}

// PrintCheck is one pass/fail check of a part against the printer.
type PrintCheck struct {
	Name  string
	Value float64
	Limit float64
	Unit  string
	Max   bool // Value must not exceed Limit
	Pass  bool
	Note  string
}

// FilamentLength returns the filament length, m, that extrudes volume v
// (m³) from filament of diameter d (m): v/(π d²/4), the whole filament
// cross-section laid down (common practice; the slicer's own figure
// includes its line widths and first-layer squish).
func FilamentLength(v, d float64) float64 { return v / (math.Pi * d * d / 4) }

// Perimeters returns the whole number of extrusion lines closest to a wall
// of thickness wall with lines of width line (at least 1), and the width
// per line that prints that wall exactly.
func Perimeters(wall, line float64) (int, float64) {
	n := max(1, int(math.Round(wall/line)))
	return n, wall / float64(n)
}

// PerimeterTolerance is the largest relative mismatch between the wall and
// a whole number of lines accepted without a warning: a slicer lays whole
// lines, so a wall between two multiples prints thinner or thicker than
// modelled (common practice).
const PerimeterTolerance = 0.15

// Write writes the sheet as plain text.
func (s PrintSheet) Write(w io.Writer) error {
	var b strings.Builder
	fmt.Fprintf(&b, "plica print sheet: %s\n\n", s.Design)
	fmt.Fprintf(&b, "Printer (from the design's [printer]; defaults where a key is not given)\n")
	tw := tabwriter.NewWriter(&b, 0, 0, 2, ' ', 0)
	fmt.Fprintf(tw, "  process\t%s\n", s.Process)
	fff := s.Process == "fff"
	if fff {
		fmt.Fprintf(tw, "  nozzle\t%.3g mm\n", s.NozzleMM)
		fmt.Fprintf(tw, "  line width\t%.3g mm\n", s.LineWidthMM)
	}
	fmt.Fprintf(tw, "  layer height\t%.3g mm\n", s.LayerHeightMM)
	if s.OverhangDeg > 0 {
		fmt.Fprintf(tw, "  overhang limit\t%.3g° from vertical\n", s.OverhangDeg)
	}
	fmt.Fprintf(tw, "  minimum wall\t%.3g mm\n", s.MinWallMM)
	if fff {
		fmt.Fprintf(tw, "  filament\t%.3g mm diameter\n", s.FilamentMM)
	}
	tw.Flush()

	fmt.Fprintf(&b, "\nBellows: print upright as exported (axis along +z, a collar on the bed): the models assume\n")
	fmt.Fprintf(&b, "layers across the axis. A tube open at both ends: no infill, no top or bottom layers, no supports.\n")
	if fff {
		for _, p := range s.Parts {
			if p.WallMM == 0 {
				continue
			}
			n, lw := Perimeters(p.WallMM, s.LineWidthMM)
			fmt.Fprintf(&b, "  %s: wall %.3g mm = %.2f line widths: %d perimeter(s)", p.File, p.WallMM, p.WallMM/s.LineWidthMM, n)
			if n == 1 {
				fmt.Fprintf(&b, " (a single wall; a spiral/vase mode with no bottom layers avoids the seam)")
			}
			if math.Abs(p.WallMM/(float64(n)*s.LineWidthMM)-1) > PerimeterTolerance {
				fmt.Fprintf(&b, "\n    warning: the wall is not near a whole number of lines; set the line width to %.3g mm to print the modelled wall", lw)
			}
			b.WriteString("\n")
		}
	}
	fmt.Fprintf(&b, "Jigs: lie flat as exported (the rod in the x-y plane); support under the rod. Print or make the rod\n")
	fmt.Fprintf(&b, "from a material that stays stiff at the heat-setting temperature.\n\n")

	fmt.Fprintf(&b, "Parts (solid volume of the mesh; mass at the design's bellows material density")
	if fff {
		fmt.Fprintf(&b, "; filament length = volume / (π d²/4), d = %.3g mm", s.FilamentMM)
	}
	b.WriteString(")\n")
	tw = tabwriter.NewWriter(&b, 0, 0, 2, ' ', 0)
	if fff {
		fmt.Fprintf(tw, "  file\tvolume mm³\tmass g\tfilament m\torientation\n")
	} else {
		fmt.Fprintf(tw, "  file\tvolume mm³\tmass g\torientation\n")
	}
	for _, p := range s.Parts {
		if fff {
			fmt.Fprintf(tw, "  %s\t%.1f\t%.2f\t%.3f\t%s\n", p.File, p.VolumeMM3, p.MassG, FilamentLength(p.VolumeMM3*1e-9, s.FilamentMM*1e-3), p.Orientation)
		} else {
			fmt.Fprintf(tw, "  %s\t%.1f\t%.2f\t%s\n", p.File, p.VolumeMM3, p.MassG, p.Orientation)
		}
	}
	tw.Flush()

	fmt.Fprintf(&b, "\nChecks (objective/REFERENCE.md section 5.4)\n")
	tw = tabwriter.NewWriter(&b, 0, 0, 2, ' ', 0)
	for _, c := range s.Checks {
		verdict, rel := "pass", ">="
		if !c.Pass {
			verdict = "FAIL"
		}
		if c.Max {
			rel = "<="
		}
		fmt.Fprintf(tw, "  %s\t%s\t%.3g %s %s %.3g %s\t%s\n", c.Name, verdict, c.Value, c.Unit, rel, c.Limit, c.Unit, c.Note)
	}
	tw.Flush()

	b.WriteString("\nCautions: every figure here is a model estimate. Stiffness, strength and fatigue of a printed\n")
	b.WriteString("bellows depend on the printer, material, settings and heat-setting: weigh and test printed\n")
	b.WriteString("prototypes (bench.csv, plica calibrate) before use. Where the manipulator carries a payload, works\n")
	b.WriteString("near people or in medical use, follow the applicable standards and have the design reviewed by a\n")
	b.WriteString("qualified person.\n")
	_, err := io.WriteString(w, b.String())
	return err
}
