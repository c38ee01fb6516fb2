package bvh

import (
	"testing"
	"unsafe"

	"github.com/hemiray/hemiray/geometry"
)

var sinkB bool

func BenchmarkSlab(b *testing.B) {
	var l lane
	l.aim(geometry.Vec3{X: 0.1, Y: 0.2, Z: 0.3}, geometry.Vec3{X: 0.3, Y: -0.5, Z: 0.8}, 10)
	nodes := make([]treeNode, 64)
	for i := range nodes {
		nodes[i] = treeNode{Bounds: [6]float32{float32(i) * 0.01, 0, 0, 1, 1, 1}}
	}
	for b.Loop() {
		for i := range nodes {
			enter, leave := l.span(unsafe.Pointer(&nodes[i]))
			sinkB = sinkB != (enter <= leave)
		}
	}
}
