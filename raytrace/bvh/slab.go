package bvh

import (
	"math"

	"github.com/hemiray/hemiray/geometry"
)

// rayBox holds the per-ray constants of the slab test.
//
// The test is written without data-dependent branches: on incoherent rays
// those mispredict about half the time and cost more than the arithmetic.
// Distances are compared as their IEEE bit patterns read as int64 (orderKey),
// so that min and max compile to conditional moves; the builtin float min
// and max carry NaN handling that is slower. Bit patterns sort like the
// floats among non-negative values, and every negative float reads as a
// negative int64; since the entry distance is clamped at 0 and a negative
// exit distance means a miss whatever its size, that order is enough.
//
// A zero direction component gets the reciprocal ±2^600 instead of ±Inf, so
// (plane − origin)·inverse is never 0·∞ = NaN and stays finite for any
// coordinate below 2^400 m. The only boxes this can drop are those the ray
// grazes exactly in the plane of a flat face, whose triangles the
// watertight test rejects as edge-on anyway.
type rayBox struct {
	ox, oy, oz float64
	ix, iy, iz float64
	// Indices into treeNode.Bounds of the near and far plane on each axis.
	nx, ny, nz, fx, fy, fz int
}

func newRayBox(o, d geometry.Vec3) rayBox {
	r := rayBox{ox: o.X, oy: o.Y, oz: o.Z, ix: inverse(d.X), iy: inverse(d.Y), iz: inverse(d.Z)}
	r.nx, r.fx = planes(d.X, 0)
	r.ny, r.fy = planes(d.Y, 1)
	r.nz, r.fz = planes(d.Z, 2)
	return r
}

func inverse(x float64) float64 {
	if x == 0 {
		return math.Copysign(0x1p600, x)
	}
	return 1 / x
}

// planes returns the Bounds indices of the plane a ray along direction
// component x meets first and last on axis k (branch-free: the sign bit
// picks max before min).
func planes(x float64, k int) (near, far int) {
	neg := int(math.Float64bits(x) >> 63)
	return k + 3*neg, k + 3 - 3*neg
}

// orderKey is x's bit pattern as an int64; see rayBox for why it orders
// distances well enough. Adding 0 turns −0 into +0, so an exit distance of
// exactly zero is not mistaken for a negative one.
func orderKey(x float64) int64 { return int64(math.Float64bits(x + 0)) }

// slab returns the order key of the ray's entry distance into the node's
// box and whether the box overlaps (0, tMax). It is conservative: far
// distances are widened by geometry.SlabScale (Ize 2013; Pharr et al. 3.9.2).
func (r *rayBox) slab(n *treeNode, tMaxKey int64) (int64, bool) {
	b := &n.Bounds
	t0 := int64(math.Float64bits((float64(b[r.nx]) - r.ox) * r.ix))
	if y := int64(math.Float64bits((float64(b[r.ny]) - r.oy) * r.iy)); y > t0 {
		t0 = y
	}
	if z := int64(math.Float64bits((float64(b[r.nz]) - r.oz) * r.iz)); z > t0 {
		t0 = z
	}
	if t0 < 0 {
		t0 = 0 // the bits of +0
	}
	t1 := orderKey((float64(b[r.fx]) - r.ox) * r.ix * geometry.SlabScale)
	if y := orderKey((float64(b[r.fy]) - r.oy) * r.iy * geometry.SlabScale); y < t1 {
		t1 = y
	}
	if z := orderKey((float64(b[r.fz]) - r.oz) * r.iz * geometry.SlabScale); z < t1 {
		t1 = z
	}
	if tMaxKey < t1 {
		t1 = tMaxKey
	}
	return t0, t0 <= t1
}
