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
// With -accuracy it measures time to accuracy instead of speed: for four
// closed-form configurations (opposed unit squares at unit distance, a
// closed unit cube, perpendicular squares with a common edge, opposed
// squares with a smaller opaque square between them) the rays per node at
// which 1.96 times the spread of every entry of the emitting node's row,
// over -seeds independent runs, falls to 0.001, by plain Monte Carlo and by
// RQMC (log-log interpolation between powers of two), and on the cluttered
// room the ratio of rays the two need for the same worst spread:
//
//	accuracy="NAME" sampling=mc|rqmc rays_per_node=N seconds=S
//
// Usage:
//
//	go run ./bench [-workload squares|box|sphere|room|all] [-rays N] [-threads T]
//	go run ./bench -scale [-workload sphere|room] [-scale-rays R] [-scale-per P] [-scale-drop S] [-scale-once] [-threads T]
//	go run ./bench -accuracy [-seeds S]
//
// The same workloads back the Go benchmarks in this folder
// (go test ./bench -bench .).
package main
