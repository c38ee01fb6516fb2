package bvh

import "math"

// widen collapses the binary tree (root at bin[0]) into four-wide nodes: a
// wide node takes its binary node's two children, then keeps replacing the
// inner child of largest surface area by its own two children until it
// has four (Wald, Benthin & Boulos, "Getting rid of packets: efficient
// SIMD single-ray traversal using multi-branching BVHs", IEEE Symp.
// Interactive Ray Tracing 2008). A traversal step then tests four boxes
// and the tree is about half as deep, so a ray takes half the dependent
// memory loads and half the hard-to-predict branches of its binary walk.
// The children of a wide node are stored side by side, depth first.
func widen(bin []treeNode) []wideNode {
	if len(bin) == 0 {
		return nil
	}
	if bin[0].Count > 0 { // the whole tree is one leaf
		nodes := []wideNode{emptyWide()}
		setSlot(&nodes[0], 0, &bin[0], 0)
		return nodes
	}
	// Counted first, so that the array is allocated once at its size
	// (reserving for the worst case, one wide node per binary inner node,
	// and copying down cost a tenth of a million-facet build).
	nodes := make([]wideNode, 1, countWide(bin, 0))
	fillWide(&nodes, 0, bin, 0)
	return nodes
}

// wideKids returns the children a wide node made from binary inner node bi
// takes: its two children, then, while fewer than four, the inner child of
// largest area replaced by its two.
func wideKids(bin []treeNode, bi int32) (kids [4]int32, n int) {
	// innerArea is a child's area, or −1 for a leaf (never expanded).
	innerArea := func(k int32) float64 {
		if bin[k].Count > 0 {
			return -1
		}
		return nodeArea(&bin[k])
	}
	var area [4]float64
	kids[0], kids[1] = bin[bi].Offset, bin[bi].Offset+1
	area[0], area[1] = innerArea(kids[0]), innerArea(kids[1])
	n = 2
	for n < 4 {
		best, bestArea := -1, -1.0
		for j := range n {
			if area[j] > bestArea {
				best, bestArea = j, area[j]
			}
		}
		if best < 0 {
			break
		}
		c := kids[best]
		kids[best], kids[n] = bin[c].Offset, bin[c].Offset+1
		area[best], area[n] = innerArea(kids[best]), innerArea(kids[n])
		n++
	}
	return kids, n
}

// countWide returns how many wide nodes the subtree from binary inner node
// bi becomes.
func countWide(bin []treeNode, bi int32) int {
	kids, n := wideKids(bin, bi)
	count := 1
	for _, k := range kids[:n] {
		if bin[k].Count == 0 {
			count += countWide(bin, k)
		}
	}
	return count
}

// emptyWide returns a wide node with every slot empty.
func emptyWide() wideNode {
	var w wideNode
	inf := float32(math.Inf(1))
	for c := range 4 {
		for k := range 3 {
			w.Bounds[k][c], w.Bounds[k+3][c] = inf, -inf
		}
	}
	return w
}

// setSlot stores binary node b as child c of w: its box and, for a leaf,
// its triangles; an inner child points at wide node child. Leaves are kept
// as the binary build made them: merging a subtree of up to 4 or 8
// triangles into one leaf (fewer, fuller wide nodes) traced 0.87–0.91 and
// 0.70–0.89 times as fast, as a triangle test costs more than a box test.
func setSlot(w *wideNode, c int, b *treeNode, child int32) {
	for p := range 6 {
		w.Bounds[p][c] = b.Bounds[p]
	}
	if b.Count > 0 {
		w.Child[c], w.Count[c] = b.Offset, uint8(b.Count)
		return
	}
	w.Child[c], w.Count[c] = child, 0
}

// fillWide fills (*nodes)[me] from binary inner node bi, appending wide
// nodes for its inner children side by side, then filling them.
func fillWide(nodes *[]wideNode, me int, bin []treeNode, bi int32) {
	kids, n := wideKids(bin, bi)
	w := emptyWide()
	var inner [4]int32
	for j := range n {
		inner[j] = -1
		if bin[kids[j]].Count == 0 {
			inner[j] = int32(len(*nodes))
			*nodes = append(*nodes, wideNode{})
		}
		setSlot(&w, j, &bin[kids[j]], inner[j])
	}
	(*nodes)[me] = w
	for j := range n {
		if inner[j] >= 0 {
			fillWide(nodes, int(inner[j]), bin, kids[j])
		}
	}
}
