package bvh

import "math"

// Node is one node of the flattened tree: 32 bytes, pinned by a test.
//
//	Bounds    [6]float32  24 bytes: min x, y, z, max x, y, z, rounded outward
//	Offset    int32        inner: index of the first child (the second follows it); leaf: first triangle
//	Count     uint16       triangles in a leaf, 0 for an inner node
//	Axis      uint8        split axis of an inner node (0, 1, 2)
type Node struct {
	Bounds [6]float32
	Offset int32
	Count  uint16
	Axis   uint8
	_      uint8
}

// triRef is a triangle in leaf order: vertex indices and the facet id.
type triRef struct {
	v  [3]int32
	id int32
}

// Tree is a built BVH. It is read-only after Build and safe for concurrent use.
type Tree struct {
	Nodes []Node
	tris  []triRef
	verts [][3]float64
	Stats Stats
}

// Hit is the result of a closest-hit query. A miss has Facet −1.
type Hit struct {
	T      float64 // distance along the ray, in units of its direction's length
	B1, B2 float64 // barycentric weights of the triangle's second and third vertex
	Facet  int32   // the caller's facet id
	Front  bool    // the ray met the counter-clockwise (front) side
}

// Miss is the Hit of a ray that meets nothing.
var Miss = Hit{T: math.Inf(1), Facet: -1}

// Bytes returns the memory the tree holds, in bytes.
func (t *Tree) Bytes() int {
	return len(t.Nodes)*32 + len(t.tris)*16 + len(t.verts)*24
}

func roundDown(x float64) float32 {
	f := float32(x)
	if float64(f) > x {
		f = math.Nextafter32(f, float32(math.Inf(-1)))
	}
	return f
}

func roundUp(x float64) float32 {
	f := float32(x)
	if float64(f) < x {
		f = math.Nextafter32(f, float32(math.Inf(1)))
	}
	return f
}
