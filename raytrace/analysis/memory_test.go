package analysis

import (
	"context"
	"testing"
	"time"

	"github.com/hemiray/hemiray/geometry"
	"github.com/hemiray/hemiray/internal/heappeak"
	"github.com/hemiray/hemiray/mesh"
	"github.com/hemiray/hemiray/raytrace"
)

// The bound given before tracing holds after it, and is near where every
// ray of a row meets a node of its own: 768 facet nodes of a closed box
// with 48 rays each (a row sees nearly 48 nodes, a replicate's nearly 12).
func TestPlannedAnalysisBytesBoundsTheTrace(t *testing.T) {
	m := mesh.Box("box", geometry.Box{Max: geometry.Vec3{X: 1, Y: 1, Z: 1}}, 8, true)
	for _, s := range []raytrace.Settings{
		{Rays: 48, Seed: 1, FacetNodes: true, Replicates: 4},
		{Rays: 48, Seed: 2, FacetNodes: true, Replicates: 2},
		{Rays: 2000, Seed: 3, Replicates: 4}, // six face nodes: the node count bounds the rows
	} {
		res, err := raytrace.Estimate(context.Background(), m, raytrace.Options{Settings: s})
		if err != nil {
			t.Fatal(err)
		}
		got, bound := AnalysisBytes(res), PlannedAnalysisBytes(len(res.Nodes), s)
		if got > bound || float64(bound) > 1.5*float64(got) {
			t.Errorf("%d nodes, %d rays, %d replicates: %d bytes after the trace, bound %d before it (want got ≤ bound ≤ 1.5 got)",
				len(res.Nodes), s.Rays, s.Replicates, got, bound)
		}
	}
}

// The analysis's peak heap (sampled while it runs, above what was held
// before it) stays within AnalysisBytes, no conductances (their dense
// memory is estimated apart): 768 facet nodes of a closed box (dense LU
// solves, whose matrices the estimate counts too) and 3,468 (iterative
// solves, so the entries are what counts), 4 replicates.
func TestAnalysisWithinItsEstimate(t *testing.T) {
	for _, c := range []struct {
		divisions int
		rays      int64
	}{{8, 400}, {17, 150}} {
		m := mesh.Box("box", geometry.Box{Max: geometry.Vec3{X: 1, Y: 1, Z: 1}}, c.divisions, true)
		s := raytrace.Settings{Rays: c.rays, Seed: 4, FacetNodes: true, Replicates: 4}
		res, err := raytrace.Estimate(context.Background(), m, raytrace.Options{Settings: s})
		if err != nil {
			t.Fatal(err)
		}
		eps, T, no := 0.8, 300.0, false
		in := &Input{Case: &Case{Defaults: SurfaceSpec{Emissivity: &eps, Temperature: &T}, Output: OutputSpec{Conductances: &no}}, Mesh: m, Settings: s}
		peak, err := heappeak.Run(200*time.Microsecond, func() error { _, err := in.Analyse(res); return err })
		if err != nil {
			t.Fatal(err)
		}
		used, estimate := int64(peak), AnalysisBytes(res)
		t.Logf("%d nodes: peak %d bytes above the start, estimate %d (%.0f%%)", len(res.Nodes), used, estimate, 100*float64(used)/float64(estimate))
		if used > estimate {
			t.Errorf("%d nodes: the analysis's heap peaked %d bytes above its start, more than the estimate of %d", len(res.Nodes), used, estimate)
		}
	}
}
