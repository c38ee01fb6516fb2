package raytrace

import (
	"context"
	"fmt"
	"testing"

	"github.com/hemiray/hemiray/geometry"
	"github.com/hemiray/hemiray/mesh"
)

// BenchmarkFollow traces a closed box of 12,288 facets (6 face nodes,
// 200,000 rays each) three ways on one thread: first hits only (view
// factors), and rays followed through reflections with every face of
// emissivity 0.5, diffuse and half mirror-like. Compare the Mrays/s
// metrics (emitted rays per second; a followed ray meets about 2 faces
// on average at ε = 0.5) and the hits per ray.
func BenchmarkFollow(b *testing.B) {
	m := mesh.Box("", geometry.Box{Max: geometry.Vec3{X: 1, Y: 1, Z: 1}}, 32, true)
	for _, c := range []struct {
		name     string
		specular float64
		follow   bool
	}{{"first-hit", 0, false}, {"diffuse", 0, true}, {"half-mirror", 0.5, true}} {
		s := Settings{Rays: 200000, Seed: 1}
		if c.follow {
			s.Optics = map[string]Optics{}
			for _, sf := range m.Surfaces {
				s.Optics[sf.Name] = Optics{Emissivity: 0.5, Specular: c.specular}
			}
		}
		b.Run(c.name, func(b *testing.B) { benchTrace(b, m, s) })
	}
}

// BenchmarkIrradiate traces a sun and a sky of 1,000,000 rays each onto
// the same box seen from outside (facets facing out, solar absorptance
// 0.5, half mirror-like), on one thread.
func BenchmarkIrradiate(b *testing.B) {
	m := mesh.Box("", geometry.Box{Max: geometry.Vec3{X: 1, Y: 1, Z: 1}}, 32, false)
	optics := map[string]Optics{}
	for _, sf := range m.Surfaces {
		optics[sf.Name] = Optics{Emissivity: 0.5, Specular: 0.5}
	}
	for _, diffuse := range []bool{false, true} {
		beams := []Beam{{Name: "b", Direction: geometry.Vec3{X: 0.3, Y: -0.5, Z: -1}, Irradiance: 1000, Rays: 1000000, Diffuse: diffuse}}
		b.Run(fmt.Sprintf("diffuse=%v", diffuse), func(b *testing.B) {
			for b.Loop() {
				if _, err := Irradiate(context.Background(), m, Options{Settings: Settings{Seed: 1}, Threads: 1}, beams, optics); err != nil {
					b.Fatal(err)
				}
			}
			b.ReportMetric(float64(b.N)*1e6/b.Elapsed().Seconds()/1e6, "Mrays/s")
		})
	}
}
