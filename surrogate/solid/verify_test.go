package solid

import (
	"math"
	"testing"
)

func rel(got, want float64) float64 { return math.Abs(got-want) / math.Abs(want) }

// lameModel meshes a thick cylinder a ≤ r ≤ b, 0 ≤ z ≤ length in the
// axisymmetric mode with its ends held axially (εz = 0).
func lameModel(t *testing.T, a, b, length float64, along, through int) (*Grid, *Model, Loads) {
	t.Helper()
	g, err := NewGrid(along, through, func(k, j int) (float64, float64) {
		return a + (b-a)*float64(k)/float64(2*along), length * float64(j) / float64(2*through)
	})
	if err != nil {
		t.Fatal(err)
	}
	m := &Model{Mesh: &g.Mesh, Mode: Axisymmetric, Material: Material{E: 2e9, Nu: 0.35}}
	var l Loads
	for _, side := range []Side{Low, High} {
		for _, n := range g.Nodes(side) {
			l.Fixed = append(l.Fixed, Fixed{Node: n, Dof: DofY})
		}
	}
	return g, m, l
}

// TestLameCylinder checks a thick-walled cylinder under internal pressure
// in the axisymmetric mode against Lamé's solution (Timoshenko & Goodier,
// Theory of Elasticity, 3rd ed., 1970, thick-walled cylinder, art. 28 from
// memory; plane strain ends so σz = ν(σr + σθ)). Nodal stresses of
// quadratic elements converge as h², hence the tolerances.
func TestLameCylinder(t *testing.T) {
	const a, b, p = 0.01, 0.025, 1e6
	g, m, l := lameModel(t, a, b, 0.004, 24, 2)
	for _, e := range g.Edges(Start) {
		l.Pressures = append(l.Pressures, Pressure{Edge: e, P: p})
	}
	sol, err := m.Solve(l)
	if err != nil {
		t.Fatal(err)
	}
	eps, err := sol.NodalStrains()
	if err != nil {
		t.Fatal(err)
	}
	E, nu := m.Material.E, m.Material.Nu
	A := p * a * a / (b*b - a*a)
	B := p * a * a * b * b / (b*b - a*a)
	for k := 0; k <= 2*g.Along; k++ {
		n := g.Node(k, 0)
		r := g.X[n]
		sr, st := A-B/(r*r), A+B/(r*r)
		sz := nu * (sr + st)
		ur := r / E * (st - nu*(sr+sz))
		if e := rel(sol.Displacement(n, DofX), ur); e > 1e-4 {
			t.Errorf("r = %.4f: u_r = %.6g, Lamé %.6g (error %.2g)", r, sol.Displacement(n, DofX), ur, e)
		}
		s := m.Material.Stress(eps[n])
		if e := math.Abs(s[2]-st) / p; e > 3e-3 {
			t.Errorf("r = %.4f: σθ = %.6g, Lamé %.6g (error %.2g p)", r, s[2], st, e)
		}
		if e := math.Abs(s[0]-sr) / p; e > 5e-3 {
			t.Errorf("r = %.4f: σr = %.6g, Lamé %.6g (error %.2g p)", r, s[0], sr, e)
		}
	}
}

// curvedBar meshes a quarter ring a ≤ r ≤ b, 0 ≤ θ ≤ π/2 in plane stress,
// symmetric on θ = 0, with the section θ = π/2 turned rigidly by β about
// the centre (sections of a curved bar in pure bending stay plane:
// Timoshenko & Goodier, Theory of Elasticity, 3rd ed., 1970, art. 29 from
// memory). It
// returns the bending moment per unit thickness, the hoop stress on the
// inner and outer fibres at θ = π/4, and the rotation.
func curvedBar(t *testing.T, a, b float64, along, through int) (m, sInner, sOuter, beta float64) {
	t.Helper()
	g, err := NewGrid(along, through, func(k, j int) (float64, float64) {
		th := math.Pi / 2 * float64(k) / float64(2*along)
		r := b - (b-a)*float64(j)/float64(2*through)
		return r * math.Cos(th), r * math.Sin(th)
	})
	if err != nil {
		t.Fatal(err)
	}
	md := &Model{Mesh: &g.Mesh, Mode: PlaneStress, Material: Material{E: 1e9, Nu: 0.3}}
	beta = 1e-3
	var l Loads
	for _, n := range g.Nodes(Start) {
		l.Fixed = append(l.Fixed, Fixed{Node: n, Dof: DofY})
	}
	end := g.Nodes(End)
	for _, n := range end {
		l.Fixed = append(l.Fixed, Fixed{Node: n, Dof: DofX, Value: -beta * g.Y[n]})
	}
	sol, err := md.Solve(l)
	if err != nil {
		t.Fatal(err)
	}
	for _, n := range end {
		m -= sol.ReactionAt(n, DofX) * g.Y[n]
	}
	eps, err := sol.NodalStrains()
	if err != nil {
		t.Fatal(err)
	}
	hoop := func(n int) float64 {
		th := math.Atan2(g.Y[n], g.X[n])
		s := md.Material.Stress(eps[n])
		c, sn := math.Cos(th), math.Sin(th)
		return s[0]*sn*sn + s[1]*c*c - 2*s[3]*sn*c
	}
	return m, hoop(g.Node(along, 2*through)), hoop(g.Node(along, 0)), beta
}

// golovin returns the hoop stress on the inner and outer fibres and the
// rotation per unit angle of a curved bar of unit thickness in pure
// bending by M (Golovin's solution, Timoshenko & Goodier, Theory of
// Elasticity, 3rd ed., 1970, art. 29, eqs. (52)–(55); from memory).
func golovin(a, b, m, e float64) (sInner, sOuter, rotPerAngle float64) {
	l := math.Log(b / a)
	n := (b*b-a*a)*(b*b-a*a) - 4*a*a*b*b*l*l
	st := func(r float64) float64 {
		return -4 * m / n * (-a*a*b*b/(r*r)*l + b*b*math.Log(r/b) + a*a*math.Log(a/r) + b*b - a*a)
	}
	bb := -2 * m / n * (b*b - a*a)
	return st(a), st(b), 4 * bb / e
}

// winklerBach returns the inner-fibre stress of a rectangular curved bar
// of depth h and unit width (Winkler–Bach curved-beam formula: Young &
// Budynas, Roark's Formulas for Stress and Strain, 7th ed., 2002, ch. 9,
// curved beams, eq. 9.1-1 and Table 9.1; from memory).
func winklerBach(a, b, m float64) float64 {
	h := b - a
	rn := h / math.Log(b/a)
	e := (a+b)/2 - rn
	return m * (rn - a) / (h * e * a)
}

// TestCurvedBarPureBending checks plane stress against the exact
// elasticity solution of a curved bar in pure bending, and shows the
// Winkler–Bach factor K_i = σ_i/(6M/h²) emerging at R/h from 10 down to 1.
func TestCurvedBarPureBending(t *testing.T) {
	const h = 0.002
	for _, rh := range []float64{10, 5, 3, 2, 1.5, 1} {
		rc := rh * h
		a, b := rc-h/2, rc+h/2
		m, si, so, beta := curvedBar(t, a, b, 48, 12)
		ei, eo, rot := golovin(a, b, m, 1e9)
		// rotation of the section at θ = π/2 relative to θ = 0
		if e := rel(beta, math.Abs(rot)*math.Pi/2); e > 1e-4 {
			t.Errorf("R/h = %g: rotation %.6g, Golovin %.6g (error %.2g)", rh, beta, math.Abs(rot)*math.Pi/2, e)
		}
		if e := rel(math.Abs(si), math.Abs(ei)); e > 5e-3 {
			t.Errorf("R/h = %g: inner σθ %.6g, Golovin %.6g (error %.2g)", rh, si, ei, e)
		}
		if e := rel(math.Abs(so), math.Abs(eo)); e > 5e-3 {
			t.Errorf("R/h = %g: outer σθ %.6g, Golovin %.6g (error %.2g)", rh, so, eo, e)
		}
		wb := winklerBach(a, b, m)
		kFE, kWB := math.Abs(si)/(6*m/(h*h)), wb/(6*m/(h*h))
		t.Logf("R/h = %4.1f  K_i: FE %.4f  Golovin %.4f  Winkler–Bach %.4f", rh, kFE, math.Abs(ei)/(6*m/(h*h)), kWB)
		// Winkler–Bach neglects σr; for rectangular sections it stays
		// within a few per cent of the exact inner-fibre stress even at
		// R/h = 1 (Timoshenko & Goodier art. 29 compare the two; from memory).
		if e := rel(kFE, kWB); e > 0.05 {
			t.Errorf("R/h = %g: K_i FE %.4f, Winkler–Bach %.4f (error %.2g)", rh, kFE, kWB, e)
		}
	}
}

// tube meshes a plain tube ri ≤ r ≤ ro, 0 ≤ z ≤ length, holds z = 0 and
// moves z = length axially by δ (mode Axisymmetric) or turns it by β
// (mode Harmonic1, W = β r). It returns EA = F·L/δ or EI = M·L/β.
func tube(t *testing.T, mode Mode, ri, ro, length float64, along, through int) float64 {
	t.Helper()
	g, err := NewGrid(along, through, func(k, j int) (float64, float64) {
		return ro - (ro-ri)*float64(j)/float64(2*through), length * float64(k) / float64(2*along)
	})
	if err != nil {
		t.Fatal(err)
	}
	m := &Model{Mesh: &g.Mesh, Mode: mode, Material: Material{E: 1.5e9, Nu: 0.38}}
	const u = 1e-4
	var l Loads
	for _, n := range g.Nodes(Start) {
		l.Fixed = append(l.Fixed, Fixed{Node: n, Dof: DofY})
	}
	end := g.Nodes(End)
	for _, n := range end {
		v := u
		if mode == Harmonic1 {
			v = u * g.X[n]
		}
		l.Fixed = append(l.Fixed, Fixed{Node: n, Dof: DofY, Value: v})
	}
	if mode == Harmonic1 {
		l.Fixed = append(l.Fixed, Fixed{Node: g.Node(0, 0), Dof: DofX})
	}
	sol, err := m.Solve(l)
	if err != nil {
		t.Fatal(err)
	}
	var f, fs float64
	for _, n := range end {
		r := sol.ReactionAt(n, DofY)
		if mode == Harmonic1 {
			r *= g.X[n]
		}
		f += r
	}
	for _, n := range g.Nodes(Start) {
		r := sol.ReactionAt(n, DofY)
		if mode == Harmonic1 {
			r *= g.X[n]
		}
		fs += r
	}
	// statics: the two ends carry equal and opposite loads
	if e := math.Abs(f+fs) / math.Abs(f); e > 1e-9 {
		t.Errorf("%v: end loads %g and %g do not balance", mode, f, fs)
	}
	return f * length / u
}

// TestTubeAxial: n = 0 on a plain tube gives EA = E·π(Ro² − Ri²)
// (elementary bar theory; exact for the axisymmetric solid with free
// lateral surfaces) and the thin-tube limit EA = E·2π·R·t.
func TestTubeAxial(t *testing.T) {
	const e = 1.5e9
	for _, c := range []struct{ ri, ro float64 }{{0.004, 0.01}, {0.0099, 0.0101}} {
		got := tube(t, Axisymmetric, c.ri, c.ro, 0.01, 4, 2)
		want := e * math.Pi * (c.ro*c.ro - c.ri*c.ri)
		if d := rel(got, want); d > 1e-9 {
			t.Errorf("Ri = %g, Ro = %g: EA %.8g, E·π(Ro²−Ri²) %.8g (error %.2g)", c.ri, c.ro, got, want, d)
		}
	}
	r, th := 0.01, 0.0002
	thin := e * 2 * math.Pi * r * th
	if d := rel(tube(t, Axisymmetric, r-th/2, r+th/2, 0.002, 4, 2), thin); d > 1e-9 {
		t.Errorf("thin tube: EA off E·2πRt by %.2g", d)
	}
}

// TestTubeBending: harmonic 1 on a plain tube under end rotation gives
// EI = E·π(Ro⁴ − Ri⁴)/4 (Euler–Bernoulli; the pure-bending elasticity
// solution, Timoshenko & Goodier, Theory of Elasticity, pure bending of
// prismatic bars (from memory), lies in the
// element's quadratic field, so the match is to round-off) and the
// thin-tube limit EI = E·π·R³·t (up to the (t/2R)² term).
func TestTubeBending(t *testing.T) {
	const e = 1.5e9
	for _, c := range []struct{ ri, ro float64 }{{0.004, 0.01}, {0.008, 0.01}, {0.0005, 0.002}} {
		got := tube(t, Harmonic1, c.ri, c.ro, 0.01, 6, 3)
		want := e * math.Pi * (math.Pow(c.ro, 4) - math.Pow(c.ri, 4)) / 4
		if d := rel(got, want); d > 1e-8 {
			t.Errorf("Ri = %g, Ro = %g: EI %.8g, E·π(Ro⁴−Ri⁴)/4 %.8g (error %.2g)", c.ri, c.ro, got, want, d)
		}
	}
	r, th := 0.01, 0.0001
	got := tube(t, Harmonic1, r-th/2, r+th/2, 0.001, 4, 1)
	if d := rel(got, e*math.Pi*r*r*r*th); d > 1e-4 {
		t.Errorf("thin tube t/R = 0.01: EI %.8g, E·π·R³·t %.8g (error %.2g)", got, e*math.Pi*r*r*r*th, d)
	}
}
