package surrogate

import (
	"errors"
	"fmt"
	"math"
	"strconv"
)

// InputError reports one invalid input value. Key is the snake_case name of
// the input with its unit (wall_mm, depth_mm, pitch_mm, outer_diameter_mm,
// crest_radius_mm, flat_fraction, spine_width_mm, spine_angle_deg,
// calibration_factor, profile, fidelity, modulus_across_layers_mpa,
// modulus_in_layer_mpa, poisson_ratio, density_kg_per_m3,
// allowable_strain); Msg says
// what was found and what was expected, in the same units. A loader can
// find the key with errors.As and prefix the file position.
type InputError struct {
	Key string
	Msg string
}

func (e *InputError) Error() string { return e.Key + ": " + e.Msg }

// num formats a number for messages: up to 4 significant digits.
func num(x float64) string { return strconv.FormatFloat(x, 'g', 4, 64) }

// mm formats a length given in metres as millimetres.
func mm(x float64) string { return num(x * 1e3) }

func inputErr(key, format string, args ...any) error {
	return &InputError{Key: key, Msg: fmt.Sprintf(format, args...)}
}

func finite(x float64) bool { return !math.IsNaN(x) && !math.IsInf(x, 0) }

// positive checks a positive finite value; scale converts SI to the unit of
// the key (1e3 for *_mm, 1e-6 for *_mpa).
func positive(key string, x, scale float64) error {
	if finite(x) && x > 0 {
		return nil
	}
	return inputErr(key, "%s is not a positive finite number (expected > 0)", num(x*scale))
}

// MaxDimension is the largest outer diameter, depth, pitch and wall
// Geometry.Validate accepts, in metres: far beyond any bellows that can be
// printed or bought, and far inside what the wall and shell models compute
// in floating point.
const MaxDimension = 10.0

// dimension checks a positive finite length of at most MaxDimension, in mm.
func dimension(key string, x float64) error {
	if err := positive(key, x, 1e3); err != nil {
		return err
	}
	if x > MaxDimension {
		return inputErr(key, "%s is out of range (expected at most %g mm)", num(x*1e3), MaxDimension*1e3)
	}
	return nil
}

func nonNegative(key string, x, scale float64) error {
	if finite(x) && x >= 0 {
		return nil
	}
	return inputErr(key, "%s is not a finite number ≥ 0 (expected ≥ 0)", num(x*scale))
}

// Validate checks the material values: moduli, density and allowable
// strain positive and finite, 0 ≤ ν < 0.5. All failures are joined.
func (m Material) Validate() error {
	var errs []error
	errs = append(errs,
		positive("modulus_across_layers_mpa", m.ModulusAcross, 1e-6),
		positive("modulus_in_layer_mpa", m.ModulusInLayer, 1e-6))
	if !finite(m.Poisson) || m.Poisson < 0 || m.Poisson >= 0.5 {
		errs = append(errs, inputErr("poisson_ratio", "%s is outside [0, 0.5) (expected 0 ≤ poisson_ratio < 0.5)", num(m.Poisson)))
	}
	errs = append(errs,
		positive("density_kg_per_m3", m.Density, 1),
		positive("allowable_strain", m.AllowableStrain, 1))
	return errors.Join(errs...)
}

// Validate checks the geometry. First every value on its own (positive,
// finite, in range: outer diameter, depth, pitch and wall at most
// MaxDimension; all such failures are joined and returned), then the
// cross-field rules, all of which are joined:
//
//   - wall < depth/2 (the crown and root walls must not overlap);
//   - depth < mean radius Rm = (outer diameter − wall − depth)/2 (keeps the
//     root radius above Rm/2, so the bore stays open and Dm ≫ w roughly holds);
//   - pitch > 4·wall (room for two walls and a gap at least as wide);
//   - UShape: wall/2 < crest radius ≤ pitch/4 and crest radius ≤ depth/2
//     (the crown's inner surface has positive radius; semicircular crowns
//     fit the pitch; flank length w − 2·rm ≥ 0);
//   - Sinusoid: pitch > π·sqrt(depth·wall), i.e. the crest radius of
//     curvature q²/(2π²w) exceeds wall/2 so the inner surface does not
//     fold over itself;
//   - Trapezoid: 0 ≤ flat fraction ≤ 1;
//   - spine width < π·Dm (the mean circumference).
func (g Geometry) Validate() error {
	var errs []error
	errs = append(errs,
		dimension("outer_diameter_mm", g.OuterDiameter),
		dimension("depth_mm", g.Depth),
		dimension("pitch_mm", g.Pitch),
		dimension("wall_mm", g.Wall),
		nonNegative("spine_width_mm", g.SpineWidth, 1e3))
	if !finite(g.SpineAngle) {
		errs = append(errs, inputErr("spine_angle_deg", "%s is not a finite number", num(g.SpineAngle*180/math.Pi)))
	}
	switch g.Profile {
	case Sinusoid:
	case UShape:
		errs = append(errs, nonNegative("crest_radius_mm", g.CrestRadius, 1e3))
	case Trapezoid:
		if !finite(g.FlatFraction) || g.FlatFraction < 0 || g.FlatFraction > 1 {
			errs = append(errs, inputErr("flat_fraction", "%s is outside [0, 1] (expected 0 ≤ flat_fraction ≤ 1)", num(g.FlatFraction)))
		}
	default:
		errs = append(errs, inputErr("profile", "%d is not a profile (expected: sinusoid|u|trapezoid)", int(g.Profile)))
	}
	if err := errors.Join(errs...); err != nil {
		return err
	}

	errs = errs[:0]
	t, w, q := g.Wall, g.Depth, g.Pitch
	if t >= w/2 {
		errs = append(errs, inputErr("wall_mm", "%s is too thick for depth_mm %s (expected wall < depth/2)", mm(t), mm(w)))
	}
	rm := (g.OuterDiameter - t - w) / 2
	if w >= rm {
		errs = append(errs, inputErr("depth_mm", "%s is not smaller than the mean radius %s mm for outer_diameter_mm %s and wall_mm %s (expected depth < (outer_diameter − wall − depth)/2)",
			mm(w), mm(rm), mm(g.OuterDiameter), mm(t)))
	}
	if q <= 4*t {
		errs = append(errs, inputErr("pitch_mm", "%s is too small for wall_mm %s (expected pitch > 4·wall = %s)", mm(q), mm(t), mm(4*t)))
	}
	switch g.Profile {
	case UShape:
		r, def := g.CrestRadius, ""
		if r == 0 {
			r, def = q/4, " (default pitch/4)"
		}
		if r > q/4*(1+1e-9) {
			errs = append(errs, inputErr("crest_radius_mm", "%s is larger than pitch_mm %s / 4 (expected crest radius ≤ pitch/4 = %s)", mm(r), mm(q), mm(q/4)))
		}
		if r <= t/2 {
			errs = append(errs, inputErr("crest_radius_mm", "%s%s is too small for wall_mm %s (expected crest radius > wall/2 = %s)", mm(r), def, mm(t), mm(t/2)))
		}
		if 2*r > w*(1+1e-9) {
			errs = append(errs, inputErr("crest_radius_mm", "%s%s is too large for depth_mm %s (expected crest radius ≤ depth/2 = %s)", mm(r), def, mm(w), mm(w/2)))
		}
	case Sinusoid:
		if lim := math.Pi * math.Sqrt(w*t); q <= lim {
			errs = append(errs, inputErr("pitch_mm", "%s is too small for depth_mm %s and wall_mm %s (expected pitch > π·sqrt(depth·wall) = %s, so the crest radius of curvature exceeds wall/2)",
				mm(q), mm(w), mm(t), mm(lim)))
		}
	}
	if dm := 2 * rm; rm > 0 && g.SpineWidth >= math.Pi*dm {
		errs = append(errs, inputErr("spine_width_mm", "%s is not smaller than the mean circumference %s mm (expected spine width < π·Dm)", mm(g.SpineWidth), mm(math.Pi*dm)))
	}
	return errors.Join(errs...)
}

// Validate checks geometry, material and calibration factors (finite,
// ≥ 0; zero means 1). Geometry errors come first.
func (b Bellows) Validate() error {
	errs := []error{b.Geometry.Validate(), b.Material.Validate()}
	if c := b.Calibration; !finite(c[0]) || !finite(c[1]) || c[0] < 0 || c[1] < 0 {
		errs = append(errs, inputErr("calibration_factor", "[%s, %s] is out of range (expected [c_x, c_y], both finite and ≥ 0; 0 means 1)", num(c[0]), num(c[1])))
	}
	return errors.Join(errs...)
}
