package mesh

import (
	"bytes"
	"math"
	"os"
	"path/filepath"
	"testing"
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
		}
	})
}
