package kinematics

import "math"

// sincos returns sin(x), cos(x) with the accuracy of math.Sincos (the same
// Cephes minimax polynomials on [−π/4, π/4], Moshier, Cephes Math Library,
// sin.c, as used by Go's math package), but without branches on the
// quadrant, which random angles would mispredict. The argument is reduced by
// the nearest multiple j of π/2 (three-part Cody–Waite constants, exact
// products for |j| < 2²³), and the quadrant j mod 4 selects and signs the
// two polynomials by bit operations. Arguments beyond ±1e6 rad, infinities
// and NaN go to math.Sincos.
func sincos(x float64) (sin, cos float64) {
	const (
		// π/2 split into three parts: twice Go's PI4A, PI4B, PI4C (math/sin.go).
		pio2A = 2 * 7.85398125648498535156e-1
		pio2B = 2 * 3.77489470793079817668e-8
		pio2C = 2 * 2.69515142907905952645e-15
		// Adding 1.5·2⁵² rounds a float64 of magnitude < 2⁵¹ to the nearest
		// integer, which then sits in the low mantissa bits.
		magic = 6755399441055744.0
	)
	if !(math.Abs(x) <= 1e6) {
		return math.Sincos(x)
	}
	t := x*(2/math.Pi) + magic
	q := math.Float64bits(t) // low bits: j mod 2⁵¹ (two's complement)
	y := t - magic
	z := ((x - y*pio2A) - y*pio2B) - y*pio2C
	zz := z * z
	zz2 := zz * zz
	zz4 := zz2 * zz2
	// Estrin's scheme: a shorter dependency chain than Horner's; the
	// reordering only touches terms below 1e-3 of the result.
	c := 1.0 - 0.5*zz + zz2*((cos4*zz+cos5)+zz2*(cos2*zz+cos3)+zz4*(cos0*zz+cos1))
	s := z + z*zz*((sin4*zz+sin5)+zz2*(sin2*zz+sin3)+zz4*(sin0*zz+sin1))
	// Quadrant j mod 4 rotates (s, c) by jπ/2: sin = s·cos(jπ/2) + c·sin(jπ/2),
	// cos = c·cos(jπ/2) − s·sin(jπ/2); the factors are 0 or ±1, so this is an
	// exact selection without branches.
	k := q & 3
	qc, qs := quadCos[k], quadSin[k]
	return s*qc + c*qs, c*qc - s*qs
}

// quadCos[j] = cos(jπ/2), quadSin[j] = sin(jπ/2), exactly.
var (
	quadCos = [4]float64{1, 0, -1, 0}
	quadSin = [4]float64{0, 1, 0, -1}
)

// sincos2 is sincos of two arguments in one call, interleaved so that the
// two independent evaluations overlap.
func sincos2(x1, x2 float64) (sin1, cos1, sin2, cos2 float64) {
	const (
		pio2A = 2 * 7.85398125648498535156e-1
		pio2B = 2 * 3.77489470793079817668e-8
		pio2C = 2 * 2.69515142907905952645e-15
		magic = 6755399441055744.0
	)
	if !(math.Abs(x1) <= 1e6 && math.Abs(x2) <= 1e6) {
		sin1, cos1 = math.Sincos(x1)
		sin2, cos2 = math.Sincos(x2)
		return
	}
	t1 := x1*(2/math.Pi) + magic
	t2 := x2*(2/math.Pi) + magic
	q1 := math.Float64bits(t1)
	q2 := math.Float64bits(t2)
	y1 := t1 - magic
	y2 := t2 - magic
	z1 := ((x1 - y1*pio2A) - y1*pio2B) - y1*pio2C
	z2 := ((x2 - y2*pio2A) - y2*pio2B) - y2*pio2C
	zz1, zz2 := z1*z1, z2*z2
	zz12, zz22 := zz1*zz1, zz2*zz2
	zz14, zz24 := zz12*zz12, zz22*zz22
	c1 := 1.0 - 0.5*zz1 + zz12*((cos4*zz1+cos5)+zz12*(cos2*zz1+cos3)+zz14*(cos0*zz1+cos1))
	c2 := 1.0 - 0.5*zz2 + zz22*((cos4*zz2+cos5)+zz22*(cos2*zz2+cos3)+zz24*(cos0*zz2+cos1))
	s1 := z1 + z1*zz1*((sin4*zz1+sin5)+zz12*(sin2*zz1+sin3)+zz14*(sin0*zz1+sin1))
	s2 := z2 + z2*zz2*((sin4*zz2+sin5)+zz22*(sin2*zz2+sin3)+zz24*(sin0*zz2+sin1))
	k1, k2 := q1&3, q2&3
	qc1, qs1 := quadCos[k1], quadSin[k1]
	qc2, qs2 := quadCos[k2], quadSin[k2]
	return s1*qc1 + c1*qs1, c1*qc1 - s1*qs1, s2*qc2 + c2*qs2, c2*qc2 - s2*qs2
}

// Coefficients _sin and _cos of Go's math/sin.go (Cephes sin.c, Moshier):
// sin z = z + z³ Σ sin_k z^(2(5−k)), cos z = 1 − z²/2 + z⁴ Σ cos_k z^(2(5−k)).
const (
	sin0 = 1.58962301576546568060e-10
	sin1 = -2.50507477628578072866e-8
	sin2 = 2.75573136213857245213e-6
	sin3 = -1.98412698295895385996e-4
	sin4 = 8.33333333332211858878e-3
	sin5 = -1.66666666666666307295e-1
	cos0 = -1.13585365213876817300e-11
	cos1 = 2.08757008419747316778e-9
	cos2 = -2.75573141792967388112e-7
	cos3 = 2.48015872888517045348e-5
	cos4 = -1.38888888888730564116e-3
	cos5 = 4.16666666666665929218e-2
)
