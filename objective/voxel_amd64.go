//go:build !purego

package objective

import "golang.org/x/sys/cpu"

func init() {
	if cpu.X86.HasAVX {
		ringDense = ringDenseAVX
	}
}

// ringDenseAVX is ringDenseGo by ringAVX (voxel_amd64.s).
func ringDenseAVX(bits []uint64, rt *ringTab, p0, p1, h float64, x0, nx, wbase int64, mask uint64) bool {
	return ringAVX(bits, rt.quad, p0, p1, h, float64(nx), float64(wbase-x0-nx*x0), mask)
}

// ringAVX sets bit mask in the words of the turned tips of quad (groups
// of four cosines and four sines), as ringDenseGo does with nx and the
// word offset base given as float64.
//
//go:noescape
func ringAVX(bits []uint64, quad []float64, p0, p1, h, nx, base float64, mask uint64) bool
