package problems

import (
	"bytes"
	"fmt"
	"strconv"

	"github.com/BurntSushi/toml"

	"plica/objective"
	"plica/surrogate"
)

// The form of a file is its content as the file gives it, typed and in the
// file's own units, with absent keys nil: what plica writes back (the
// portable copy of a problem in a run folder, the design files of a front).
// It is decoded after the file has been checked, so it holds only known
// keys with values of the right type. Fields are in key order, so that the
// written files list their keys alphabetically.

// num is a number as the file writes it: an integer stays an integer.
type num struct {
	f     float64
	i     int64
	isInt bool
}

func float(f float64) num { return num{f: f} }

func (n num) MarshalTOML() ([]byte, error) {
	if n.isInt {
		return []byte(strconv.FormatInt(n.i, 10)), nil
	}
	return []byte(tomlFloat(n.f)), nil
}

func (n *num) UnmarshalTOML(data any) error {
	switch x := data.(type) {
	case int64:
		*n = num{f: float64(x), i: x, isInt: true}
	case float64:
		*n = num{f: x}
	default:
		return fmt.Errorf("found %s (expected a number)", describe(data))
	}
	return nil
}

// tomlFloat writes a float as the TOML encoder does: shortest exact
// digits, with a decimal point unless there is an exponent.
func tomlFloat(f float64) string {
	s := strconv.FormatFloat(f, 'g', -1, 64)
	for _, c := range s {
		if c == 'e' || c == '.' || c == 'n' || c == 'i' {
			return s
		}
	}
	return s + ".0"
}

// numParam is a [[bellows]] number that a problem may give as a range
// [lo, hi] (rng set).
type numParam struct {
	num
	rng []num
}

func (p numParam) MarshalTOML() ([]byte, error) {
	if p.rng == nil {
		return p.num.MarshalTOML()
	}
	return marshalList(p.rng)
}

func (p *numParam) UnmarshalTOML(data any) error {
	if arr, ok := data.([]any); ok {
		p.rng = make([]num, len(arr))
		for i, e := range arr {
			if err := p.rng[i].UnmarshalTOML(e); err != nil {
				return err
			}
		}
		return nil
	}
	return p.num.UnmarshalTOML(data)
}

// nameParam is a [[bellows]] name (material, profile, winding) that a
// problem may give as a list of options.
type nameParam struct {
	name    string
	options []string
}

func (p nameParam) MarshalTOML() ([]byte, error) {
	if p.options == nil {
		return []byte(tomlQuote(p.name)), nil
	}
	var b bytes.Buffer
	b.WriteByte('[')
	for i, o := range p.options {
		if i > 0 {
			b.WriteString(", ")
		}
		b.WriteString(tomlQuote(o))
	}
	b.WriteByte(']')
	return b.Bytes(), nil
}

func (p *nameParam) UnmarshalTOML(data any) error {
	switch x := data.(type) {
	case string:
		p.name = x
	case []any:
		p.options = []string{}
		for _, e := range x {
			s, ok := e.(string)
			if !ok {
				return fmt.Errorf("found %s in the options (expected a list of names)", describe(e))
			}
			p.options = append(p.options, s)
		}
	default:
		return fmt.Errorf("found %s (expected a name)", describe(data))
	}
	return nil
}

func marshalList(ns []num) ([]byte, error) {
	var b bytes.Buffer
	b.WriteByte('[')
	for i, n := range ns {
		if i > 0 {
			b.WriteString(", ")
		}
		t, _ := n.MarshalTOML()
		b.Write(t)
	}
	b.WriteByte(']')
	return b.Bytes(), nil
}

// designForm is the form of the design tables of a design or problem file.
type designForm struct {
	Fidelity     *surrogate.Fidelity `toml:"fidelity"`
	Name         *string             `toml:"name"`
	Bellows      []bellowsForm       `toml:"bellows"`
	Load         *loadForm           `toml:"load"`
	Material     []materialForm      `toml:"material"`
	Printer      *printerForm        `toml:"printer"`
	Requirements *requirementsForm   `toml:"requirements"`
	TaskPoint    []taskForm          `toml:"task_point"`
	Workspace    *workspaceForm      `toml:"workspace"`
	Scatter      *scatterForm        `toml:"scatter"`
}

// problemForm is the form of a problem file: the design tables and the
// problem's own.
type problemForm struct {
	Fidelity     *surrogate.Fidelity `toml:"fidelity"`
	Name         *string             `toml:"name"`
	Bellows      []bellowsForm       `toml:"bellows"`
	Constraint   []constraintForm    `toml:"constraint"`
	Load         *loadForm           `toml:"load"`
	Material     []materialForm      `toml:"material"`
	Objective    []objectiveForm     `toml:"objective"`
	Printer      *printerForm        `toml:"printer"`
	Requirements *requirementsForm   `toml:"requirements"`
	Scatter      *scatterForm        `toml:"scatter"`
	Search       *searchForm         `toml:"search"`
	TaskPoint    []taskForm          `toml:"task_point"`
	Workspace    *workspaceForm      `toml:"workspace"`
}

func (p *problemForm) design() designForm {
	return designForm{Fidelity: p.Fidelity, Name: p.Name, Bellows: p.Bellows, Load: p.Load, Material: p.Material,
		Printer: p.Printer, Requirements: p.Requirements, TaskPoint: p.TaskPoint, Workspace: p.Workspace, Scatter: p.Scatter}
}

type bellowsForm struct {
	BendingStiffness  []num      `toml:"bending_stiffness_n_mm2"`
	CalibrationFactor []num      `toml:"calibration_factor"`
	CalibrationFile   *string    `toml:"calibration_file"`
	CrestRadius       *numParam  `toml:"crest_radius_mm"`
	CurvedLength      *numParam  `toml:"curved_length_mm"`
	Depth             *numParam  `toml:"depth_mm"`
	FlatFraction      *numParam  `toml:"flat_fraction"`
	InsertionRange    []num      `toml:"insertion_range_mm"`
	LinearDensity     *num       `toml:"linear_density_kg_per_m"`
	Material          *nameParam `toml:"material"`
	OuterDiameter     *numParam  `toml:"outer_diameter_mm"`
	Pitch             *numParam  `toml:"pitch_mm"`
	Precurvature      *numParam  `toml:"precurvature_per_m"`
	PrecurvatureXY    []num      `toml:"precurvature_xy_per_m"`
	Profile           *nameParam `toml:"profile"`
	SettingOverbend   *num       `toml:"setting_overbend"`
	SpineAngle        *numParam  `toml:"spine_angle_deg"`
	SpineWidth        *numParam  `toml:"spine_width_mm"`
	StraightLength    *numParam  `toml:"straight_length_mm"`
	ThreadLead        *num       `toml:"thread_lead_mm"`
	Threaded          *bool      `toml:"threaded"`
	TorsionStiffness  *num       `toml:"torsional_stiffness_n_mm2"`
	Wall              *numParam  `toml:"wall_mm"`
	Winding           *nameParam `toml:"winding"`
}

// numeric returns the field of a key that a problem may vary as a range.
func (b *bellowsForm) numeric(key string) **numParam {
	switch key {
	case "crest_radius_mm":
		return &b.CrestRadius
	case "curved_length_mm":
		return &b.CurvedLength
	case "depth_mm":
		return &b.Depth
	case "flat_fraction":
		return &b.FlatFraction
	case "outer_diameter_mm":
		return &b.OuterDiameter
	case "pitch_mm":
		return &b.Pitch
	case "precurvature_per_m":
		return &b.Precurvature
	case "spine_angle_deg":
		return &b.SpineAngle
	case "spine_width_mm":
		return &b.SpineWidth
	case "straight_length_mm":
		return &b.StraightLength
	case "wall_mm":
		return &b.Wall
	}
	panic("problems: " + key + " is not a numeric variable")
}

// names returns the field of a key that a problem may give as options.
func (b *bellowsForm) names(key string) **nameParam {
	switch key {
	case "material":
		return &b.Material
	case "profile":
		return &b.Profile
	case "winding":
		return &b.Winding
	}
	panic("problems: " + key + " is not a categorical variable")
}

type materialForm struct {
	AllowableStrain *num    `toml:"allowable_strain"`
	Density         *num    `toml:"density_kg_per_m3"`
	ModulusAcross   *num    `toml:"modulus_across_layers_mpa"`
	ModulusInLayer  *num    `toml:"modulus_in_layer_mpa"`
	Name            *string `toml:"name"`
	Poisson         *num    `toml:"poisson_ratio"`
}

type loadForm struct {
	GravityDirection []num `toml:"gravity_direction"`
	Gravity          *num  `toml:"gravity_m_per_s2"`
	Payload          *num  `toml:"payload_g"`
	TipForce         []num `toml:"tip_force_n"`
	TipMoment        []num `toml:"tip_moment_n_mm"`
}

type printerForm struct {
	LayerHeight   *num               `toml:"layer_height_mm"`
	LineWidth     *num               `toml:"line_width_mm"`
	MinWall       *num               `toml:"min_wall_mm"`
	Nozzle        *num               `toml:"nozzle_mm"`
	OverhangLimit *num               `toml:"overhang_limit_deg"`
	Process       *objective.Process `toml:"process"`
}

type requirementsForm struct {
	MaxMass              *num  `toml:"max_mass_g"`
	MaxResidualCurvature *num  `toml:"max_residual_curvature_per_m"`
	MaxStraightTipAngle  *num  `toml:"max_straight_tip_angle_deg"`
	MaxStraightTipOffset *num  `toml:"max_straight_tip_offset_mm"`
	MaxTipSag            *num  `toml:"max_tip_sag_mm"`
	MinBendAngleRange    *num  `toml:"min_bend_angle_range_deg"`
	MinClearance         *num  `toml:"min_clearance_mm"`
	MinPassProbability   *num  `toml:"min_pass_probability"`
	MinPayloadToWeight   *num  `toml:"min_payload_to_weight"`
	MinReach             *num  `toml:"min_reach_mm"`
	MinStabilityMargin   *num  `toml:"min_stability_margin"`
	MinTaskCoverage      *num  `toml:"min_task_coverage"`
	StrainSafetyFactor   *num  `toml:"strain_safety_factor"`
	WithinValidatedRange *bool `toml:"within_validated_range"`
}

type taskForm struct {
	Direction          []num `toml:"direction"`
	DirectionTolerance *num  `toml:"direction_tolerance_deg"`
	Loaded             *bool `toml:"loaded"`
	Position           []num `toml:"position_mm"`
	Tolerance          *num  `toml:"tolerance_mm"`
}

type workspaceForm struct {
	BaseSteps      *num `toml:"base_steps"`
	InsertionSteps *num `toml:"insertion_steps"`
	RelativeSteps  *num `toml:"relative_steps"`
	Samples        *num `toml:"samples"`
	Voxel          *num `toml:"voxel_mm"`
}

type objectiveForm struct {
	Goal     *Goal   `toml:"goal"`
	Quantile *num    `toml:"quantile"`
	Score    *string `toml:"score"`
}

type constraintForm struct {
	Max   *num    `toml:"max"`
	Min   *num    `toml:"min"`
	Score *string `toml:"score"`
}

type searchForm struct {
	CheckpointEvery  *num    `toml:"checkpoint_every"`
	Evaluations      *num    `toml:"evaluations"`
	Method           *Method `toml:"method"`
	Population       *num    `toml:"population"`
	Seed             *num    `toml:"seed"`
	StallGenerations *num    `toml:"stall_generations"`
	StallTolerance   *num    `toml:"stall_tolerance"`
	Time             *string `toml:"time"`
	Weights          []num   `toml:"weights"`
	Workers          *num    `toml:"workers"`
}

// encodeForm writes a form as TOML.
func encodeForm(buf *bytes.Buffer, form any) error {
	enc := toml.NewEncoder(buf)
	enc.Indent = ""
	return enc.Encode(form)
}

// clone copies the bellows tables, so that a written design can set its
// variables without touching the problem's form.
func cloneBellows(bs []bellowsForm) []bellowsForm {
	return append([]bellowsForm(nil), bs...)
}
