package bvh

import (
	"math"
	"unsafe"

	"github.com/hemiray/hemiray/geometry"
)

// treeNode is one node of the binary tree the build makes (then widens
// into wideNodes): 32 bytes, pinned by a test.
//
//	Bounds    [6]float32  24 bytes: min x, y, z, max x, y, z (exact: vertices are float32)
//	Offset    int32        inner: index of the first child (the second follows it); leaf: first triangle
//	Count     uint16       triangles in a leaf, 0 for an inner node
//	Axis      uint8        split axis of an inner node (0, 1, 2)
type treeNode struct {
	Bounds [6]float32
	Offset int32
	Count  uint16
	Axis   uint8
	_      uint8
}

// wideNode is a node of the tree the traversal reads: up to four children,
// their boxes stored plane by plane so that one plane of all four children
// is 16 contiguous bytes. 128 bytes, two cache lines, pinned by a test.
//
//	Bounds  [6][4]float32  plane p (min x, y, z, max x, y, z) of child c at Bounds[p][c]
//	Child   [4]int32       inner child: its wideNode index; leaf: its first triangle
//	Count   [4]uint8       triangles of a leaf child; 0 for an inner child or an empty slot
//
// An empty slot has an empty box (+∞ low, −∞ high) that no ray enters.
type wideNode struct {
	Bounds [6][4]float32
	Child  [4]int32
	Count  [4]uint8
	_      [12]byte
}

// wideSize is the size of a wideNode, in bytes.
const wideSize = 128

// leafTri is a triangle in leaf order: its vertices rounded to float32 and
// its facet id, 40 bytes, so that a leaf's triangles are one contiguous run
// of memory with no indirection. float32 is the precision of binary STL;
// RoundVertex gives callers the same rounded points, so that rays can start
// exactly on the triangles the tree holds.
type leafTri struct {
	v  [9]float32
	id int32
}

// vertex returns corner k as float64 (exact).
func (t *leafTri) vertex(k int) [3]float64 {
	return [3]float64{float64(t.v[3*k]), float64(t.v[3*k+1]), float64(t.v[3*k+2])}
}

// RoundVertex returns p as the tree stores it: each coordinate rounded to
// the nearest float32. Emitters built from rounded vertices lie exactly on
// the tree's triangles.
func RoundVertex(p geometry.Vec3) geometry.Vec3 {
	return geometry.Vec3{X: float64(float32(p.X)), Y: float64(float32(p.Y)), Z: float64(float32(p.Z))}
}

// Tree is a built BVH. It is read-only after Build and safe for concurrent use.
type Tree struct {
	nodes []wideNode // the root is nodes[0]
	tris  []leafTri
	// Plane grids (grid.go): a slot with Count gridCount holds grid
	// grids[Child].
	grids    []planeGrid
	cells    []int32
	cellTris []int32
	Stats    Stats
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
	return len(t.nodes)*wideSize + len(t.tris)*40 + len(t.grids)*int(unsafe.Sizeof(planeGrid{})) + 4*(len(t.cells)+len(t.cellTris))
}
