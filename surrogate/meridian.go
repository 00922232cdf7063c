package surrogate

import (
	"plica/surrogate/convolution"
	"plica/surrogate/shell"
)

// MeanRadius returns Rm = OD/2 − t/2 − w/2, m: the crown centreline lies at
// Rm + w/2 and the root centreline at Rm − w/2 (surrogate/REFERENCE.md §1.1).
func (g Geometry) MeanRadius() float64 { return (g.OuterDiameter - g.Wall - g.Depth) / 2 }

// crestRadius returns the U-profile crown/root radius rm (0 → q/4).
func (g Geometry) crestRadius() float64 {
	if g.CrestRadius == 0 {
		return g.Pitch / 4
	}
	return g.CrestRadius
}

// DefaultShellElements is the default number of shell elements per arc,
// flank or flat of half a convolution (convolution.DefaultElements).
const DefaultShellElements = convolution.DefaultElements

// HalfMeridian returns the centreline of half a convolution, root apex at
// z = 0 to crown apex at z = q/2 (package convolution). The geometry must
// be valid.
func (g Geometry) HalfMeridian() convolution.Meridian {
	rm, w, q := g.MeanRadius(), g.Depth, g.Pitch
	switch g.Profile {
	case Sinusoid:
		return convolution.Sinusoid(rm, w, q)
	case UShape:
		return convolution.UShape(rm, w, q, g.crestRadius())
	case Trapezoid:
		return convolution.Trapezoid(rm, w, q, g.FlatFraction)
	}
	return convolution.Meridian{}
}

// shellModel runs the shell model on half a convolution of the wall
// (convolution.Shell) with the orthotropic wall of the material.
func shellModel(g *Geometry, mtl *Material, perSeg int) (convolution.Result, error) {
	m := g.HalfMeridian()
	return convolution.Shell(&m, shell.Wall{Es: mtl.ModulusAcross, Et: mtl.ModulusInLayer, Nu: mtl.Poisson, T: g.Wall}, perSeg)
}
