package surrogate

import (
	"math"

	"plica/surrogate/shell"
)

// The shell element on a straight cylinder, for verification against the
// closed forms of cylindrical-shell theory (surrogate/REFERENCE.md §5.3). Units are
// consistent (any set); the cylinder is isotropic.

func cylinderMesh(r, l float64, n int) (rs, zs []float64) {
	for i := 0; i <= n; i++ {
		rs = append(rs, r)
		zs = append(zs, l*float64(i)/float64(n))
	}
	return rs, zs
}

// CylinderAxialStiffness is the axial stiffness of a cylinder of radius r,
// wall t and length l with radially free ends, from n shell elements. The
// membrane solution 2πrEt/l is exact in the element.
func CylinderAxialStiffness(r, t, l, e, nu float64, n int) (float64, error) {
	rs, zs := cylinderMesh(r, l, n)
	nn := len(rs)
	p := shell.Problem{R: rs, Z: zs, Wall: shell.Wall{Es: e, Et: e, Nu: nu, T: t},
		Fixed: make([]bool, 3*nn), Value: make([]float64, 3*nn)}
	last := 3 * (nn - 1)
	const delta = 0.01
	p.Fixed[1], p.Fixed[last+1] = true, true
	p.Value[last+1] = delta
	_, react, err := p.Solve()
	if err != nil {
		return 0, err
	}
	return react[last+1] / delta, nil
}

// CylinderEdgeStiffness is the radial edge stiffness per unit circumference
// of a long cylinder with a rotation-free loaded edge (the far end, 12/β
// away, clamped), from n shell elements; shell theory gives 2β³D for the
// semi-infinite cylinder.
func CylinderEdgeStiffness(r, t, e, nu float64, n int) (float64, error) {
	beta := math.Pow(3*(1-nu*nu)/(r*r*t*t), 0.25)
	rs, zs := cylinderMesh(r, 12/beta, n)
	nn := len(rs)
	p := shell.Problem{R: rs, Z: zs, Wall: shell.Wall{Es: e, Et: e, Nu: nu, T: t},
		Fixed: make([]bool, 3*nn), Value: make([]float64, 3*nn), Load: make([]float64, 3*nn)}
	last := 3 * (nn - 1)
	p.Fixed[last], p.Fixed[last+1], p.Fixed[last+2] = true, true, true
	p.Load[0] = 2 * math.Pi * r // unit radial line load
	disp, _, err := p.Solve()
	if err != nil {
		return 0, err
	}
	return 1 / disp[0], nil
}
