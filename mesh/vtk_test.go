package mesh

import (
	"bytes"
	"encoding/xml"
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"github.com/hemiray/hemiray/geometry"
)

// The .vtp file parses as XML and declares the right counts and arrays
// (VTK XML PolyData as in the VTK file-format specification).
func TestWriteVTP(t *testing.T) {
	m := Box("", geometry.Box{Max: geometry.Vec3{X: 1, Y: 2, Z: 3}}, 2, true)
	ids := make([]int32, len(m.Facets))
	area := make([]float64, len(m.Facets))
	for f := range m.Facets {
		ids[f] = m.SurfaceOf[f]
		area[f] = m.FacetArea(f)
	}
	names := make([]string, len(m.Facets))
	for f := range m.Facets {
		names[f] = m.Surfaces[m.SurfaceOf[f]].Name
	}
	names[0] = "wall, \"north\" <1>" // characters XML and CSV treat specially
	var b bytes.Buffer
	if err := WriteVTP(&b, m, []CellArray{{Name: "surface", Int: ids}, {Name: "area_m2", Float: area}, {Name: "surface_name", String: names}}, "surfaces: xmin -- xmax"); err != nil {
		t.Fatal(err)
	}
	var doc struct {
		PolyData struct {
			Piece struct {
				Points int `xml:"NumberOfPoints,attr"`
				Polys  int `xml:"NumberOfPolys,attr"`
				Arrays []struct {
					Name string `xml:"Name,attr"`
					Text string `xml:",chardata"`
				} `xml:"CellData>DataArray"`
				Conn []struct {
					Name string `xml:"Name,attr"`
					Text string `xml:",chardata"`
				} `xml:"Polys>DataArray"`
			}
		}
	}
	if err := xml.Unmarshal(b.Bytes(), &doc); err != nil {
		t.Fatalf("not XML: %v", err)
	}
	p := doc.PolyData.Piece
	if p.Points != len(m.Vertices) || p.Polys != len(m.Facets) {
		t.Fatalf("points %d polys %d, want %d %d", p.Points, p.Polys, len(m.Vertices), len(m.Facets))
	}
	if len(p.Arrays) != 2 || p.Arrays[1].Name != "area_m2" {
		t.Fatalf("cell arrays %+v", p.Arrays)
	}
	vals := strings.Fields(p.Arrays[1].Text)
	if len(vals) != len(m.Facets) {
		t.Fatalf("area array has %d values", len(vals))
	}
	sum := 0.0
	for _, v := range vals {
		x, _ := strconv.ParseFloat(v, 64)
		sum += x
	}
	// Box area 2(1·2 + 2·3 + 3·1) = 22 m².
	if d := sum - 22; d > 1e-12 || d < -1e-12 {
		t.Errorf("areas sum to %v, want 22", sum)
	}
	if n := len(strings.Fields(p.Conn[0].Text)); n != 3*len(m.Facets) {
		t.Errorf("connectivity has %d indices", n)
	}
	// When Debian's python3-vtk9 is installed, VTK's own reader must agree.
	// It installs for the system Python, which need not be first on PATH.
	py := "/usr/bin/python3"
	if _, err := os.Stat(py); err != nil {
		py = "python3"
	}
	if _, err := exec.LookPath(py); err == nil {
		dir := t.TempDir()
		path := filepath.Join(dir, "box.vtp")
		os.WriteFile(path, b.Bytes(), 0o644)
		script := `import sys, vtk
r = vtk.vtkXMLPolyDataReader(); r.SetFileName(sys.argv[1]); r.Update()
o = r.GetOutput(); s = o.GetCellData().GetAbstractArray("surface_name")
print(o.GetNumberOfPoints(), o.GetNumberOfCells(), o.GetCellData().GetArray("area_m2").GetNumberOfTuples(), s.GetNumberOfValues(), repr(s.GetValue(0)), s.GetValue(47))`
		out, err := exec.Command(py, "-c", script, path).CombinedOutput()
		if err != nil {
			if strings.Contains(string(out), "No module named") {
				t.Log("python3-vtk9 not installed: VTK read-back skipped")
				return
			}
			t.Fatalf("VTK reader: %v\n%s", err, out)
		}
		if want := strconv.Itoa(len(m.Vertices)) + ` 48 48 48 'wall, "north" <1>' ` + names[47]; strings.TrimSpace(string(out)) != want {
			t.Errorf("VTK reader says %q, want %q", out, want)
		}
	}
}
