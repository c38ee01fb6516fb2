package mesh

import (
	"math"

	"github.com/hemiray/hemiray/geometry"
)

// earClipper triangulates simple polygons, convex or concave, keeping the
// polygon's winding. Its buffers are reused between polygons.
type earClipper struct {
	x, y []float64 // projected corners
	idx  []int     // remaining corners, positions in the polygon
	out  [][3]int32
	work int // point-in-ear tests left for this polygon (see triangulate)
	// spent counts the tests of every polygon of the file, against
	// fileBudget: a file of many pathological faces stays bounded too.
	spent int
}

// triangulate splits polygon poly (vertex indices into v) into len(poly)−2
// triangles. The polygon is projected onto the plane of its Newell normal
// (Newell's method: the best-fit plane of a possibly non-planar polygon), and
// ears are clipped from the projected outline. A polygon with no ear (a
// self-intersecting outline or a collinear one), or one that exhausts a
// quadratic work budget, is finished as a fan, so no area is lost silently;
// the mesh checks then report any degenerate facets.
// fileBudget bounds the point-in-ear tests of one file's polygons (about
// five seconds).
var fileBudget = 1 << 30

func (c *earClipper) triangulate(v []geometry.Vec3, poly []int32) [][3]int32 {
	n := len(poly)
	var nrm geometry.Vec3
	for i := range n {
		a, b := v[poly[i]], v[poly[(i+1)%n]]
		nrm.X += (a.Y - b.Y) * (a.Z + b.Z)
		nrm.Y += (a.Z - b.Z) * (a.X + b.X)
		nrm.Z += (a.X - b.X) * (a.Y + b.Y)
	}
	// Drop the normal's dominant axis; order the two kept axes so that the
	// outline is counter-clockwise in 2-D exactly when it is about nrm.
	ax, ay := 0, 1
	switch ab := (geometry.Vec3{X: math.Abs(nrm.X), Y: math.Abs(nrm.Y), Z: math.Abs(nrm.Z)}); {
	case ab.X >= ab.Y && ab.X >= ab.Z:
		ax, ay = 1, 2
		if nrm.X < 0 {
			ax, ay = 2, 1
		}
	case ab.Y >= ab.Z:
		ax, ay = 2, 0
		if nrm.Y < 0 {
			ax, ay = 0, 2
		}
	default:
		if nrm.Z < 0 {
			ax, ay = 1, 0
		}
	}
	c.x, c.y, c.idx, c.out = c.x[:0], c.y[:0], c.idx[:0], c.out[:0]
	for i, p := range poly {
		c.x = append(c.x, v[p].Axis(ax))
		c.y = append(c.y, v[p].Axis(ay))
		c.idx = append(c.idx, i)
	}
	// Ear clipping is quadratic for ordinary outlines but cubic for
	// pathological ones; past a quadratic budget (and past the file's) the
	// rest becomes a fan.
	c.work = max(0, min(8*n*n+1024, fileBudget-c.spent))
	start := c.work
	defer func() { c.spent += start - max(c.work, 0) }()
	for len(c.idx) > 3 {
		ear := c.findEar()
		if ear < 0 {
			break
		}
		m := len(c.idx)
		a, b, d := c.idx[(ear+m-1)%m], c.idx[ear], c.idx[(ear+1)%m]
		c.out = append(c.out, [3]int32{poly[a], poly[b], poly[d]})
		c.idx = append(c.idx[:ear], c.idx[ear+1:]...)
	}
	for k := 1; k+1 < len(c.idx); k++ {
		c.out = append(c.out, [3]int32{poly[c.idx[0]], poly[c.idx[k]], poly[c.idx[k+1]]})
	}
	return c.out
}

func (c *earClipper) cross(a, b, d int) float64 {
	return (c.x[b]-c.x[a])*(c.y[d]-c.y[a]) - (c.y[b]-c.y[a])*(c.x[d]-c.x[a])
}

// findEar returns the position in c.idx of a convex corner whose triangle
// holds no other remaining corner, or −1.
func (c *earClipper) findEar() int {
	m := len(c.idx)
	for k := range m {
		a, b, d := c.idx[(k+m-1)%m], c.idx[k], c.idx[(k+1)%m]
		if c.cross(a, b, d) <= 0 {
			continue // reflex or flat corner
		}
		ok := true
		for _, q := range c.idx {
			if q == a || q == b || q == d {
				continue
			}
			if c.work--; c.work < 0 {
				return -1
			}
			// Inside or on the boundary of the candidate ear.
			if c.cross(a, b, q) >= 0 && c.cross(b, d, q) >= 0 && c.cross(d, a, q) >= 0 {
				ok = false
				break
			}
		}
		if ok {
			return k
		}
	}
	return -1
}
