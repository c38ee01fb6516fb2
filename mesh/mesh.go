package mesh

import (
	"fmt"
	"math"

	"github.com/hemiray/hemiray/geometry"
)

// Mesh is a set of triangular facets over shared vertices, grouped into surfaces.
type Mesh struct {
	Vertices []geometry.Vec3 // metres
	Facets   [][3]int32      // vertex indices, counter-clockwise seen from the front
	// SurfaceOf[f] is the index into Surfaces of facet f.
	SurfaceOf []int32
	// Origin[f] says where facet f was read from (Source −1 for built
	// shapes); it may be empty when no facet was read from a file.
	Origin   []Origin
	Surfaces []Surface
	// Sources lists the files the mesh was read from, in load order.
	Sources []Source
}

// Surface is a named group of facets: one radiation surface of the model.
type Surface struct {
	Name   string
	Source int     // index into Mesh.Sources, or -1 for built shapes
	Facets []int32 // facet indices, in input order
	Area   float64 // m²
}

// Origin locates a facet in its input: Line is the line of its face (OBJ)
// or of its "facet" keyword (ASCII STL), or its 1-based number in a binary STL.
type Origin struct {
	Source int32
	Line   int32
}

// Source describes one input file.
type Source struct {
	Path   string
	Format string // "stl-binary", "stl-ascii" or "obj"
	Unit   Unit
	Facets int
	// Ignored counts the input lines that carry no geometry hemiray uses
	// (OBJ texture coordinates, normals, smoothing groups, …), by keyword.
	Ignored map[string]int
}

// Triangle returns facet f as a geometry.Triangle.
func (m *Mesh) Triangle(f int) geometry.Triangle {
	v := m.Facets[f]
	return geometry.Triangle{V0: m.Vertices[v[0]], V1: m.Vertices[v[1]], V2: m.Vertices[v[2]]}
}

// FacetArea returns the area of facet f in m².
func (m *Mesh) FacetArea(f int) float64 { return m.Triangle(f).Area() }

// TotalArea returns the sum of all surface areas in m².
func (m *Mesh) TotalArea() float64 {
	a := 0.0
	for _, s := range m.Surfaces {
		a += s.Area
	}
	return a
}

// Bounds returns the bounding box of the vertices used by facets.
func (m *Mesh) Bounds() geometry.Box {
	b := geometry.EmptyBox()
	for _, f := range m.Facets {
		for _, v := range f {
			b = b.Extend(m.Vertices[v])
		}
	}
	return b
}

// SurfaceIndex returns the index of the surface called name, or -1.
func (m *Mesh) SurfaceIndex(name string) int {
	for i, s := range m.Surfaces {
		if s.Name == name {
			return i
		}
	}
	return -1
}

// Where describes where facet f came from, for messages: "box.obj:12",
// "part.stl facet 7", or "facet 7 of surface top" for built shapes.
func (m *Mesh) Where(f int) string {
	if f < len(m.Origin) && m.Origin[f].Source >= 0 && int(m.Origin[f].Source) < len(m.Sources) {
		o := m.Origin[f]
		s := m.Sources[o.Source]
		if s.Format != "stl-binary" {
			return fmt.Sprintf("%s:%d", s.Path, o.Line)
		}
		return fmt.Sprintf("%s facet %d", s.Path, o.Line)
	}
	return fmt.Sprintf("facet %d of surface %s", f, m.Surfaces[m.SurfaceOf[f]].Name)
}

// Append adds the facets and surfaces of o to m, renumbering vertices and
// sources. A surface name present in both is an error naming both origins.
func (m *Mesh) Append(o *Mesh) error {
	for _, s := range o.Surfaces {
		if i := m.SurfaceIndex(s.Name); i >= 0 {
			return fmt.Errorf("surface %q is defined by both %s and %s; give one of them another name",
				s.Name, m.sourceName(m.Surfaces[i].Source), o.sourceName(s.Source))
		}
	}
	vOff, fOff := int32(len(m.Vertices)), int32(len(m.Facets))
	sOff, srcOff := int32(len(m.Surfaces)), int32(len(m.Sources))
	m.Vertices = append(m.Vertices, o.Vertices...)
	for _, f := range o.Facets {
		m.Facets = append(m.Facets, [3]int32{f[0] + vOff, f[1] + vOff, f[2] + vOff})
	}
	for _, s := range o.SurfaceOf {
		m.SurfaceOf = append(m.SurfaceOf, s+sOff)
	}
	// Origins stay aligned with facets; meshes that were never read from
	// a file need none.
	if len(m.Origin) > 0 || len(o.Origin) > 0 {
		for len(m.Origin) < int(fOff) {
			m.Origin = append(m.Origin, Origin{Source: -1})
		}
		for f := range o.Facets {
			or := Origin{Source: -1}
			if f < len(o.Origin) && o.Origin[f].Source >= 0 {
				or = Origin{Source: o.Origin[f].Source + srcOff, Line: o.Origin[f].Line}
			}
			m.Origin = append(m.Origin, or)
		}
	}
	for _, s := range o.Surfaces {
		facets := make([]int32, len(s.Facets))
		for k, f := range s.Facets {
			facets[k] = f + fOff
		}
		src := s.Source
		if src >= 0 {
			src += int(srcOff)
		}
		m.Surfaces = append(m.Surfaces, Surface{Name: s.Name, Source: src, Facets: facets, Area: s.Area})
	}
	m.Sources = append(m.Sources, o.Sources...)
	return nil
}

func (m *Mesh) sourceName(src int) string {
	if src >= 0 && src < len(m.Sources) {
		return m.Sources[src].Path
	}
	return "a built shape"
}

// FlipSurface reverses the winding of every facet of surface s, turning its
// front to the other side (for CAD exports whose normals point the wrong way).
func (m *Mesh) FlipSurface(s int) {
	for _, f := range m.Surfaces[s].Facets {
		v := &m.Facets[f]
		v[1], v[2] = v[2], v[1]
	}
}

// AreaOf returns the total area of the given facets, summed with
// Neumaier's compensated summation (Neumaier, "Rundungsfehleranalyse
// einiger Verfahren zur Summation endlicher Summen", ZAMM 54, 1974; from
// memory): a surface of many small facets then reads 0.28 m², not
// 0.27999999999999764.
func (m *Mesh) AreaOf(facets []int32) float64 {
	sum, c := 0.0, 0.0
	for _, f := range facets {
		a := m.FacetArea(int(f))
		t := sum + a
		if math.Abs(sum) >= math.Abs(a) {
			c += (sum - t) + a
		} else {
			c += (a - t) + sum
		}
		sum = t
	}
	return sum + c
}

// RenameSurfaces renames surfaces: names maps an old name to a new one.
// Old names that map to one new name become one surface (their facets in
// surface order), so several mesh groups can make one radiation node. A
// name not in the model, or a new name that is already another surface's,
// is an error.
func (m *Mesh) RenameSurfaces(names map[string]string) error {
	for old, nw := range names {
		if m.SurfaceIndex(old) < 0 {
			return fmt.Errorf("no surface %q to rename", old)
		}
		if i := m.SurfaceIndex(nw); i >= 0 {
			if _, renamed := names[nw]; !renamed && nw != old {
				return fmt.Errorf("cannot rename %q to %q: a surface of that name exists (rename it too, or rename %q to it as well to combine them)", old, nw, nw)
			}
		}
		if nw == "" {
			return fmt.Errorf("cannot rename %q to an empty name", old)
		}
	}
	var out []Surface
	index := map[string]int{}
	remap := make([]int32, len(m.Surfaces))
	for i, s := range m.Surfaces {
		name := s.Name
		if nw, ok := names[name]; ok {
			name = nw
		}
		k, seen := index[name]
		if !seen {
			k = len(out)
			index[name] = k
			out = append(out, Surface{Name: name, Source: s.Source})
		} else if out[k].Source != s.Source {
			out[k].Source = -1 // combined from several files
		}
		out[k].Facets = append(out[k].Facets, s.Facets...)
		remap[i] = int32(k)
	}
	for f, s := range m.SurfaceOf {
		m.SurfaceOf[f] = remap[s]
	}
	for k := range out {
		out[k].Area = m.AreaOf(out[k].Facets)
	}
	m.Surfaces = out
	return nil
}
