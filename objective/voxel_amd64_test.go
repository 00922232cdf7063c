//go:build !purego

package objective

import (
	"math"
	"math/rand/v2"
	"slices"
	"testing"

	"github.com/stretchr/testify/require"
	"golang.org/x/sys/cpu"
)

// TestRingKernelsEqual: ringAVX sets exactly the bits of the
// straightforward loop ringDenseGo, for tips spread over a box, tips whose
// turned coordinates land on voxel faces (multiples of the edge, where the
// floor of a rounded quotient is decided by its last bit), tips on and
// near the axis, signed zeros, and numbers of common rotations that do
// not fill the last group of four; and both refuse a tip whose word
// falls outside the bitset.
func TestRingKernelsEqual(t *testing.T) {
	if !cpu.X86.HasAVX {
		t.Skip("no AVX on this machine: ringDense is ringDenseGo")
	}
	r := rand.New(rand.NewPCG(3, 5))
	const h = 2e-3
	rho := 0.06
	x0 := int64(math.Floor(-rho/h)) - 1
	nx := int64(math.Floor(rho/h)) + 1 - x0 + 1
	const layers = 3 // words of three 64-layer slabs
	words := nx * nx * layers
	var tips [][2]float64
	for range 2000 {
		rr, a := rho*math.Sqrt(r.Float64()), 2*math.Pi*r.Float64()
		tips = append(tips, [2]float64{rr * math.Cos(a), rr * math.Sin(a)})
	}
	for k := -int(rho / h); k <= int(rho/h); k++ {
		v := float64(k) * h
		tips = append(tips, [2]float64{v, 0}, [2]float64{0, v}, [2]float64{v * 0.8, v * 0.4},
			[2]float64{math.Nextafter(v, 1), 0}, [2]float64{math.Nextafter(v, -1), 0})
	}
	tips = append(tips, [2]float64{0, 0}, [2]float64{math.Copysign(0, -1), math.Copysign(0, -1)},
		[2]float64{1e-300, -1e-300}, [2]float64{h / 2, -h / 2})
	want := make([]uint64, words)
	got := make([]uint64, words)
	for _, steps := range []int{64, 63, 62, 61, 5, 4, 3, 2, 1, 360} {
		rt := ringTable(steps)
		for i, p := range tips {
			// a few tips per bitset, so that each sets bits of its own
			if i%8 == 0 {
				clear(want)
				clear(got)
			}
			wbase := nx * nx * int64(i%layers)
			mask := uint64(1) << (i % 64)
			require.True(t, ringDenseGo(want, rt, p[0], p[1], h, x0, nx, wbase, mask), "steps %d tip %v", steps, p)
			require.True(t, ringDenseAVX(got, rt, p[0], p[1], h, x0, nx, wbase, mask), "steps %d tip %v", steps, p)
			if !slices.Equal(want, got) {
				t.Fatalf("steps %d tip %d %v: the kernels set different bits", steps, i, p)
			}
		}
		// a word outside the bitset: both refuse
		for _, p := range [][2]float64{{0, -2 * rho}, {1e10, 1e10}, {-1e10, 0}} {
			bits := make([]uint64, words)
			require.False(t, ringDenseGo(bits, rt, p[0], p[1], h, x0, nx, 0, 1), "steps %d tip %v", steps, p)
			require.False(t, ringDenseAVX(bits, rt, p[0], p[1], h, x0, nx, 0, 1), "steps %d tip %v", steps, p)
		}
	}
}
