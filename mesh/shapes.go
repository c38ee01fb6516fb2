package mesh

import (
	"math"

	"github.com/hemiray/hemiray/geometry"
)

// The shape builders make exact, watertight test and demo geometry. Each
// returns a Mesh whose surfaces need no source file; combine them with
// Append. Vertices shared between faces are shared indices, so a closed shape
// has no open edges.

type shape struct {
	*builder
	at map[geometry.Vec3]int32
}

func newShape() shape { return shape{newBuilder(nil), map[geometry.Vec3]int32{}} }

func (s shape) vertex(p geometry.Vec3) int32 {
	p = geometry.Vec3{X: p.X + 0, Y: p.Y + 0, Z: p.Z + 0} // one key for −0 and +0
	if i, ok := s.at[p]; ok {
		return i
	}
	i := int32(len(s.m.Vertices))
	s.m.Vertices = append(s.m.Vertices, p)
	s.at[p] = i
	return i
}

// grid adds an nu×nv grid of quads, each split in two triangles, over the
// parallelogram at o spanned by u and v. The front faces u×v.
func (s shape) grid(o, u, v geometry.Vec3, nu, nv int) {
	for i := range nu {
		for j := range nv {
			p := func(a, b int) int32 {
				return s.vertex(o.Add(u.Scale(float64(a) / float64(nu))).Add(v.Scale(float64(b) / float64(nv))))
			}
			a, b, c, d := p(i, j), p(i+1, j), p(i+1, j+1), p(i, j+1)
			s.add(a, b, c, 0)
			s.add(a, c, d, 0)
		}
	}
}

// Rectangle returns one surface: the parallelogram at corner o spanned by u
// and v, split into nu×nv cells of two triangles. Its front faces u×v.
func Rectangle(name string, o, u, v geometry.Vec3, nu, nv int) *Mesh {
	s := newShape()
	s.use(name)
	s.grid(o, u, v, max(nu, 1), max(nv, 1))
	return s.finish()
}

// Box returns the six faces of box b as surfaces PREFIX_xmin, PREFIX_xmax,
// PREFIX_ymin, … (xmin, xmax, … when prefix is empty), each n×n cells of two
// triangles. Normals point into the box when inward is true (an enclosure
// seen from inside), else out of it (a solid seen from outside).
func Box(prefix string, b geometry.Box, n int, inward bool) *Mesh {
	n = max(n, 1)
	s := newShape()
	d := b.Diagonal()
	ex := geometry.Vec3{X: d.X}
	ey := geometry.Vec3{Y: d.Y}
	ez := geometry.Vec3{Z: d.Z}
	if prefix != "" {
		prefix += "_"
	}
	// Each face's (u, v) gives an outward front u×v; inward swaps them.
	faces := []struct {
		name string
		o    geometry.Vec3
		u, v geometry.Vec3
	}{
		{"xmin", b.Min, ez, ey},
		{"xmax", b.Min.Add(ex), ey, ez},
		{"ymin", b.Min, ex, ez},
		{"ymax", b.Min.Add(ey), ez, ex},
		{"zmin", b.Min, ey, ex},
		{"zmax", b.Min.Add(ez), ex, ey},
	}
	for _, f := range faces {
		s.use(prefix + f.name)
		if inward {
			s.grid(f.o, f.v, f.u, n, n)
		} else {
			s.grid(f.o, f.u, f.v, n, n)
		}
	}
	return s.finish()
}

// Sphere returns one surface approximating the sphere of the given centre and
// radius: the faces of a cube, each n×n cells of two triangles (12·n²
// facets), projected onto the sphere. Normals point inward when inward is true.
func Sphere(name string, centre geometry.Vec3, radius float64, n int, inward bool) *Mesh {
	cube := Box("", geometry.Box{Min: geometry.Vec3{X: -1, Y: -1, Z: -1}, Max: geometry.Vec3{X: 1, Y: 1, Z: 1}}, n, inward)
	s := newShape()
	s.use(name)
	for _, f := range cube.Facets {
		var id [3]int32
		for k, v := range f {
			id[k] = s.vertex(centre.Add(cube.Vertices[v].Normalize().Scale(radius)))
		}
		s.add(id[0], id[1], id[2], 0)
	}
	return s.finish()
}

// ring returns the point at angle a on the circle of radius r about c in the
// plane spanned by unit vectors e1, e2.
func ring(c, e1, e2 geometry.Vec3, r, a float64) geometry.Vec3 {
	return c.Add(e1.Scale(r * math.Cos(a))).Add(e2.Scale(r * math.Sin(a)))
}

// basis returns unit vectors e1, e2 with e1×e2 = n/|n|.
func basis(n geometry.Vec3) (e1, e2 geometry.Vec3) {
	n = n.Normalize()
	a := geometry.Vec3{X: 1}
	if math.Abs(n.X) > 0.9 {
		a = geometry.Vec3{Y: 1}
	}
	e1 = a.Sub(n.Scale(a.Dot(n))).Normalize()
	return e1, n.Cross(e1)
}

// disk adds a disk of nr rings and ns sectors to the current surface.
func (s shape) disk(c, normal geometry.Vec3, r float64, nr, ns int) {
	e1, e2 := basis(normal)
	centre := s.vertex(c)
	at := func(i, j int) int32 {
		return s.vertex(ring(c, e1, e2, r*float64(i)/float64(nr), 2*math.Pi*float64(j%ns)/float64(ns)))
	}
	for j := range ns {
		s.add(centre, at(1, j), at(1, j+1), 0)
		for i := 1; i < nr; i++ {
			a, b, cc, d := at(i, j), at(i+1, j), at(i+1, j+1), at(i, j+1)
			s.add(a, b, cc, 0)
			s.add(a, cc, d, 0)
		}
	}
}

// Disk returns one surface: the disk of the given centre and radius facing
// normal, as nr rings of ns sectors (ns·(2nr−1) facets). Its outline is the
// regular ns-gon inscribed in the circle.
func Disk(name string, centre, normal geometry.Vec3, radius float64, nr, ns int) *Mesh {
	s := newShape()
	s.use(name)
	s.disk(centre, normal, radius, max(nr, 1), max(ns, 3))
	return s.finish()
}

// Cylinder returns the side of the cylinder of the given radius whose axis
// runs from base to base+axis, as na segments around and nl along
// (2·na·nl facets), named name. With caps it also has the end disks
// NAME_bottom and NAME_top (one ring each), sharing the rim vertices, so the
// whole is closed. Normals point into the cylinder when inward is true.
func Cylinder(name string, base, axis geometry.Vec3, radius float64, na, nl int, caps, inward bool) *Mesh {
	na, nl = max(na, 3), max(nl, 1)
	s := newShape()
	e1, e2 := basis(axis)
	at := func(i, j int) int32 {
		return s.vertex(ring(base.Add(axis.Scale(float64(i)/float64(nl))), e1, e2, radius, 2*math.Pi*float64(j%na)/float64(na)))
	}
	tri := func(a, b, c int32) {
		if inward {
			a, c = c, a
		}
		s.add(a, b, c, 0)
	}
	s.use(name)
	for i := range nl {
		for j := range na {
			a, b, c, d := at(i, j), at(i, j+1), at(i+1, j+1), at(i+1, j)
			tri(a, b, c)
			tri(a, c, d)
		}
	}
	if caps {
		s.use(name + "_bottom")
		cb := s.vertex(base)
		for j := range na {
			tri(cb, at(0, j+1), at(0, j))
		}
		s.use(name + "_top")
		ct := s.vertex(base.Add(axis))
		for j := range na {
			tri(ct, at(nl, j), at(nl, j+1))
		}
	}
	return s.finish()
}

// Merge returns one surface called name holding the facets of all parts,
// with coincident vertices shared (so pieces built side by side join
// without open edges).
func Merge(name string, parts ...*Mesh) *Mesh {
	s := newShape()
	s.use(name)
	for _, p := range parts {
		for f := range p.Facets {
			t := p.Triangle(f)
			s.add(s.vertex(t.V0), s.vertex(t.V1), s.vertex(t.V2), 0)
		}
	}
	return s.finish()
}

// Scaled returns a copy of m with every coordinate multiplied by k (to
// write files in other units).
func Scaled(m *Mesh, k float64) *Mesh {
	out := *m
	out.Vertices = make([]geometry.Vec3, len(m.Vertices))
	for i, v := range m.Vertices {
		out.Vertices[i] = v.Scale(k)
	}
	out.Surfaces = append([]Surface(nil), m.Surfaces...)
	for i := range out.Surfaces {
		out.Surfaces[i].Area *= k * k
	}
	return &out
}
