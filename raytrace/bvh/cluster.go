package bvh

import (
	"math"
	"sort"
)

// A binned SAH build reads every triangle at every level, about twenty
// times on a million facets. For large nodes the build instead sorts the
// triangles along a Morton curve, cuts the curve into clusters of at most
// clusterSize neighbouring triangles, joins the clusters by binned SAH
// over their boxes, and builds each cluster by binned SAH as before
// (hierarchical LBVH: Pantaleoni & Luebke, "HLBVH: hierarchical LBVH
// construction for real-time ray tracing of dynamic geometry", HPG 2010;
// SAH over the clusters as in Garanzha, Pantaleoni & McAllister, "Simpler
// and faster HLBVH with work queues", HPG 2011). A triangle is then read
// about eight times. The top levels split at cluster boundaries instead of
// twelve bins a level: with clusters of 64 facets that is finer, not
// coarser, than the bins.

const (
	clusterMin      = 1 << 12 // nodes with more triangles than this are built over clusters
	clusterSize     = 64      // most triangles in a cluster
	clusterMaxDepth = 24      // clustering starts above this depth; see buildClustered
	mortonBits      = 10      // bits of each coordinate in a Morton code
)

// spread3 spaces the low 10 bits of x two zero bits apart.
func spread3(x uint32) uint32 {
	x &= 0x3ff
	x = (x | x<<16) & 0x030000ff
	x = (x | x<<8) & 0x0300f00f
	x = (x | x<<4) & 0x030c30c3
	x = (x | x<<2) & 0x09249249
	return x
}

// buildClustered builds the subtree over prims[lo:hi] over Morton clusters
// and reports whether it did; it does not when the triangles' centroids
// all fall in one cell of the Morton grid (the caller then splits by SAH).
//
// Depth: it is called above clusterMaxDepth (24); the clusters are joined
// by SAH up to that depth and by halving their number below it (at most
// 31 levels more), and a cluster's own subtree of ≤ 64 triangles takes at
// most 6 levels past SAH's depth limit of 32: at most 61 levels in all,
// within the 63 the traversal's stack allows.
func (b *builder) buildClustered(nodes *[]treeNode, me, lo, hi, depth int, bounds box) bool {
	ps := b.prims[lo:hi]
	n := len(ps)
	var scale [3]float64
	for k := range 3 {
		if e := float64(bounds.hi[k]) - float64(bounds.lo[k]); e > 0 {
			scale[k] = (1 << mortonBits) * (1 - 1e-6) / e
		}
	}
	// Keys: the Morton code of the centroid above, the triangle's index
	// below, sorted by an LSD radix sort on the code's 30 bits.
	keys := make([]uint64, n)
	for i := range ps {
		var code uint32
		for k := range 3 {
			q := uint32((float64(ps[i].centre(k)) - float64(bounds.lo[k])) * scale[k])
			code |= spread3(min(q, 1<<mortonBits-1)) << (2 - k)
		}
		keys[i] = uint64(code)<<32 | uint64(i)
	}
	if keys[0]>>32 == keys[n-1]>>32 {
		same := true
		for _, k := range keys {
			if k>>32 != keys[0]>>32 {
				same = false
				break
			}
		}
		if same {
			return false
		}
	}
	radixSort(keys)
	sorted := make([]prim, n)
	for j, k := range keys {
		sorted[j] = ps[uint32(k)]
	}
	copy(ps, sorted)
	var items []item
	cutClusters(keys, 0, n, 3*mortonBits-1, lo, &items)
	if len(items) < 2 {
		return false
	}
	for i := range items {
		it := &items[i]
		it.b = empty
		for j := it.lo; j < it.hi; j++ {
			it.b.grow(&b.prims[j].b)
		}
		for k := range 3 {
			it.c[k] = 0.5 * (float64(it.b.lo[k]) + float64(it.b.hi[k]))
		}
	}
	b.buildClusters(nodes, me, items, depth, bounds)
	return true
}

// radixSort sorts keys by their bits 32 to 61 (three passes of 10 bits;
// stable, so ties keep the triangles' order).
func radixSort(keys []uint64) {
	tmp := make([]uint64, len(keys))
	src, dst := keys, tmp
	for shift := 32; shift < 32+3*mortonBits; shift += mortonBits {
		var count [1<<mortonBits + 1]int
		for _, k := range src {
			count[(k>>shift)&(1<<mortonBits-1)+1]++
		}
		for i := 1; i <= 1<<mortonBits; i++ {
			count[i] += count[i-1]
		}
		for _, k := range src {
			d := (k >> shift) & (1<<mortonBits - 1)
			dst[count[d]] = k
			count[d]++
		}
		src, dst = dst, src
	}
	copy(keys, src) // after an odd number of passes the result is in tmp
}

// cutClusters appends to out the clusters of the sorted keys[lo:hi], whose
// codes agree above bit: split where that bit changes, until a piece holds
// at most clusterSize triangles. Triangles in one cell of the finest grid
// are cut into pieces of clusterSize by count. Item ranges are offset by
// base (positions in b.prims).
func cutClusters(keys []uint64, lo, hi, bit, base int, out *[]item) {
	for hi-lo > clusterSize && bit >= 0 {
		m := lo + sort.Search(hi-lo, func(i int) bool { return keys[lo+i]>>(32+bit)&1 == 1 })
		if m > lo && m < hi {
			cutClusters(keys, lo, m, bit-1, base, out)
			lo = m
		}
		bit--
	}
	for hi-lo > clusterSize {
		*out = append(*out, item{lo: base + lo, hi: base + lo + clusterSize, grid: -1})
		lo += clusterSize
	}
	*out = append(*out, item{lo: base + lo, hi: base + hi, grid: -1})
}

// buildClusters fills (*nodes)[me] with the subtree over the clusters:
// binned SAH over their boxes (weighted by their triangles) above
// clusterMaxDepth, halving their number below it; one cluster is built by
// build.
func (b *builder) buildClusters(nodes *[]treeNode, me int, items []item, depth int, bounds box) {
	if len(items) == 1 {
		b.build(nodes, me, items[0].lo, items[0].hi, depth, items[0].b)
		return
	}
	nd := &(*nodes)[me]
	nd.setBounds(&bounds)
	mid, axis, sd := -1, 0, sides{}
	if depth < clusterMaxDepth {
		mid, axis, sd = sahItems(items)
	}
	if mid <= 0 || mid >= len(items) {
		mid = len(items) / 2
		sd = sides{empty, empty}
		for i := range items {
			if i < mid {
				sd.lb.grow(&items[i].b)
			} else {
				sd.rb.grow(&items[i].b)
			}
		}
	}
	lb, rb := sd.lb, sd.rb
	nd.Axis = uint8(axis)
	base := len(*nodes)
	nd.Offset = int32(base)
	*nodes = append(*nodes, treeNode{}, treeNode{})
	left, right := items[:mid], items[mid:]
	nRight := 0
	for i := range right {
		nRight += right[i].hi - right[i].lo
	}
	if nRight > parallelSplit && b.buildParallel(nodes, base, nRight,
		func(ns *[]treeNode, at int) { b.buildClusters(ns, at, left, depth+1, lb) },
		func(ns *[]treeNode, at int) { b.buildClusters(ns, at, right, depth+1, rb) }) {
		return
	}
	b.buildClusters(nodes, base, left, depth+1, lb)
	b.buildClusters(nodes, base+1, right, depth+1, rb)
}

// sahItems splits items by binned SAH over their boxes' centres along the
// axis where the centres spread most (12 bins, cost area × triangles) and
// partitions them in place. It returns the size of the left part (−1 when
// all centres coincide), the axis, and both parts' bounds.
func sahItems(items []item) (mid, axis int, sd sides) {
	lo, hi := [3]float64{math.Inf(1), math.Inf(1), math.Inf(1)}, [3]float64{math.Inf(-1), math.Inf(-1), math.Inf(-1)}
	for i := range items {
		for k := range 3 {
			lo[k], hi[k] = min(lo[k], items[i].c[k]), max(hi[k], items[i].c[k])
		}
	}
	for k := 1; k < 3; k++ {
		if hi[k]-lo[k] > hi[axis]-lo[axis] {
			axis = k
		}
	}
	extent := hi[axis] - lo[axis]
	if !(extent > 0) {
		return -1, axis, sides{}
	}
	bins := min(numBins, len(items))
	scale := float64(bins) * (1 - 1e-6) / extent
	binOf := func(it *item) int { return min(int((it.c[axis]-lo[axis])*scale), bins-1) }
	var counts [numBins]int
	var boxes [numBins]box
	for i := range bins {
		boxes[i] = empty
	}
	total := 0
	for i := range items {
		k := binOf(&items[i])
		counts[k] += items[i].hi - items[i].lo
		total += items[i].hi - items[i].lo
		boxes[k].grow(&items[i].b)
	}
	_, bestK, sd := sweepBins(&boxes, &counts, bins, total)
	if bestK < 0 {
		return -1, axis, sides{}
	}
	i, j := 0, len(items)-1
	for {
		for i <= j && binOf(&items[i]) < bestK {
			i++
		}
		for i <= j && binOf(&items[j]) >= bestK {
			j--
		}
		if i >= j {
			break
		}
		items[i], items[j] = items[j], items[i]
		i++
		j--
	}
	return i, axis, sd
}
