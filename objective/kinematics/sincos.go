package kinematics

import "math"

// sincos returns sin(x), cos(x) with the accuracy of math.Sincos: the same
// Cephes minimax polynomials on [−π/4, π/4] (Moshier, Cephes Math Library,
// sin.c, as used by Go's math package), without branches on the quadrant,
// which random angles would mispredict. The argument is reduced by the
// nearest multiple j of π/2 (three-part Cody–Waite constants whose products
// with j are exact for the |j| < 2²⁰ that |x| ≤ 1e6 allows); the polynomials
// are evaluated by Estrin's scheme; the quadrant j mod 4 selects and signs
// them through exact 0/±1 factors. Arguments beyond ±1e6 rad, infinities and
// NaN go to math.Sincos. Tested against math.Sincos to 2.3e-16.
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
	// Estrin's scheme: a shorter dependency chain than Horner's. The
	// reordered terms are at most (π/4)⁴/24 ≈ 0.016 of the result, so their
	// different rounding stays below an ulp of it.
	c := 1.0 - 0.5*zz + zz2*((cosC4*zz+cosC5)+zz2*(cosC2*zz+cosC3)+zz4*(cosC0*zz+cosC1))
	s := z + z*zz*((sinC4*zz+sinC5)+zz2*(sinC2*zz+sinC3)+zz4*(sinC0*zz+sinC1))
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
// two independent evaluations overlap; the results are those of two sincos
// calls, bit for bit (the expressions are the same).
func sincos2(x1, x2 float64) (sinX1, cosX1, sinX2, cosX2 float64) {
	const (
		pio2A = 2 * 7.85398125648498535156e-1
		pio2B = 2 * 3.77489470793079817668e-8
		pio2C = 2 * 2.69515142907905952645e-15
		magic = 6755399441055744.0
	)
	if !(math.Abs(x1) <= 1e6 && math.Abs(x2) <= 1e6) {
		sinX1, cosX1 = math.Sincos(x1)
		sinX2, cosX2 = math.Sincos(x2)
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
	c1 := 1.0 - 0.5*zz1 + zz12*((cosC4*zz1+cosC5)+zz12*(cosC2*zz1+cosC3)+zz14*(cosC0*zz1+cosC1))
	c2 := 1.0 - 0.5*zz2 + zz22*((cosC4*zz2+cosC5)+zz22*(cosC2*zz2+cosC3)+zz24*(cosC0*zz2+cosC1))
	s1 := z1 + z1*zz1*((sinC4*zz1+sinC5)+zz12*(sinC2*zz1+sinC3)+zz14*(sinC0*zz1+sinC1))
	s2 := z2 + z2*zz2*((sinC4*zz2+sinC5)+zz22*(sinC2*zz2+sinC3)+zz24*(sinC0*zz2+sinC1))
	k1, k2 := q1&3, q2&3
	qc1, qs1 := quadCos[k1], quadSin[k1]
	qc2, qs2 := quadCos[k2], quadSin[k2]
	return s1*qc1 + c1*qs1, c1*qc1 - s1*qs1, s2*qc2 + c2*qs2, c2*qc2 - s2*qs2
}

// Coefficients _sin and _cos of Go's math/sin.go (Cephes sin.c, Moshier):
// sin z = z + z³ Σ sin_k z^(2(5−k)), cos z = 1 − z²/2 + z⁴ Σ cos_k z^(2(5−k)).
const (
	sinC0 = 1.58962301576546568060e-10
	sinC1 = -2.50507477628578072866e-8
	sinC2 = 2.75573136213857245213e-6
	sinC3 = -1.98412698295895385996e-4
	sinC4 = 8.33333333332211858878e-3
	sinC5 = -1.66666666666666307295e-1
	cosC0 = -1.13585365213876817300e-11
	cosC1 = 2.08757008419747316778e-9
	cosC2 = -2.75573141792967388112e-7
	cosC3 = 2.48015872888517045348e-5
	cosC4 = -1.38888888888730564116e-3
	cosC5 = 4.16666666666665929218e-2
)
