package export

import (
	"fmt"
	"math"

	"plica/surrogate"
)

// helix holds what the sections of a helical bellows are built from.
type helix struct {
	q, collar, height, zFull float64
	rRoot, rMean             float64
	per, k                   int
	conv                     [][2]float64 // one period of the meridian, m
	// with a spine: the sections' columns (spineColumns, from the angle
	// phi0 on) and the plain twins' heights of conv
	cols []column
	twin []float64
}

func newHelix(g surrogate.Geometry, n int, collar float64, k int) helix {
	mer := g.HalfMeridian()
	q := mer.Pitch()
	half := halfPoints(mer, HelicalPerPiece, g.Wall)
	per := 2 * (len(half) - 1)
	conv := make([][2]float64, per)
	for l := range conv {
		if l < len(half)-1 {
			conv[l] = half[l]
		} else {
			p := half[per-l]
			conv[l] = [2]float64{p[0], q - p[1]}
		}
	}
	h := helix{q: q, collar: collar, height: 2*collar + float64(n+2)*q, zFull: collar + q,
		rRoot: half[0][0], rMean: g.MeanRadius(), per: per, k: k, conv: conv}
	if g.SpineWidth > 0 {
		h.cols = spineColumns(g, k)
		h.k = len(h.cols)
		// the columns from the spine's first edge, taken into [0, 2π)
		phi0 := h.cols[0].phi - 2*math.Pi*math.Floor(h.cols[0].phi/(2*math.Pi))
		for j := range h.cols {
			h.cols[j].phi += phi0 - h.cols[0].phi
		}
		th := twinPoints(mer, HelicalPerPiece, g.Wall)
		h.twin = make([]float64, per)
		for l := range h.twin {
			if l < len(th)-1 {
				h.twin[l] = th[l]
			} else {
				h.twin[l] = q - th[per-l]
			}
		}
	}
	return h
}

// depth is the depth factor a(z): a raised cosine from 0 to 1 over each
// run-out, 1 between them, 0 on the collars.
func (h helix) depth(z float64) float64 {
	x := math.Min((z-h.collar)/h.q, (h.height-h.collar-z)/h.q)
	switch {
	case x <= 0:
		return 0
	case x >= 1:
		return 1
	}
	return (1 - math.Cos(math.Pi*x)) / 2
}

// section returns the centreline at column j (angle 2πj/k, or the
// spine's column j), m, from the collar end at z = 0 to the top one, the
// grid index of its second point (the first on the grid) and, with a
// spine, each point's change with the blend fraction f.
func (h helix) section(j int) ([][2]float64, int, [][2]float64) {
	phi := 2 * math.Pi * float64(j) / float64(h.k)
	f := 1.0
	if h.cols != nil {
		phi, f = h.cols[j].phi, h.cols[j].f
	}
	lift := h.q * phi / (2 * math.Pi)
	per := float64(h.per)
	zp := func(gi int) float64 { return h.zFull + float64(gi)*h.q/per + lift }
	// keep grid points at least half a spacing from the collar ends; the
	// grid stands 1/k of a spacing apart from angle to angle, so a margin
	// of 0.5 + 0.25/k spacings stays clear of rounding when it is
	// commensurate (no collar)
	thr := 0.5 + 0.25/float64(h.k)
	lo := int(math.Ceil((-h.zFull-lift)*per/h.q + thr))
	hi := int(math.Floor((h.height-h.zFull-lift)*per/h.q - thr))
	for lo < hi && h.depth(zp(lo+1)) == 0 {
		lo++
	}
	for hi > lo && h.depth(zp(hi-1)) == 0 {
		hi--
	}
	line := [][2]float64{{h.rRoot, 0}}
	var diff [][2]float64
	if h.cols != nil {
		diff = append(diff, [2]float64{})
	}
	for gi := lo; gi <= hi; gi++ {
		z := zp(gi)
		l := ((gi % h.per) + h.per) % h.per
		m := (gi - l) / h.per
		base := h.zFull + float64(m)*h.q + lift
		rc, zc := h.conv[l][0], base+h.conv[l][1]
		a := h.depth(z)
		if h.cols != nil {
			// the blend: the plain twin on Rm moved toward the meridian
			// point by f (surrogate/REFERENCE.md §2.8)
			zt := base + h.twin[l]
			diff = append(diff, [2]float64{a * (rc - h.rMean), a * (zc - zt)})
			rc, zc = h.rMean+f*(rc-h.rMean), zt+f*(zc-zt)
		}
		line = append(line, [2]float64{h.rRoot + a*(rc-h.rRoot), z + a*(zc-z)})
	}
	if h.cols != nil {
		diff = append(diff, [2]float64{})
	}
	return append(line, [2]float64{h.rRoot, h.height}), lo, diff
}

// wall returns the centreline of column j, the grid index of its second
// point and the outer and inner lines of the wall of thickness t: offset
// ±t/2 in the meridian plane, lengthened across a spine's blends by
// blendScale.
func (h helix) wall(j int, t float64) (line [][2]float64, lo int, outer, inner [][2]float64) {
	line, lo, diff := h.section(j)
	if h.cols == nil {
		return line, lo, offset(line, t/2), offset(line, -t/2)
	}
	col := h.cols[j]
	sc := func(i int, n [2]float64) float64 { return blendScale(col, line[i][0], n, diff[i]) }
	return line, lo, offsetScaled(line, t/2, sc), offsetScaled(line, -t/2, sc)
}

// helical meshes a single-start, right-handed helical bellows (lead =
// pitch q) of n full-depth turns, k sides about the axis, output in mm
// (results/export/REFERENCE.md §5). From z = 0: a plain collar of length
// collar (m) at the root radius, a run-out of one pitch over which the
// convolution depth grows from zero to full, the n full-depth turns, a
// run-out back to zero and the top collar; height 2·collar + (n+2)·q.
//
// The meridian section at angle φ is the revolved centreline moved up by
// q·φ/2π, and its points are indexed on one grid for all angles: grid
// point g has the surrogate's meridian point g mod P of period ⌊g/P⌋ (P
// points a period) and a plain twin at the root radius spaced q/P apart.
// The centreline point is the plain twin moved toward the meridian point
// by the depth factor a(z), a raised cosine 0 → 1 over each run-out, of
// the twin's height z; a depends on the height alone, so the wall is the
// same surface seen from φ = 2π and from φ = 0, where the grid index
// shifts by one period, P. Each angle's centreline (plain collar ends
// at z = 0 and at the top) is offset ±t/2 along its normal like the
// revolved wall, and neighbouring angles are joined by merging their grid
// indices (equal indices make a quad; points one angle has and the other
// lacks, in the plain collars and run-out ends, make fans in the flat
// face between the two angles). Points of the collars away from the
// run-outs are left out: the collar is straight there.
//
// With a spine the sections stand at the spine's graded columns
// (spineColumns) and each meridian point is first blended from its plain
// twin on the mean radius by the column's blend fraction, so the spine
// and its blends grow out of the collar over the run-out too; the offset
// is lengthened across the blends (blendScale, REFERENCE.md §5, §7).
func helical(g surrogate.Geometry, n int, collar float64, k int) (Mesh, error) {
	if n < 1 {
		return Mesh{}, fmt.Errorf("helical: %d turns, need at least 1", n)
	}
	h := newHelix(g, n, collar, k)
	per, t := h.per, g.Wall
	k = h.k
	type key struct{ side, v int }
	less := func(a, b key) bool { return a.side < b.side || (a.side == b.side && a.v < b.v) }
	type column struct {
		id  []int32
		key []key
	}
	const lowest, highest = math.MinInt, math.MaxInt
	var out Mesh
	cols := make([]column, k)
	for j := 0; j < k; j++ {
		phi := 2 * math.Pi * float64(j) / float64(k)
		if h.cols != nil {
			phi = h.cols[j].phi
		}
		line, lo, outer, inner := h.wall(j, t)
		c := &cols[j]
		add := func(p [2]float64, kk key) {
			c.id = append(c.id, int32(len(out.V)))
			c.key = append(c.key, kk)
			out.V = append(out.V, [3]float64{p[0] * math.Cos(phi) * 1e3, p[0] * math.Sin(phi) * 1e3, p[1] * 1e3})
		}
		last := len(line) - 1
		for i, p := range outer {
			switch i {
			case 0:
				add(p, key{0, lowest})
			case last:
				add(p, key{0, highest})
			default:
				add(p, key{0, lo + i - 1})
			}
		}
		for i := last; i >= 0; i-- {
			switch i {
			case last:
				add(inner[i], key{1, lowest})
			case 0:
				add(inner[i], key{1, highest})
			default:
				add(inner[i], key{1, -(lo + i - 1)})
			}
		}
	}
	for j := 0; j < k; j++ {
		a, b := cols[j], cols[(j+1)%k]
		bk := b.key
		if j == k-1 {
			// the seam: φ = 2π is φ = 0 with the grid one period on
			bk = make([]key, len(b.key))
			for i, kk := range b.key {
				bk[i] = kk
				switch {
				case kk.v == lowest || kk.v == highest:
				case kk.side == 0:
					bk[i].v -= per
				default:
					bk[i].v += per
				}
			}
		}
		// merge the two closed sections by key (the closing vertex, the
		// first again, sorts last on both)
		na, nb := len(a.id), len(b.id)
		keyA := func(i int) key {
			if i == na {
				return key{2, 0}
			}
			return a.key[i]
		}
		keyB := func(i int) key {
			if i == nb {
				return key{2, 0}
			}
			return bk[i]
		}
		i, m := 0, 0
		for i < na || m < nb {
			ia, ib := a.id[i%na], b.id[m%nb]
			if m < nb && (i == na || !less(keyA(i+1), keyB(m+1))) {
				out.T = append(out.T, [3]int32{ia, ib, b.id[(m+1)%nb]})
				m++
			} else {
				out.T = append(out.T, [3]int32{ia, ib, a.id[(i+1)%na]})
				i++
			}
		}
	}
	return out, nil
}
