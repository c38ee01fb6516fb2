package main

import (
	"os"
	"path/filepath"
	"regexp"
	"strings"
	"testing"

	"github.com/hemiray/hemiray/geometry"
	"github.com/hemiray/hemiray/mesh"
)

// The case file shown in README.md is valid as written: given meshes with
// the surfaces it names, it reads without error and means what it says.
func TestReadmeCaseFile(t *testing.T) {
	b := mustRead(t, filepath.Join("..", "..", "README.md"))
	m := regexp.MustCompile("(?s)```toml\n(.*?)```").FindSubmatch(b)
	if m == nil {
		t.Fatal("README.md has no toml block")
	}
	dir := t.TempDir()
	os.WriteFile(filepath.Join(dir, "case.toml"), m[1], 0o644)
	v := func(x, y, z float64) geometry.Vec3 { return geometry.Vec3{X: x, Y: y, Z: z} }
	enc := mesh.Box("", geometry.Box{Max: v(400, 300, 200)}, 2, true)
	if err := enc.Append(mesh.Rectangle("heater", v(100, 100, 50), v(100, 0, 0), v(0, 100, 0), 2, 2)); err != nil {
		t.Fatal(err)
	}
	f, _ := os.Create(filepath.Join(dir, "enclosure.obj"))
	mesh.WriteOBJ(f, enc)
	f.Close()
	f, _ = os.Create(filepath.Join(dir, "board.stl"))
	mesh.WriteSTL(f, mesh.Rectangle("board", v(50, 50, 20), v(200, 0, 0), v(0, 150, 0), 2, 2), "board")
	f.Close()
	in, err := openCase(filepath.Join(dir, "case.toml"))
	if err != nil {
		t.Fatalf("the README's case file does not read: %v", err)
	}
	h := in.Case.Spec("heater")
	if *h.Emissivity != 0.9 || *h.Temperature != 600 || !h.IsTwoSided() {
		t.Errorf("heater settings %+v", h)
	}
	if back := in.Case.Spec("heater.back"); *back.Emissivity != 0.3 {
		t.Errorf("heater.back emissivity %v", *back.Emissivity)
	}
	if !strings.Contains(string(b), "hemiray demo") {
		t.Error("README lost its demo command")
	}
}
