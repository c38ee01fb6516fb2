package raytrace

import (
	"fmt"
	"math"
	"strings"

	"github.com/hemiray/hemiray/geometry"
	"github.com/hemiray/hemiray/mesh"
)

// Node grouping: how a surface's facets are split into radiation nodes
// when one node per surface is too coarse for the analyst's thermal model
// and one per facet too fine. Settings.Split gives, per surface,
//
//	"grid NxM"  an N × M grid over the surface's extent (the two axes along
//	            which it is largest): node NAME[i,j], by facet centroid;
//	"patches"   one node per connected patch (facets sharing an edge):
//	            NAME~1, NAME~2, … in the order of their first facet;
//
// and Options.NodeOf names the node of single facets (a facet → node map
// file). Empty cells and patches make no node. The two sides of a two-sided
// surface are split alike (NAME[i,j] and NAME[i,j].back).

// groups returns, for the facets of surface s, the name of the node each
// belongs to; nil means the surface is one node.
func groups(m *mesh.Mesh, s int, split string, nodeOf []string) ([]string, error) {
	surf := &m.Surfaces[s]
	var names []string
	switch {
	case split == "":
	case split == "patches":
		names = patches(m, surf)
	case strings.HasPrefix(split, "grid "):
		var nx, ny int
		if _, err := fmt.Sscanf(split, "grid %dx%d", &nx, &ny); err != nil || nx < 1 || ny < 1 || nx*ny > 1<<20 {
			return nil, fmt.Errorf("surface %s: split %q: give \"grid NxM\" with N, M ≥ 1 (at most 2^20 cells) or \"patches\"", surf.Name, split)
		}
		names = grid(m, surf, nx, ny)
	default:
		return nil, fmt.Errorf("surface %s: split %q: give \"grid NxM\" or \"patches\"", surf.Name, split)
	}
	if nodeOf != nil {
		for k, f := range surf.Facets {
			if n := nodeOf[f]; n != "" {
				if names == nil {
					names = make([]string, len(surf.Facets))
					for i := range names {
						names[i] = surf.Name
					}
				}
				names[k] = n
			}
		}
	}
	return names, nil
}

// grid assigns each facet to the cell of an nx × ny grid over the two
// largest extents of the surface, by its centroid.
func grid(m *mesh.Mesh, surf *mesh.Surface, nx, ny int) []string {
	b := geometry.EmptyBox()
	for _, f := range surf.Facets {
		t := m.Triangle(int(f))
		b = b.Union(geometry.Box{Min: t.V0, Max: t.V0}).Union(geometry.Box{Min: t.V1, Max: t.V1}).Union(geometry.Box{Min: t.V2, Max: t.V2})
	}
	ext := b.Max.Sub(b.Min)
	e := [3]float64{ext.X, ext.Y, ext.Z}
	u, v := 0, 1 // the two axes of largest extent, u the larger
	for k := range 3 {
		if e[k] > e[u] {
			u = k
		}
	}
	v = (u + 1) % 3
	if w := (u + 2) % 3; e[w] > e[v] {
		v = w
	}
	lo := [3]float64{b.Min.X, b.Min.Y, b.Min.Z}
	cell := func(x float64, k, n int) int {
		if e[k] <= 0 {
			return 0
		}
		return min(n-1, max(0, int(math.Floor(float64(n)*(x-lo[k])/e[k]))))
	}
	names := make([]string, len(surf.Facets))
	for i, f := range surf.Facets {
		c := m.Triangle(int(f)).Centroid()
		p := [3]float64{c.X, c.Y, c.Z}
		names[i] = fmt.Sprintf("%s[%d,%d]", surf.Name, cell(p[u], u, nx), cell(p[v], v, ny))
	}
	return names
}

// patches numbers the connected patches of a surface: facets that share an
// edge (corners matched by position) are in one patch.
func patches(m *mesh.Mesh, surf *mesh.Surface) []string {
	parent := make([]int, len(surf.Facets))
	for i := range parent {
		parent[i] = i
	}
	find := func(i int) int {
		for parent[i] != i {
			parent[i] = parent[parent[i]]
			i = parent[i]
		}
		return i
	}
	type edge [2]geometry.Vec3
	first := map[edge]int{}
	for i, f := range surf.Facets {
		v := m.Facets[f]
		for k := range 3 {
			a, b := m.Vertices[v[k]], m.Vertices[v[(k+1)%3]]
			if less(b, a) {
				a, b = b, a
			}
			if j, ok := first[edge{a, b}]; ok {
				parent[find(i)] = find(j)
			} else {
				first[edge{a, b}] = i
			}
		}
	}
	number := map[int]int{}
	names := make([]string, len(surf.Facets))
	for i := range surf.Facets {
		r := find(i)
		if _, ok := number[r]; !ok {
			number[r] = len(number) + 1
		}
		names[i] = fmt.Sprintf("%s~%d", surf.Name, number[r])
	}
	return names
}

func less(a, b geometry.Vec3) bool {
	if a.X != b.X {
		return a.X < b.X
	}
	if a.Y != b.Y {
		return a.Y < b.Y
	}
	return a.Z < b.Z
}
