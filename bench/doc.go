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
// With -scale it instead runs the whole pipeline end to end (trace,
// smoothing and solve of the pooled tally and 4 replicates, every output
// with --csv compact) on the 1,002,252-facet sphere grouped into about 10⁴
// nodes and the cluttered room grouped into about 2,000, on 1 and T
// threads, and prints times, the post-trace share, the peak heap and the
// output size:
//
//	scale=NAME facets=F nodes=N threads=T rays_per_node=R trace_s=… analyse_s=… write_s=… peak_heap_gb=… outputs_mb=… conductances=…
//
// Usage:
//
//	go run ./bench [-workload squares|box|sphere|room|all] [-rays N] [-threads T]
//	go run ./bench -scale [-scale-rays R] [-threads T]
//
// The same workloads back the Go benchmarks in this folder
// (go test ./bench -bench .).
package main
