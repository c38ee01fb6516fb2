package main

import (
	"testing"

	"github.com/hemiray/hemiray/raytrace/bvh"
	"github.com/hemiray/hemiray/raytrace/sample"
)

// BenchmarkBuild measures the single-thread BVH build of each workload.
func BenchmarkBuild(b *testing.B) {
	for _, w := range workloads {
		b.Run(w.name, func(b *testing.B) {
			m, err := w.make()
			if err != nil {
				b.Fatal(err)
			}
			b.ReportAllocs()
			for b.Loop() {
				bvh.Build(m.Vertices, m.Facets, bvh.Options{Threads: 1})
			}
			b.ReportMetric(float64(len(m.Facets))*float64(b.N)/b.Elapsed().Seconds()/1e6, "Mfacets/s")
		})
	}
}

// BenchmarkIntersect measures single-thread throughput of the engine's rays
// one at a time, generation included.
func BenchmarkIntersect(b *testing.B) { benchmarkRays(b, (*scene).trace) }

// BenchmarkIntersectBatch is BenchmarkIntersect with interleaved traversal,
// as the estimator traces.
func BenchmarkIntersectBatch(b *testing.B) { benchmarkRays(b, (*scene).traceBatch) }

func benchmarkRays(b *testing.B, trace func(*scene, int, sample.Stream, *tally)) {
	for _, w := range workloads {
		b.Run(w.name, func(b *testing.B) {
			m, err := w.make()
			if err != nil {
				b.Fatal(err)
			}
			s, err := newScene(m, 0)
			if err != nil {
				b.Fatal(err)
			}
			st := sample.NewStream(1, 0, 0)
			var t tally
			const batch = 1024
			b.ReportAllocs()
			b.ResetTimer()
			for b.Loop() {
				trace(s, batch, st, &t)
				st.Skip(5 * batch)
			}
			b.ReportMetric(float64(batch)*float64(b.N)/b.Elapsed().Seconds(), "rays/s")
		})
	}
}
