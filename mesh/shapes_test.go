package mesh

import (
	"math"
	"testing"

	"github.com/hemiray/hemiray/geometry"
)

func close(a, b, rel float64) bool { return math.Abs(a-b) <= rel*math.Max(math.Abs(a), math.Abs(b)) }

func TestShapeAreasAndCounts(t *testing.T) {
	box := geometry.Box{Min: geometry.Vec3{X: -1, Y: 0, Z: 2}, Max: geometry.Vec3{X: 2, Y: 0.5, Z: 4}}
	tests := []struct {
		name   string
		m      *Mesh
		facets int
		area   float64 // exact area of the tessellated shape
		closed bool
	}{
		// Parallelogram: |u×v| (elementary vector geometry).
		{"rectangle", Rectangle("r", geometry.Vec3{}, geometry.Vec3{X: 3}, geometry.Vec3{X: 1, Y: 2}, 4, 5), 40, 6, false},
		// Box: 2(ab+bc+ca) for sides 3, 0.5, 2.
		{"box outward", Box("", box, 3, false), 108, 2 * (3*0.5 + 0.5*2 + 2*3), true},
		{"box inward", Box("b", box, 2, true), 48, 2 * (3*0.5 + 0.5*2 + 2*3), true},
		// Disk outline is the inscribed regular n-gon: A = (n/2) r² sin(2π/n).
		{"disk", Disk("d", geometry.Vec3{}, geometry.Vec3{X: 1, Y: 1, Z: 1}, 2, 3, 32), 32 * 5, 16 * 4 * math.Sin(2*math.Pi/32), false},
		// Prism side: n · (2 r sin(π/n)) · h; caps: two inscribed n-gons.
		{"cylinder", Cylinder("c", geometry.Vec3{}, geometry.Vec3{Z: 3}, 0.5, 24, 4, false, false), 2 * 24 * 4, 24 * 2 * 0.5 * math.Sin(math.Pi/24) * 3, false},
		{"closed cylinder", Cylinder("c", geometry.Vec3{}, geometry.Vec3{Y: 3}, 0.5, 24, 4, true, true), 2*24*4 + 48,
			24*2*0.5*math.Sin(math.Pi/24)*3 + 2*12*0.25*math.Sin(2*math.Pi/24), true},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			if got := len(tc.m.Facets); got != tc.facets {
				t.Errorf("facets = %d, want %d", got, tc.facets)
			}
			if got := tc.m.TotalArea(); !close(got, tc.area, 1e-12) {
				t.Errorf("area = %.15g, want %.15g", got, tc.area)
			}
			r := Check(tc.m)
			if r.Closed != tc.closed {
				t.Errorf("closed = %v, want %v; findings %+v", r.Closed, tc.closed, r.Findings)
			}
			for _, s := range r.Surfaces {
				if !s.Winding {
					t.Errorf("surface %s has inconsistent winding", s.Name)
				}
			}
		})
	}
}

func TestSphereConvergesToExactArea(t *testing.T) {
	// A polyhedron inscribed in a sphere has less area than 4πr², and the gap
	// shrinks like 1/n² (common practice for inscribed tessellations).
	const r = 1.5
	exact := 4 * math.Pi * r * r
	prevGap := math.Inf(1)
	for _, n := range []int{4, 8, 16, 32} {
		m := Sphere("s", geometry.Vec3{X: 1}, r, n, false)
		if len(m.Facets) != 12*n*n {
			t.Fatalf("n=%d: facets = %d, want %d", n, len(m.Facets), 12*n*n)
		}
		gap := (exact - m.TotalArea()) / exact
		if gap <= 0 || gap >= prevGap/3 {
			t.Errorf("n=%d: relative area gap %.3g, want in (0, %.3g)", n, gap, prevGap/3)
		}
		prevGap = gap
		if rep := Check(m); !rep.Closed {
			t.Errorf("n=%d: sphere not closed: %+v", n, rep.Findings)
		}
	}
}

func TestBoxNormalsPointAsAsked(t *testing.T) {
	b := geometry.Box{Max: geometry.Vec3{X: 1, Y: 1, Z: 1}}
	for _, inward := range []bool{false, true} {
		m := Box("", b, 2, inward)
		c := b.Center()
		for f := range m.Facets {
			tr := m.Triangle(f)
			out := tr.Centroid().Sub(c).Dot(tr.Normal()) > 0
			if out == inward {
				t.Fatalf("inward=%v: facet %d normal %v points the wrong way", inward, f, tr.Normal())
			}
		}
	}
}

// Renaming keeps every facet and area; two groups renamed alike become one
// surface; a clash with a surface not renamed is refused.
func TestRenameSurfaces(t *testing.T) {
	m := Box("", geometry.Box{Max: geometry.Vec3{X: 1, Y: 2, Z: 3}}, 1, true)
	area := m.TotalArea()
	if err := m.RenameSurfaces(map[string]string{"xmin": "walls", "xmax": "walls", "zmin": "floor"}); err != nil {
		t.Fatal(err)
	}
	w := m.SurfaceIndex("walls")
	if len(m.Surfaces) != 5 || w < 0 || m.Surfaces[w].Area != 12 || m.SurfaceIndex("floor") < 0 || m.TotalArea() != area {
		t.Errorf("surfaces %+v", m.Surfaces)
	}
	for _, f := range m.Surfaces[w].Facets {
		if m.SurfaceOf[f] != int32(w) {
			t.Fatalf("facet %d still in surface %d", f, m.SurfaceOf[f])
		}
	}
	if err := m.RenameSurfaces(map[string]string{"ymin": "floor"}); err == nil {
		t.Error("renaming onto an existing surface was accepted")
	}
	if err := m.RenameSurfaces(map[string]string{"roof": "top"}); err == nil {
		t.Error("renaming a missing surface was accepted")
	}
}
