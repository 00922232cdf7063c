package fecheck

import (
	"context"
	"math"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"plica/surrogate"
	"plica/surrogate/solid"
)

// TestFESolidVsCalculiX checks the surrogate's wall model against an
// independent 3-D solid model solved by CalculiX: the periodic
// convolution (half of it, full circumference, mirror conditions on the
// root and crest planes) in C3D20 bricks through the wall, bent and
// twisted. The accuracy targets, for both the solid model run directly
// (harmonic 1, default mesh) and the surrogate's strip fidelity (its
// generated wall tables): peak meridional strain per unit curvature
// within ±10 % of the 3-D model and never more than 5 % low; EI and GJ
// within ±5 %. The 3-D model's strain is extrapolated to the nodes from
// the 27 integration points of each brick (about +0.5 % on the coarse
// mesh: ccx's extrapolation, as for the shell model in REFERENCE.md).
// Sources: the exactness of the harmonic method for an axisymmetric body
// under a cos θ load (Zienkiewicz & Taylor, The Finite Element Method,
// vol. 1, axisymmetric solids under non-symmetric loads; from memory)
// makes the two models discretisations of the same elasticity problem.
func TestFESolidVsCalculiX(t *testing.T) {
	needCCX(t)
	mat := ringMaterial
	for _, c := range ringGeometries {
		t.Run(c.name, func(t *testing.T) {
			t.Parallel()
			g := c.geometry()
			b := surrogate.Bellows{Geometry: g, Material: mat}
			require.NoError(t, b.Validate())
			sec, err := b.Section(surrogate.Strip)
			require.NoError(t, err)
			spec := c.spec(mat)
			sr, err := solid.Analyze(spec.conv, solid.Material{E: mat.ModulusAcross, Nu: mat.Poisson}, solid.MeshSize{})
			require.NoError(t, err)
			fe, err := solveRing(context.Background(), t.TempDir(), &spec, c.name, Options{})
			require.NoError(t, err)

			solidStrain := math.Abs(sr.Bending.Meridional.Value)
			t.Logf("%-18s w/q %.2f t/2ρ %.2f w/Dm %.2f t/w %.2f | 3-D %d el %.1f s: EI %.5g GJ %.5g ε/κ %.5g m",
				c.name, c.wq, c.fold, c.wdm, g.Wall/g.Depth, fe.Elements, fe.RunTimeS, fe.EINm2, fe.GJNm2, fe.StrainPerCurvatureM)
			t.Logf("  solid/3-D: EI %+.2f %%, ε/κ %+.2f %% | surrogate (%v)/3-D: EI %+.2f %%, GJ %+.2f %%, ε/κ %+.2f %%; beam analogy EI %+.2f %%",
				100*(sr.BendingStiffness/fe.EINm2-1), 100*(solidStrain/fe.StrainPerCurvatureM-1),
				sec.Fidelity, 100*(sec.EI[0][0]/fe.EINm2-1), 100*(sec.GJ/fe.GJNm2-1), 100*(sec.StrainPerCurvature/fe.StrainPerCurvatureM-1),
				100*(sec.AxialRatePerConvolution*g.Pitch*g.MeanRadius()*g.MeanRadius()/2/fe.EINm2-1))
			strain := func(who string, v float64) {
				r := v/fe.StrainPerCurvatureM - 1
				assert.True(t, r >= -0.05 && r <= 0.10, "%s: strain per curvature %.5g m, 3-D %.5g m (%+.1f %%; want −5 % … +10 %)", who, v, fe.StrainPerCurvatureM, 100*r)
			}
			strain("solid", solidStrain)
			strain("surrogate", sec.StrainPerCurvature)
			assert.InEpsilon(t, fe.EINm2, sr.BendingStiffness, 0.05, "solid EI")
			assert.InEpsilon(t, fe.EINm2, sec.EI[0][0], 0.05, "surrogate EI")
			assert.InEpsilon(t, fe.GJNm2, sec.GJ, 0.05, "surrogate GJ")
		})
	}
}

// TestRingGeometriesReachEdges: the CalculiX comparison above reaches
// every geometric edge of surrogate.Validity it is the reference for
// (t/2ρ 0.8, w/Dm 0.25, t/w near 0.5, w/q 0.15 and 1.6 for the
// sinusoid, 0.6 and 1.6 for the U), within 10 % of the edge.
func TestRingGeometriesReachEdges(t *testing.T) {
	top := map[string]float64{}
	low := map[string]float64{}
	for _, c := range ringGeometries {
		g := c.geometry()
		for q, v := range map[string]float64{
			surrogate.QuantityWallDepth: g.Wall / g.Depth, surrogate.QuantityFold: g.FoldRatio(),
			surrogate.QuantityDepthDiam: g.Depth / (2 * g.MeanRadius()), c.p.String() + " " + surrogate.QuantityDepthPitch: g.Depth / g.Pitch,
		} {
			top[q] = math.Max(top[q], v)
			if l, ok := low[q]; !ok || v < l {
				low[q] = v
			}
		}
	}
	for _, l := range surrogate.Validity {
		switch l.Quantity {
		case surrogate.QuantitySpine, surrogate.QuantitySpinePitchDiam, surrogate.QuantitySpineDepthPitch, surrogate.QuantitySpineStrain:
			// the spine's limits come from the generated table's grid and
			// TestFESpineGJ (the wall strain's from its 3-D shell
			// comparison, surrogate/REFERENCE.md §6.4), not from the ring
			// comparison
			continue
		}
		if l.Quantity == surrogate.QuantityConvolutions || l.Quantity == surrogate.QuantityOpening || l.Max == 0 {
			continue
		}
		key := l.Quantity
		if l.Quantity == surrogate.QuantityDepthPitch {
			key = l.Profiles[0].String() + " " + l.Quantity
		}
		assert.GreaterOrEqual(t, top[key], 0.9*l.Max, "%s: the FE geometries reach the upper edge %g", key, l.Max)
		if l.Min > 0 {
			assert.LessOrEqual(t, low[key], 1.2*l.Min, "%s: the FE geometries reach the lower edge %g", key, l.Min)
		}
	}
}
