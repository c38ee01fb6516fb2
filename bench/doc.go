// Command bench measures hemiray's ray-tracing core on generated workloads
// and prints a table and one machine-readable line per workload:
//
//	workload=NAME facets=N build_s=X bytes_per_facet=B mrays_1t=R1 mrays_all=R2 threads=T efficiency=E
//
// build_s is the single-thread BVH build; bytes_per_facet counts the mesh
// (vertices, facets, surface tables) and the tree; mrays are millions of the
// engine's real rays per second, drawn by the estimator's own generator
// (raytrace.RaySource: an emitting facet picked in proportion to area with
// an alias table, a uniform point on it, a cosine-weighted
// direction about its normal, the closest hit), ray generation included,
// traced in interleaved batches (bvh.Tree.IntersectBatch) as the estimator
// traces them. The table also shows the tree's own bytes per facet and
// one ray at a time for comparison.
//
// Usage:
//
//	go run ./bench [-workload squares|box|sphere|room|all] [-rays N] [-threads T]
//
// The same workloads back the Go benchmarks in this folder
// (go test ./bench -bench .).
package main
