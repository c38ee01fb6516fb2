package raytrace

import (
	"context"
	"math"
	"strings"
	"testing"

	"github.com/hemiray/hemiray/geometry"
	"github.com/hemiray/hemiray/mesh"
)

// Opposed unit squares 1 apart with the bottom split 2 × 2: by symmetry
// every quarter sees the top with the whole square's view factor, the
// closed form of Howell's catalogue C-11, and each is a quarter of the
// area. The test holds each quarter to 4 standard errors of C-11.
func TestGridSplitAgainstClosedForm(t *testing.T) {
	v := func(x, y, z float64) geometry.Vec3 { return geometry.Vec3{X: x, Y: y, Z: z} }
	m := &mesh.Mesh{}
	for _, p := range []*mesh.Mesh{
		mesh.Rectangle("bottom", v(0, 0, 0), v(1, 0, 0), v(0, 1, 0), 8, 8),
		mesh.Rectangle("top", v(0, 0, 1), v(0, 1, 0), v(1, 0, 0), 8, 8),
	} {
		if err := m.Append(p); err != nil {
			t.Fatal(err)
		}
	}
	r, err := Estimate(context.Background(), m, Options{Settings: Settings{Rays: 200000, Seed: 3, Split: map[string]string{"bottom": "grid 2x2"}}})
	if err != nil {
		t.Fatal(err)
	}
	want := geometry.FParallelRectangles(1, 1, 1)
	top := r.NodeIndex("top")
	for _, name := range []string{"bottom[0,0]", "bottom[0,1]", "bottom[1,0]", "bottom[1,1]"} {
		i := r.NodeIndex(name)
		if i < 0 {
			t.Fatalf("no node %s among %d nodes", name, len(r.Nodes))
		}
		if a := r.Nodes[i].Area; math.Abs(a-0.25) > 1e-12 {
			t.Errorf("%s has area %v, want 0.25", name, a)
		}
		if f := r.Factor(i, top); math.Abs(f.F-want) > 4*f.StdErr {
			t.Errorf("F(%s → top) = %.5f ± %.5f, C-11 gives %.5f", name, f.F, f.StdErr, want)
		}
	}
	if len(r.Nodes) != 5 {
		t.Errorf("%d nodes, want 4 quarters and the top", len(r.Nodes))
	}
}

// Patches are the connected parts of a surface; a node map names single
// facets; a bad split is refused with the surface's name.
func TestPatchesAndNodeMap(t *testing.T) {
	v := func(x, y, z float64) geometry.Vec3 { return geometry.Vec3{X: x, Y: y, Z: z} }
	m := mesh.Merge("fins", mesh.Rectangle("a", v(0, 0, 0), v(1, 0, 0), v(0, 1, 0), 2, 2),
		mesh.Rectangle("b", v(0, 0, 2), v(1, 0, 0), v(0, 1, 0), 2, 2))
	nodes, err := Nodes(m, Options{Settings: Settings{Split: map[string]string{"fins": "patches"}}})
	if err != nil || len(nodes) != 2 || nodes[0].Name != "fins~1" || nodes[1].Name != "fins~2" || len(nodes[0].Facets) != 8 {
		t.Fatalf("patches: %v, %+v", err, nodes)
	}
	of := make([]string, len(m.Facets))
	of[0], of[1] = "corner", "corner"
	nodes, err = Nodes(m, Options{NodeOf: of})
	if err != nil || len(nodes) != 2 || nodes[0].Name != "corner" || len(nodes[0].Facets) != 2 || nodes[1].Name != "fins" {
		t.Fatalf("node map: %v, %+v", err, nodes)
	}
	if _, err := Nodes(m, Options{Settings: Settings{Split: map[string]string{"fins": "grid 0x3"}}}); err == nil || !strings.Contains(err.Error(), "fins") {
		t.Errorf("a bad split: %v", err)
	}
}
