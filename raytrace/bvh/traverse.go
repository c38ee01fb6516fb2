package bvh

import (
	"math"
	"unsafe"

	"github.com/hemiray/hemiray/geometry"
)

// stackSize bounds the traversal stack; see the package comment for why 64
// is enough.
const stackSize = 64

// stackEntry is a subtree to visit later, with the order key of the
// distance at which the ray enters it.
type stackEntry struct {
	node int32
	t    int64
}

// Intersect returns the closest hit of the ray from o along d with
// 0 < t < tMax, skipping the facet with id skip (the emitter; −1 skips
// nothing). A miss returns Miss. It runs the same traversal as
// IntersectBatch, one lane alone.
func (t *Tree) Intersect(o, d geometry.Vec3, tMax float64, skip int32) Hit {
	var l lane
	if !t.startLane(&l, &Query{O: o, D: d, TMax: tMax, Skip: skip}) {
		return Miss
	}
	for !t.step(&l) {
	}
	return l.hit
}

// Occluded reports whether anything but facet skip lies on the ray from o
// along d with 0 < t < tMax (a visibility query: the first hit ends it).
func (t *Tree) Occluded(o, d geometry.Vec3, tMax float64, skip int32) bool {
	var l lane
	if !t.startLane(&l, &Query{O: o, D: d, TMax: tMax, Skip: skip}) {
		return false
	}
	l.anyHit = true
	for !t.step(&l) {
	}
	return l.hit.Facet >= 0
}

// Query is one ray of a batch for IntersectBatch: from O along D, for hits
// with 0 < t < TMax, skipping facet Skip (−1 skips nothing).
type Query struct {
	O, D geometry.Vec3
	TMax float64
	Skip int32
}

// lanes is how many rays a Batch traverses at once.
const lanes = 8

// Batch traces many independent rays by interleaving their traversals: it
// advances each of a few rays by one node in turn. A single ray's traversal
// is a chain of dependent loads, and on a tree larger than the caches each
// link waits hundreds of nanoseconds for memory; interleaving lets the
// processor fetch for several rays at once. A Batch holds one worker's
// traversal state (stacks included), so it is reused, never shared.
type Batch struct {
	l [lanes]lane
}

type lane struct {
	ox, oy, oz, ix, iy, iz, fx, fy, fz float64
	nx, ny, nz, mx, my, mz             uintptr // byte offsets of the slab planes in a treeNode
	sh                                 geometry.Shear
	tMax                               float64
	tMaxKey                            int64
	hit                                Hit
	skip, cur, q                       int32
	sp                                 int
	anyHit                             bool // stop at the first hit (Occluded)
	stack                              [stackSize]stackEntry
}

// IntersectBatch stores in hits[i] the closest hit of qs[i], exactly as
// Intersect would. hits must be at least as long as qs.
func (t *Tree) IntersectBatch(b *Batch, qs []Query, hits []Hit) {
	hits = hits[:len(qs)]
	next := 0
	active := 0
	for i := range b.l {
		b.l[i].q = -1
	}
	start := func(l *lane) {
		for next < len(qs) {
			q := &qs[next]
			next++
			if t.startLane(l, q) {
				t.fetchAhead(0)
				l.q = int32(next - 1)
				active++
				return
			}
			hits[next-1] = Miss
		}
		l.q = -1
	}
	for i := range b.l {
		start(&b.l[i])
	}
	for active > 0 {
		for i := range b.l {
			l := &b.l[i]
			if l.q < 0 {
				continue
			}
			if t.step(l) {
				hits[l.q] = l.hit
				active--
				start(l)
			}
		}
	}
}

// never is the order key of a child box the ray misses.
const never = math.MaxInt64

// bound returns the float32 at byte offset off of a node, widened.
func bound(node unsafe.Pointer, off uintptr) float64 {
	return float64(*(*float32)(unsafe.Add(node, off)))
}

// startLane loads a query into a lane; false if the ray misses the root.
func (t *Tree) startLane(l *lane, q *Query) bool {
	if len(t.nodes) == 0 {
		return false
	}
	l.aim(q.O, q.D, q.TMax)
	l.sh = geometry.NewShear(q.O, q.D)
	l.hit, l.skip, l.sp, l.anyHit = Miss, q.Skip, 0, false
	// Start at the sentinel above the root (node 1, see Build): one step
	// tests the root's box with the same slab test as every other box.
	l.cur = sentinel
	return !t.step(l)
}

// fetchAhead starts loading what visiting node i will read: the pair of
// its children, or its triangles (their first and last cache line; leaves
// seldom span more than two).
func (t *Tree) fetchAhead(i int32) {
	fetchNode(&t.nodes[i], unsafe.SliceData(t.nodes), unsafe.SliceData(t.tris))
}

// step visits one node of the lane's traversal; true when the ray is done.
//
// The child test is written for throughput on incoherent rays: the bounds
// are read at byte offsets fixed per ray (no index checks), and which child
// comes first, whether the other is pushed and which memory to fetch next
// are chosen with conditional moves rather than jumps that would mispredict
// about half the time.
func (t *Tree) step(l *lane) bool {
	n := &t.nodes[l.cur]
	if n.Count == 0 {
		pair := unsafe.Pointer(unsafe.SliceData(t.nodes))
		pair = unsafe.Add(pair, uintptr(n.Offset)*unsafe.Sizeof(treeNode{}))
		lb, rb := pair, unsafe.Add(pair, unsafe.Sizeof(treeNode{}))
		// The slab test of both children (Kay & Kajiya 1986; see slab.go),
		// written out so that the two boxes' loads and compares interleave.
		ox, oy, oz := l.ox, l.oy, l.oz
		ix, iy, iz, fx, fy, fz := l.ix, l.iy, l.iz, l.fx, l.fy, l.fz
		nx, ny, nz, mx, my, mz := l.nx, l.ny, l.nz, l.mx, l.my, l.mz
		l0 := int64(math.Float64bits((bound(lb, nx) - ox) * ix))
		r0 := int64(math.Float64bits((bound(rb, nx) - ox) * ix))
		l1 := int64(math.Float64bits((bound(lb, mx)-ox)*fx + 0))
		r1 := int64(math.Float64bits((bound(rb, mx)-ox)*fx + 0))
		if v := int64(math.Float64bits((bound(lb, ny) - oy) * iy)); v > l0 {
			l0 = v
		}
		if v := int64(math.Float64bits((bound(rb, ny) - oy) * iy)); v > r0 {
			r0 = v
		}
		if v := int64(math.Float64bits((bound(lb, my)-oy)*fy + 0)); v < l1 {
			l1 = v
		}
		if v := int64(math.Float64bits((bound(rb, my)-oy)*fy + 0)); v < r1 {
			r1 = v
		}
		if v := int64(math.Float64bits((bound(lb, nz) - oz) * iz)); v > l0 {
			l0 = v
		}
		if v := int64(math.Float64bits((bound(rb, nz) - oz) * iz)); v > r0 {
			r0 = v
		}
		if v := int64(math.Float64bits((bound(lb, mz)-oz)*fz + 0)); v < l1 {
			l1 = v
		}
		if v := int64(math.Float64bits((bound(rb, mz)-oz)*fz + 0)); v < r1 {
			r1 = v
		}
		tMaxKey := l.tMaxKey
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
		// A child the ray misses gets entry distance "never", so the
		// nearer child is the one to visit and the farther is pushed
		// only if it is met too.
		if l0 > l1 {
			l0 = never
		}
		if r0 > r1 {
			r0 = never
		}
		near, far, tNear, tFar := n.Offset, n.Offset+1, l0, r0
		if r0 < l0 {
			near, far, tNear, tFar = far, near, r0, l0
		}
		if tNear != never {
			// sp < stackSize always (see the package comment); the mask
			// only spares an index check. The entry counts if sp moves.
			l.stack[l.sp&(stackSize-1)] = stackEntry{far, tFar}
			if tFar != never {
				l.sp++
			}
			l.cur = near
			t.fetchAhead(near)
			return false
		}
	} else {
		end := n.Offset + int32(n.Count)
		for i := n.Offset; i < end; i++ {
			tri := &t.tris[i]
			if tri.id == l.skip {
				continue
			}
			a, b, c := tri.vertex(0), tri.vertex(1), tri.vertex(2)
			th, b1, b2, front, ok := l.sh.Triangle(&a, &b, &c, l.tMax)
			if ok {
				l.tMax, l.tMaxKey = th, orderKey(th)
				l.hit = Hit{T: th, B1: b1, B2: b2, Facet: tri.id, Front: front}
				if l.anyHit {
					return true
				}
			}
		}
	}
	for {
		if l.sp == 0 {
			return true
		}
		l.sp--
		if l.stack[l.sp].t <= l.tMaxKey {
			l.cur = l.stack[l.sp].node
			t.fetchAhead(l.cur)
			return false
		}
	}
}
