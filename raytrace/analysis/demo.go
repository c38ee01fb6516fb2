package analysis

import (
	"io"
	"path/filepath"

	"github.com/hemiray/hemiray/geometry"
	"github.com/hemiray/hemiray/mesh"
	"github.com/hemiray/hemiray/raytrace/internal/atomicfile"
)

// The demo scenario (invented for the demo, not a reference case): a
// sealed-looking electronics enclosure, 400 × 300 × 200 mm, with a vent in
// its lid. A circuit board dissipating 15 W sits on standoffs inside; a
// power module dissipating 6 W stands on the board. The walls are held at
// 308 K by the outside air, the lid at 305 K; the room beyond the vent is
// at 298 K. What temperature do the board and the module reach by
// radiation alone, and how much of their heat leaves through the vent?
const DemoCase = `# hemiray demo case: an electronics enclosure with a vented lid.
# Invented scenario for the demo; every key is documented in README.md.

[model]
files = ["enclosure.obj", "board.stl", "module.stl"]
units = "mm"

[rays]
per_node = 500000
seed = 2026
confidence = 0.95
replicates = 8
sampling = "rqmc"     # scrambled Sobol' points, intervals from the replicates; "mc": plain Monte Carlo

[ambient]
temperature = 298.0   # K, the room seen through the vent

[output]
dir = "results"

[defaults]
emissivity = 0.85     # painted sheet metal
temperature = 308.0   # K, walls held by the outside air

[surfaces.lid]
temperature = 305.0

[surfaces.board]
two_sided = true      # the board radiates from both faces
emissivity = 0.90     # solder mask, component side
heat_flow = 15.0      # W dissipated by the board

[surfaces."board.back"]
emissivity = 0.80     # bare side

[surfaces.module]
emissivity = 0.80     # anodised aluminium
heat_flow = 6.0       # W
`

// demoMeshes returns the demo geometry in metres.
func demoMeshes() (enclosure, board, module *mesh.Mesh, err error) {
	v := func(x, y, z float64) geometry.Vec3 { return geometry.Vec3{X: x, Y: y, Z: z} }
	const lx, ly, lz = 0.40, 0.30, 0.20
	box := mesh.Box("", geometry.Box{Max: v(lx, ly, lz)}, 8, true)
	enclosure = &mesh.Mesh{}
	walls := []*mesh.Mesh{}
	for _, s := range []string{"xmin", "xmax", "ymin", "ymax"} {
		walls = append(walls, only(box, s))
	}
	parts := []*mesh.Mesh{mesh.Merge("walls", walls...), mesh.Merge("floor", only(box, "zmin"))}
	// The lid faces down (into the box) and has a 100 × 80 mm vent in its middle.
	down := func(x0, y0, x1, y1 float64) *mesh.Mesh {
		return mesh.Rectangle("lid", v(x0, y0, lz), v(0, y1-y0, 0), v(x1-x0, 0, 0), 4, 4)
	}
	const vx0, vx1, vy0, vy1 = 0.15, 0.25, 0.11, 0.19
	parts = append(parts, mesh.Merge("lid", down(0, 0, lx, vy0), down(0, vy1, lx, ly), down(0, vy0, vx0, vy1), down(vx1, vy0, lx, vy1)))
	for _, p := range parts {
		if err := enclosure.Append(p); err != nil {
			return nil, nil, nil, err
		}
	}
	// A 250 × 180 mm board 40 mm above the floor, front up.
	board = mesh.Rectangle("board", v(0.06, 0.05, 0.04), v(0.25, 0, 0), v(0, 0.18, 0), 10, 8)
	// A 60 × 50 × 30 mm module on 5 mm standoffs above the board.
	module = mesh.Merge("module", mesh.Box("m", geometry.Box{Min: v(0.12, 0.09, 0.045), Max: v(0.18, 0.14, 0.075)}, 3, false))
	return enclosure, board, module, nil
}

// only returns surface name of m as a mesh of its own.
func only(m *mesh.Mesh, name string) *mesh.Mesh {
	one := &mesh.Mesh{Vertices: m.Vertices}
	for _, f := range m.Surfaces[m.SurfaceIndex(name)].Facets {
		one.Facets = append(one.Facets, m.Facets[f])
	}
	return mesh.Merge(name, one)
}

// WriteDemo writes the demo's meshes (in millimetres) and case file into dir
// and returns the case path.
func WriteDemo(dir string) (string, error) {
	enclosure, board, module, err := demoMeshes()
	if err != nil {
		return "", err
	}
	return writeScenario(dir, []scenarioFile{
		{"enclosure.obj", func(w io.Writer) error { return mesh.WriteOBJ(w, mesh.Scaled(enclosure, 1000)) }},
		{"board.stl", func(w io.Writer) error { return mesh.WriteSTL(w, mesh.Scaled(board, 1000), "board") }},
		{"module.stl", func(w io.Writer) error { return mesh.WriteSTL(w, mesh.Scaled(module, 1000), "module") }},
		{"case.toml", func(w io.Writer) error { _, err := io.WriteString(w, DemoCase); return err }},
	})
}

// scenarioFile is one file of a demo scenario and how to write it.
type scenarioFile struct {
	name  string
	write func(io.Writer) error
}

// writeScenario writes a scenario's files into dir, atomically each, and
// returns the path of its case file.
func writeScenario(dir string, files []scenarioFile) (string, error) {
	for _, f := range files {
		if err := atomicfile.Write(filepath.Join(dir, f.name), f.write); err != nil {
			return "", err
		}
	}
	return filepath.Join(dir, "case.toml"), nil
}
