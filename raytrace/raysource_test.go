package raytrace

import (
	"testing"

	"github.com/hemiray/hemiray/geometry"
	"github.com/hemiray/hemiray/mesh"
	"github.com/hemiray/hemiray/raytrace/bvh"
	"github.com/hemiray/hemiray/raytrace/sample"
)

// Batches of any length draw the same rays as one ray at a time (the
// determinism contract: ray k uses the stream's numbers 5k … 5k+4), and
// every ray leaves the front of the facet it names.
func TestRaySourceBatchesAgree(t *testing.T) {
	m := mesh.Box("", geometry.Box{Max: geometry.Vec3{X: 2, Y: 1, Z: 3}}, 3, true)
	src, err := NewRaySource(m)
	if err != nil {
		t.Fatal(err)
	}
	const n = 1000
	one := make([]bvh.Query, n)
	st := sample.NewStream(3, 1, 0)
	for k := range one {
		src.Rays(&st, one[k:k+1])
	}
	for _, size := range []int{7, 64, 65, 1000} {
		got := make([]bvh.Query, n)
		st := sample.NewStream(3, 1, 0)
		for lo := 0; lo < n; lo += size {
			src.Rays(&st, got[lo:min(lo+size, n)])
		}
		for k := range got {
			if got[k] != one[k] {
				t.Fatalf("batches of %d: ray %d = %+v, one at a time %+v", size, k, got[k], one[k])
			}
		}
	}
	for k, q := range one {
		tri := m.Triangle(int(q.Skip))
		if q.D.Dot(tri.Normal()) <= 0 {
			t.Fatalf("ray %d leaves facet %d backwards", k, q.Skip)
		}
		// The origin lies on the facet's plane up to the offset that lifts
		// it off (far below a millimetre here).
		if d := q.O.Sub(tri.V0).Dot(tri.Normal()); d < 0 || d > 1e-9 {
			t.Fatalf("ray %d starts %g m off its facet's plane", k, d)
		}
	}
}

// BenchmarkRaySource measures ray generation alone on a model whose alias
// table and emitter data (200,000 facets, about 23 MB) exceed the caches.
func BenchmarkRaySource(b *testing.B) {
	m := mesh.Sphere("s", geometry.Vec3{}, 1, 129, true)
	src, err := NewRaySource(m)
	if err != nil {
		b.Fatal(err)
	}
	st := sample.NewStream(1, 0, 0)
	var qs [chunk]bvh.Query
	b.ReportAllocs()
	for b.Loop() {
		src.Rays(&st, qs[:])
	}
	b.ReportMetric(float64(len(qs))*float64(b.N)/b.Elapsed().Seconds()/1e6, "Mrays/s")
}
