package main

import (
	"math/rand/v2"

	"github.com/hemiray/hemiray/geometry"
	"github.com/hemiray/hemiray/mesh"
)

// workload is a generated scene for the benchmarks.
type workload struct {
	name string
	desc string
	make func() (*mesh.Mesh, error)
}

var workloads = []workload{
	{"squares", "two directly opposed unit squares 1 m apart, 2×100×100 triangles each", opposedSquares},
	{"box", "closed box, 6 faces × 2×64×64 triangles, normals inward", closedBox},
	{"room", "closed 4×4×3 m room with about 200,000 small random triangles inside", clutteredRoom},
	{"sphere", "inward-facing sphere of 1,002,252 triangles (12·289²)", bigSphere},
}

func opposedSquares() (*mesh.Mesh, error) {
	m := mesh.Rectangle("bottom", geometry.Vec3{}, geometry.Vec3{X: 1}, geometry.Vec3{Y: 1}, 100, 100)
	top := mesh.Rectangle("top", geometry.Vec3{Z: 1}, geometry.Vec3{Y: 1}, geometry.Vec3{X: 1}, 100, 100)
	return m, m.Append(top)
}

func closedBox() (*mesh.Mesh, error) {
	return mesh.Box("", geometry.Box{Max: geometry.Vec3{X: 1, Y: 1, Z: 1}}, 64, true), nil
}

func bigSphere() (*mesh.Mesh, error) {
	return mesh.Sphere("sphere", geometry.Vec3{}, 1, 289, true), nil
}

// clutteredRoom is an inward-facing room with 200,000 triangles of about
// 5 cm placed and oriented at random (seeded) inside it.
func clutteredRoom() (*mesh.Mesh, error) {
	room := mesh.Box("room", geometry.Box{Max: geometry.Vec3{X: 4, Y: 4, Z: 3}}, 16, true)
	rng := rand.New(rand.NewPCG(2026, 12))
	const n = 200000
	clutter := &mesh.Mesh{}
	s := mesh.Surface{Name: "clutter", Source: -1}
	for i := range n {
		c := geometry.Vec3{X: 0.1 + 3.8*rng.Float64(), Y: 0.1 + 3.8*rng.Float64(), Z: 0.1 + 2.8*rng.Float64()}
		k := int32(len(clutter.Vertices))
		for range 3 {
			d := geometry.Vec3{X: rng.NormFloat64(), Y: rng.NormFloat64(), Z: rng.NormFloat64()}.Normalize()
			clutter.Vertices = append(clutter.Vertices, c.Add(d.Scale(0.03)))
		}
		clutter.Facets = append(clutter.Facets, [3]int32{k, k + 1, k + 2})
		clutter.SurfaceOf = append(clutter.SurfaceOf, 0)
		s.Facets = append(s.Facets, int32(i))
		s.Area += clutter.FacetArea(i)
	}
	clutter.Surfaces = []mesh.Surface{s}
	return room, room.Append(clutter)
}

// meshBytes is the memory of the mesh's arrays.
func meshBytes(m *mesh.Mesh) int {
	n := len(m.Vertices)*24 + len(m.Facets)*12 + len(m.SurfaceOf)*4 + len(m.Origin)*8
	for _, s := range m.Surfaces {
		n += len(s.Facets) * 4
	}
	return n
}
