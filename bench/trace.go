package main

import (
	"github.com/hemiray/hemiray/mesh"
	"github.com/hemiray/hemiray/raytrace"
	"github.com/hemiray/hemiray/raytrace/bvh"
	"github.com/hemiray/hemiray/raytrace/sample"
)

// scene is a workload ready to trace.
type scene struct {
	m    *mesh.Mesh
	tree *bvh.Tree
	src  *raytrace.RaySource // the estimator's own ray generator
}

func newScene(m *mesh.Mesh, threads int) (*scene, error) {
	src, err := raytrace.NewRaySource(m)
	if err != nil {
		return nil, err
	}
	return &scene{m: m, tree: bvh.Build(m.Vertices, m.Facets, bvh.Options{Threads: threads}), src: src}, nil
}

// tally counts the rays traced and where they went.
type tally struct {
	rays, escaped int
	fromSurface   []int   // rays by surface of the emitter
	pair          [][]int // hits by (emitter surface, surface hit)
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

// traceBatch traces n rays from stream st in batches of 64 with
// IntersectBatch, as the estimator does, and tallies their first hits.
func (s *scene) traceBatch(n int, st sample.Stream, t *tally) {
	t.init(len(s.m.Surfaces))
	var b bvh.Batch
	var qs [64]bvh.Query
	var hits [64]bvh.Hit
	for done := 0; done < n; done += len(qs) {
		s.src.Rays(&st, qs[:])
		s.tree.IntersectBatch(&b, qs[:], hits[:])
		for k, h := range hits {
			t.count(s, qs[k].Skip, h)
		}
	}
}

// trace is traceBatch with one ray at a time through Intersect.
func (s *scene) trace(n int, st sample.Stream, t *tally) {
	t.init(len(s.m.Surfaces))
	var q [1]bvh.Query
	for range n {
		s.src.Rays(&st, q[:])
		t.count(s, q[0].Skip, s.tree.Intersect(q[0].O, q[0].D, q[0].TMax, q[0].Skip))
	}
}
