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

// traversal is the shared loop of Intersect and Occluded: it tests both
// children of an inner node, descends into the nearer one that is hit and
// pushes the other with its entry distance, so that a popped node behind
// the closest hit found so far is skipped without touching it.
type stackEntry struct {
	node int32
	t    int64 // orderKey of the entry distance
}

// Intersect returns the closest hit of the ray from o along d with
// 0 < t < tMax, skipping the facet with id skip (the emitter; −1 skips
// nothing). A miss returns Miss.
func (t *Tree) Intersect(o, d geometry.Vec3, tMax float64, skip int32) Hit {
	hit := Miss
	if len(t.Nodes) == 0 {
		return hit
	}
	rb := newRayBox(o, d)
	tMaxKey := orderKey(tMax)
	if _, ok := rb.slab(&t.Nodes[0], tMaxKey); !ok {
		return hit
	}
	sh := geometry.NewShear(o, d)
	nodes, tris, verts := t.Nodes, t.tris, t.verts
	var stack [stackSize]stackEntry
	sp := 0
	cur := int32(0)
	for {
		n := &nodes[cur]
		if n.Count == 0 {
			l, r := n.Offset, n.Offset+1
			tl, hl := rb.slab(&nodes[l], tMaxKey)
			tr, hr := rb.slab(&nodes[r], tMaxKey)
			switch {
			case hl && hr:
				if tr < tl {
					l, r, tl, tr = r, l, tr, tl
				}
				stack[sp] = stackEntry{r, tr}
				sp++
				cur = l
				continue
			case hl:
				cur = l
				continue
			case hr:
				cur = r
				continue
			}
		} else {
			end := n.Offset + int32(n.Count)
			for i := n.Offset; i < end; i++ {
				tri := &tris[i]
				if tri.id == skip {
					continue
				}
				th, b1, b2, front, ok := sh.Triangle(&verts[tri.v[0]], &verts[tri.v[1]], &verts[tri.v[2]], tMax)
				if ok {
					tMax, tMaxKey = th, orderKey(th)
					hit = Hit{T: th, B1: b1, B2: b2, Facet: tri.id, Front: front}
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

// Occluded reports whether anything but facet skip lies on the ray from o
// along d with 0 < t < tMax (a visibility query: the first hit ends it).
func (t *Tree) Occluded(o, d geometry.Vec3, tMax float64, skip int32) bool {
	if len(t.Nodes) == 0 {
		return false
	}
	rb := newRayBox(o, d)
	tMaxKey := orderKey(tMax)
	if _, ok := rb.slab(&t.Nodes[0], tMaxKey); !ok {
		return false
	}
	sh := geometry.NewShear(o, d)
	nodes, tris, verts := t.Nodes, t.tris, t.verts
	var stack [stackSize]int32
	sp := 0
	cur := int32(0)
	for {
		n := &nodes[cur]
		if n.Count == 0 {
			l, r := n.Offset, n.Offset+1
			_, hl := rb.slab(&nodes[l], tMaxKey)
			_, hr := rb.slab(&nodes[r], tMaxKey)
			switch {
			case hl && hr:
				stack[sp] = r
				sp++
				cur = l
				continue
			case hl:
				cur = l
				continue
			case hr:
				cur = r
				continue
			}
		} else {
			end := n.Offset + int32(n.Count)
			for i := n.Offset; i < end; i++ {
				tri := &tris[i]
				if tri.id == skip {
					continue
				}
				if _, _, _, _, ok := sh.Triangle(&verts[tri.v[0]], &verts[tri.v[1]], &verts[tri.v[2]], tMax); ok {
					return true
				}
			}
		}
		if sp == 0 {
			return false
		}
		sp--
		cur = stack[sp]
	}
}
