package mesh

import (
	"bytes"
	"errors"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strings"
	"syscall"
	"testing"

	"github.com/hemiray/hemiray/geometry"
)

func load(t *testing.T, path string, opts LoadOptions) *Mesh {
	t.Helper()
	m, err := LoadFile(path, opts)
	if err != nil {
		t.Fatalf("LoadFile(%s): %v", path, err)
	}
	return m
}

type wantSurface struct {
	name   string
	facets int
	area   float64
}

func checkSurfaces(t *testing.T, m *Mesh, want []wantSurface) {
	t.Helper()
	if len(m.Surfaces) != len(want) {
		t.Fatalf("got %d surfaces %v, want %d", len(m.Surfaces), names(m), len(want))
	}
	for i, w := range want {
		s := m.Surfaces[i]
		if s.Name != w.name || len(s.Facets) != w.facets || !close(s.Area, w.area, 1e-9) {
			t.Errorf("surface %d = {%s, %d facets, %g m²}, want {%s, %d, %g}", i, s.Name, len(s.Facets), s.Area, w.name, w.facets, w.area)
		}
	}
}

func names(m *Mesh) []string {
	var s []string
	for _, x := range m.Surfaces {
		s = append(s, x.Name)
	}
	return s
}

func TestReadTestdata(t *testing.T) {
	tests := []struct {
		file string
		opts LoadOptions
		want []wantSurface
		open int // model boundary edges
	}{
		// Binary file whose header begins with "solid": 2 m × 1 m plate.
		{"heater_plate_binary.stl", LoadOptions{}, []wantSurface{{"heater_plate exported as binary", 8, 2}}, 8},
		// Same file in millimetres: area scales by 1e-6.
		{"heater_plate_binary.stl", LoadOptions{Unit: Millimetre}, []wantSurface{{"heater_plate exported as binary", 8, 2e-6}}, 8},
		// Two solid blocks, each its own surface: 0.4×0.3 and 0.4×0.25.
		{"cabinet_multi.stl", LoadOptions{}, []wantSurface{{"floor", 2, 0.12}, {"back_wall", 2, 0.1}}, 6},
		// Triangle before any group (area 0.5), concave L hexagon (area 3), quad lid (area 4).
		{"duct_bend.obj", LoadOptions{}, []wantSurface{{"duct_bend", 1, 0.5}, {"end_plate", 4, 3}, {"lid", 2, 4}}, 0},
		{"duct_bend.obj", LoadOptions{GroupByMaterial: true, Unit: Inch}, []wantSurface{{"duct_bend", 1, 0.5 * 0.0254 * 0.0254}, {"steel", 4, 3 * 0.0254 * 0.0254}, {"painted", 2, 4 * 0.0254 * 0.0254}}, 0},
		// 3 unit quads of a 2×2 patch: outline of an L has 8 unit edges.
		{"scan_open.obj", LoadOptions{Unit: Centimetre}, []wantSurface{{"patch", 6, 3e-4}}, 8},
	}
	for _, tc := range tests {
		t.Run(tc.file+"/"+string(tc.opts.Unit), func(t *testing.T) {
			m := load(t, filepath.Join("..", "testdata", tc.file), tc.opts)
			checkSurfaces(t, m, tc.want)
			r := Check(m)
			if tc.open > 0 {
				var got int
				for _, f := range r.Findings {
					if f.Check == "open-edges" {
						got = f.Count
					}
				}
				if got != tc.open {
					t.Errorf("open edges = %d, want %d (%+v)", got, tc.open, r.Findings)
				}
			}
		})
	}
}

func TestOBJIgnoredAndNormals(t *testing.T) {
	m := load(t, "../testdata/duct_bend.obj", LoadOptions{})
	ign := m.Sources[0].Ignored
	for k, want := range map[string]int{"vt": 1, "vn": 1, "s": 1, "mtllib": 1, "usemtl": 2} {
		if ign[k] != want {
			t.Errorf("ignored[%s] = %d, want %d (all: %v)", k, ign[k], want, ign)
		}
	}
	// Every facet of the L plate must face +z like the polygon it came from.
	for _, f := range m.Surfaces[1].Facets {
		if n := m.Triangle(int(f)).Normal(); !close(n.Z, 1, 1e-12) {
			t.Errorf("facet %d normal %v, want +z", f, n)
		}
	}
	if got := m.Where(int(m.Surfaces[2].Facets[0])); got != "../testdata/duct_bend.obj:30" {
		t.Errorf("Where = %q, want line 30", got)
	}
}

func TestEarClippingConcave(t *testing.T) {
	// A comb: 5 teeth, concave outline, tilted out of every axis plane.
	// Area of the planar outline: base 9×1 plus 5 teeth of 1×2 = 19.
	pts2 := [][2]float64{{0, 0}, {9, 0}, {9, 3}, {8, 3}, {8, 1}, {7, 1}, {7, 3}, {6, 3}, {6, 1}, {5, 1}, {5, 3}, {4, 3}, {4, 1}, {3, 1}, {3, 3}, {2, 3}, {2, 1}, {1, 1}, {1, 3}, {0, 3}}
	e1 := geometry.Vec3{X: 1, Y: 2, Z: 2}.Scale(1.0 / 3)
	e2 := geometry.Vec3{X: 2, Y: 1, Z: -2}.Scale(1.0 / 3)
	var v []geometry.Vec3
	var poly []int32
	for i, p := range pts2 {
		v = append(v, e1.Scale(p[0]).Add(e2.Scale(p[1])))
		poly = append(poly, int32(i))
	}
	var c earClipper
	tris := c.triangulate(v, poly)
	if len(tris) != len(poly)-2 {
		t.Fatalf("got %d triangles, want %d", len(tris), len(poly)-2)
	}
	n := e1.Cross(e2)
	area := 0.0
	for _, tr := range tris {
		g := geometry.Triangle{V0: v[tr[0]], V1: v[tr[1]], V2: v[tr[2]]}
		if g.Cross().Dot(n) <= 0 {
			t.Errorf("triangle %v is flipped or flat", tr)
		}
		area += g.Area()
	}
	if !close(area, 19, 1e-12) {
		t.Errorf("area = %.15g, want 19", area)
	}
}

func TestRoundTrip(t *testing.T) {
	src := Box("oven", geometry.Box{Min: geometry.Vec3{X: 0.25, Y: 0.5}, Max: geometry.Vec3{X: 1.5, Y: 2, Z: 0.75}}, 3, true)
	dir := t.TempDir()

	var obj bytes.Buffer
	if err := WriteOBJ(&obj, src); err != nil {
		t.Fatal(err)
	}
	path := filepath.Join(dir, "oven.obj")
	os.WriteFile(path, obj.Bytes(), 0o644)
	back := load(t, path, LoadOptions{})
	if len(back.Surfaces) != 6 || len(back.Facets) != len(src.Facets) {
		t.Fatalf("OBJ round trip: %d surfaces, %d facets", len(back.Surfaces), len(back.Facets))
	}
	for i := range src.Surfaces {
		if back.Surfaces[i].Name != src.Surfaces[i].Name || back.Surfaces[i].Area != src.Surfaces[i].Area {
			t.Errorf("OBJ surface %d = %s %v, want %s %v", i, back.Surfaces[i].Name, back.Surfaces[i].Area, src.Surfaces[i].Name, src.Surfaces[i].Area)
		}
	}

	// Binary STL keeps geometry (float32, exact for these coordinates) and welds shared corners.
	var stl bytes.Buffer
	if err := WriteSTL(&stl, src, "oven"); err != nil {
		t.Fatal(err)
	}
	if stl.Len() != 84+50*len(src.Facets) {
		t.Fatalf("binary STL size %d, want %d", stl.Len(), 84+50*len(src.Facets))
	}
	path = filepath.Join(dir, "oven.stl")
	os.WriteFile(path, stl.Bytes(), 0o644)
	back = load(t, path, LoadOptions{})
	if len(back.Surfaces) != 1 || back.Surfaces[0].Name != "oven" || len(back.Vertices) != len(src.Vertices) {
		t.Fatalf("STL round trip: surfaces %v, %d vertices, want 1 and %d", names(back), len(back.Vertices), len(src.Vertices))
	}
	if !close(back.TotalArea(), src.TotalArea(), 1e-12) || !Check(back).Closed {
		t.Errorf("STL round trip: area %v want %v, closed %v", back.TotalArea(), src.TotalArea(), Check(back).Closed)
	}
}

func TestLoadSeveralFiles(t *testing.T) {
	m, err := Load([]string{"../testdata/cabinet_multi.stl", "../testdata/duct_bend.obj"}, LoadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if got := strings.Join(names(m), ","); got != "floor,back_wall,duct_bend,end_plate,lid" {
		t.Errorf("surfaces = %s", got)
	}
	if w := m.Where(int(m.Surfaces[3].Facets[0])); !strings.HasPrefix(w, "../testdata/duct_bend.obj:") {
		t.Errorf("Where after Load = %q", w)
	}
	_, err = Load([]string{"../testdata/cabinet_multi.stl", "../testdata/cabinet_multi.stl"}, LoadOptions{})
	if err == nil || !strings.Contains(err.Error(), `"floor"`) || strings.Count(err.Error(), "cabinet_multi.stl") != 2 {
		t.Errorf("duplicate surface error = %v, want one naming the surface and both files", err)
	}
}

// A file's facets keep their file and line when appended to a built shape
// that has no origins of its own.
func TestAppendKeepsOrigins(t *testing.T) {
	file, err := LoadFile("../testdata/duct_bend.obj", LoadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	m := Rectangle("plate", geometry.Vec3{}, geometry.Vec3{X: 1}, geometry.Vec3{Y: 1}, 2, 2)
	if err := m.Append(file); err != nil {
		t.Fatal(err)
	}
	if w := m.Where(0); w != "facet 0 of surface plate" {
		t.Errorf("built facet: Where = %q", w)
	}
	n := len(m.Facets) - len(file.Facets)
	for f := range file.Facets {
		if got, want := m.Where(n+f), file.Where(f); got != want {
			t.Fatalf("appended facet %d: Where = %q, want %q", f, got, want)
		}
	}
	built := Rectangle("a", geometry.Vec3{}, geometry.Vec3{X: 1}, geometry.Vec3{Y: 1}, 2, 2)
	if err := built.Append(Rectangle("b", geometry.Vec3{Z: 1}, geometry.Vec3{X: 1}, geometry.Vec3{Y: 1}, 2, 2)); err != nil {
		t.Fatal(err)
	}
	if len(built.Origin) != 0 {
		t.Errorf("two built shapes: %d origins, want none", len(built.Origin))
	}
}

func TestBadInput(t *testing.T) {
	dir := t.TempDir()
	plate, _ := os.ReadFile("../testdata/heater_plate_binary.stl")
	hugeCount := append([]byte{}, plate...)
	hugeCount[80], hugeCount[81], hugeCount[82], hugeCount[83] = 0xff, 0xff, 0xff, 0x7f
	nanPlate := append([]byte{}, plate...)
	copy(nanPlate[84+50*2+12:], []byte{0, 0, 0xc0, 0x7f}) // facet 3, first x = NaN
	mangled := bytes.ReplaceAll(plate, []byte{'\n'}, []byte{'\r', '\n'})
	mangled = append(mangled, '\r', '\n')
	tests := []struct {
		name, file string
		data       []byte
		want       string // substring of the error
	}{
		{"truncated binary", "t.stl", plate[:len(plate)-7], "promises 8 facets"},
		{"count too large", "c.stl", hugeCount, "promises 2147483647 facets"},
		{"text-mode mangled binary", "m.stl", mangled, "text-mode"},
		{"binary NaN", "n.stl", nanPlate, "n.stl: facet 3: coordinate is NaN"},
		{"ascii missing vertex", "a.stl", []byte("solid x\nfacet normal 0 0 1\nouter loop\nvertex 0 0 0\nvertex 1 0 0\nendloop\nendfacet\nendsolid x\n"), "a.stl:6:"},
		{"ascii not a number", "b.stl", []byte("solid x\nfacet normal 0 0 1\nouter loop\nvertex 0 0 0\nvertex 1 zero 0\nvertex 0 1 0\nendloop\nendfacet\nendsolid x\n"), "b.stl:5:"},
		{"ascii NaN", "c2.stl", []byte("solid x\nfacet normal 0 0 1\nouter loop\nvertex 0 0 0\nvertex 1 nan 0\nvertex 0 1 0\nendloop\nendfacet\nendsolid x\n"), "c2.stl:5: coordinate is nan"},
		{"ascii no endsolid", "d.stl", []byte("solid x\nfacet normal 0 0 1\nouter loop\nvertex 0 0 0\nvertex 1 0 0\nvertex 0 1 0\nendloop\nendfacet\n"), "d.stl:9: file ends inside the solid of line 1: no endsolid"},
		{"ascii second solid without end", "e.stl", []byte("solid a\nsolid b\n"), "e.stl:2:"},
		{"empty stl", "e0.stl", nil, "empty file"},
		{"empty obj", "e0.obj", nil, "empty file"},
		{"obj index 0", "z.obj", []byte("v 0 0 0\nv 1 0 0\nv 0 1 0\nf 0 1 2\n"), "z.obj:4: face index 0"},
		{"obj index out of range", "r.obj", []byte("v 0 0 0\nv 1 0 0\nv 0 1 0\n\nf 1 2 4\n"), "r.obj:5: face refers to vertex 4"},
		{"obj relative out of range", "q.obj", []byte("v 0 0 0\nf -1 -2 -3\n"), "q.obj:2:"},
		{"obj NaN", "n.obj", []byte("v 0 NaN 0\n"), "n.obj:1: vertex coordinate is NaN"},
		{"obj bad number", "b.obj", []byte("v 0 0 0\nv 1 x 0\n"), "b.obj:2: vertex coordinate \"x\""},
		{"obj short vertex", "s.obj", []byte("v 0 0\n"), "s.obj:1: vertex has 2 coordinates"},
		{"obj no faces", "nf.obj", []byte("v 0 0 0\n"), "no faces"},
		{"obj two-corner face", "tc.obj", []byte("v 0 0 0\nv 1 0 0\nf 1 2\n"), "tc.obj:3: face has 2 distinct corners"},
		{"unknown extension", "x.ply", []byte("ply\n"), "unknown mesh format"},
		{"huge polygon", "h.obj", hugePolygon(), "h.obj:10002: face has 10001 corners"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			path := filepath.Join(dir, tc.file)
			os.WriteFile(path, tc.data, 0o644)
			_, err := LoadFile(path, LoadOptions{})
			if err == nil || !strings.Contains(err.Error(), tc.want) {
				t.Errorf("LoadFile(%s) error = %v, want it to contain %q", tc.file, err, tc.want)
			}
			if err != nil && !strings.Contains(err.Error(), tc.file) {
				t.Errorf("error %q does not name the file", err)
			}
		})
	}
	t.Run("directory", func(t *testing.T) {
		d := filepath.Join(dir, "dir.stl")
		os.Mkdir(d, 0o755)
		_, err := LoadFile(d, LoadOptions{})
		var pe *ParseError
		if !errors.As(err, &pe) || !strings.Contains(err.Error(), "directory") {
			t.Errorf("LoadFile(directory) = %v", err)
		}
	})
	t.Run("unknown unit", func(t *testing.T) {
		if _, err := ParseUnit("furlong"); err == nil {
			t.Error("ParseUnit(furlong) succeeded")
		}
		if _, err := LoadFile("../testdata/scan_open.obj", LoadOptions{Unit: "yd"}); err == nil || !strings.Contains(err.Error(), "yd") {
			t.Errorf("LoadFile with unit yd = %v", err)
		}
	})
}

func TestUnits(t *testing.T) {
	// Exact by definition: 1 in = 25.4 mm, 1 ft = 12 in (international yard and pound agreement, 1959).
	for _, tc := range []struct {
		in   string
		want float64
	}{{"m", 1}, {"CM", 0.01}, {"mm", 0.001}, {"in", 0.0254}, {" ft ", 0.3048}} {
		u, err := ParseUnit(tc.in)
		if err != nil || u.Metres() != tc.want {
			t.Errorf("ParseUnit(%q) = %v, %v; metres %v, want %v", tc.in, u, err, u.Metres(), tc.want)
		}
	}
	if math.IsNaN(Foot.Metres()) {
		t.Fatal("unreachable")
	}
}

// hugePolygon is an OBJ face with more corners than hemiray triangulates.
func hugePolygon() []byte {
	var b strings.Builder
	for i := range 10001 {
		a := 2 * math.Pi * float64(i) / 10001
		fmt.Fprintf(&b, "v %g %g 0\n", math.Cos(a), math.Sin(a))
	}
	b.WriteString("f")
	for i := range 10001 {
		fmt.Fprintf(&b, " %d", i+1)
	}
	b.WriteString("\n")
	return []byte(b.String())
}

// A UTF-8 byte-order mark before the first line (some Windows editors write
// one) is not part of the first statement: the first vertex still counts,
// so every index and the area stay right (common practice for text readers).
func TestByteOrderMark(t *testing.T) {
	const bom = "\xef\xbb\xbf"
	obj := bom + "v 0 0 0\nv 2 0 0\nv 0 1 0\nf 1 2 3\n"
	m, err := ReadOBJ(strings.NewReader(obj), "bom.obj", OBJOptions{Unit: Metre})
	if err != nil || len(m.Vertices) != 3 || m.TotalArea() != 1 {
		t.Errorf("OBJ with a BOM: %v, %d vertices, area %v; want 3 vertices, area 1", err, len(m.Vertices), m.TotalArea())
	}
	stl := bom + "solid plate\nfacet normal 0 0 1\nouter loop\nvertex 0 0 0\nvertex 2 0 0\nvertex 0 1 0\nendloop\nendfacet\nendsolid plate\n"
	m, err = ReadSTL(strings.NewReader(stl), "bom.stl", Metre)
	if err != nil {
		t.Fatalf("ASCII STL with a BOM: %v", err)
	}
	if m.TotalArea() != 1 || len(m.Surfaces) != 1 || m.Surfaces[0].Name != "plate" {
		t.Errorf("ASCII STL with a BOM: area %v, surfaces %+v; want 1 and one surface \"plate\"", m.TotalArea(), m.Surfaces)
	}
}

// A control character inside a group name (a stray carriage return, a
// tab) becomes a space: the name goes into CSV files.
func TestControlCharactersInNames(t *testing.T) {
	obj := "v 0 0 0\nv 2 0 0\nv 0 1 0\ng top\rlid\tA \r\nf 1 2 3\n"
	m, err := ReadOBJ(strings.NewReader(obj), "cr.obj", OBJOptions{Unit: Metre})
	if err != nil || len(m.Surfaces) != 1 || m.Surfaces[0].Name != "top lid A" {
		t.Errorf("got %v, %+v; want one surface \"top lid A\"", err, m.Surfaces)
	}
}

// Special files are refused before they are opened: a FIFO would block the
// read forever, a device would never end.
func TestLoadRefusesSpecialFiles(t *testing.T) {
	fifo := filepath.Join(t.TempDir(), "pipe.obj")
	if err := syscall.Mkfifo(fifo, 0o600); err != nil {
		t.Skip("no FIFOs here:", err)
	}
	if _, err := LoadFile(fifo, LoadOptions{}); err == nil || !strings.Contains(err.Error(), "not a regular file") {
		t.Errorf("FIFO: %v", err)
	}
	if _, err := LoadFile("/dev/zero.obj", LoadOptions{}); err == nil {
		t.Error("a missing device path read without error")
	}
}
