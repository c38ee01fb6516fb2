package raytrace

import (
	"math"
	"unsafe"

	"github.com/hemiray/hemiray/geometry"
	"github.com/hemiray/hemiray/mesh"
	"github.com/hemiray/hemiray/raytrace/bvh"
	"github.com/hemiray/hemiray/raytrace/internal/prefetch"
	"github.com/hemiray/hemiray/raytrace/sample"
)

// numbersPerRay is how many stream numbers one ray consumes: the facet
// pick, two for the point and two for the direction. Fixed, so ray r of a
// batch starts at offset r·numbersPerRay whoever traces it.
const numbersPerRay = 5

// facetEmitter is what a ray needs of its facet: the triangle exactly as
// the tree stores it (corner and edges) and its unit front normal.
type facetEmitter struct {
	v0, e1, e2, n geometry.Vec3
}

// emitters returns the emitter data and areas of all facets, from the
// vertices rounded as the tree stores them, so that every origin lies on a
// triangle the tree holds.
func emitters(m *mesh.Mesh) ([]facetEmitter, []float64) {
	em := make([]facetEmitter, len(m.Facets))
	area := make([]float64, len(m.Facets))
	for f, v := range m.Facets {
		a := bvh.RoundVertex(m.Vertices[v[0]])
		b := bvh.RoundVertex(m.Vertices[v[1]])
		c := bvh.RoundVertex(m.Vertices[v[2]])
		t := geometry.Triangle{V0: a, V1: b, V2: c}
		em[f] = facetEmitter{v0: a, e1: b.Sub(a), e2: c.Sub(a), n: t.Normal()}
		area[f] = t.Area()
	}
	return em, area
}

// nodeEmitter picks the facets of one node in proportion to their area.
type nodeEmitter struct {
	facet0 int32        // the node's only facet, when it has one
	pick   sample.Alias // facet ids by area; empty for a single facet
	sign   float64      // +1 emits from the front, −1 from the back
}

func newNodeEmitter(n *Node, area []float64) nodeEmitter {
	e := nodeEmitter{facet0: n.Facets[0], sign: 1}
	if n.Back {
		e.sign = -1
	}
	if len(n.Facets) > 1 {
		e.pick = sample.NewLabeledAlias(n.Facets, func(f int32) float64 { return area[f] })
	}
	return e
}

// numbers are the uniform numbers of up to chunk rays: per ray the facet
// pick, two for the point and two for the direction.
type numbers [chunk][numbersPerRay]float64

// draw fills u[:n] from st: ray k takes the stream's numbers 5k … 5k+4.
func (u *numbers) draw(st *sample.Stream, n int) {
	for k := range n {
		for j := range numbersPerRay {
			u[k][j] = st.Float64()
		}
	}
}

// rays fills qs (at most chunk long) with the node's rays for the numbers
// u: for each, a facet by area, a uniform point on it, a cosine-weighted
// direction about the emitting side's normal, and the origin moved off the
// facet's plane to that side.
//
// It works in passes over the batch (prefetch the alias entries; pick the
// facets and prefetch their emitter data; build the rays) so that on a
// model larger than the caches the misses of all rays overlap instead of
// stalling each ray in turn.
func (e *nodeEmitter) rays(u *numbers, em []facetEmitter, qs []bvh.Query) {
	qs = qs[:min(len(qs), chunk)]
	multi := e.pick.Len() > 0
	if multi {
		for k := range qs {
			e.pick.Prefetch(u[k][0])
		}
	}
	for k := range qs {
		f := e.facet0
		if multi {
			f = e.pick.Pick(u[k][0])
		}
		qs[k].Skip = f
		prefetch.Lines(unsafe.Pointer(&em[f]), unsafe.Pointer(&em[f].n.Z))
	}
	for k := range qs {
		f := qs[k].Skip
		fe := &em[f]
		b1, b2 := sample.UniformTriangle(u[k][1], u[k][2])
		p := fe.v0.Add(fe.e1.Scale(b1)).Add(fe.e2.Scale(b2))
		n := fe.n.Scale(e.sign)
		x, y, z := sample.CosineHemisphere(u[k][3], u[k][4])
		d := geometry.NewFrame(n).ToWorld(x, y, z)
		o := geometry.OffsetOrigin(p, fe.v0, fe.v0.Add(fe.e1), fe.v0.Add(fe.e2), 1-b1-b2, b1, b2, n)
		qs[k] = bvh.Query{O: o, D: d, TMax: math.Inf(1), Skip: f}
	}
}
