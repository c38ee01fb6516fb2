package bvh_test

import (
	"fmt"
	"math"

	"github.com/hemiray/hemiray/geometry"
	"github.com/hemiray/hemiray/mesh"
	"github.com/hemiray/hemiray/raytrace/bvh"
)

// Build a tree over a closed box and find what a ray from its centre hits.
func ExampleTree_Intersect() {
	box := mesh.Box("", geometry.Box{Max: geometry.Vec3{X: 2, Y: 2, Z: 2}}, 4, true)
	tree := bvh.Build(box.Vertices, box.Facets, bvh.Options{})
	h := tree.Intersect(geometry.Vec3{X: 1, Y: 1, Z: 1}, geometry.Vec3{Z: 1}, math.Inf(1), -1)
	fmt.Printf("hit %s at t = %g, front: %v\n", box.Surfaces[box.SurfaceOf[h.Facet]].Name, h.T, h.Front)
	// Output: hit zmax at t = 1, front: true
}
