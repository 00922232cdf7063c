package surrogate_test

import (
	"fmt"
	"math"
	"os"
	"text/tabwriter"

	"plica/surrogate"
)

// ExampleBellows_Section prints the section properties of a demo bellows
// (invented dimensions) in generic PETG at both fidelities, with and
// without a spine.
func ExampleBellows_Section() {
	petg, _ := surrogate.LookupMaterial("petg")
	b := surrogate.Bellows{
		Geometry: surrogate.Geometry{
			OuterDiameter: 30e-3, Depth: 2.5e-3, Pitch: 6e-3, Wall: 0.6e-3,
			Profile: surrogate.Sinusoid,
		},
		Material: petg,
	}
	spine := b
	spine.SpineWidth, spine.SpineAngle = 3e-3, math.Pi/2

	w := tabwriter.NewWriter(os.Stdout, 0, 0, 2, ' ', 0)
	fmt.Fprintln(w, "case\tfidelity\tk_conv_n_per_mm\tei_x_n_mm2\tei_y_n_mm2\tgj_n_mm2\tmass_g_per_m\tstrain_per_curvature_mm\thoop_factor")
	for _, c := range []struct {
		name string
		b    surrogate.Bellows
		f    surrogate.Fidelity
	}{
		{"plain", b, surrogate.Strip},
		{"plain", b, surrogate.Shell},
		{"spine +y", spine, surrogate.Strip},
	} {
		s, err := c.b.Section(c.f)
		if err != nil {
			fmt.Println(err)
			return
		}
		fmt.Fprintf(w, "%s\t%v\t%.4g\t%.4g\t%.4g\t%.4g\t%.4g\t%.4g\t%.3f\n", c.name, s.Fidelity,
			s.AxialRatePerConvolution*1e-3, s.EI[0][0]*1e6, s.EI[1][1]*1e6, s.GJ*1e6,
			s.MassPerLength*1e3, s.StrainPerCurvature*1e3, s.HoopFactor)
	}
	w.Flush()
	// Output:
	// case      fidelity  k_conv_n_per_mm  ei_x_n_mm2  ei_y_n_mm2  gj_n_mm2   mass_g_per_m  strain_per_curvature_mm  hoop_factor
	// plain     strip     741.1            4.036e+05   4.036e+05   4.835e+06  86.51         8.181                    1.158
	// plain     shell     740.7            4.035e+05   4.035e+05   4.835e+06  86.51         8.233                    1.158
	// spine +y  strip     741.1            8.326e+05   4.005e+05   4.055e+06  85.11         12.46                    1.158
}
