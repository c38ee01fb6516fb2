package mesh

import (
	"bytes"
	"math"
	"os"
	"path/filepath"
	"testing"

	"github.com/hemiray/hemiray/geometry"
)

func seedFuzz(f *testing.F, ext string) {
	files, _ := filepath.Glob(filepath.Join("..", "testdata", "*"+ext))
	for _, p := range files {
		if b, err := os.ReadFile(p); err == nil {
			f.Add(b)
		}
	}
}

// validMesh is the property every successful read must have.
func validMesh(t *testing.T, m *Mesh) {
	for f, v := range m.Facets {
		for _, i := range v {
			if i < 0 || int(i) >= len(m.Vertices) {
				t.Fatalf("facet %d index %d out of range [0,%d)", f, i, len(m.Vertices))
			}
		}
		if a := m.FacetArea(f); math.IsNaN(a) || math.IsInf(a, 0) {
			t.Fatalf("facet %d area %v", f, a)
		}
		if s := m.SurfaceOf[f]; s < 0 || int(s) >= len(m.Surfaces) {
			t.Fatalf("facet %d surface %d out of range", f, s)
		}
	}
	Check(m)
}

func FuzzReadSTL(f *testing.F) {
	seedFuzz(f, ".stl")
	f.Fuzz(func(t *testing.T, b []byte) {
		if len(b) > 1<<20 {
			return
		}
		m, err := ReadSTL(bytes.NewReader(b), "fuzz.stl", Metre)
		if err == nil {
			validMesh(t, m)
			roundTrip(t, m, func(w *bytes.Buffer) error { return WriteSTL(w, m, "fuzz") },
				func(r *bytes.Reader) (*Mesh, error) { return ReadSTL(r, "again.stl", Metre) }, true)
		}
	})
}

func FuzzReadOBJ(f *testing.F) {
	seedFuzz(f, ".obj")
	f.Fuzz(func(t *testing.T, b []byte) {
		if len(b) > 1<<16 {
			return // ear clipping is quadratic per polygon; keep runs fast
		}
		m, err := ReadOBJ(bytes.NewReader(b), "fuzz.obj", OBJOptions{Unit: Metre})
		if err == nil {
			validMesh(t, m)
			roundTrip(t, m, func(w *bytes.Buffer) error { return WriteOBJ(w, m) },
				func(r *bytes.Reader) (*Mesh, error) { return ReadOBJ(r, "again.obj", OBJOptions{Unit: Metre}) }, false)
		}
	})
}

// roundTrip writes m and reads it back: the same facets with the same
// corners, in the same order within each surface (binary STL keeps one
// solid and float32 corners).
func roundTrip(t *testing.T, m *Mesh, write func(*bytes.Buffer) error, read func(*bytes.Reader) (*Mesh, error), float32Corners bool) {
	var b bytes.Buffer
	if err := write(&b); err != nil {
		t.Fatalf("write: %v", err)
	}
	m2, err := read(bytes.NewReader(b.Bytes()))
	if err != nil {
		t.Fatalf("reading back what was written: %v", err)
	}
	if len(m2.Facets) != len(m.Facets) {
		t.Fatalf("%d facets read back, %d written", len(m2.Facets), len(m.Facets))
	}
	var order []int
	for _, s := range m.Surfaces {
		for _, f := range s.Facets {
			order = append(order, int(f))
		}
	}
	if float32Corners {
		order = order[:0]
		for f := range m.Facets {
			order = append(order, f)
		}
	}
	round := func(v geometry.Vec3) geometry.Vec3 {
		if float32Corners {
			return geometry.Vec3{X: float64(float32(v.X)), Y: float64(float32(v.Y)), Z: float64(float32(v.Z))}
		}
		return v
	}
	for k, f := range order {
		a, b := m.Triangle(f), m2.Triangle(k)
		if round(a.V0) != b.V0 || round(a.V1) != b.V1 || round(a.V2) != b.V2 {
			t.Fatalf("facet %d written as %v, read back as %v", f, a, b)
		}
	}
}
