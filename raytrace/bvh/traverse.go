package bvh

import (
	"math"

	"github.com/hemiray/hemiray/geometry"
)

// stackSize bounds the traversal stack; see the package comment for why 64
// is enough.
const stackSize = 64

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
	// Indices into Node.Bounds of the near and far plane on each axis.
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
func (r *rayBox) slab(n *Node, tMaxKey int64) (int64, bool) {
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

// stackEntry is a subtree to visit later, with the order key of the
// distance at which the ray enters it.
type stackEntry struct {
	node int32
	t    int64
}

// Intersect returns the closest hit of the ray from o along d with
// 0 < t < tMax, skipping the facet with id skip (the emitter; −1 skips
// nothing). A miss returns Miss.
func (t *Tree) Intersect(o, d geometry.Vec3, tMax float64, skip int32) Hit {
	return t.traverse(o, d, tMax, skip, false)
}

// Occluded reports whether anything but facet skip lies on the ray from o
// along d with 0 < t < tMax (a visibility query: the first hit ends it).
func (t *Tree) Occluded(o, d geometry.Vec3, tMax float64, skip int32) bool {
	return t.traverse(o, d, tMax, skip, true).Facet >= 0
}

// traverse is the loop of both queries. At an inner node it tests the
// boxes of both children (one cache line, see Node), descends into the
// nearer one hit and pushes the other with its entry distance, so that a
// popped subtree behind the closest hit so far is dropped untouched. The
// slab test is written out here rather than called: it runs twice per
// visited node, and the call and its spills cost as much as its arithmetic.
func (t *Tree) traverse(o, d geometry.Vec3, tMax float64, skip int32, anyHit bool) Hit {
	hit := Miss
	if len(t.Nodes) == 0 {
		return hit
	}
	r := newRayBox(o, d)
	tMaxKey := orderKey(tMax)
	if _, ok := r.slab(&t.Nodes[0], tMaxKey); !ok {
		return hit
	}
	sh := geometry.NewShear(o, d)
	nodes, tris := t.Nodes, t.tris
	ox, oy, oz, ix, iy, iz := r.ox, r.oy, r.oz, r.ix, r.iy, r.iz
	fx, fy, fz := ix*farScale, iy*farScale, iz*farScale
	nx, ny, nz, mx, my, mz := r.nx, r.ny, r.nz, r.fx, r.fy, r.fz
	var stack [stackSize]stackEntry
	sp := 0
	cur := int32(0)
	for {
		n := &nodes[cur]
		if n.Count == 0 {
			// Both children, near and far planes per axis; see rayBox.
			lb, rb := &nodes[n.Offset].Bounds, &nodes[n.Offset+1].Bounds
			l0 := int64(math.Float64bits((float64(lb[nx]) - ox) * ix))
			r0 := int64(math.Float64bits((float64(rb[nx]) - ox) * ix))
			l1 := int64(math.Float64bits((float64(lb[mx])-ox)*fx + 0))
			r1 := int64(math.Float64bits((float64(rb[mx])-ox)*fx + 0))
			if v := int64(math.Float64bits((float64(lb[ny]) - oy) * iy)); v > l0 {
				l0 = v
			}
			if v := int64(math.Float64bits((float64(rb[ny]) - oy) * iy)); v > r0 {
				r0 = v
			}
			if v := int64(math.Float64bits((float64(lb[my])-oy)*fy + 0)); v < l1 {
				l1 = v
			}
			if v := int64(math.Float64bits((float64(rb[my])-oy)*fy + 0)); v < r1 {
				r1 = v
			}
			if v := int64(math.Float64bits((float64(lb[nz]) - oz) * iz)); v > l0 {
				l0 = v
			}
			if v := int64(math.Float64bits((float64(rb[nz]) - oz) * iz)); v > r0 {
				r0 = v
			}
			if v := int64(math.Float64bits((float64(lb[mz])-oz)*fz + 0)); v < l1 {
				l1 = v
			}
			if v := int64(math.Float64bits((float64(rb[mz])-oz)*fz + 0)); v < r1 {
				r1 = v
			}
			if l0 < 0 {
				l0 = 0
			}
			if r0 < 0 {
				r0 = 0
			}
			if tMaxKey < l1 {
				l1 = tMaxKey
			}
			if tMaxKey < r1 {
				r1 = tMaxKey
			}
			hl, hr := l0 <= l1, r0 <= r1
			switch {
			case hl && hr:
				near, far, tFar := n.Offset, n.Offset+1, r0
				if r0 < l0 {
					near, far, tFar = far, near, l0
				}
				stack[sp] = stackEntry{far, tFar}
				sp++
				cur = near
				continue
			case hl:
				cur = n.Offset
				continue
			case hr:
				cur = n.Offset + 1
				continue
			}
		} else {
			end := n.Offset + int32(n.Count)
			for i := n.Offset; i < end; i++ {
				tri := &tris[i]
				if tri.id == skip {
					continue
				}
				a, b, c := tri.vertex(0), tri.vertex(1), tri.vertex(2)
				th, b1, b2, front, ok := sh.Triangle(&a, &b, &c, tMax)
				if ok {
					tMax, tMaxKey = th, orderKey(th)
					hit = Hit{T: th, B1: b1, B2: b2, Facet: tri.id, Front: front}
					if anyHit {
						return hit
					}
				}
			}
		}
		// Pop the next subtree that can still hold a closer hit.
		for {
			if sp == 0 {
				return hit
			}
			sp--
			if stack[sp].t <= tMaxKey {
				cur = stack[sp].node
				break
			}
		}
	}
}

// farScale widens exit distances; it carries one rounding more than
// geometry.SlabScale because it is folded into the reciprocal direction.
var farScale = 1 + 2*4*0x1p-53/(1-4*0x1p-53)
