package bvh

import (
	"math"
	"runtime"
	"sync"
	"time"

	"github.com/hemiray/hemiray/geometry"
)

// Build parameters. The SAH costs are relative: one box pair test against
// one triangle test, measured rather than published (common practice is
// to tune them per implementation).
const (
	numBins       = 16
	maxLeafSize   = 16      // a node with more triangles is always split
	costTrav      = 3.0     // SAH cost of visiting an inner node
	costTri       = 1.0     // SAH cost of one triangle test
	maxSAHDepth   = 32      // below this depth, split at the median (bounds the stack)
	parallelSplit = 1 << 15 // subtrees larger than this build on their own goroutine
)

// Options control Build.
type Options struct {
	// Threads is how many goroutines may build subtrees at once; 0 means
	// GOMAXPROCS.
	Threads int
}

// box is a float64 bounding box indexed by axis.
type box struct{ lo, hi [3]float64 }

func emptyBox() box {
	inf := math.Inf(1)
	return box{[3]float64{inf, inf, inf}, [3]float64{-inf, -inf, -inf}}
}

// grow extends b to hold o. Plain comparisons: math.Min and math.Max are
// calls with NaN and ±0 handling the build does not need (no NaN reaches it).
func (b *box) grow(o *box) {
	for k := range 3 {
		if o.lo[k] < b.lo[k] {
			b.lo[k] = o.lo[k]
		}
		if o.hi[k] > b.hi[k] {
			b.hi[k] = o.hi[k]
		}
	}
}

// add extends b to hold point p.
func (b *box) add(p *[3]float64) {
	for k := range 3 {
		if p[k] < b.lo[k] {
			b.lo[k] = p[k]
		}
		if p[k] > b.hi[k] {
			b.hi[k] = p[k]
		}
	}
}

func (b *box) area() float64 {
	dx, dy, dz := b.hi[0]-b.lo[0], b.hi[1]-b.lo[1], b.hi[2]-b.lo[2]
	if dx < 0 || dy < 0 || dz < 0 {
		return 0
	}
	return 2 * (dx*dy + dy*dz + dz*dx)
}

// prim is a triangle during the build: its bounds and facet id (56 bytes;
// the build moves prims around, so centroids are computed, not stored).
type prim struct {
	b  box
	id int32
}

// centre returns the centroid of p's box on axis k.
func (p *prim) centre(k int) float64 { return 0.5 * (p.b.lo[k] + p.b.hi[k]) }

// centroid returns the centre of p's box.
func (p *prim) centroid() [3]float64 { return [3]float64{p.centre(0), p.centre(1), p.centre(2)} }

type builder struct {
	prims []prim
	sem   chan struct{} // tokens for extra goroutines
}

// Build constructs the tree over the triangles (v[f[i][0]], v[f[i][1]],
// v[f[i][2]]); facet i gets id i. Degenerate triangles are kept (they are
// never hit), and triangles with non-finite coordinates are left out.
func Build(v []geometry.Vec3, f [][3]int32, opts Options) *Tree {
	start := time.Now()
	threads := opts.Threads
	if threads <= 0 {
		threads = runtime.GOMAXPROCS(0)
	}
	b := &builder{prims: make([]prim, 0, len(f)), sem: make(chan struct{}, threads-1)}
	for i, t := range f {
		p := prim{b: emptyBox(), id: int32(i)}
		finite := true
		for _, vi := range t {
			x := v[vi].Array()
			for k := range 3 {
				finite = finite && !math.IsNaN(x[k]) && !math.IsInf(x[k], 0)
			}
			p.b.add(&x)
		}
		if !finite {
			continue
		}
		b.prims = append(b.prims, p)
	}
	t := &Tree{}
	if len(b.prims) > 0 {
		// The root, then an unused node, so that every child pair starts at
		// an even index: 64-byte aligned in the page-aligned array.
		t.Nodes = make([]Node, 2, 2*len(b.prims)/3+2)
		bounds, cb := emptyBox(), emptyBox()
		for i := range b.prims {
			bounds.grow(&b.prims[i].b)
			c := b.prims[i].centroid()
			cb.add(&c)
		}
		b.build(&t.Nodes, 0, 0, len(b.prims), 1, bounds, cb)
	}
	t.gather(v, f, b.prims)
	t.Stats.BuildTime = time.Since(start)
	t.Stats.BuildProcs = threads
	t.computeStats()
	return t
}

// gather stores the triangles in leaf order and copies their vertices in
// order of first use, so that a leaf's data sits together in memory.
func (t *Tree) gather(v []geometry.Vec3, f [][3]int32, prims []prim) {
	t.tris = make([]triRef, len(prims))
	remap := make([]int32, len(v))
	for i := range remap {
		remap[i] = -1
	}
	for i, p := range prims {
		r := triRef{id: p.id}
		for k, vi := range f[p.id] {
			if remap[vi] < 0 {
				remap[vi] = int32(len(t.verts))
				t.verts = append(t.verts, v[vi].Array())
			}
			r.v[k] = remap[vi]
		}
		t.tris[i] = r
	}
}

// build fills (*nodes)[me] with the subtree over prims[lo:hi]. The two
// children of an inner node are appended side by side as a pair, so that
// one 64-byte cache line holds both boxes the traversal tests together;
// pairs follow each other in depth-first order.
//
// bounds and cb are the bounds of the triangles and of their centroids; the
// binning pass returns them for both children, so each level reads its
// triangles once to bin them and once to partition them.
func (b *builder) build(nodes *[]Node, me, lo, hi, depth int, bounds, cb box) {
	ps := b.prims[lo:hi]
	nd := &(*nodes)[me]
	for k := range 3 {
		nd.Bounds[k], nd.Bounds[k+3] = roundDown(bounds.lo[k]), roundUp(bounds.hi[k])
	}
	n := hi - lo
	if n == 1 {
		nd.Offset, nd.Count = int32(lo), 1
		return
	}
	axis := 0
	for k := 1; k < 3; k++ {
		if cb.hi[k]-cb.lo[k] > cb.hi[axis]-cb.lo[axis] {
			axis = k
		}
	}
	extent := cb.hi[axis] - cb.lo[axis]
	mid := -1
	var split sides
	if extent > 0 && depth < maxSAHDepth {
		mid, split = b.sahSplit(ps, &bounds, cb.lo[axis], extent, axis, n)
	}
	if mid < 0 || mid == n {
		// All centroids coincide, the depth cap is reached, or binning put
		// everything on one side: halve by count.
		mid = 0
		if n > maxLeafSize {
			mid = n / 2
			if extent > 0 {
				nthElement(ps, mid, axis)
			}
			split = measure(ps[:mid], ps[mid:])
		}
	}
	if mid == 0 { // a leaf
		nd.Offset, nd.Count = int32(lo), uint16(n)
		return
	}
	nd.Axis = uint8(axis)
	base := len(*nodes)
	nd.Offset = int32(base)
	*nodes = append(*nodes, Node{}, Node{})

	if n > parallelSplit && b.buildParallel(nodes, base, lo, mid, hi, depth, &split) {
		return
	}
	b.build(nodes, base, lo, lo+mid, depth+1, split.lb, split.lc)
	b.build(nodes, base+1, lo+mid, hi, depth+1, split.rb, split.rc)
}

// buildParallel builds the right child on another goroutine when a token
// is free, the left one on this goroutine, and splices the right subtree
// (its root at 0, its pairs from 1) in after the left one. It reports
// whether it did the work.
func (b *builder) buildParallel(nodes *[]Node, base, lo, mid, hi, depth int, split *sides) bool {
	select {
	case b.sem <- struct{}{}:
	default:
		return false
	}
	right := make([]Node, 1, 2*(hi-lo-mid)/3+2)
	rb, rc := split.rb, split.rc
	var wg sync.WaitGroup
	wg.Add(1)
	go func() {
		defer wg.Done()
		b.build(&right, 0, lo+mid, hi, depth+1, rb, rc)
		<-b.sem
	}()
	b.build(nodes, base, lo, lo+mid, depth+1, split.lb, split.lc)
	wg.Wait()
	shift := int32(len(*nodes) - 1)
	for i := range right {
		if right[i].Count == 0 {
			right[i].Offset += shift
		}
	}
	(*nodes)[base+1] = right[0]
	*nodes = append(*nodes, right[1:]...)
	return true
}

// sides are the triangle and centroid bounds of both halves of a split.
type sides struct{ lb, lc, rb, rc box }

// measure computes the sides of a split by reading every triangle.
func measure(l, r []prim) sides {
	s := sides{emptyBox(), emptyBox(), emptyBox(), emptyBox()}
	for i := range l {
		s.lb.grow(&l[i].b)
		c := l[i].centroid()
		s.lc.add(&c)
	}
	for i := range r {
		s.rb.grow(&r[i].b)
		c := r[i].centroid()
		s.rc.add(&c)
	}
	return s
}

// sahSplit bins centroids along axis and partitions ps at the cheapest of the
// numBins−1 planes (binned SAH: Wald, "On fast construction of SAH-based
// bounding volume hierarchies", IEEE Symp. Interactive Ray Tracing 2007).
// It returns the size of the left part (0 when a leaf is cheaper, −1 when
// no plane separates the centroids) and the bounds of both parts.
func (b *builder) sahSplit(ps []prim, bounds *box, cmin, extent float64, axis, n int) (int, sides) {
	var counts [numBins]int
	var boxes, cents [numBins]box
	for i := range boxes {
		boxes[i], cents[i] = emptyBox(), emptyBox()
	}
	scale := numBins * (1 - 1e-6) / extent
	for i := range ps {
		c := ps[i].centroid()
		k := int((c[axis] - cmin) * scale)
		k = min(max(k, 0), numBins-1)
		counts[k]++
		boxes[k].grow(&ps[i].b)
		cents[k].add(&c)
	}
	// Backward sweep: area·count of everything right of each plane.
	var rightCost [numBins]float64
	acc, cnt := emptyBox(), 0
	for k := numBins - 1; k > 0; k-- {
		acc.grow(&boxes[k])
		cnt += counts[k]
		rightCost[k] = acc.area() * float64(cnt)
	}
	// Forward sweep: add the left side and keep the cheapest plane.
	best, bestK := math.Inf(1), -1
	acc, cnt = emptyBox(), 0
	for k := 1; k < numBins; k++ {
		acc.grow(&boxes[k-1])
		cnt += counts[k-1]
		if cnt == 0 || cnt == n {
			continue
		}
		if c := acc.area()*float64(cnt) + rightCost[k]; c < best {
			best, bestK = c, k
		}
	}
	if bestK < 0 {
		return -1, sides{}
	}
	pa := bounds.area()
	splitCost := costTrav
	if pa > 0 {
		splitCost += costTri * best / pa
	} else {
		splitCost += costTri * float64(n) // a point-sized node: splitting cannot help
	}
	if n <= maxLeafSize && costTri*float64(n) <= splitCost {
		return 0, sides{}
	}
	sd := sides{emptyBox(), emptyBox(), emptyBox(), emptyBox()}
	for k := range numBins {
		if k < bestK {
			sd.lb.grow(&boxes[k])
			sd.lc.grow(&cents[k])
		} else {
			sd.rb.grow(&boxes[k])
			sd.rc.grow(&cents[k])
		}
	}
	// Partition in place: bins below bestK to the left.
	i, j := 0, n-1
	for i <= j {
		k := int((ps[i].centre(axis) - cmin) * scale)
		if k < bestK {
			i++
			continue
		}
		ps[i], ps[j] = ps[j], ps[i]
		j--
	}
	return i, sd
}

// nthElement reorders ps so that ps[m] has the centroid it would have if
// sorted along axis, with smaller ones before it (Hoare's selection).
func nthElement(ps []prim, m, axis int) {
	lo, hi := 0, len(ps)-1
	for lo < hi {
		pivot := ps[(lo+hi)/2].centre(axis)
		i, j := lo, hi
		for i <= j {
			for ps[i].centre(axis) < pivot {
				i++
			}
			for ps[j].centre(axis) > pivot {
				j--
			}
			if i <= j {
				ps[i], ps[j] = ps[j], ps[i]
				i++
				j--
			}
		}
		switch {
		case m <= j:
			hi = j
		case m >= i:
			lo = i
		default:
			return
		}
	}
}
