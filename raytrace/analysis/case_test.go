package analysis

import (
	"errors"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/hemiray/hemiray/geometry"
	"github.com/hemiray/hemiray/mesh"
)

// Values that would overflow or make no physical sense are refused at
// validation, naming the key's path, so that no +Inf or NaN reaches a
// result file.
func TestValidateNamesTheKey(t *testing.T) {
	base := func() *Case {
		return &Case{Model: ModelSpec{Files: []string{"m.obj"}}, Surfaces: map[string]SurfaceSpec{}}
	}
	tests := []struct {
		name string
		edit func(c *Case)
		key  string
	}{
		{"huge heat flow", func(c *Case) { c.Surfaces["board"] = SurfaceSpec{HeatFlow: ptr(1e308)} }, "surfaces.board.heat_flow"},
		{"infinite flux", func(c *Case) { c.Defaults.HeatFlux = ptr(math.Inf(1)) }, "defaults.heat_flux"},
		{"NaN flux", func(c *Case) { c.Surfaces["lid"] = SurfaceSpec{HeatFlux: ptr(math.NaN())} }, "surfaces.lid.heat_flux"},
		{"1e100 K", func(c *Case) { c.Surfaces["lid"] = SurfaceSpec{Temperature: ptr(1e100)} }, "surfaces.lid.temperature"},
		{"infinite ambient", func(c *Case) { c.Ambient.Temperature = ptr(math.Inf(1)) }, "ambient.temperature"},
		{"emissivity 0", func(c *Case) { c.Defaults.Emissivity = ptr(0.0) }, "defaults.emissivity"},
		{"NaN confidence", func(c *Case) { c.Rays.Confidence = math.NaN() }, "rays.confidence"},
		{"one replicate", func(c *Case) { c.Rays.Replicates = 1 }, "rays.replicates"},
		{"two conditions", func(c *Case) { c.Surfaces["lid"] = SurfaceSpec{Temperature: ptr(300.0), Adiabatic: ptr(true)} }, "surfaces.lid"},
		{"no files", func(c *Case) { c.Model.Files = nil }, "model.files"},
	}
	for _, tc := range tests {
		c := base()
		tc.edit(c)
		var ke *KeyError
		if err := c.Validate(); !errors.As(err, &ke) || strings.Join(ke.Key, ".") != tc.key {
			t.Errorf("%s: %v, want an error at %s", tc.name, err, tc.key)
		}
	}
	if err := base().Validate(); err != nil {
		t.Errorf("a plain case: %v", err)
	}
}

// The echo before tracing states the size in metres and the unit read, so
// a forgotten units = "mm" shows; a two-sided back silently taking the
// default emissivity is noted.
func TestDescribeAndNotes(t *testing.T) {
	c := &Case{Dir: "../../testdata", Model: ModelSpec{Files: []string{"cabinet_multi.stl"}, Units: "mm"},
		Defaults: SurfaceSpec{Emissivity: ptr(0.9)},
		Surfaces: map[string]SurfaceSpec{"floor": {TwoSided: ptr(true), Emissivity: ptr(0.3)}}}
	in, err := Open(c)
	if err != nil {
		t.Fatal(err)
	}
	if d := in.Describe(); !strings.Contains(d, "2 surfaces") || !strings.Contains(d, "read in mm") {
		t.Errorf("Describe: %s", d)
	}
	if n := in.Notes(); len(n) != 1 || !strings.Contains(n[0], `"floor.back"`) {
		t.Errorf("Notes: %v", n)
	}
}

// Two binary STL files whose headers name the same solid load together
// when the case names their surfaces; groups renamed alike become one
// surface.
func TestNamesAndRename(t *testing.T) {
	dir := t.TempDir()
	v := func(x, y, z float64) geometry.Vec3 { return geometry.Vec3{X: x, Y: y, Z: z} }
	for i, name := range []string{"a.stl", "b.stl"} {
		f, _ := os.Create(filepath.Join(dir, name))
		mesh.WriteSTL(f, mesh.Rectangle("x", v(0, 0, float64(i)), v(1, 0, 0), v(0, 1, 0), 1, 1), "Exported solid")
		f.Close()
	}
	c := &Case{Dir: dir, Model: ModelSpec{Files: []string{"a.stl", "b.stl"}}}
	if _, err := Open(c); err == nil || !strings.Contains(err.Error(), "[model.names]") {
		t.Errorf("same header names: %v", err)
	}
	c.Model.Names = map[string]string{"a.stl": "low", "b.stl": "high"}
	in, err := Open(c)
	if err != nil || in.Mesh.SurfaceIndex("low") < 0 || in.Mesh.SurfaceIndex("high") < 0 {
		t.Fatalf("named: %v", err)
	}
	c.Model.Rename = map[string]string{"low": "plates", "high": "plates"}
	if in, err = Open(c); err != nil || len(in.Mesh.Surfaces) != 1 || in.Mesh.Surfaces[0].Area != 2 {
		t.Errorf("renamed alike: %v, %+v", err, in.Mesh.Surfaces)
	}
	c.Model.Rename = map[string]string{"roof": "top"}
	var ke *KeyError
	if _, err := Open(c); !errors.As(err, &ke) || strings.Join(ke.Key, ".") != "model.rename" {
		t.Errorf("unknown rename: %v", err)
	}
}

// A facet → node map file makes the nodes it names; its content is part of
// the input hash, so tallies of another map are refused; bad lines name
// the file and line.
func TestNodeMapFile(t *testing.T) {
	dir := t.TempDir()
	v := func(x, y, z float64) geometry.Vec3 { return geometry.Vec3{X: x, Y: y, Z: z} }
	f, _ := os.Create(filepath.Join(dir, "p.obj"))
	mesh.WriteOBJ(f, mesh.Rectangle("plate", v(0, 0, 0), v(1, 0, 0), v(0, 1, 0), 2, 1))
	f.Close()
	os.WriteFile(filepath.Join(dir, "map.csv"), []byte("facet,node\n0,left\n1,left\n"), 0o644)
	c := &Case{Dir: dir, Model: ModelSpec{Files: []string{"p.obj"}, NodeMap: "map.csv"}}
	in, err := Open(c)
	if err != nil {
		t.Fatal(err)
	}
	nodes, err := in.Nodes()
	if err != nil || len(nodes) != 2 || nodes[0].Name != "left" || nodes[1].Name != "plate" {
		t.Fatalf("nodes %v, %+v", err, nodes)
	}
	r1, _ := in.Record(0, 1, len(nodes))
	os.WriteFile(filepath.Join(dir, "map.csv"), []byte("facet,node\n0,left\n"), 0o644)
	in2, _ := Open(c)
	r2, _ := in2.Record(0, 1, len(nodes))
	if d := r2.Differences(r1); len(d) == 0 {
		t.Error("a changed node map went unnoticed")
	}
	os.WriteFile(filepath.Join(dir, "map.csv"), []byte("facet,node\n7,left\n"), 0o644)
	var ke *KeyError
	if _, err := Open(c); !errors.As(err, &ke) || !strings.Contains(err.Error(), "map.csv:2") {
		t.Errorf("bad facet: %v", err)
	}
}
