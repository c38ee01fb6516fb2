package bvh

import "time"

// Stats describes a built tree.
type Stats struct {
	Triangles  int
	Nodes      int // four-wide nodes
	Leaves     int
	Grids      int     // coplanar runs located by a plane grid (grid.go), not counted in Leaves
	MaxDepth   int     // of the binary tree the build makes before widening
	MaxLeaf    int     // most triangles in one leaf
	SAHCost    float64 // expected cost per ray, in triangle tests (Aila, Karras & Laine, HPG 2013)
	BuildTime  time.Duration
	TreeBytes  int
	BuildProcs int
}

// computeStats fills t.Stats; the depth, leaves and SAH cost are those of
// the binary tree bin, before widening.
func (t *Tree) computeStats(bin []treeNode) {
	s := &t.Stats
	s.Triangles, s.Nodes, s.TreeBytes = len(t.tris), len(t.nodes), t.Bytes()
	if len(bin) == 0 {
		return
	}
	rootArea := nodeArea(&bin[0])
	var walk func(i, depth int)
	walk = func(i, depth int) {
		n := &bin[i]
		s.MaxDepth = max(s.MaxDepth, depth)
		a := 0.0
		if rootArea > 0 {
			a = nodeArea(n) / rootArea
		}
		if n.Count == gridCount {
			s.Grids++
			s.SAHCost += a * (costTrav + gridTests*costTri)
			return
		}
		if n.Count > 0 {
			s.Leaves++
			s.MaxLeaf = max(s.MaxLeaf, int(n.Count))
			s.SAHCost += a * float64(n.Count) * costTri
			return
		}
		s.SAHCost += a * costTrav
		walk(int(n.Offset), depth+1)
		walk(int(n.Offset)+1, depth+1)
	}
	walk(0, 1)
}

func nodeArea(n *treeNode) float64 {
	dx := float64(n.Bounds[3]) - float64(n.Bounds[0])
	dy := float64(n.Bounds[4]) - float64(n.Bounds[1])
	dz := float64(n.Bounds[5]) - float64(n.Bounds[2])
	return 2 * (dx*dy + dy*dz + dz*dx)
}
