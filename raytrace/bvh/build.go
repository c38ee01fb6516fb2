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
	numBins       = 12
	maxLeafSize   = 8       // a node with more triangles is always split
	costTrav      = 1.0     // SAH cost of visiting an inner node
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

// box is a bounding box indexed by axis. float32 is exact here: the tree
// stores vertices as float32, so the bounds of the stored triangles are
// float32 numbers, and node bounds need no outward rounding.
type box struct{ lo, hi [3]float32 }

func emptyBox() box { return empty }

// empty holds no point: every bound is on the wrong side.
var empty = box{
	[3]float32{float32(math.Inf(1)), float32(math.Inf(1)), float32(math.Inf(1))},
	[3]float32{float32(math.Inf(-1)), float32(math.Inf(-1)), float32(math.Inf(-1))},
}

// grow extends b to hold o, with the min and max builtins, which compile
// to branch-free code: the binning pass grows a random bin per facet, and
// compare-and-branch mispredicted there (builds 14–23 % faster). No NaN
// reaches the build; a −0 bound for a +0 one tests alike.
func (b *box) grow(o *box) {
	b.lo[0], b.lo[1], b.lo[2] = min(b.lo[0], o.lo[0]), min(b.lo[1], o.lo[1]), min(b.lo[2], o.lo[2])
	b.hi[0], b.hi[1], b.hi[2] = max(b.hi[0], o.hi[0]), max(b.hi[1], o.hi[1]), max(b.hi[2], o.hi[2])
}

// add extends b to hold point p.
func (b *box) add(p *[3]float32) {
	b.lo[0], b.lo[1], b.lo[2] = min(b.lo[0], p[0]), min(b.lo[1], p[1]), min(b.lo[2], p[2])
	b.hi[0], b.hi[1], b.hi[2] = max(b.hi[0], p[0]), max(b.hi[1], p[1]), max(b.hi[2], p[2])
}

func (b *box) area() float64 {
	dx := float64(b.hi[0]) - float64(b.lo[0])
	dy := float64(b.hi[1]) - float64(b.lo[1])
	dz := float64(b.hi[2]) - float64(b.lo[2])
	if dx < 0 || dy < 0 || dz < 0 {
		return 0
	}
	return 2 * (dx*dy + dy*dz + dz*dx)
}

// prim is a triangle during the build: its bounds and facet id (28 bytes;
// the build moves prims around, so centroids are computed, not stored).
type prim struct {
	b  box
	id int32
}

// centre returns the centroid of p's box on axis k.
func (p *prim) centre(k int) float32 { return 0.5 * (p.b.lo[k] + p.b.hi[k]) }

type builder struct {
	prims []prim
	sem   chan struct{} // tokens for extra goroutines
	// The plane grids made so far (grid.go), handed to the Tree.
	grids      []planeGrid
	cells      []int32
	cellTris   []int32
	noClusters bool // build large nodes by binned SAH too (cluster.go)
}

// Build constructs the tree over the triangles (v[f[i][0]], v[f[i][1]],
// v[f[i][2]]); facet i gets id i. Degenerate triangles are kept (they are
// never hit), and triangles with non-finite coordinates are left out.
func Build(v []geometry.Vec3, f [][3]int32, opts Options) *Tree {
	return buildTree(v, f, opts, false)
}

// buildTree is Build, with the cluster build of large nodes turned off if
// noClusters (for tests that compare the two).
func buildTree(v []geometry.Vec3, f [][3]int32, opts Options, noClusters bool) *Tree {
	start := time.Now()
	threads := opts.Threads
	if threads <= 0 {
		threads = runtime.GOMAXPROCS(0)
	}
	b := &builder{prims: make([]prim, 0, len(f)), sem: make(chan struct{}, threads-1), noClusters: noClusters}
	// Each vertex is rounded once (a welded mesh has half as many vertices
	// as facets, a sixth of their corners); a non-finite one is marked by
	// a NaN first coordinate.
	v32 := make([][3]float32, len(v))
	for i, p := range v {
		x := [3]float32{float32(p.X), float32(p.Y), float32(p.Z)}
		for k := range 3 {
			if math.IsNaN(float64(x[k])) || math.IsInf(float64(x[k]), 0) {
				x[0] = float32(math.NaN())
			}
		}
		v32[i] = x
	}
	for i, t := range f {
		a, c, e := &v32[t[0]], &v32[t[1]], &v32[t[2]]
		if a[0] != a[0] || c[0] != c[0] || e[0] != e[0] {
			continue
		}
		p := prim{b: box{lo: *a, hi: *a}, id: int32(i)}
		p.b.add(c)
		p.b.add(e)
		b.prims = append(b.prims, p)
	}
	t := &Tree{}
	var bin []treeNode
	if len(b.prims) > 0 {
		// A binary tree of n triangles has at most 2n−1 nodes (leaves of
		// one triangle), so the array never grows.
		bin = make([]treeNode, 1, 2*len(b.prims))
		bounds := emptyBox()
		for i := range b.prims {
			bounds.grow(&b.prims[i].b)
		}
		if items := b.planeItems(v, f, &bounds); items != nil {
			b.buildItems(&bin, 0, items, 1)
		} else {
			b.build(&bin, 0, 0, len(b.prims), 1, bounds)
		}
	}
	t.nodes = widen(bin)
	t.grids, t.cells, t.cellTris = b.grids, b.cells, b.cellTris
	t.gather(v32, f, b.prims)
	t.Stats.BuildTime = time.Since(start)
	t.Stats.BuildProcs = threads
	t.computeStats(bin)
	return t
}

// gather stores the triangles in leaf order with their rounded vertices.
func (t *Tree) gather(v32 [][3]float32, f [][3]int32, prims []prim) {
	t.tris = make([]leafTri, len(prims))
	for i, p := range prims {
		r := leafTri{id: p.id}
		for k, vi := range f[p.id] {
			x := &v32[vi]
			r.v[3*k], r.v[3*k+1], r.v[3*k+2] = x[0], x[1], x[2]
		}
		t.tris[i] = r
	}
}

// setBounds stores b as the node's box.
func (nd *treeNode) setBounds(b *box) {
	for k := range 3 {
		nd.Bounds[k], nd.Bounds[k+3] = b.lo[k], b.hi[k]
	}
}

// build fills (*nodes)[me] with the binary subtree over prims[lo:hi]. The
// two children of an inner node are appended side by side (Offset and
// Offset+1), pairs in depth-first order; widen reads this tree once, so its
// layout does not matter to the traversal.
//
// bounds are the bounds of the triangles; the binning pass returns them for
// both children, so each level reads its triangles once to bin them and once
// to partition them. Bins span the node's bounds rather than its centroids'
// (which would cost another pass); the centroids lie inside them.
func (b *builder) build(nodes *[]treeNode, me, lo, hi, depth int, bounds box) {
	ps := b.prims[lo:hi]
	nd := &(*nodes)[me]
	nd.setBounds(&bounds)
	n := hi - lo
	if n == 1 {
		nd.Offset, nd.Count = int32(lo), 1
		return
	}
	if n > clusterMin && depth < clusterMaxDepth && !b.noClusters && b.buildClustered(nodes, me, lo, hi, depth, bounds) {
		return
	}
	axis := 0
	for k := 1; k < 3; k++ {
		if bounds.hi[k]-bounds.lo[k] > bounds.hi[axis]-bounds.lo[axis] {
			axis = k
		}
	}
	extent := float64(bounds.hi[axis]) - float64(bounds.lo[axis])
	mid := -1
	var split sides
	if extent > 0 && depth < maxSAHDepth {
		mid, split = b.sahSplit(ps, &bounds, float64(bounds.lo[axis]), extent, axis, n)
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
	*nodes = append(*nodes, treeNode{}, treeNode{})

	if n > parallelSplit && b.buildParallel(nodes, base, hi-lo-mid,
		func(ns *[]treeNode, at int) { b.build(ns, at, lo, lo+mid, depth+1, split.lb) },
		func(ns *[]treeNode, at int) { b.build(ns, at, lo+mid, hi, depth+1, split.rb) }) {
		return
	}
	b.build(nodes, base, lo, lo+mid, depth+1, split.lb)
	b.build(nodes, base+1, lo+mid, hi, depth+1, split.rb)
}

// buildParallel builds a pair of children, the right one (of nRight
// triangles) on another goroutine when a token is free and the left one on
// this goroutine, and splices the right subtree (its root at 0, its pairs
// from 1) in after the left one, so the tree is the one a single thread
// builds. It reports whether it did the work.
func (b *builder) buildParallel(nodes *[]treeNode, base, nRight int, left, right func(nodes *[]treeNode, me int)) bool {
	select {
	case b.sem <- struct{}{}:
	default:
		return false
	}
	sub := make([]treeNode, 1, 2*nRight/3+2)
	var wg sync.WaitGroup
	wg.Add(1)
	go func() {
		defer wg.Done()
		right(&sub, 0)
		<-b.sem
	}()
	left(nodes, base)
	wg.Wait()
	shift := int32(len(*nodes) - 1)
	for i := range sub {
		if sub[i].Count == 0 {
			sub[i].Offset += shift
		}
	}
	(*nodes)[base+1] = sub[0]
	*nodes = append(*nodes, sub[1:]...)
	return true
}

// sides are the bounds of both halves of a split.
type sides struct{ lb, rb box }

// measure computes the sides of a split by reading every triangle.
func measure(l, r []prim) sides {
	s := sides{emptyBox(), emptyBox()}
	for i := range l {
		s.lb.grow(&l[i].b)
	}
	for i := range r {
		s.rb.grow(&r[i].b)
	}
	return s
}

// sahSplit bins centroids along axis and partitions ps at the cheapest of the
// numBins−1 planes (binned SAH: Wald, "On fast construction of SAH-based
// bounding volume hierarchies", IEEE Symp. Interactive Ray Tracing 2007).
// It returns the size of the left part (0 when a leaf is cheaper, −1 when
// no plane separates the centroids) and the bounds of both parts.
func (b *builder) sahSplit(ps []prim, bounds *box, cmin, extent float64, axis, n int) (int, sides) {
	// No more bins than triangles: near the leaves most nodes hold a few,
	// and sweeping twelve bins for them was most of the build's time.
	bins := min(numBins, n)
	if n == 2 {
		return splitPair(ps, bounds, cmin, float64(bins)*(1-1e-6)/extent, axis)
	}
	var counts [numBins]int
	var boxes [numBins]box
	for i := range bins {
		boxes[i] = empty
	}
	scale := float64(bins) * (1 - 1e-6) / extent
	for i := range ps {
		k := int((float64(ps[i].centre(axis)) - cmin) * scale)
		k = min(max(k, 0), bins-1)
		counts[k]++
		boxes[k].grow(&ps[i].b)
	}
	best, bestK, sd := sweepBins(&boxes, &counts, bins, n)
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
	// Partition in place, bins below bestK to the left, swapping only
	// pairs that are both on the wrong side (Hoare's scheme).
	left := func(p *prim) bool { return int((float64(p.centre(axis))-cmin)*scale) < bestK }
	i, j := 0, n-1
	for {
		for i <= j && left(&ps[i]) {
			i++
		}
		for i <= j && !left(&ps[j]) {
			j--
		}
		if i >= j {
			break
		}
		ps[i], ps[j] = ps[j], ps[i]
		i++
		j--
	}
	return i, sd
}

// splitPair is sahSplit for two triangles, the same decision without the
// bins (a third of the nodes): split them when their centroids fall in
// different halves of the node and two boxes cost less than one leaf of
// two, the lower one first.
func splitPair(ps []prim, bounds *box, cmin, scale float64, axis int) (int, sides) {
	k0 := min(max(int((float64(ps[0].centre(axis))-cmin)*scale), 0), 1)
	k1 := min(max(int((float64(ps[1].centre(axis))-cmin)*scale), 0), 1)
	if k0 == k1 {
		return -1, sides{}
	}
	splitCost := costTrav + costTri*2 // a point-sized node: splitting cannot help
	if pa := bounds.area(); pa > 0 {
		splitCost = costTrav + costTri*(ps[0].b.area()+ps[1].b.area())/pa
	}
	if 2*costTri <= splitCost {
		return 0, sides{}
	}
	if k0 > k1 {
		ps[0], ps[1] = ps[1], ps[0]
	}
	return 1, sides{ps[0].b, ps[1].b}
}

// sweepBins finds the cheapest plane between the first bins of boxes
// (holding counts triangles, n in all): its SAH cost (area × triangles of
// both sides), its index (bins below it go left; −1 when no plane has
// triangles on both sides) and both sides' bounds.
func sweepBins(boxes *[numBins]box, counts *[numBins]int, bins, n int) (best float64, bestK int, sd sides) {
	// Backward sweep: area·count of everything right of each plane, and
	// its box.
	var rightCost [numBins]float64
	var rightBox [numBins]box
	acc, cnt := empty, 0
	for k := bins - 1; k > 0; k-- {
		acc.grow(&boxes[k])
		cnt += counts[k]
		rightCost[k], rightBox[k] = acc.area()*float64(cnt), acc
	}
	// Forward sweep: add the left side and keep the cheapest plane.
	best, bestK = math.Inf(1), -1
	acc, cnt = empty, 0
	for k := 1; k < bins; k++ {
		acc.grow(&boxes[k-1])
		cnt += counts[k-1]
		if cnt == 0 || cnt == n {
			continue
		}
		if c := acc.area()*float64(cnt) + rightCost[k]; c < best {
			best, bestK, sd.lb = c, k, acc
		}
	}
	if bestK >= 0 {
		sd.rb = rightBox[bestK]
	}
	return best, bestK, sd
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
