package main

import (
	"context"
	"fmt"
	"os"
	"path/filepath"
	"time"

	"github.com/hemiray/hemiray/internal/heappeak"
	"github.com/hemiray/hemiray/mesh"
	"github.com/hemiray/hemiray/raytrace"
	"github.com/hemiray/hemiray/raytrace/analysis"
	"github.com/hemiray/hemiray/raytrace/report"
)

// scaleResult is one end-to-end run of the whole pipeline on a large model.
type scaleResult struct {
	name                  string
	facets, nodes         int
	threads               int
	rays                  int64 // per node
	traceS, analyseS      float64
	writeS                float64
	peakHeapGB, outputsMB float64
	drop                  float64 // conductor threshold
	conductS              float64 // of analyseS, in parallel with the pooled solve
	kept                  int     // conductors written
	iterations            int     // 0: dense
	maxDropped            float64 // largest share of a node's emission dropped
}

// runScale traces, smooths, solves (4 replicates) and writes every output
// (--csv compact, no pictures) of m with its facets grouped into nodes of
// per consecutive facets of a surface, every node a gray wall at 300 K.
func runScale(name string, m *mesh.Mesh, per int, rays int64, threads int, drop float64, conductances bool) (scaleResult, error) {
	r := scaleResult{name: name, facets: len(m.Facets), threads: threads, rays: rays, drop: drop}
	nodeOf := make([]string, len(m.Facets))
	for _, s := range m.Surfaces {
		for k, f := range s.Facets {
			nodeOf[f] = fmt.Sprintf("%s/%d", s.Name, k/per)
		}
	}
	eps, T := 0.8, 300.0
	in := &analysis.Input{
		Case: &analysis.Case{Defaults: analysis.SurfaceSpec{Emissivity: &eps, Temperature: &T},
			Output: analysis.OutputSpec{DropConductors: drop, Conductances: &conductances}},
		Mesh:     m,
		Settings: raytrace.Settings{Rays: rays, Seed: 1, Replicates: 4},
		NodeOf:   nodeOf,
	}
	dir, err := os.MkdirTemp("", "hemiray-scale")
	if err != nil {
		return r, err
	}
	defer os.RemoveAll(dir)
	var t *analysis.Traced
	var a *analysis.Result
	var t0, t1, t2, t3 time.Time
	// The heap sampled while the pipeline runs: its peak above what was there.
	peak, err := heappeak.Run(20*time.Millisecond, func() (err error) {
		t0 = time.Now()
		if t, err = in.Trace(context.Background(), analysis.Run{Dir: dir, Threads: threads, MemoryLimit: -1}); err != nil {
			return err
		}
		t1 = time.Now()
		if a, err = in.Analyse(t.Result); err != nil {
			return err
		}
		t2 = time.Now()
		_, err = report.Write(dir, report.Outputs{Input: in, Traced: t, Analysis: a, Compact: true})
		t3 = time.Now()
		return err
	})
	if err != nil {
		return r, err
	}
	r.nodes = len(t.Result.Nodes)
	if c := a.Conductors; c != nil {
		r.conductS, r.kept, r.iterations = c.Elapsed.Seconds(), c.Kept(), c.Iterations
		for _, d := range c.Dropped {
			r.maxDropped = max(r.maxDropped, d)
		}
	}
	r.traceS, r.analyseS, r.writeS = t1.Sub(t0).Seconds(), t2.Sub(t1).Seconds(), t3.Sub(t2).Seconds()
	r.peakHeapGB = float64(peak) / (1 << 30)
	files, _ := filepath.Glob(filepath.Join(dir, "*"))
	for _, f := range files {
		if st, err := os.Stat(f); err == nil {
			r.outputsMB += float64(st.Size()) / 1e6
		}
	}
	return r, nil
}

// printScale prints the scale table and one machine-readable line a run.
func printScale(rs []scaleResult) {
	fmt.Println("\nend to end (trace, smoothing and solve of the pool and 4 replicates, every output with --csv compact)")
	fmt.Printf("%10s %9s %7s %7s %8s %9s %9s %8s %10s %9s %9s %10s %6s %8s\n", "model", "facets", "nodes", "threads", "rays", "trace_s", "post_s", "post/tr", "peak_GB", "out_MB", "cond_s", "kept", "iter", "dropped")
	for _, r := range rs {
		post := r.analyseS + r.writeS
		fmt.Printf("%10s %9d %7d %7d %8d %9.1f %9.1f %8.2f %10.2f %9.0f %9.1f %10d %6d %8.1e\n", r.name, r.facets, r.nodes, r.threads, r.rays, r.traceS, post, post/r.traceS, r.peakHeapGB, r.outputsMB, r.conductS, r.kept, r.iterations, r.maxDropped)
	}
	fmt.Println("cond_s: conductances (beside the pooled solve); iter: most CG iterations of a column (0: dense LU); dropped: largest share of a node's emission in dropped conductors")
	fmt.Println()
	for _, r := range rs {
		fmt.Printf("scale=%s facets=%d nodes=%d threads=%d rays_per_node=%d trace_s=%.2f analyse_s=%.2f write_s=%.2f peak_heap_gb=%.2f outputs_mb=%.0f conductances_s=%.2f conductors=%d drop=%g max_dropped_share=%.3g\n",
			r.name, r.facets, r.nodes, r.threads, r.rays, r.traceS, r.analyseS, r.writeS, r.peakHeapGB, r.outputsMB, r.conductS, r.kept, r.drop, r.maxDropped)
	}
}
