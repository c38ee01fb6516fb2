package render

import (
	"image/color"
	"math"
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
	img := HeatMap("view factor F(row → column)", []string{"a", "b"}, []string{"a", "b", "ambient"}, [][]float64{{0, 0.5, 0.5}, {0.25, 0, 0.75}}, false)
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
	cam := Frame(m.Bounds(), View{Azimuth: 35, Elevation: 25}, 1024, 768)
	b.ResetTimer()
	for b.Loop() {
		Render(s, cam, 0)
	}
}

// With Up = "y" the picture's up is +y: an outward box seen from 0°, 0°
// shows face zmax at the centre and ymax above it.
func TestUpAxisY(t *testing.T) {
	m := mesh.Box("", geometry.Box{Min: geometry.Vec3{X: -1, Y: -1, Z: -1}, Max: geometry.Vec3{X: 1, Y: 1, Z: 1}}, 3, false)
	cam := Frame(m.Bounds(), View{Azimuth: 0, Elevation: 30, Up: "y"}, 201, 201)
	img := Render(scene(m), cam, 1)
	if got, want := img.RGBAAt(100, 130), SurfaceColor(m.SurfaceIndex("zmax")); !sameHue(got, want) {
		t.Errorf("below the centre: %v, want zmax's hue %v", got, want)
	}
	if got, want := img.RGBAAt(100, 70), SurfaceColor(m.SurfaceIndex("ymax")); !sameHue(got, want) {
		t.Errorf("above the centre: %v, want ymax's hue %v", got, want)
	}
}

// sameHue reports whether a shaded colour is a darkening of want.
func sameHue(got, want color.RGBA) bool {
	k := float64(int(got.R)+int(got.G)+int(got.B)) / float64(int(want.R)+int(want.G)+int(want.B))
	d := func(g, w uint8) float64 { return float64(g) - k*float64(w) }
	return math.Abs(d(got.R, want.R)) < 4 && math.Abs(d(got.G, want.G)) < 4 && math.Abs(d(got.B, want.B)) < 4
}

// Round ticks: steps of 1, 2 or 5 × 10^k inside the range (Heckbert 1990).
func TestNiceTicks(t *testing.T) {
	tests := []struct {
		lo, hi float64
		want   []float64
	}{
		{0, 1, []float64{0, 0.2, 0.4, 0.6, 0.8, 1}},
		{-55.75, 476.19, []float64{0, 100, 200, 300, 400}},
		{298.1, 381.3, []float64{300, 320, 340, 360, 380}},
	}
	for _, tc := range tests {
		got := NiceTicks(tc.lo, tc.hi, 5)
		if len(got) != len(tc.want) {
			t.Errorf("NiceTicks(%v, %v) = %v, want %v", tc.lo, tc.hi, got, tc.want)
			continue
		}
		for k := range got {
			if math.Abs(got[k]-tc.want[k]) > 1e-12 {
				t.Errorf("NiceTicks(%v, %v) = %v, want %v", tc.lo, tc.hi, got, tc.want)
				break
			}
		}
	}
}

// The diverging map is grey at zero, blue below, red above, and its
// lightness falls symmetrically from the middle.
func TestDiverging(t *testing.T) {
	if c := Diverging(0.5); c.R != c.G || c.G != c.B {
		t.Errorf("zero is %v, want grey", c)
	}
	if lo, hi := Diverging(0), Diverging(1); !(lo.B > lo.R && hi.R > hi.B) {
		t.Errorf("ends %v %v", lo, hi)
	}
	for k := 1; k <= 50; k++ {
		a, b := luminance(Diverging(0.5-float64(k)/100)), luminance(Diverging(0.5-float64(k-1)/100))
		if a > b {
			t.Fatalf("lightness rises toward the cool end at %d", k)
		}
	}
}
