package analysis

import (
	"io"

	"github.com/hemiray/hemiray/geometry"
	"github.com/hemiray/hemiray/mesh"
)

// The second demo scenario (invented for the demo, not a reference case):
// a small instrument housing on a spacecraft deck, 300 × 200 × 150 mm on
// short standoffs, with a glazed window in its top and a 2 W detector
// inside; a polished shield stands beside it. Two positions of the sun in
// one case: low behind the shield, and high over the window. What do the
// detector and the housing reach by radiation alone, with the deck held at
// 290 K and deep space around?
const InstrumentCase = `# hemiray demo case: an instrument housing with a window and a polished sun
# shield on a spacecraft deck, under the sun at two positions.
# Invented scenario for the demo; every key is documented in README.md.

[model]
files = ["instrument.obj"]
units = "mm"

[rays]
per_node = 200000
seed = 2027

[ambient]
temperature = 3.0          # K, deep space

[output]
dir = "results"

[defaults]
emissivity = 0.85          # white paint, infrared
solar_absorptance = 0.25   # white paint, sunlight
adiabatic = true           # radiation only

[surfaces.deck]
temperature = 290.0        # K, held by the spacecraft's heat pipes
solar_absorptance = 0.5

[surfaces.housing]
two_sided = true           # outside painted, inside black
[surfaces."housing.back"]
emissivity = 0.9
solar_absorptance = 0.95

[surfaces.window]
two_sided = true
emissivity = 0.84          # glass is opaque in the infrared
solar_absorptance = 0.05
solar_transmittance = 0.9  # and clear in sunlight
solar_specular = 1.0
[surfaces."window.back"]
emissivity = 0.84
solar_absorptance = 0.05
solar_specular = 1.0

[surfaces.detector]
emissivity = 0.9
solar_absorptance = 0.9
heat_flow = 2.0            # W dissipated

[surfaces.shield]
two_sided = true
emissivity = 0.05          # polished aluminium: a poor emitter …
specular = 0.9             # … and a near-mirror
solar_absorptance = 0.12
solar_specular = 0.9
[surfaces."shield.back"]
emissivity = 0.05
specular = 0.9
solar_absorptance = 0.12
solar_specular = 0.9

[[sun]]
name = "low"               # low over the shield's side
azimuth = 180.0
elevation = 25.0
irradiance = 1361.0        # W/m², near Earth
rays = 1000000

[[sun]]
name = "high"              # high over the window
azimuth = 150.0
elevation = 70.0
irradiance = 1361.0
rays = 1000000
`

// instrumentMesh returns the second demo's geometry in metres.
func instrumentMesh() (*mesh.Mesh, error) {
	v := func(x, y, z float64) geometry.Vec3 { return geometry.Vec3{X: x, Y: y, Z: z} }
	const x0, x1, y0, y1, z0, z1 = 0.25, 0.55, 0.20, 0.40, 0.02, 0.17
	// The window: 120 × 80 mm in the middle of the top.
	const wx0, wx1, wy0, wy1 = 0.34, 0.46, 0.26, 0.34
	box := mesh.Box("", geometry.Box{Min: v(x0, y0, z0), Max: v(x1, y1, z1)}, 4, false)
	up := func(a0, b0, a1, b1 float64) *mesh.Mesh {
		return mesh.Rectangle("top", v(a0, b0, z1), v(a1-a0, 0, 0), v(0, b1-b0, 0), 3, 3)
	}
	housing := []*mesh.Mesh{}
	for _, s := range []string{"xmin", "xmax", "ymin", "ymax", "zmin"} {
		housing = append(housing, only(box, s))
	}
	housing = append(housing, up(x0, y0, x1, wy0), up(x0, wy1, x1, y1), up(x0, wy0, wx0, wy1), up(wx1, wy0, x1, wy1))
	parts := []*mesh.Mesh{
		mesh.Rectangle("deck", v(0, 0, 0), v(0.8, 0, 0), v(0, 0.6, 0), 8, 6),
		mesh.Merge("housing", housing...),
		mesh.Rectangle("window", v(wx0, wy0, z1), v(wx1-wx0, 0, 0), v(0, wy1-wy0, 0), 3, 2),
		// A 60 × 40 × 30 mm detector on the housing's floor, below the window.
		mesh.Merge("detector", mesh.Box("d", geometry.Box{Min: v(0.37, 0.28, 0.025), Max: v(0.43, 0.32, 0.055)}, 2, false)),
		// The shield: 400 × 300 mm, upright, 100 mm off the housing's −x side.
		mesh.Rectangle("shield", v(0.15, 0.10, 0.01), v(0, 0.40, 0), v(0, 0, 0.30), 4, 3),
	}
	m := &mesh.Mesh{}
	for _, p := range parts {
		if err := m.Append(p); err != nil {
			return nil, err
		}
	}
	return m, nil
}

// WriteInstrumentDemo writes the second demo's mesh (in millimetres) and
// case file into dir and returns the case path.
func WriteInstrumentDemo(dir string) (string, error) {
	m, err := instrumentMesh()
	if err != nil {
		return "", err
	}
	return writeScenario(dir, []scenarioFile{
		{"instrument.obj", func(w io.Writer) error { return mesh.WriteOBJ(w, mesh.Scaled(m, 1000)) }},
		{"case.toml", func(w io.Writer) error { _, err := io.WriteString(w, InstrumentCase); return err }},
	})
}
