package main

import (
	"flag"
	"fmt"
	"log"
	"math"
	"os"
	"path/filepath"
	"runtime"
	"runtime/pprof"
	"sort"
	"sync"
	"text/tabwriter"
	"time"

	"github.com/hemiray/hemiray/mesh"
	"github.com/hemiray/hemiray/raytrace/bvh"
	"github.com/hemiray/hemiray/raytrace/sample"
)

type result struct {
	name                string
	facets              int
	build1, buildAll    time.Duration
	bytesPerFacet       float64
	treeBytesPerFacet   float64 // the tree alone: what traversal reads
	mrays1, mraysAll    float64 // interleaved batches, as the estimator traces
	mraysSingle         float64 // one ray at a time, for comparison
	threads             int
	sahCost             float64
	depth               int
	squaresF, squaresSE float64
}

func main() {
	log.SetFlags(0)
	log.SetPrefix("bench: ")
	which := flag.String("workload", "all", "workload: squares, box, room, sphere or all")
	rays := flag.Int("rays", 2000000, "rays per throughput measurement")
	threads := flag.Int("threads", runtime.GOMAXPROCS(0), "threads for the multi-thread measurement")
	objDir := flag.String("obj", "", "also write each workload as DIR/NAME.obj (to time hemiray trace on it)")
	scale := flag.Bool("scale", false, "instead: the whole pipeline on the 1M-facet sphere at about 10^4 nodes and the cluttered room at about 2,000 nodes, on 1 and -threads threads")
	scaleRays := flag.Int64("scale-rays", 1000, "with -scale: rays per node")
	scaleDrop := flag.Float64("scale-drop", 0, "with -scale: drop conductors below this share of both nodes' emission")
	scalePer := flag.Int("scale-per", 100, "with -scale: facets per node")
	scaleOnce := flag.Bool("scale-once", false, "with -scale: only on -threads threads, not also on 1")
	scaleNoG := flag.Bool("scale-no-conductances", false, "with -scale: skip the conductances")
	accuracy := flag.Bool("accuracy", false, "instead: rays per node to a 0.001 half-width on four closed-form configurations, plain Monte Carlo against RQMC, and the cluttered room")
	seeds := flag.Int("seeds", 24, "with -accuracy: independent runs per point")
	cpuProfile := flag.String("cpuprofile", "", "write a CPU profile of the whole run to this file (go tool pprof)")
	flag.Parse()
	if *cpuProfile != "" {
		f, err := os.Create(*cpuProfile)
		if err != nil {
			log.Fatal(err)
		}
		if err := pprof.StartCPUProfile(f); err != nil {
			log.Fatal(err)
		}
		defer pprof.StopCPUProfile()
	}
	if *accuracy {
		rs, err := raysToTarget(0.001, *seeds)
		if err != nil {
			log.Fatal(err)
		}
		worst, all, err := roomRatio(1<<14, *seeds)
		if err != nil {
			log.Fatal(err)
		}
		printAccuracy(rs, worst, all)
		return
	}
	if *scale {
		var rs []scaleResult
		for _, w := range []struct {
			name string
			make func() (*mesh.Mesh, error)
			per  int
		}{{"sphere", bigSphere, *scalePer}, {"room", clutteredRoom, *scalePer}} {
			if *which != "all" && *which != w.name {
				continue
			}
			m, err := w.make()
			if err != nil {
				log.Fatal(err)
			}
			counts := []int{1, *threads}
			if *scaleOnce {
				counts = []int{*threads}
			}
			for _, th := range counts {
				r, err := runScale(w.name, m, w.per, *scaleRays, th, *scaleDrop, !*scaleNoG)
				if err != nil {
					log.Fatalf("%s: %v", w.name, err)
				}
				rs = append(rs, r)
				log.Printf("%s on %d threads done", w.name, th)
			}
		}
		printScale(rs)
		return
	}

	var results []result
	found := false
	for _, w := range workloads {
		if *which != "all" && *which != w.name {
			continue
		}
		found = true
		m, err := w.make()
		if err != nil {
			log.Fatalf("%s: %v", w.name, err)
		}
		if *objDir != "" {
			if err := writeOBJ(filepath.Join(*objDir, w.name+".obj"), m); err != nil {
				log.Fatal(err)
			}
		}
		r := result{name: w.name, facets: len(m.Facets), threads: *threads}
		t0 := time.Now()
		bvh.Build(m.Vertices, m.Facets, bvh.Options{Threads: 1})
		r.build1 = time.Since(t0)
		runtime.GC()
		t0 = time.Now()
		s, err := newScene(m, *threads)
		if err != nil {
			log.Fatalf("%s: %v", w.name, err)
		}
		r.buildAll = time.Since(t0)
		r.bytesPerFacet = float64(meshBytes(m)+s.tree.Bytes()) / float64(len(m.Facets))
		r.treeBytesPerFacet = float64(s.tree.Bytes()) / float64(len(m.Facets))
		r.sahCost, r.depth = s.tree.Stats.SAHCost, s.tree.Stats.MaxDepth

		// Warm up, then measure one thread and all threads.
		var warm tally
		s.traceBatch(min(*rays/10, 100000), sample.NewStream(1, -1, 0), &warm)
		r.mrays1 = measure(s, *rays, 1, s.traceBatch)
		r.mraysAll = measure(s, *rays, *threads, s.traceBatch)
		r.mraysSingle = measure(s, *rays, 1, s.trace)
		if w.name == "squares" {
			r.squaresF, r.squaresSE = squaresViewFactor(s, *rays)
		}
		results = append(results, r)
		fmt.Fprintf(os.Stderr, "%s done\n", w.name)
	}
	if !found {
		log.Fatalf("unknown workload %q (squares, box, room, sphere or all)", *which)
	}
	tw := tabwriter.NewWriter(os.Stdout, 0, 4, 2, ' ', tabwriter.AlignRight)
	fmt.Fprintln(tw, "workload\tfacets\tbuild 1t [s]\tbuild all [s]\tbytes/facet\ttree bytes/facet\tSAH cost\tdepth\tMrays/s 1t\tMrays/s all\tthreads\tefficiency\t1t, one ray at a time\t")
	for _, r := range results {
		fmt.Fprintf(tw, "%s\t%d\t%.3f\t%.3f\t%.1f\t%.1f\t%.1f\t%d\t%.3f\t%.3f\t%d\t%.2f\t%.3f\t\n", r.name, r.facets,
			r.build1.Seconds(), r.buildAll.Seconds(), r.bytesPerFacet, r.treeBytesPerFacet, r.sahCost, r.depth, r.mrays1, r.mraysAll, r.threads, r.mraysAll/(r.mrays1*float64(r.threads)), r.mraysSingle)
	}
	tw.Flush()
	for _, r := range results {
		if r.name == "squares" {
			// Directly opposed unit squares at unit spacing: F = 0.19982
			// (Howell's catalogue of configuration factors, parallel opposed
			// rectangles; value from memory).
			fmt.Printf("squares: F(bottom→top) = %.5f ± %.5f (1σ), reference 0.19982, deviation %.1fσ\n",
				r.squaresF, r.squaresSE, (r.squaresF-0.19982)/r.squaresSE)
		}
	}
	fmt.Println()
	for _, r := range results {
		fmt.Printf("workload=%s facets=%d build_s=%.3f bytes_per_facet=%.1f mrays_1t=%.3f mrays_all=%.3f threads=%d efficiency=%.2f\n",
			r.name, r.facets, r.build1.Seconds(), r.bytesPerFacet, r.mrays1, r.mraysAll, r.threads, r.mraysAll/(r.mrays1*float64(r.threads)))
	}
}

func writeOBJ(path string, m *mesh.Mesh) error {
	if err := os.MkdirAll(filepath.Dir(path), 0o755); err != nil {
		return err
	}
	f, err := os.Create(path)
	if err != nil {
		return err
	}
	if err := mesh.WriteOBJ(f, m); err != nil {
		f.Close()
		return err
	}
	return f.Close()
}

// tracer is scene.trace or scene.traceBatch.
type tracer func(n int, st sample.Stream, t *tally)

// measure returns the median Mrays/s of three runs of n rays on threads.
func measure(s *scene, n, threads int, trace tracer) float64 {
	r := []float64{measureOnce(n, threads, trace), measureOnce(n, threads, trace), measureOnce(n, threads, trace)}
	sort.Float64s(r)
	return r[1]
}

func measureOnce(n, threads int, trace tracer) float64 {
	var wg sync.WaitGroup
	start := time.Now()
	for k := range threads {
		wg.Add(1)
		go func() {
			defer wg.Done()
			var t tally
			trace(n/threads, sample.NewStream(7, int64(k), 0), &t)
		}()
	}
	wg.Wait()
	return float64(n/threads*threads) / time.Since(start).Seconds() / 1e6
}

// squaresViewFactor estimates F from the bottom square to the top one.
func squaresViewFactor(s *scene, n int) (f, se float64) {
	var t tally
	s.traceBatch(n, sample.NewStream(99, 0, 0), &t)
	bottom := s.m.SurfaceIndex("bottom")
	top := s.m.SurfaceIndex("top")
	nb := float64(t.fromSurface[bottom])
	f = float64(t.pair[bottom][top]) / nb
	return f, math.Sqrt(f * (1 - f) / nb)
}
