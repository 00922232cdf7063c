package export

import (
	"fmt"
	"math"
)

// JigPath is the centreline of a heat-setting rod, m: a straight handle,
// an arc and a straight tip, lying in the x–y plane and turning toward +y.
type JigPath struct {
	Handle float64 // straight length before the arc, m
	Radius float64 // centreline radius of the arc, m
	Arc    float64 // centreline length of the arc, m
	Tip    float64 // straight length after the arc, m (may be 0)
}

// Angle is the arc's turning angle, rad.
func (p JigPath) Angle() float64 { return p.Arc / p.Radius }

// ArcSteps is the number of straight pieces the arc is cut into: at most
// 2π/k each, so the chord factor sin(Δφ)/Δφ (results/export/REFERENCE.md
// §4) stays within the k-gon's area factor.
func (p JigPath) ArcSteps(k int) int {
	return max(1, int(math.Ceil(p.Angle()/(2*math.Pi/float64(k)))))
}

// Jig meshes a round rod of diameter d (m) along the path with k sides,
// both ends closed by flat caps, resting on z = 0; output in mm. The
// volume is exactly A_k·(Handle + Tip) + m·sin(Δφ)·A_k·Radius, A_k the
// k-gon area and m arc steps of Δφ (results/export/REFERENCE.md §4).
func Jig(p JigPath, d float64, k int) (Mesh, error) {
	a := d / 2
	switch {
	case k < 3 || k > MaxSides:
		return Mesh{}, fmt.Errorf("jig: segments %d: expected 3 to %d", k, MaxSides)
	case !(a > 0):
		return Mesh{}, fmt.Errorf("jig: rod diameter %g mm: expected > 0", d*1e3)
	case !(p.Handle > 0) || !(p.Arc > 0) || p.Tip < 0:
		return Mesh{}, fmt.Errorf("jig: handle %g mm, arc %g mm, tip %g mm: expected handle and arc > 0, tip >= 0", p.Handle*1e3, p.Arc*1e3, p.Tip*1e3)
	case !(p.Radius > 2*a):
		return Mesh{}, fmt.Errorf("jig: arc radius %.4g mm is not above the rod diameter %.4g mm (the rod would fold onto itself)", p.Radius*1e3, d*1e3)
	case p.Angle() >= 2*math.Pi:
		return Mesh{}, fmt.Errorf("jig: the arc turns %.4g° (expected below 360°: the rod would close on itself)", p.Angle()*180/math.Pi)
	}
	// ring centres and tangent angles along the path
	type station struct{ x, y, psi float64 }
	st := []station{{0, 0, 0}, {p.Handle, 0, 0}}
	m := p.ArcSteps(k)
	for j := 1; j <= m; j++ {
		phi := p.Angle() * float64(j) / float64(m)
		st = append(st, station{p.Handle + p.Radius*math.Sin(phi), p.Radius * (1 - math.Cos(phi)), phi})
	}
	if p.Tip > 0 {
		e := st[len(st)-1]
		st = append(st, station{e.x + p.Tip*math.Cos(e.psi), e.y + p.Tip*math.Sin(e.psi), e.psi})
	}
	// lift so the lowest ring vertex is on the bed
	lift := 0.0
	for i := 0; i < k; i++ {
		lift = math.Max(lift, -a*math.Sin(2*math.Pi*float64(i)/float64(k)))
	}
	var out Mesh
	for _, s := range st {
		// in-plane normal n = (−sin ψ, cos ψ, 0), binormal +z
		nx, ny := -math.Sin(s.psi), math.Cos(s.psi)
		for i := 0; i < k; i++ {
			al := 2 * math.Pi * float64(i) / float64(k)
			c, sn := a*math.Cos(al), a*math.Sin(al)
			out.V = append(out.V, [3]float64{(s.x + c*nx) * 1e3, (s.y + c*ny) * 1e3, (lift + sn) * 1e3})
		}
	}
	id := func(j, i int) int32 { return int32(j*k + i%k) }
	for j := 0; j+1 < len(st); j++ {
		for i := 0; i < k; i++ {
			out.T = append(out.T, [3]int32{id(j, i), id(j+1, i), id(j+1, i+1)}, [3]int32{id(j, i), id(j+1, i+1), id(j, i+1)})
		}
	}
	// end caps: a fan about each end's centre
	for e, j := range []int{0, len(st) - 1} {
		s := st[j]
		c := int32(len(out.V))
		out.V = append(out.V, [3]float64{s.x * 1e3, s.y * 1e3, lift * 1e3})
		for i := 0; i < k; i++ {
			if e == 0 { // the reverse of the side triangles' edges on this ring
				out.T = append(out.T, [3]int32{c, id(j, i), id(j, i+1)})
			} else {
				out.T = append(out.T, [3]int32{c, id(j, i+1), id(j, i)})
			}
		}
	}
	if out.Volume() < 0 {
		for i, t := range out.T {
			out.T[i] = [3]int32{t[0], t[2], t[1]}
		}
	}
	return out, nil
}
