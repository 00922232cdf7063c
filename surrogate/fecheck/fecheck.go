package fecheck

import (
	"context"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"time"

	"plica/surrogate"
)

// Mesh is a mesh density level.
type Mesh int

const (
	// Coarse is the default: one bellows, all load cases, in well under a
	// minute on one core.
	Coarse Mesh = iota
	// Fine doubles the element count in each direction of the wall.
	Fine
	// draft halves the coarse mesh; it is only the second mesh of the
	// convergence figure of a coarse run.
	draft
)

// String returns "coarse", "fine" or "draft".
func (m Mesh) String() string {
	switch m {
	case Coarse:
		return "coarse"
	case Fine:
		return "fine"
	case draft:
		return "draft"
	}
	return fmt.Sprintf("mesh(%d)", int(m))
}

// Options controls a cross-check.
type Options struct {
	// Mesh is the primary mesh (Coarse or Fine).
	Mesh Mesh
	// Convergence also solves the next coarser mesh (Fine → Coarse,
	// Coarse → a draft mesh of half the element count per direction) and
	// reports the relative change from it to the primary mesh.
	Convergence bool
	// Shell and Solid select the models; both false means both.
	Shell, Solid bool
	// Fidelity of the surrogate to compare with (surrogate.Strip default).
	Fidelity surrogate.Fidelity
	// CCX is the executable name or path (default "ccx" from PATH).
	CCX string
	// Threads for ccx (default 1).
	Threads int
	// Dir keeps the decks and ccx's output there, one subdirectory per
	// mesh (coarse, fine, draft); "" uses a temporary directory that is
	// removed afterwards.
	Dir string
	// Progress, when not nil, is told when each model starts (Solving
	// false) and when ccx begins to solve its load cases (Solving true).
	// It is called from the goroutine that copies ccx's output, one call
	// at a time.
	Progress func(Progress)

	level Mesh // the mesh being solved, for Progress
}

// Progress is one stage of a cross-check. Each model is one ccx step:
// the shell model solves its four load cases together (one
// factorization, four right-hand sides), the solid model its one.
type Progress struct {
	Mesh    Mesh     // mesh level being solved
	Model   string   // "shell" or "solid"
	Cases   []string // load cases of the model: axial, torsion, bending_x, bending_y; axial extension (solid)
	Solving bool     // false while the deck is written and ccx starts; true once ccx's step begins
}

// steps returns the output-line callback that reports when ccx begins
// the step of model (nil without opt.Progress), after reporting that the
// model starts.
func (opt *Options) steps(model string, cases []string) func(string) {
	if opt.Progress == nil {
		return nil
	}
	report, lv := opt.Progress, opt.level
	report(Progress{Mesh: lv, Model: model, Cases: cases})
	return func(line string) {
		if n, ok := stepLine(line); ok && n == 1 {
			report(Progress{Mesh: lv, Model: model, Cases: cases, Solving: true})
		}
	}
}

func shellCaseNames() []string {
	names := make([]string, len(shellCases))
	for i, c := range shellCases {
		names[i] = c.name
	}
	return names
}

// Result is the FE cross-check of one bellows. Fields carry their units
// in their JSON names; SI throughout.
type Result struct {
	Mesh        string            `json:"mesh"`
	Shell       *ShellResult      `json:"shell,omitempty"`
	Solid       *SolidResult      `json:"solid,omitempty"`
	Convergence *Convergence      `json:"convergence,omitempty"`
	Comparison  []Comparison      `json:"comparison"`
	Surrogate   surrogate.Section `json:"-"`
	RunTimeS    float64           `json:"run_time_s"`
}

// ShellResult holds the quantities measured on the 3-D shell model, per
// unit length of the convolutions between the measuring rings.
type ShellResult struct {
	Elements              int     `json:"elements"`
	Nodes                 int     `json:"nodes"`
	Convolutions          int     `json:"convolutions"`
	MeasuredConvolutions  int     `json:"measured_convolutions"`
	PitchM                float64 `json:"pitch_m"`
	EAN                   float64 `json:"ea_n"`
	AxialRateNPerM        float64 `json:"axial_rate_per_convolution_n_per_m"`
	EIxNm2                float64 `json:"ei_x_n_m2"`
	EIyNm2                float64 `json:"ei_y_n_m2"`
	EIxyNm2               float64 `json:"ei_xy_n_m2"`
	GJNm2                 float64 `json:"gj_n_m2"`
	StrainPerCurvatureM   float64 `json:"strain_per_curvature_m"`
	StrainPerExtensionPM  float64 `json:"strain_per_extension_per_m"`
	AxialTwistRadPerMPerN float64 `json:"axial_twist_rad_per_m_per_n"`
	RunTimeS              float64 `json:"run_time_s"`
}

// SolidResult holds the quantities of the axisymmetric solid model of one
// pitch under axial extension.
type SolidResult struct {
	Elements             int     `json:"elements"`
	Nodes                int     `json:"nodes"`
	ThroughWall          int     `json:"elements_through_wall"`
	AxialRateNPerM       float64 `json:"axial_rate_per_convolution_n_per_m"`
	StrainPerExtensionPM float64 `json:"strain_per_extension_per_m"`
	RunTimeS             float64 `json:"run_time_s"`
}

// Convergence is the relative change (primary − coarser)/primary of each
// quantity from the next coarser mesh to the primary one.
type Convergence struct {
	FromMesh             string  `json:"from_mesh"`
	EIx                  float64 `json:"ei_x_rel"`
	EIy                  float64 `json:"ei_y_rel"`
	GJ                   float64 `json:"gj_rel"`
	AxialRate            float64 `json:"axial_rate_rel"`
	StrainPerCurvature   float64 `json:"strain_per_curvature_rel"`
	SolidAxialRate       float64 `json:"solid_axial_rate_rel"`
	SolidStrainPerExtent float64 `json:"solid_strain_per_extension_rel"`
}

// Comparison is one quantity, FE beside the surrogate.
type Comparison struct {
	Quantity  string  `json:"quantity"`
	Unit      string  `json:"unit"`
	FE        float64 `json:"fe"`
	Surrogate float64 `json:"surrogate"`
	RelDiff   float64 `json:"rel_diff"` // surrogate/FE − 1
}

// meshParams returns the shell (around, per pitch) and solid (through
// the wall) resolution of a level.
func meshParams(m Mesh) (around, perPitch, through int) {
	switch m {
	case Fine:
		return 32, 32, 16
	case draft:
		return 12, 12, 4
	}
	return 20, 20, 8
}

// Pitches is the number of convolutions of the shell model; the
// measuring rings sit RingOffset pitches in from each end.
const (
	Pitches    = 8
	RingOffset = 2
)

func material(b *surrogate.Bellows) wallMaterial {
	return wallMaterial{Es: b.Material.ModulusAcross, Et: b.Material.ModulusInLayer, nu: b.Material.Poisson, t: b.Wall}
}

func shellFor(b *surrogate.Bellows, m Mesh) shellSpec {
	around, per, _ := meshParams(m)
	s := shellSpec{wall: bellowsWall(b.Geometry), mat: material(b), helical: b.Helical,
		spineWidth: b.SpineWidth, spineAngle: b.SpineAngle,
		pitches: Pitches, around: around, perPitch: per, ringA: RingOffset, ring: Pitches - 2*RingOffset}
	if b.SpineWidth > 0 {
		// The wall blends into the spine over one convolution depth. The
		// mesh is graded around the circumference (gradedEdges): fine
		// across the spine and the blends, where the shear flow of torsion
		// turns, growing to the revolved wall's element (2π/around) away
		// from them. The grid starts at the spine's first edge.
		s.spineBlendWidth = b.Depth
		g := spineGrading(m)
		h := b.SpineWidth / s.wall.rMean / 2
		s.edges = gradedEdges(h, s.spineBlendWidth/s.wall.rMean, 2*math.Pi/float64(s.around), g.spine, g.blend, g.growth)
		s.around = len(s.edges) - 1
		s.start = b.SpineAngle - h
	}
	return s
}

// grading is the circumferential mesh of a spined wall: elements across
// the spine and across each blend, and the growth factor from one element
// to the next beyond the blends.
type grading struct {
	spine, blend int
	growth       float64
}

// spineGrading returns the grading of a mesh level.
func spineGrading(m Mesh) grading {
	switch m {
	case draft:
		return grading{spine: 2, blend: 2, growth: 1.5}
	case Fine:
		return grading{spine: 4, blend: 6, growth: 1.5}
	}
	return grading{spine: 3, blend: 4, growth: 1.5}
}

func solidFor(w wall, mat wallMaterial, m Mesh) axiSpec {
	_, _, through := meshParams(m)
	// elements along the pitch: about 1.5 times as long as thick
	var dev float64
	for i := range w.pieces {
		dev += w.pieces[i].length()
	}
	n := int(math.Ceil(dev / (1.5 * mat.t / float64(through))))
	n = max(n, 20*through)
	n = min(n, 600*through)
	return axiSpec{wall: w, mat: mat, perPt: n, through: through}
}

// WriteFunc writes the file name with write, which streams its content.
// The caller chooses how: plica's run-folder writer (temp + rename)
// outside this package, plain files in Run's scratch directory.
type WriteFunc func(name string, write func(io.Writer) error) error

// WriteDecks writes the CalculiX decks of bellows b at mesh m through
// create, by file name: shell.inp (3-D shell model, four load cases) and
// solid.inp (axisymmetric solid of one pitch). It returns the names
// written. Run them with `ccx -i shell` and `ccx -i solid` where they
// are.
func WriteDecks(create WriteFunc, b surrogate.Bellows, m Mesh) ([]string, error) {
	if err := b.Validate(); err != nil {
		return nil, err
	}
	sh := shellFor(&b, m)
	so := solidFor(sh.wall, sh.mat, m)
	var names []string
	for _, d := range []struct {
		name  string
		write func(w io.Writer) error
	}{
		{"shell.inp", func(w io.Writer) error { return writeShellDeck(w, sh.build(), title(&b, m)) }},
		{"solid.inp", func(w io.Writer) error { return writeAxiDeck(w, so.build(), title(&b, m)) }},
	} {
		if err := create(d.name, d.write); err != nil {
			return names, err
		}
		names = append(names, d.name)
	}
	return names, nil
}

func title(b *surrogate.Bellows, m Mesh) string {
	wind := "revolved"
	if b.Helical {
		wind = "helical"
	}
	return fmt.Sprintf("plica fecheck: %s %s bellows, OD %.4g mm, w %.4g mm, q %.4g mm, t %.4g mm, %s mesh",
		wind, b.Profile, b.OuterDiameter*1e3, b.Depth*1e3, b.Pitch*1e3, b.Wall*1e3, m)
}

// writeScratch writes path with a plain create and write: the decks Run
// and the verification cases solve live in a directory that belongs to
// the run alone (a private temporary directory, or Options.Dir, which
// plica fe stages and publishes whole by a rename), so no reader sees a
// half-written deck; ccx only reads it after writeScratch returns. Files
// a user reads elsewhere go through the caller's WriteFunc.
func writeScratch(path string, write func(io.Writer) error) error {
	f, err := os.Create(path)
	if err != nil {
		return err
	}
	err = write(f)
	if e := f.Close(); err == nil {
		err = e
	}
	return err
}

// Run cross-checks bellows b with CalculiX: it writes the decks, runs ccx
// on each, reads the results back and compares them with the
// uncalibrated surrogate (opt.Fidelity). A missing ccx gives an error
// wrapping ErrNoCCX; a failing ccx a one-line error with its reason.
func Run(ctx context.Context, b surrogate.Bellows, opt Options) (*Result, error) {
	if err := b.Validate(); err != nil {
		return nil, err
	}
	if opt.Mesh != Coarse && opt.Mesh != Fine {
		return nil, fmt.Errorf("fecheck: mesh %d is not coarse or fine", int(opt.Mesh))
	}
	if _, err := findCCX(opt.CCX); err != nil {
		return nil, err
	}
	start := time.Now()
	b.Calibration = [2]float64{}
	sec, err := b.Section(opt.Fidelity)
	if err != nil {
		return nil, err
	}
	doShell, doSolid := opt.Shell, opt.Solid
	if !doShell && !doSolid {
		doShell, doSolid = true, true
	}
	dir := opt.Dir
	if dir == "" {
		dir, err = os.MkdirTemp("", "plica-fecheck-")
		if err != nil {
			return nil, err
		}
		defer os.RemoveAll(dir)
	} else if err := os.MkdirAll(dir, 0o755); err != nil {
		return nil, err
	}
	levels := []Mesh{opt.Mesh}
	if opt.Convergence {
		if opt.Mesh == Fine {
			levels = append(levels, Coarse)
		} else {
			levels = append(levels, draft)
		}
	}
	res := &Result{Mesh: opt.Mesh.String(), Surrogate: sec}
	var shells []*ShellResult
	var solids []*SolidResult
	for _, lv := range levels {
		opt.level = lv
		sub := filepath.Join(dir, lv.String())
		if err := os.MkdirAll(sub, 0o755); err != nil {
			return nil, err
		}
		sh := shellFor(&b, lv)
		if doShell {
			r, err := solveShell(ctx, sub, &sh, title(&b, lv), opt)
			if err != nil {
				return nil, err
			}
			shells = append(shells, r)
		}
		if doSolid {
			so := solidFor(sh.wall, sh.mat, lv)
			r, err := solveSolid(ctx, sub, &so, title(&b, lv), opt)
			if err != nil {
				return nil, err
			}
			solids = append(solids, r)
		}
	}
	if doShell {
		res.Shell = shells[0]
	}
	if doSolid {
		res.Solid = solids[0]
	}
	if opt.Convergence {
		c := &Convergence{FromMesh: levels[1].String()}
		rel := func(a, b float64) float64 { return (a - b) / a }
		if doShell {
			p, q := shells[0], shells[1]
			c.EIx, c.EIy, c.GJ = rel(p.EIxNm2, q.EIxNm2), rel(p.EIyNm2, q.EIyNm2), rel(p.GJNm2, q.GJNm2)
			c.AxialRate, c.StrainPerCurvature = rel(p.AxialRateNPerM, q.AxialRateNPerM), rel(p.StrainPerCurvatureM, q.StrainPerCurvatureM)
		}
		if doSolid {
			p, q := solids[0], solids[1]
			c.SolidAxialRate, c.SolidStrainPerExtent = rel(p.AxialRateNPerM, q.AxialRateNPerM), rel(p.StrainPerExtensionPM, q.StrainPerExtensionPM)
		}
		res.Convergence = c
	}
	res.Comparison = Compare(res, sec)
	res.RunTimeS = time.Since(start).Seconds()
	return res, nil
}

// Compare lists the FE quantities of r beside those of the surrogate
// section s (rel_diff = surrogate/FE − 1).
func Compare(r *Result, s surrogate.Section) []Comparison {
	var out []Comparison
	add := func(q, unit string, fe, sur float64) {
		out = append(out, Comparison{Quantity: q, Unit: unit, FE: fe, Surrogate: sur, RelDiff: sur/fe - 1})
	}
	strainPerExt := 0.0
	if s.OpeningPerCurvature > 0 {
		strainPerExt = s.StrainPerCurvature / s.OpeningPerCurvature
	}
	if sh := r.Shell; sh != nil {
		add("ei_x", "N·m²", sh.EIxNm2, s.EI[0][0])
		add("ei_y", "N·m²", sh.EIyNm2, s.EI[1][1])
		add("gj", "N·m²", sh.GJNm2, s.GJ)
		// EA/q: the axial rate of one pitch of the whole section (with
		// its spine, if any)
		add("axial_rate_per_convolution", "N/m", sh.AxialRateNPerM, s.EA/sh.PitchM)
		add("strain_per_curvature", "m", sh.StrainPerCurvatureM, s.StrainPerCurvature)
	}
	if so := r.Solid; so != nil {
		add("solid_axial_rate_per_convolution", "N/m", so.AxialRateNPerM, s.AxialRatePerConvolution)
		add("solid_strain_per_extension", "1/m", so.StrainPerExtensionPM, strainPerExt)
	}
	return out
}

// errNoResult reports a result file without the expected blocks.
var errNoResult = errors.New("unexpected ccx output")
