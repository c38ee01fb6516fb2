package bvh

import (
	"testing"

	"github.com/hemiray/hemiray/geometry"
)

var sinkB bool

// BenchmarkSlab times one step of the traversal: the slab test of a pair
// of children from the root.
func BenchmarkSlab(b *testing.B) {
	v := []geometry.Vec3{{X: 0, Y: 0, Z: 1}, {X: 1, Y: 0, Z: 1}, {X: 0, Y: 1, Z: 1}, {X: 0, Y: 0, Z: 2}, {X: 1, Y: 0, Z: 2}, {X: 0, Y: 1, Z: 2}}
	tree := Build(v, [][3]int32{{0, 1, 2}, {3, 4, 5}}, Options{})
	var l lane
	q := Query{O: geometry.Vec3{X: 0.1, Y: 0.2, Z: 0.3}, D: geometry.Vec3{X: 0.1, Y: -0.05, Z: 0.8}, TMax: 10, Skip: -1}
	for b.Loop() {
		sinkB = tree.startLane(&l, &q) != sinkB
	}
}
