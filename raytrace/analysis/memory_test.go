package analysis

import (
	"context"
	"testing"

	"github.com/hemiray/hemiray/geometry"
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
