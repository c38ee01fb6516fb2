package bvh

import (
	"math"
	"unsafe"

	"github.com/hemiray/hemiray/geometry"
)

// The slab test (Kay & Kajiya, "Ray tracing complex scenes", SIGGRAPH
// 1986; robust form after Ize, "Robust BVH ray traversal", JCGT 2(2),
// 2013) is written without data-dependent branches: on incoherent rays
// those mispredict about half the time and cost more than the arithmetic.
// Distances are compared as their IEEE bit patterns read as int64
// (orderKey), so that min and max compile to conditional moves; the builtin
// float min and max carry NaN handling that is slower. Bit patterns sort
// like the floats among non-negative values, and every negative float reads
// as a negative int64; since the entry distance is clamped at 0 and a
// negative exit distance means a miss whatever its size, that order is
// enough.
//
// A zero direction component gets the reciprocal ±2^600 instead of ±Inf, so
// (plane − origin)·inverse is never 0·∞ = NaN and stays finite for any
// coordinate below 2^400 m. The only boxes this can drop are those the ray
// grazes exactly in the plane of a flat face, whose triangles the
// watertight test rejects as edge-on anyway.

// farScale widens exit distances by 1 + 2γ(4) (γ(n) = nu/(1−nu), Pharr,
// Jakob & Humphreys, Physically Based Rendering, 3rd ed., sec. 3.9): three
// roundings of the slab distance and one more for folding the factor into
// the reciprocal direction, so rounding can never make the test miss a box
// the ray touches.
var farScale = 1 + 2*4*0x1p-53/(1-4*0x1p-53)

// aim sets the lane's per-ray constants of the slab test for a ray from o
// along d up to tMax: origin, reciprocal direction (times farScale for exit
// distances), and the byte offsets in a wideNode of the near and far plane
// on each axis (of its first child; child c is 4c bytes on).
func (l *lane) aim(o, d geometry.Vec3, tMax float64) {
	l.o3, l.d3 = [3]float64{o.X, o.Y, o.Z}, [3]float64{d.X, d.Y, d.Z}
	l.ix, l.iy, l.iz = inverse(d.X), inverse(d.Y), inverse(d.Z)
	l.fx, l.fy, l.fz = l.ix*farScale, l.iy*farScale, l.iz*farScale
	nx, mx := planes(d.X, 0)
	ny, my := planes(d.Y, 1)
	nz, mz := planes(d.Z, 2)
	const plane = uintptr(unsafe.Sizeof(wideNode{}.Bounds[0]))
	l.nx, l.ny, l.nz, l.mx, l.my, l.mz = plane*uintptr(nx), plane*uintptr(ny), plane*uintptr(nz), plane*uintptr(mx), plane*uintptr(my), plane*uintptr(mz)
	l.tMax, l.tMaxKey = tMax, orderKey(tMax)
}

func inverse(x float64) float64 {
	if x == 0 {
		return math.Copysign(0x1p600, x)
	}
	return 1 / x
}

// planes returns the Bounds plane indices of the plane a ray along direction
// component x meets first and last on axis k (branch-free: the sign bit
// picks max before min).
func planes(x float64, k int) (near, far int) {
	neg := int(math.Float64bits(x) >> 63)
	return k + 3*neg, k + 3 - 3*neg
}

// orderKey is x's bit pattern as an int64; the comment at the top of this
// file says why it orders distances well enough. Adding 0 turns −0 into +0, so an exit distance of
// exactly zero is not mistaken for a negative one.
func orderKey(x float64) int64 { return int64(math.Float64bits(x + 0)) }
