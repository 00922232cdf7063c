package objective

import (
	"math"
	bits64 "math/bits"
	"sync"
)

// voxelVolume counts the voxels of edge h that hold at least one tip
// sample, over the shapes and baseSteps common rotations. The voxels are
// bits of a box around the base axis that holds every turned tip (radius
// the largest tip distance from the axis, height the tips' z range, one
// voxel of margin); a box too large for memory, or a tip outside it,
// falls back to a hash set. Both count exactly the voxels of
// voxelKey (tested against each other).
//
// Voxel (ix, iy, iz) of the box (indices from its corner) is bit iz mod 64
// of word ix + nx·iy + nx²·⌊iz/64⌋. The common rotations leave z, so the
// turned tips of a shape all set the same bit, each in the word of its
// voxel column: two of them write to one word only when they share a
// voxel, and the writes of a ring do not wait on one another.
func (e *evaluator) voxelVolume(shapes []*shape, baseSteps int, h float64) (float64, error) {
	rt := ringTable(baseSteps)
	rho, zlo, zhi := 0.0, math.Inf(1), math.Inf(-1)
	for _, sh := range shapes {
		p := sh.tip.P
		rho = fmax(rho, sh.rho)
		zlo, zhi = fmin(zlo, p[2]), fmax(zhi, p[2])
	}
	x0 := int64(math.Floor(-rho/h)) - 1
	x1 := int64(math.Floor(rho/h)) + 1
	z0 := int64(math.Floor(zlo/h)) - 1
	z1 := int64(math.Floor(zhi/h)) + 1
	nx, nz := x1-x0+1, z1-z0+1
	if nx > 0 && nz > 0 && nx <= 1<<16 && nz <= 1<<16 {
		if words := nx * nx * ((nz + 63) / 64); words <= maxVoxelWords {
			count, ok, err := e.voxelBits(shapes, rt, h, rho, x0, z0, nx, nz, words)
			if err != nil {
				return 0, err
			}
			if ok {
				return float64(count) * h * h * h, nil
			}
		}
	}
	return voxelVolumeMap(shapes, baseSteps, h, e.tick)
}

// voxelBits counts the voxels of voxelVolume in its bitset of words
// words; ok is false when a turned tip falls outside the box (the hash
// set then counts). The bitset is left clear.
func (e *evaluator) voxelBits(shapes []*shape, rt *ringTab, h, rho float64, x0, z0, nx, nz, words int64) (count int, ok bool, err error) {
	if int64(cap(e.voxels)) < words {
		e.voxels = make([]uint64, words)
	}
	bits := e.voxels[:words]
	turns := len(shapes) * len(rt.sins)
	// A box of few words against the turned tips is counted and cleared
	// whole; otherwise every word set is listed once (at most one per
	// turned tip) and only those are.
	dense := 4*words <= int64(turns)
	if voxelMode != 0 {
		dense = voxelMode == 1
	}
	var touched []int32
	if !dense {
		if cap(e.touched) < turns {
			e.touched = make([]int32, turns)
		}
		touched = e.touched[:cap(e.touched)]
	}
	nt := 0
	defer func() {
		if dense {
			clear(bits)
		} else {
			for _, w := range touched[:nt] {
				bits[w] = 0
			}
		}
	}()
	for k, sh := range shapes {
		if err := e.tick(k, len(shapes)); err != nil {
			return 0, false, err
		}
		// the voxel of voxelKey(turnedBy(p, sin, cos), h): the common
		// rotation leaves z, so its layer is the shape's
		p := sh.tip.P
		iz := int64(int32(math.Floor(p[2]/h))) - z0
		if iz < 0 || iz >= nz || !(sh.rho <= rho) {
			return 0, false, nil
		}
		wbase, mask := nx*nx*(iz>>6), uint64(1)<<(iz&63)
		if dense {
			ok = ringDense(bits, rt, p[0], p[1], h, x0, nx, wbase, mask)
		} else {
			nt, ok = ringTouched(bits, touched, nt, rt, p[0], p[1], h, x0, nx, wbase, mask)
		}
		if !ok {
			return 0, false, nil
		}
	}
	if dense {
		for _, w := range bits {
			count += bits64.OnesCount64(w)
		}
	} else {
		for _, w := range touched[:nt] {
			count += bits64.OnesCount64(bits[w])
		}
	}
	return count, true, nil
}

// voxelMode, when not 0, makes voxelVolume count the whole box (1) or
// only the words it set (2), for the tests to compare both with the hash
// set; 0 chooses by the box size.
var voxelMode = 0

// maxVoxelWords bounds the bitset of voxelVolume (8 MiB).
const maxVoxelWords = 1 << 20

// ringTab holds the sines and cosines of the common rotations of a
// workspace as baseTable gives them, and the same values in groups of
// four rotations, their four cosines then their four sines, the last
// rotation repeated to fill the last group (ringAVX: a repeated turned
// tip sets a bit already set).
type ringTab struct {
	sins, coss []float64
	quad       []float64
}

// ringTable returns the ringTab of steps common rotations (shared,
// read-only).
func ringTable(steps int) *ringTab {
	if t, ok := ringTables.Load(steps); ok {
		return t.(*ringTab)
	}
	sins, coss := baseTable(steps)
	rt := &ringTab{sins: sins, coss: coss}
	for j := 0; j < steps; j += 4 {
		var k [4]int
		for i := range k {
			k[i] = min(j+i, steps-1)
		}
		for _, i := range k {
			rt.quad = append(rt.quad, coss[i])
		}
		for _, i := range k {
			rt.quad = append(rt.quad, sins[i])
		}
	}
	ringTables.Store(steps, rt)
	return rt
}

var ringTables sync.Map // steps → *ringTab

// ringDense sets bit mask in the word of every turned tip (p0, p1) of rt
// for a box of nx × nx voxel columns from voxel x0 on, h the edge, whose
// layer words start at wbase: the voxel of voxelKey(turnedBy(p, sin, cos),
// h), with the same arithmetic. It returns false, possibly after setting
// some bits, when a word falls outside bits.
//
// Every turned tip lies inside the box when rho, the box's half-width
// less its voxel of margin, is at least the tip's distance from the axis
// as math.Hypot gives it: |c p0 − s p1| and |s p0 + c p1| exceed that
// distance by at most 5 units of the last place, so x/h ≥ −rho/h − 1e-11
// for the ≤ 2¹⁶ voxels of the box and floor(x/h) ≥ x0 = floor(−rho/h) − 1
// (likewise at the top end); the check is kept all the same.
//
// ringDenseGo is the straightforward loop; on amd64 with AVX ringDense is
// ringDenseAVX, the same operations four rotations at a time
// (TestRingKernelsEqual).
var ringDense = ringDenseGo

func ringDenseGo(bits []uint64, rt *ringTab, p0, p1, h float64, x0, nx, wbase int64, mask uint64) bool {
	sins, coss := rt.sins, rt.coss[:len(rt.sins)]
	base := wbase - x0 - nx*x0
	n := uint64(len(bits))
	for j, s := range sins {
		c := coss[j]
		w := ringWord(p0, p1, s, c, h, nx, base)
		if uint64(w) >= n {
			return false
		}
		bits[w] |= mask
	}
	return true
}

// ringTouched is ringDenseGo that also lists each word it sets from zero
// in touched[nt:] and returns the new length.
func ringTouched(bits []uint64, touched []int32, nt int, rt *ringTab, p0, p1, h float64, x0, nx, wbase int64, mask uint64) (int, bool) {
	sins, coss := rt.sins, rt.coss[:len(rt.sins)]
	base := wbase - x0 - nx*x0
	n := uint64(len(bits))
	for j, s := range sins {
		c := coss[j]
		w := ringWord(p0, p1, s, c, h, nx, base)
		if uint64(w) >= n {
			return nt, false
		}
		old := bits[w]
		if old == 0 {
			touched[nt] = int32(w)
			nt++
		}
		bits[w] = old | mask
	}
	return nt, true
}

// ringWord is the word index of the tip (p0, p1) turned by (s, c) in
// ringDenseGo and ringTouched: floor(x/h) + nx floor(y/h) + base with
// x = c p0 − s p1, y = s p0 + c p1 (the operations ringAVX repeats).
func ringWord(p0, p1, s, c, h float64, nx, base int64) int64 {
	return floorInt((c*p0-s*p1)/h) + nx*floorInt((s*p0+c*p1)/h) + base
}

// floorInt is int64(int32(math.Floor(x))) for |x| < 2³¹ (the bitset box is
// at most 2¹⁶ voxels wide): truncation, one less when that rounded up.
func floorInt(x float64) int64 {
	t := int64(x)
	if float64(t) > x {
		t--
	}
	return t
}

// voxelVolumeMap is voxelVolume with a hash set of voxel keys.
func voxelVolumeMap(shapes []*shape, baseSteps int, h float64, tick func(k, total int) error) (float64, error) {
	sins, coss := baseTable(baseSteps)
	occupied := make(map[[3]int32]struct{})
	for k, sh := range shapes {
		if err := tick(k, len(shapes)); err != nil {
			return 0, err
		}
		for j := range baseSteps {
			occupied[voxelKey(turnedBy(sh.tip.P, sins[j], coss[j]), h)] = struct{}{}
		}
	}
	return float64(len(occupied)) * h * h * h, nil
}

// voxelKey is the voxel of edge h holding p.
func voxelKey(p [3]float64, h float64) [3]int32 {
	return [3]int32{int32(math.Floor(p[0] / h)), int32(math.Floor(p[1] / h)), int32(math.Floor(p[2] / h))}
}
