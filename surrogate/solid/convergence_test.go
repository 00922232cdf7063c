package solid

import (
	"fmt"
	"math"
	"strings"
	"testing"
)

// deepSinusoid is the convergence-study geometry: w/q = 1, t/(2ρ) = 0.5,
// Rm/w = 2.5 (a deep, thick-walled fold; invented for the study).
func deepSinusoid() Convolution {
	q, w := 0.004, 0.004
	c := Convolution{Profile: Sinusoid, MeanRadius: 0.01, Depth: w, Pitch: q}
	c.Wall = 0.5 * 2 * c.FoldRadius()
	return c
}

var pla = Material{E: 1.5e9, Nu: 0.38} // a generic printed polymer (invented)

type convRow struct {
	ms                   MeshSize
	nodes                int
	k, ei, eAx, eBend, m float64
}

func study(t *testing.T, c Convolution, sizes []MeshSize) []convRow {
	t.Helper()
	var rows []convRow
	for _, ms := range sizes {
		r, err := Analyze(c, pla, ms)
		if err != nil {
			t.Fatal(err)
		}
		rows = append(rows, convRow{ms: ms, nodes: r.Nodes, k: r.AxialStiffness, ei: r.BendingStiffness,
			eAx: r.Axial.Max.Value, eBend: r.Bending.Max.Value, m: r.Axial.Meridional.Value})
	}
	return rows
}

// richardson extrapolates two results of a method of order p on meshes
// refined by 2 (Richardson extrapolation; common practice).
func richardson(coarse, fine float64, p float64) float64 {
	f := math.Pow(2, p)
	return fine + (fine-coarse)/(f-1)
}

// TestConvergence is the h-refinement study of CONVERGENCE.md: through
// the thickness at a fine meridional mesh, then along the meridian at the
// default thickness mesh. Strain recovered at the nodes of quadratic
// elements converges as h² (Zienkiewicz & Taylor, The Finite Element
// Method, vol. 1, convergence of derivatives; from memory): the test
// checks that order and the default mesh's error against the Richardson
// limit. Run with -v for the table.
func TestConvergence(t *testing.T) {
	c := deepSinusoid()
	var b strings.Builder
	fmt.Fprintf(&b, "deep sinusoid: Rm = %g mm, w = %g mm, q = %g mm, t = %.4g mm, t/2ρ = %.3g, w/q = %g\n",
		c.MeanRadius*1e3, c.Depth*1e3, c.Pitch*1e3, c.Wall*1e3, c.FoldRatio(), c.Depth/c.Pitch)
	print := func(rows []convRow) {
		for _, r := range rows {
			fmt.Fprintf(&b, "| %d | %d | %.1f | %d | %.6g | %.6g | %.5g | %.5g |\n",
				r.ms.Through, r.ms.Along, r.ms.Bias, r.nodes, r.k, r.ei, r.eAx, r.eBend)
		}
	}
	def := c.DefaultMesh()
	fmt.Fprintf(&b, "default mesh: %d through × %d along, bias %.1f\n", def.Through, def.Along, def.Bias)
	fmt.Fprintf(&b, "| through | along | bias | nodes | k_conv N/m | EI N·m² | ε_axial 1/m | ε_bending m |\n|---|---|---|---|---|---|---|---|\n")
	var throughSizes []MeshSize
	for _, n := range []int{4, 8, 12, 16, 24} {
		throughSizes = append(throughSizes, MeshSize{n, def.Along, def.Bias})
	}
	through := study(t, c, append(throughSizes, MeshSize{def.Through, def.Along, 0}))
	print(through)
	along := study(t, c, []MeshSize{{def.Through, def.Along / 4, def.Bias}, {def.Through, def.Along / 2, def.Bias},
		def, {def.Through, 2 * def.Along, def.Bias}, {def.Through, 4 * def.Along, def.Bias}})
	print(along)

	n := len(along)
	limAx := richardson(along[n-2].eAx, along[n-1].eAx, 2)
	limBend := richardson(along[n-2].eBend, along[n-1].eBend, 2)
	limK, limEI := along[n-1].k, along[n-1].ei
	fmt.Fprintf(&b, "Richardson limit along the meridian (p = 2): ε_axial %.5g 1/m, ε_bending %.5g m\n", limAx, limBend)
	r := along[2]
	fmt.Fprintf(&b, "default mesh against the limit along: k_conv %+.3f %%, EI %+.3f %%, ε_axial %+.2f %%, ε_bending %+.2f %%\n",
		100*(r.k/limK-1), 100*(r.ei/limEI-1), 100*(r.eAx/limAx-1), 100*(r.eBend/limBend-1))
	if e := math.Abs(r.eAx/limAx - 1); e > 0.02 {
		t.Errorf("default mesh: axial strain %.2f %% off the limit, want ≤ 2 %%", 100*e)
	}
	if e := math.Abs(r.eBend/limBend - 1); e > 0.02 {
		t.Errorf("default mesh: bending strain %.2f %% off the limit, want ≤ 2 %%", 100*e)
	}
	if e := math.Abs(r.k/limK - 1); e > 2e-3 {
		t.Errorf("default mesh: k_conv %.3f %% off, want ≤ 0.2 %%", 100*e)
	}
	fine := through[len(throughSizes)-1]
	var thr convRow
	for _, x := range through {
		if x.ms == def {
			thr = x
		}
	}
	thAx := thr.eAx/fine.eAx - 1
	fmt.Fprintf(&b, "default through-thickness mesh against 24 elements: ε_axial %+.2f %%, ε_bending %+.2f %%\n", 100*thAx, 100*(thr.eBend/fine.eBend-1))
	if math.Abs(thAx) > 0.01 {
		t.Errorf("default through-thickness mesh %.2f %% off 24 elements, want ≤ 1 %%", 100*thAx)
	}
	// observed order from the three finest meridional meshes
	d1, d2 := along[n-2].eAx-along[n-3].eAx, along[n-1].eAx-along[n-2].eAx
	p := math.Log2(d1 / d2)
	fmt.Fprintf(&b, "observed order of the axial strain along the meridian: %.2f\n", p)
	if !(p > 1.5 && p < 3) {
		t.Errorf("observed order %.2f, want about 2", p)
	}
	t.Log("\n" + b.String())
}
