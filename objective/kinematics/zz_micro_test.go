package kinematics

import (
	"math"
	"testing"
)

var sinkF float64
var sinkP Pose

func BenchmarkMicroSincosOurs(b *testing.B) {
	x := 0.1
	var acc float64
	for b.Loop() {
		s, c := sincos(x)
		acc += s + c
		x += 0.7312
	}
	sinkF = acc
}
func BenchmarkMicroSincosGo(b *testing.B) {
	x := 0.1
	var acc float64
	for b.Loop() {
		s, c := math.Sincos(x)
		acc += s + c
		x += 0.7312
	}
	sinkF = acc
}
func BenchmarkMicroSqrtDiv(b *testing.B) {
	x := 0.1
	var acc float64
	for b.Loop() {
		k := math.Sqrt(x)
		acc += 1 / k
		x += 0.7312
	}
	sinkF = acc
}
func BenchmarkMicroCoeffs(b *testing.B) {
	x := 0.1
	var acc float64
	for b.Loop() {
		a, bb, c, cx := linkCoeffs(x, 0.1)
		acc += a + bb + c + cx
		x += 0.7312
		if x > 20 {
			x = 0.1
		}
	}
	sinkF = acc
}
func BenchmarkMicroLinkPose(b *testing.B) {
	x := 0.1
	var acc float64
	for b.Loop() {
		p := linkPose([3]float64{x, 2, 0}, 0.1, x, 0.2, 0.3, 0.4)
		acc += p.P[0]
		x += 0.7312
		if x > 20 {
			x = 0.1
		}
	}
	sinkF = acc
}
func BenchmarkMicroLinkTransform(b *testing.B) {
	x := 0.1
	var acc float64
	for b.Loop() {
		p := LinkTransform([3]float64{x, 2, 0}, 0.1)
		acc += p.P[0]
		x += 0.7312
		if x > 20 {
			x = 0.1
		}
	}
	sinkF = acc
}
func BenchmarkMicroEmpty(b *testing.B) {
	x := 0.1
	var acc float64
	for b.Loop() {
		acc += x
		x += 0.7312
	}
	sinkF = acc
}
func BenchmarkMicroEmptyN(b *testing.B) {
	x := 0.1
	var acc float64
	for i := 0; i < b.N; i++ {
		acc += x
		x += 0.7312
	}
	sinkF = acc
}
func BenchmarkMicroSincosLatency(b *testing.B) {
	x := 0.1
	for i := 0; i < b.N; i++ {
		s, c := sincos(x)
		x = s + c + float64(i&7)
	}
	sinkF = x
}
func BenchmarkMicroSincosGoLatency(b *testing.B) {
	x := 0.1
	for i := 0; i < b.N; i++ {
		s, c := math.Sincos(x)
		x = s + c + float64(i&7)
	}
	sinkF = x
}
func BenchmarkMicroSincosThroughput(b *testing.B) {
	x := 0.1
	acc := 0.0
	for i := 0; i < b.N; i++ {
		s, c := sincos(x)
		acc += s + c
		x += 0.7312
	}
	sinkF = acc
}
func BenchmarkMicroFloor(b *testing.B) {
	acc := 0.0
	x1, x2 := 0.1, 0.3
	for i := 0; i < b.N; i++ {
		s1, c1 := sincos(x1)
		s2, c2 := sincos(x2)
		ux := s1*0.3 + c2*0.2
		uy := c1*0.1 + s2*0.7
		k := math.Sqrt(ux*ux + uy*uy)
		s3, c3 := sincos(k * 0.05)
		acc += s3 * c3 / k
		x1 += 0.7312
		x2 += 0.331
	}
	sinkF = acc
}
