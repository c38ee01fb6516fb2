package raytrace_test

import (
	"context"
	"fmt"
	"math"

	"github.com/hemiray/hemiray/geometry"
	"github.com/hemiray/hemiray/mesh"
	"github.com/hemiray/hemiray/raytrace"
	"github.com/hemiray/hemiray/raytrace/bvh"
	"github.com/hemiray/hemiray/raytrace/sample"
)

// Estimate traces the view factor between two opposed unit squares one
// metre apart; the published value is 0.19982 (Howell's catalogue C-11).
func ExampleEstimate() {
	v := func(x, y, z float64) geometry.Vec3 { return geometry.Vec3{X: x, Y: y, Z: z} }
	m := mesh.Rectangle("bottom", v(0, 0, 0), v(1, 0, 0), v(0, 1, 0), 4, 4)
	if err := m.Append(mesh.Rectangle("top", v(0, 0, 1), v(0, 1, 0), v(1, 0, 0), 4, 4)); err != nil {
		fmt.Println(err)
		return
	}
	r, err := raytrace.Estimate(context.Background(), m, raytrace.Options{Settings: raytrace.Settings{Rays: 200000, Seed: 1}})
	if err != nil {
		fmt.Println(err)
		return
	}
	f := r.Factor(r.NodeIndex("bottom"), r.NodeIndex("top"))
	exact := geometry.FParallelRectangles(1, 1, 1)
	fmt.Printf("inside the 95%% interval: %v; within 4 standard errors: %v\n",
		f.Lo <= exact && exact <= f.Hi, abs(f.F-exact) <= 4*f.StdErr)
	// Output: inside the 95% interval: true; within 4 standard errors: true
}

func abs(x float64) float64 {
	if x < 0 {
		return -x
	}
	return x
}

// RaySource draws the estimator's own rays for timing and testing the
// tracer alone. From two opposed unit squares one metre apart, the
// fraction of rays that meet the other square is their view factor,
// 0.19982 (Howell's catalogue C-11).
func ExampleRaySource() {
	v := func(x, y, z float64) geometry.Vec3 { return geometry.Vec3{X: x, Y: y, Z: z} }
	m := mesh.Rectangle("bottom", v(0, 0, 0), v(1, 0, 0), v(0, 1, 0), 4, 4)
	if err := m.Append(mesh.Rectangle("top", v(0, 0, 1), v(0, 1, 0), v(1, 0, 0), 4, 4)); err != nil {
		fmt.Println(err)
		return
	}
	src, err := raytrace.NewRaySource(m)
	if err != nil {
		fmt.Println(err)
		return
	}
	tree := bvh.Build(m.Vertices, m.Facets, bvh.Options{})
	var b bvh.Batch
	qs := make([]bvh.Query, 1000)
	hits := make([]bvh.Hit, len(qs))
	st := sample.NewStream(1, 0, 0)
	n, met := 0, 0
	for range 200 {
		src.Rays(&st, qs)
		tree.IntersectBatch(&b, qs, hits)
		for k, h := range hits {
			n++
			if h.Facet >= 0 && m.SurfaceOf[h.Facet] != m.SurfaceOf[qs[k].Skip] {
				met++
			}
		}
	}
	f := float64(met) / float64(n)
	se := math.Sqrt(f * (1 - f) / float64(n))
	fmt.Printf("within 4 standard errors of %.5f: %v\n", geometry.FParallelRectangles(1, 1, 1), math.Abs(f-geometry.FParallelRectangles(1, 1, 1)) <= 4*se)
	// Output: within 4 standard errors of 0.19982: true
}
