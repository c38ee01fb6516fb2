package raytrace

import (
	"math"

	"github.com/hemiray/hemiray/geometry"
	"github.com/hemiray/hemiray/mesh"
	"github.com/hemiray/hemiray/raytrace/bvh"
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
	facets []int32
	pick   sample.Alias // over facets; unused for a single facet
	sign   float64      // +1 emits from the front, −1 from the back
}

func newNodeEmitter(n *Node, area []float64) nodeEmitter {
	e := nodeEmitter{facets: n.Facets, sign: 1}
	if n.Back {
		e.sign = -1
	}
	if len(n.Facets) > 1 {
		w := make([]float64, len(n.Facets))
		for k, f := range n.Facets {
			w[k] = area[f]
		}
		e.pick = sample.NewAlias(w)
	}
	return e
}

// ray draws the next ray of node e from st: a facet by area, a uniform point
// on it, a cosine-weighted direction about the emitting side's normal, and
// the origin moved off the facet's plane to that side.
func (e *nodeEmitter) ray(st *sample.Stream, em []facetEmitter) bvh.Query {
	u := st.Float64()
	f := e.facets[0]
	if len(e.facets) > 1 {
		f = e.facets[e.pick.Pick(u)]
	}
	fe := &em[f]
	b1, b2 := sample.UniformTriangle(st.Float64(), st.Float64())
	p := fe.v0.Add(fe.e1.Scale(b1)).Add(fe.e2.Scale(b2))
	n := fe.n.Scale(e.sign)
	x, y, z := sample.CosineHemisphere(st.Float64(), st.Float64())
	d := geometry.NewFrame(n).ToWorld(x, y, z)
	o := geometry.OffsetOrigin(p, fe.v0, fe.v0.Add(fe.e1), fe.v0.Add(fe.e2), 1-b1-b2, b1, b2, n)
	return bvh.Query{O: o, D: d, TMax: math.Inf(1), Skip: f}
}
