package convolution

import "plica/surrogate/shell"

// DefaultElements is the default number of shell elements per arc, flank
// or flat of half a convolution (five times as many on a half sinusoid):
// 80 + 80 + 80 for a half U-convolution, 400 for a half sinusoid
// (surrogate/REFERENCE.md §2.3 reference resolution).
const DefaultElements = 80

// Shell runs the axisymmetric shell model on half a convolution (surrogate/REFERENCE.md
// §2.3) meshed by Meridian.Nodes(perSeg): root apex W = 0, χ = 0; crown
// apex W = δ, χ = 0; U free; k_conv = F_a/(2δ) (two half convolutions in
// series, movement e = 2δ).
func Shell(m *Meridian, wall shell.Wall, perSeg int) (Result, error) {
	r, z := m.Nodes(perSeg)
	nn := len(r)
	p := shell.Problem{
		R: r, Z: z,
		Wall:  wall,
		Fixed: make([]bool, 3*nn),
		Value: make([]float64, 3*nn),
	}
	const delta = 1.0 // linear model: any δ
	last := 3 * (nn - 1)
	p.Fixed[1], p.Fixed[2] = true, true
	p.Fixed[last+1], p.Fixed[last+2] = true, true
	p.Value[last+1] = delta
	d, react, err := p.Solve()
	if err != nil {
		return Result{}, err
	}
	return Result{
		K:                 react[last+1] / (2 * delta),
		StrainPerMovement: p.PeakMeridionalStrain(d) / (2 * delta),
	}, nil
}
