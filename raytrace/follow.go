package raytrace

import (
	"math"

	"github.com/hemiray/hemiray/geometry"
	"github.com/hemiray/hemiray/raytrace/bvh"
	"github.com/hemiray/hemiray/raytrace/sample"
)

// How a followed ray ends.
const (
	endAbsorbed = iota // by a node (id is the node)
	endEscaped         // left the model to the ambient
	endBack            // met the back of a one-sided surface (id is the surface)
)

// maxBounces ends a ray that is still reflecting after this many
// interactions by absorbing it where it is. With every emissivity at least
// 10⁻³ the chance of reaching it is below (1 − 10⁻³)^100000 < e⁻¹⁰⁰.
const maxBounces = 100000

// followSalt separates the seeds of the reflection streams from those of
// the emission streams.
const followSalt = 0x6A09E667F3BCC909

// follow continues a ray from origin o along unit direction d, whose
// first hit is h, through reflections and transmissions until a node
// absorbs it, it leaves the model, or it meets the back of a one-sided
// surface (Howell, "Application of Monte Carlo to heat transfer problems",
// Advances in Heat Transfer 5, 1968: absorption decided by a random draw
// at every hit, so each ray ends at exactly one place and the counts stay
// multinomial). At a hit on node j a uniform u decides: absorbed when
// u < ε_j; passed straight through a thin sheet when u < ε_j + τ_j;
// otherwise reflected, as by a mirror (r = d − 2(d·n)n) with probability
// ρ_s/ρ, else diffusely (cosine-weighted about the normal of the side that
// was hit). st is the ray's own stream.
func (e *engine) follow(d geometry.Vec3, h bvh.Hit, st *sample.Stream) (end int, id int32) {
	for bounce := 0; ; bounce++ {
		if h.Facet < 0 {
			return endEscaped, 0
		}
		j, sign := e.nm.front[h.Facet], 1.0
		if !h.Front {
			j, sign = e.nm.back[h.Facet], -1
		}
		if j < 0 {
			return endBack, e.m.SurfaceOf[h.Facet]
		}
		fa := &e.fates[j]
		u := st.Float64()
		if u < fa.absorb || bounce == maxBounces {
			return endAbsorbed, int32(j)
		}
		fe := &e.em[h.Facet]
		// The normal of the side that was hit, towards the ray's origin.
		n := fe.n.Scale(sign)
		switch {
		case u < fa.transmit:
			n = n.Scale(-1) // leave from the other side, same direction
		case u < fa.mirror:
			d = d.Sub(n.Scale(2 * d.Dot(n)))
		default:
			x, y, z := sample.CosineHemisphere(st.Float64(), st.Float64())
			d = geometry.NewFrame(n).ToWorld(x, y, z)
		}
		b1, b2 := h.B1, h.B2
		p := fe.v0.Add(fe.e1.Scale(b1)).Add(fe.e2.Scale(b2))
		o := geometry.OffsetOrigin(p, fe.v0, fe.v0.Add(fe.e1), fe.v0.Add(fe.e2), 1-b1-b2, b1, b2, n)
		h = e.tree.Intersect(o, d, math.Inf(1), h.Facet)
	}
}

// followStream returns the stream of ray r of node i's reflections.
func followStream(seed uint64, i NodeID, r int64) sample.Stream {
	return sample.NewStream(seed^followSalt, int64(i), r)
}
