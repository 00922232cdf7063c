package surrogate

import (
	"math"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// cylinderMesh returns n elements of a cylinder of radius r from z = 0 to z = l.
// TestShellStraightCylinderAxial checks the element against the membrane
// axial stiffness of a cylinder with radially free ends, k = 2π R E t / L
// (PHYSICS §9.7: R = 10, t = 0.1, L = 5, E = 1000, ν = 0.3 → 1256.64; the
// element represents the exact solution, so agreement is to rounding;
// derived from the membrane solution ε_s = δ/L, ε_θ = −ν ε_s).
func TestShellStraightCylinderAxial(t *testing.T) {
	for _, n := range []int{1, 4, 37} {
		rs, zs := cylinderMesh(10, 5, n)
		nn := len(rs)
		p := shellProblem{r: rs, z: zs, mat: shellMat{Es: 1000, Et: 1000, nu: 0.3, t: 0.1},
			fixed: make([]bool, 3*nn), value: make([]float64, 3*nn)}
		last := 3 * (nn - 1)
		p.fixed[1], p.fixed[last+1] = true, true
		p.value[last+1] = 0.01
		_, react, err := p.solve()
		require.NoError(t, err, "cylinder n=%d", n)
		want := 2 * math.Pi * 10 * 1000 * 0.1 / 5
		assert.InDelta(t, 1256.64, want, 0.005, "closed form, quoted to 6 digits")
		assert.InEpsilon(t, want, react[last+1]/0.01, 1e-12, "cylinder axial stiffness, n=%d elements", n)
	}
}

// TestShellSemiInfiniteCylinderEdge checks the radial edge stiffness of a
// semi-infinite cylinder with a rotation-free edge (M = 0), per unit
// circumference 2 β³ D with β⁴ = 3(1−ν²)/(R² t²) (Timoshenko &
// Woinowsky-Krieger, Theory of Plates and Shells, 2nd ed., 1959, §114,
// from memory; PHYSICS §9.7: 0.388982, element 0.388986, 1e-5 relative).
func TestShellSemiInfiniteCylinderEdge(t *testing.T) {
	const r, th, e, nu = 10.0, 0.1, 1000.0, 0.3
	beta := math.Pow(3*(1-nu*nu)/(r*r*th*th), 0.25)
	d := e * th * th * th / (12 * (1 - nu*nu))
	want := 2 * beta * beta * beta * d
	assert.InEpsilon(t, 0.388982, want, 2e-6, "closed form 2β³D")
	// Length 12/β (e^(−12) ≈ 6e-6 edge interaction; PHYSICS §9.7 asks for
	// more than 10/β), 480 elements: β·ℓ = 0.025. The element converges as
	// h² from above (linear u cannot cancel the cubic Poisson term of ε_θ).
	rs, zs := cylinderMesh(r, 12/beta, 480)
	nn := len(rs)
	p := shellProblem{r: rs, z: zs, mat: shellMat{Es: e, Et: e, nu: nu, t: th},
		fixed: make([]bool, 3*nn), value: make([]float64, 3*nn), load: make([]float64, 3*nn)}
	last := 3 * (nn - 1)
	p.fixed[last], p.fixed[last+1], p.fixed[last+2] = true, true, true
	const q0 = 1.0 // radial line load per unit circumference
	p.load[0] = 2 * math.Pi * r * q0
	disp, _, err := p.solve()
	require.NoError(t, err)
	got := q0 / disp[0]
	assert.InEpsilon(t, want, got, 1e-5, "semi-infinite cylinder edge stiffness, 480 elements over 12/β")
	assert.InEpsilon(t, 0.388986, got, 1e-5, "PHYSICS §9.7 element value")
}

// TestShellMeshConvergence checks that k_conv changes by less than 0.2 %
// from 40 to 160 elements per arc/flank (PHYSICS §6.2, derived) and the
// peak strain by less than 1 % (κ_s converges one order slower).
func TestShellMeshConvergence(t *testing.T) {
	cases := []struct {
		name string
		p    ShapePoint
	}{
		{"u C1=0.5 C2=1", ShapePoint{Profile: UShape, C1: 0.5, C2: 1, Wall: 0.3, Poisson: 0.35}},
		{"u C1=0.2 C2=2", ShapePoint{Profile: UShape, C1: 0.2, C2: 2, Wall: ThinWall, Poisson: 0.45}},
		{"sinusoid w/q=0.5 C2q=0.5", ShapePoint{Profile: Sinusoid, DepthRatio: 0.5, C2: 0.5, Wall: 0.2, Poisson: 0.35}},
		{"sinusoid w/q=3 C2q=1", ShapePoint{Profile: Sinusoid, DepthRatio: 3, C2: 1, Wall: ThinWall, Poisson: 0.3}},
		{"trapezoid f=0.4", ShapePoint{Profile: Trapezoid, FlatFraction: 0.4, DepthRatio: 0.5, C2: 0.6, Wall: 0.2, Poisson: 0.4}},
	}
	for _, c := range cases {
		b, err := shapeBellows(c.p)
		require.NoError(t, err, c.name)
		coarse, err := shellModel(&b.Geometry, &b.Material, 40)
		require.NoError(t, err, c.name)
		fine, err := shellModel(&b.Geometry, &b.Material, 160)
		require.NoError(t, err, c.name)
		assert.InEpsilon(t, fine.k, coarse.k, 2e-3, "%s: k_conv 40 vs 160 elements", c.name)
		assert.InEpsilon(t, fine.epsPerE, coarse.epsPerE, 1e-2, "%s: peak strain 40 vs 160 elements", c.name)
	}
}
