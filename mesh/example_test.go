package mesh_test

import (
	"fmt"
	"strings"

	"github.com/hemiray/hemiray/geometry"
	"github.com/hemiray/hemiray/mesh"
)

// ReadOBJ groups facets into surfaces by g/o and triangulates polygons.
func ExampleReadOBJ() {
	obj := `v 0 0 0
v 2 0 0
v 2 1 0
v 0 1 0
g plate
f 1 2 3 4
`
	m, err := mesh.ReadOBJ(strings.NewReader(obj), "plate.obj", mesh.OBJOptions{Unit: mesh.Millimetre})
	if err != nil {
		fmt.Println(err)
		return
	}
	s := m.Surfaces[0]
	fmt.Printf("%s: %d facets, %.1e m²\n", s.Name, len(s.Facets), s.Area)
	// Output: plate: 2 facets, 2.0e-06 m²
}

// Check reports the defects of a mesh; a box from the shape builders is closed.
func ExampleCheck() {
	box := mesh.Box("oven", geometry.Box{Max: geometry.Vec3{X: 1, Y: 1, Z: 1}}, 2, true)
	r := mesh.Check(box)
	fmt.Println(len(r.Surfaces), "surfaces, closed:", r.Closed, "findings:", len(r.Findings))
	// Output: 6 surfaces, closed: true findings: 0
}
