package bvh

import (
	"math"
	"unsafe"

	"github.com/hemiray/hemiray/geometry"
)

// stackSize bounds the traversal stack; see the package comment for why
// 256 is enough.
const stackSize = 256

// stackEntry is a child to visit later (a wide node, or a leaf's triangles
// where count > 0), with the order key of the distance at which the ray
// enters its box (its two low bits hold the child's slot; see step).
type stackEntry struct {
	node  int32
	count int32
	t     int64
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
	o3, d3                 [3]float64 // origin and direction, indexed by axis
	ix, iy, iz, fx, fy, fz float64
	pu, pv, pe             float64 // a grid visit's crossing point and its slack
	pg                     *planeGrid
	hi                     int32   // a grid visit's end of the cell's list
	nx, ny, nz, mx, my, mz uintptr // byte offsets of the slab planes in a treeNode
	sh                     geometry.Shear
	tMax                   float64
	tMaxKey                int64
	hit                    Hit
	skip, cur, count, q    int32 // cur: the wide node, or first triangle where count > 0
	sp                     int
	anyHit                 bool // stop at the first hit (Occluded)
	stack                  [stackSize]stackEntry
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
				t.fetchAhead(0, 0)
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

// startLane loads a query into a lane at the root; false for an empty tree.
func (t *Tree) startLane(l *lane, q *Query) bool {
	if len(t.nodes) == 0 {
		return false
	}
	l.aim(q.O, q.D, q.TMax)
	l.sh = geometry.NewShear(q.O, q.D)
	l.hit, l.skip, l.sp, l.anyHit = Miss, q.Skip, 0, false
	// The root's own box is not tested: its four children's are.
	l.cur, l.count = 0, 0
	return true
}

// fetchAhead starts loading what visiting a child reads: both cache lines
// of a wide node, or a leaf's triangles (their first and last cache line;
// leaves seldom span more than two). For a plane grid's slot it loads two
// unrelated lines, which is harmless (a prefetch never faults) and cheaper
// than a test; the grid visit prefetches its own data (grid.go).
func (t *Tree) fetchAhead(child, count int32) {
	fetchChild(child, count, unsafe.SliceData(t.nodes), unsafe.SliceData(t.tris))
}

// slotMiss is the order key at and above which a child key means a miss:
// never with its two low bits cleared for the slot.
const slotMiss = never &^ 3

// step visits one node of the lane's traversal; true when the ray is done.
//
// The step is written for throughput on incoherent rays: the four child
// boxes are read at byte offsets fixed per ray (no index checks), sorted by
// entry distance with a network of min and max (conditional moves, no
// jumps), and the hit ones pushed farthest first by stores at computed
// positions, so the only data-dependent jumps are whether any child was
// hit and whether the node is a leaf.
func (t *Tree) step(l *lane) bool {
	if l.count == 0 {
		node := unsafe.Add(unsafe.Pointer(unsafe.SliceData(t.nodes)), uintptr(l.cur)*wideSize)
		k0, k1, k2, k3 := l.enter4(node)
		// Sort the four keys: a ≤ b ≤ c ≤ d.
		a, b := min(k0, k1), max(k0, k1)
		c, d := min(k2, k3), max(k2, k3)
		a, c = min(a, c), max(a, c)
		b, d = min(b, d), max(b, d)
		b, c = min(b, c), max(b, c)
		if a < slotMiss {
			w := (*wideNode)(node)
			hits := 1 + b2i(b < slotMiss) + b2i(c < slotMiss) + b2i(d < slotMiss)
			// Push d, c, b so that b is on top; a missed one is written
			// where the next store (or the free top) overwrites it.
			sp := l.sp
			l.stack[sp&(stackSize-1)] = stackEntry{w.Child[d&3], int32(w.Count[d&3]), d}
			sp += b2i(hits == 4)
			l.stack[sp&(stackSize-1)] = stackEntry{w.Child[c&3], int32(w.Count[c&3]), c}
			sp += b2i(hits >= 3)
			l.stack[sp&(stackSize-1)] = stackEntry{w.Child[b&3], int32(w.Count[b&3]), b}
			l.sp += hits - 1
			l.cur, l.count = w.Child[a&3], int32(w.Count[a&3])
			t.fetchAhead(l.cur, l.count)
			return false
		}
	} else if l.count == gridCount {
		if t.enterGrid(l, l.cur) {
			return true
		}
		if l.count != 0 {
			return false
		}
	} else if l.count < 0 {
		if t.gridStep(l) {
			return true
		}
		if l.count != 0 {
			return false
		}
	} else {
		end := l.cur + l.count
		for i := l.cur; i < end; i++ {
			if l.hitTri(&t.tris[i]) {
				return true
			}
		}
	}
	for {
		if l.sp == 0 {
			return true
		}
		l.sp--
		e := &l.stack[l.sp&(stackSize-1)]
		if e.t&^3 <= l.tMaxKey {
			l.cur, l.count = e.node, e.count
			t.fetchAhead(l.cur, l.count)
			return false
		}
	}
}

// hitTri tests the lane's ray against tri (unless it is the facet to skip)
// and keeps a closer hit; true when an any-hit query is answered.
func (l *lane) hitTri(tri *leafTri) bool {
	if tri.id == l.skip {
		return false
	}
	a, b, c := tri.vertex(0), tri.vertex(1), tri.vertex(2)
	th, b1, b2, front, ok := l.sh.Triangle(&a, &b, &c, l.tMax)
	if !ok {
		return false
	}
	l.tMax, l.tMaxKey = th, orderKey(th)
	l.hit = Hit{T: th, B1: b1, B2: b2, Facet: tri.id, Front: front}
	return l.anyHit
}

// b2i is 1 for true and 0 for false (compiled without a jump).
func b2i(x bool) int {
	var i int
	if x {
		i = 1
	}
	return i
}
