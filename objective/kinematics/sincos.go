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
	// Coefficients _sin and _cos of Go's math/sin.go (Cephes sin.c),
	// evaluated by Estrin's scheme (shorter dependency chain than Horner's;
	// the reordering only touches terms below 1e-3 of the result).
	c := 1.0 - 0.5*zz + zz2*((-1.38888888888730564116e-3*zz+4.16666666666665929218e-2)+
		zz2*(-2.75573141792967388112e-7*zz+2.48015872888517045348e-5)+
		zz4*(-1.13585365213876817300e-11*zz+2.08757008419747316778e-9))
	s := z + z*zz*((8.33333333332211858878e-3*zz+-1.66666666666666307295e-1)+
		zz2*(2.75573136213857245213e-6*zz+-1.98412698295895385996e-4)+
		zz4*(1.58962301576546568060e-10*zz+-2.50507477628578072866e-8))
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
