package main

import (
	"math"

	"github.com/hemiray/hemiray/geometry"
	"github.com/hemiray/hemiray/mesh"
	"github.com/hemiray/hemiray/raytrace/bvh"
	"github.com/hemiray/hemiray/raytrace/sample"
)

// emitter is what a ray needs of its facet, packed for one or two cache lines.
type emitter struct {
	v0, e1, e2, n geometry.Vec3
}

// scene is a workload ready to trace.
type scene struct {
	m        *mesh.Mesh
	tree     *bvh.Tree
	emitters []emitter
	pick     sample.Alias
}

func newScene(m *mesh.Mesh, threads int) *scene {
	s := &scene{m: m, tree: bvh.Build(m.Vertices, m.Facets, bvh.Options{Threads: threads})}
	areas := make([]float64, len(m.Facets))
	s.emitters = make([]emitter, len(m.Facets))
	for f := range m.Facets {
		t := m.Triangle(f)
		// Emit from the triangle exactly as the tree stores it.
		t = geometry.Triangle{V0: bvh.RoundVertex(t.V0), V1: bvh.RoundVertex(t.V1), V2: bvh.RoundVertex(t.V2)}
		areas[f] = t.Area()
		s.emitters[f] = emitter{v0: t.V0, e1: t.V1.Sub(t.V0), e2: t.V2.Sub(t.V0), n: t.Normal()}
	}
	s.pick = sample.NewAlias(areas)
	return s
}

// tally counts the rays traced and where they went.
type tally struct {
	rays, escaped int
	fromSurface   []int   // rays by surface of the emitter
	pair          [][]int // hits by (emitter surface, surface hit)
}

// ray draws the next ray from st: an emitting facet by area, a uniform point
// on it, a cosine-weighted direction about its normal, the origin moved off
// its plane.
func (s *scene) ray(st *sample.Stream) bvh.Query {
	f := s.pick.Pick(st.Float64())
	e := &s.emitters[f]
	b1, b2 := sample.UniformTriangle(st.Float64(), st.Float64())
	p := e.v0.Add(e.e1.Scale(b1)).Add(e.e2.Scale(b2))
	x, y, z := sample.CosineHemisphere(st.Float64(), st.Float64())
	d := geometry.NewFrame(e.n).ToWorld(x, y, z)
	o := geometry.OffsetOrigin(p, e.v0, e.v0.Add(e.e1), e.v0.Add(e.e2), 1-b1-b2, b1, b2, e.n)
	return bvh.Query{O: o, D: d, TMax: math.Inf(1), Skip: int32(f)}
}

// count tallies one ray from facet f that hit h.
func (t *tally) count(s *scene, f int32, h bvh.Hit) {
	t.rays++
	t.fromSurface[s.m.SurfaceOf[f]]++
	if h.Facet < 0 {
		t.escaped++
		return
	}
	t.pair[s.m.SurfaceOf[f]][s.m.SurfaceOf[h.Facet]]++
}

func (t *tally) init(ns int) {
	if t.pair == nil {
		t.fromSurface = make([]int, ns)
		t.pair = make([][]int, ns)
		for i := range t.pair {
			t.pair[i] = make([]int, ns)
		}
	}
}

// traceBatch is trace with IntersectBatch, in batches of 64 rays.
func (s *scene) traceBatch(n int, st sample.Stream, t *tally) {
	t.init(len(s.m.Surfaces))
	var b bvh.Batch
	var qs [64]bvh.Query
	var hits [64]bvh.Hit
	for done := 0; done < n; done += len(qs) {
		for k := range qs {
			qs[k] = s.ray(&st)
		}
		s.tree.IntersectBatch(&b, qs[:], hits[:])
		for k, h := range hits {
			t.count(s, qs[k].Skip, h)
		}
	}
}

// trace fires n rays with stream st and tallies their first hits.
func (s *scene) trace(n int, st sample.Stream, t *tally) {
	t.init(len(s.m.Surfaces))
	for range n {
		q := s.ray(&st)
		t.count(s, q.Skip, s.tree.Intersect(q.O, q.D, q.TMax, q.Skip))
	}
}
