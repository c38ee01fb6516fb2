package raytrace

import (
	"errors"

	"github.com/hemiray/hemiray/mesh"
	"github.com/hemiray/hemiray/raytrace/bvh"
	"github.com/hemiray/hemiray/raytrace/sample"
)

// RaySource draws rays exactly as Estimate does for a node, here one
// node made of the fronts of all of a model's facets. It lets the benchmark
// program and other tools time and test the engine's real rays.
type RaySource struct {
	em []facetEmitter
	ne nodeEmitter
}

// NewRaySource prepares rays from the fronts of all facets of m, each
// facet picked in proportion to its area.
func NewRaySource(m *mesh.Mesh) (*RaySource, error) {
	if len(m.Facets) == 0 {
		return nil, errors.New("the model has no facets")
	}
	em, area := emitters(m)
	all := make([]int32, len(m.Facets))
	total := 0.0
	for f := range all {
		all[f] = int32(f)
		total += area[f]
	}
	if !(total > 0) {
		return nil, errors.New("the model has zero area")
	}
	return &RaySource{em: em, ne: newNodeEmitter(&Node{Facets: all}, area)}, nil
}

// Rays fills qs with the next len(qs) rays of st. Each ray skips its own
// facet (Query.Skip is the emitting facet).
func (r *RaySource) Rays(st *sample.Stream, qs []bvh.Query) {
	var u numbers
	for lo := 0; lo < len(qs); lo += chunk {
		n := min(chunk, len(qs)-lo)
		u.draw(st, n)
		r.ne.rays(&u, r.em, qs[lo:lo+n])
	}
}
