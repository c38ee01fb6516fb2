package render

import (
	"image/color"
	"testing"

	"github.com/hemiray/hemiray/geometry"
	"github.com/hemiray/hemiray/mesh"
	"github.com/hemiray/hemiray/raytrace/bvh"
)

func scene(m *mesh.Mesh) Scene {
	n := make([]geometry.Vec3, len(m.Facets))
	for f := range m.Facets {
		n[f] = m.Triangle(f).Normal()
	}
	return Scene{
		Tree:   bvh.Build(m.Vertices, m.Facets, bvh.Options{}),
		Normal: n,
		Color:  func(f int32, front bool) color.RGBA { return SurfaceColor(int(m.SurfaceOf[f])) },
	}
}

// A known layout: an outward box seen from +x; the pixel at the centre of
// the picture shows face xmax head on (|n·d| = 1, full colour).
func TestCentrePixelShowsTheFacedSurface(t *testing.T) {
	m := mesh.Box("", geometry.Box{Min: geometry.Vec3{X: -1, Y: -1, Z: -1}, Max: geometry.Vec3{X: 1, Y: 1, Z: 1}}, 3, false)
	for _, v := range []struct {
		view string
		face string
	}{{"+x", "xmax"}, {"-y", "ymin"}, {"+z", "zmax"}} {
		view, _ := ParseView(v.view)
		cam := Frame(m.Bounds(), view, 321, 201)
		img := Render(scene(m), cam, 2)
		if b := img.Bounds(); b.Dx() != 321 || b.Dy() != 201 {
			t.Fatalf("image %v, want 321×201", b)
		}
		got := img.RGBAAt(160, 100)
		want := SurfaceColor(m.SurfaceIndex(v.face))
		if got != want {
			t.Errorf("view %s: centre pixel %v, want %s's colour %v", v.view, got, v.face, want)
		}
		if c := img.RGBAAt(0, 0); c != Background {
			t.Errorf("view %s: corner pixel %v, want the background", v.view, c)
		}
	}
}

// The colour bar's colours get lighter monotonically from bottom to top
// (viridis is designed with monotonically increasing lightness).
func TestColorBarMonotonic(t *testing.T) {
	prev := -1.0
	for k := 0; k <= 100; k++ {
		l := luminance(Viridis(float64(k) / 100))
		if l <= prev {
			t.Fatalf("luminance falls at t=%.2f: %v after %v", float64(k)/100, l, prev)
		}
		prev = l
	}
	// Endpoints of the published viridis table: #440154 and #FDE725 (from memory).
	if c := Viridis(0); absDiff(c.R, 0x44) > 4 || absDiff(c.G, 0x01) > 4 || absDiff(c.B, 0x54) > 4 {
		t.Errorf("viridis(0) = %v, want #440154", c)
	}
	if c := Viridis(1); absDiff(c.R, 0xFD) > 4 || absDiff(c.G, 0xE7) > 4 || absDiff(c.B, 0x25) > 4 {
		t.Errorf("viridis(1) = %v, want #FDE725", c)
	}
	img := HeatMap([]string{"a", "b"}, []string{"a", "b", "ambient"}, [][]float64{{0, 0.5, 0.5}, {0.25, 0, 0.75}}, false)
	// The bar in the heat map runs dark (bottom) to light (top).
	x := img.Bounds().Max.X - 91
	top, bottom := img.RGBAAt(x, 45), img.RGBAAt(x, img.Bounds().Max.Y-35)
	if luminance(top) <= luminance(bottom) {
		t.Errorf("colour bar top %v is not lighter than bottom %v", top, bottom)
	}
}

func absDiff(a, b uint8) int {
	if a > b {
		return int(a - b)
	}
	return int(b - a)
}

func BenchmarkRender(b *testing.B) {
	m := mesh.Sphere("s", geometry.Vec3{}, 1, 289, false) // 1,002,252 facets
	s := scene(m)
	cam := Frame(m.Bounds(), View{35, 25}, 1024, 768)
	b.ResetTimer()
	for b.Loop() {
		Render(s, cam, 0)
	}
}
