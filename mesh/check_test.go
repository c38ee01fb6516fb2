package mesh

import (
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/hemiray/hemiray/geometry"
)

// findings maps check name to count.
func findings(r Report) map[string]int {
	out := map[string]int{}
	for _, f := range r.Findings {
		out[f.Check] = f.Count
	}
	return out
}

func TestCheckDefects(t *testing.T) {
	closedBox := func() *Mesh {
		return Box("", geometry.Box{Max: geometry.Vec3{X: 1, Y: 1, Z: 1}}, 1, false)
	}
	tests := []struct {
		name  string
		build func() *Mesh
		want  map[string]int
	}{
		{"closed box", closedBox, map[string]int{}},
		{"flipped facet", func() *Mesh {
			m := closedBox()
			f := &m.Facets[0]
			f[1], f[2] = f[2], f[1]
			return m
		}, map[string]int{"winding": 3}},
		{"hole", func() *Mesh {
			m := closedBox()
			last := len(m.Facets) - 1
			m.Facets, m.SurfaceOf = m.Facets[:last], m.SurfaceOf[:last]
			s := &m.Surfaces[len(m.Surfaces)-1]
			s.Facets = s.Facets[:len(s.Facets)-1]
			return m
		}, map[string]int{"open-edges": 3}},
		{"duplicate", func() *Mesh {
			m := closedBox()
			m.Facets = append(m.Facets, m.Facets[1])
			m.SurfaceOf = append(m.SurfaceOf, 0)
			return m
		}, map[string]int{"duplicate": 1, "non-manifold": 3}},
		{"degenerate and NaN", func() *Mesh {
			m := closedBox()
			v := int32(len(m.Vertices))
			m.Vertices = append(m.Vertices, geometry.Vec3{X: 5}, geometry.Vec3{X: 6}, geometry.Vec3{X: 7}, geometry.Vec3{X: math.NaN()})
			m.Facets = append(m.Facets, [3]int32{v, v + 1, v + 2}, [3]int32{v, v + 1, v + 3})
			m.SurfaceOf = append(m.SurfaceOf, 0, 0)
			return m
		}, map[string]int{"degenerate": 1, "non-finite": 1, "open-edges": 4, "winding": 1}},
		{"fin (non-manifold)", func() *Mesh {
			m := closedBox()
			// A facet standing on the box's edge from (0,0,0) to (1,0,0).
			v := int32(len(m.Vertices))
			m.Vertices = append(m.Vertices, geometry.Vec3{X: 0.5, Y: -1, Z: -1})
			var b int32
			for i, p := range m.Vertices {
				if p == (geometry.Vec3{}) {
					b = int32(i)
				}
			}
			var c int32
			for i, p := range m.Vertices {
				if p == (geometry.Vec3{X: 1}) {
					c = int32(i)
				}
			}
			m.Facets = append(m.Facets, [3]int32{b, c, v})
			m.SurfaceOf = append(m.SurfaceOf, 0)
			return m
		}, map[string]int{"non-manifold": 1, "open-edges": 2}},
		{"zero-area surface", func() *Mesh {
			m := closedBox()
			m.Surfaces = append(m.Surfaces, Surface{Name: "ghost", Source: -1, Facets: []int32{0}, Area: 0})
			return m
		}, map[string]int{"zero-area-surface": 1}},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			r := Check(tc.build())
			got := findings(r)
			for k, want := range tc.want {
				if got[k] != want {
					t.Errorf("%s = %d, want %d (all %v)", k, got[k], want, got)
				}
			}
			for k := range got {
				if _, ok := tc.want[k]; !ok {
					t.Errorf("unexpected finding %s = %d", k, got[k])
				}
			}
			edgesOK := got["open-edges"]+got["non-manifold"]+got["winding"] == 0
			if r.Closed != edgesOK {
				t.Errorf("Closed = %v", r.Closed)
			}
		})
	}
}

func TestCheckExamplesNameFileAndLine(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, "flip.obj")
	// Two triangles sharing edge 2-3 with the same direction: one is flipped.
	os.WriteFile(path, []byte("v 0 0 0\nv 1 0 0\nv 0 1 0\nv 1 1 0\ng a\nf 1 2 3\n# flipped:\nf 2 3 4\n"), 0o644)
	m := load(t, path, LoadOptions{})
	r := Check(m)
	for _, f := range r.Findings {
		if f.Check == "winding" {
			if len(f.Examples) == 0 || !strings.HasSuffix(f.Examples[0], "flip.obj:6") {
				t.Errorf("winding examples = %v, want flip.obj:6", f.Examples)
			}
			if r.Surfaces[0].Winding {
				t.Error("surface a reported as consistently wound")
			}
			return
		}
	}
	t.Errorf("no winding finding in %+v", r.Findings)
}

// A closed box's normals are reported inward or outward (its signed
// volume); edges shared by two surfaces of the box are no holes in either.
func TestCheckOrientationAndSharedEdges(t *testing.T) {
	for _, inward := range []bool{true, false} {
		r := Check(Box("", geometry.Box{Max: geometry.Vec3{X: 1, Y: 2, Z: 3}}, 2, inward))
		want := map[bool]string{true: "inward", false: "outward"}[inward]
		if !r.Closed || r.Normals != want {
			t.Errorf("inward=%v: closed %v, normals %q", inward, r.Closed, r.Normals)
		}
		for _, s := range r.Surfaces {
			if s.Open != 0 {
				t.Errorf("surface %s of a closed box has %d boundary edges", s.Name, s.Open)
			}
		}
	}
}
