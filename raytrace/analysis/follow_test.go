package analysis

import (
	"context"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"testing"

	"github.com/hemiray/hemiray/geometry"
	"github.com/hemiray/hemiray/mesh"
	"github.com/hemiray/hemiray/raytrace/exchange"
)

// openWith writes m as OBJ into a temporary folder and opens case c on it.
func openWith(t *testing.T, m *mesh.Mesh, c *Case) *Input {
	t.Helper()
	dir := t.TempDir()
	f, err := os.Create(filepath.Join(dir, "model.obj"))
	if err != nil {
		t.Fatal(err)
	}
	if err := mesh.WriteOBJ(f, m); err != nil {
		t.Fatal(err)
	}
	if err := f.Close(); err != nil {
		t.Fatal(err)
	}
	c.Dir, c.Model.Files = dir, []string{"model.obj"}
	in, err := Open(c)
	if err != nil {
		t.Fatal(err)
	}
	return in
}

func analysed(t *testing.T, in *Input) *Result {
	t.Helper()
	tr, err := in.Trace(context.Background(), Run{})
	if err != nil {
		t.Fatal(err)
	}
	a, err := in.Analyse(tr.Result)
	if err != nil {
		t.Fatal(err)
	}
	return a
}

// Two plates facing each other across a box whose side walls are
// near-perfect mirrors (emissivity 10⁻⁹, wholly specular, adiabatic):
// infinite parallel plates, which exchange Q = σA(T₁⁴ − T₂⁴)/(1/ε₁ + 1/ε₂ − 1)
// whether they reflect diffusely or as mirrors (Siegel & Howell, Thermal
// Radiation Heat Transfer, the chapter on specular surfaces; from memory).
// The view-factor route cannot see the mirrors: it gives far less.
func TestFollowedPlatesHeatFlow(t *testing.T) {
	const e1, e2, t1, t2 = 0.5, 0.3, 600.0, 300.0
	want := exchange.Sigma * (math.Pow(t1, 4) - math.Pow(t2, 4)) / (1/e1 + 1/e2 - 1)
	for _, spec := range []float64{0, 1} {
		t.Run(fmt.Sprintf("plates specular %.0f", spec), func(t *testing.T) {
			m := mesh.Box("", geometry.Box{Max: geometry.Vec3{X: 1, Y: 1, Z: 0.5}}, 2, true)
			wall := SurfaceSpec{Emissivity: ptr(1e-9), Specular: ptr(1.0), Adiabatic: ptr(true)}
			c := &Case{
				Rays: RaySpec{PerNode: 40000, Seed: 3},
				Surfaces: map[string]SurfaceSpec{
					"xmin": wall, "xmax": wall, "ymin": wall, "ymax": wall,
					"zmin": {Emissivity: ptr(e1), Specular: ptr(spec), Temperature: ptr(t1)},
					"zmax": {Emissivity: ptr(e2), Temperature: ptr(t2)},
				},
			}
			a := analysed(t, openWith(t, m, c))
			if !a.Absorption {
				t.Fatal("mirror walls did not make the run follow rays")
			}
			i := 0
			for a.Nodes[i].Name != "zmin" {
				i++
			}
			q, h := a.Solution.Q[i], a.QHalf[i]
			t.Logf("Q = %.3f ± %.3f W, closed form %.3f W", q, h, want)
			if math.Abs(q-want) > 2*h || h > 0.01*want {
				t.Errorf("Q(zmin) = %.4f ± %.4f W, closed form %.4f W", q, h, want)
			}
		})
	}
}

// With every surface diffuse and opaque both routes solve the same physics:
// inside a sphere, where a diffuse emitter irradiates every point alike
// (so the view-factor route's uniform-radiosity premise holds; Siegel &
// Howell, from memory), the heat flows of the followed route and of the
// view-factor route agree within their intervals.
func TestFollowedMatchesViewFactorsWhenDiffuse(t *testing.T) {
	sph := mesh.Sphere("s", geometry.Vec3{}, 1, 12, true)
	per := 2 * 12 * 12
	m := &mesh.Mesh{}
	for k := range 6 {
		part := mesh.Merge(fmt.Sprintf("p%d", k), &mesh.Mesh{Vertices: sph.Vertices, Facets: sph.Facets[k*per : (k+1)*per]})
		if err := m.Append(part); err != nil {
			t.Fatal(err)
		}
	}
	surfaces := map[string]SurfaceSpec{
		"p0": {Emissivity: ptr(0.8), Temperature: ptr(500.0)},
		"p1": {Emissivity: ptr(0.3), Temperature: ptr(300.0)},
		"p2": {Emissivity: ptr(0.6), Adiabatic: ptr(true)},
		"p3": {Emissivity: ptr(0.9), HeatFlux: ptr(200.0)},
		"p4": {Emissivity: ptr(0.15), Adiabatic: ptr(true)},
		"p5": {Emissivity: ptr(1.0), Temperature: ptr(350.0)},
	}
	run := func(follow bool) *Result {
		c := &Case{Rays: RaySpec{PerNode: 100000, Seed: 5, FollowReflections: follow}, Surfaces: surfaces}
		return analysed(t, openWith(t, m, c))
	}
	v, f := run(false), run(true)
	if v.Absorption || !f.Absorption {
		t.Fatalf("routes: view %v, followed %v", !v.Absorption, f.Absorption)
	}
	scale := 0.0 // round-off allowance for the flows fixed by the conditions
	for _, q := range v.Solution.Q {
		scale = max(scale, 1e-9*math.Abs(q))
	}
	for i, n := range v.Nodes {
		dq, hq := f.Solution.Q[i]-v.Solution.Q[i], math.Hypot(f.QHalf[i], v.QHalf[i])
		dt, ht := f.Solution.T[i]-v.Solution.T[i], math.Hypot(f.THalf[i], v.THalf[i])
		t.Logf("%s: Q %.2f vs %.2f ± %.2f W, T %.2f vs %.2f ± %.2f K", n.Name, f.Solution.Q[i], v.Solution.Q[i], hq, f.Solution.T[i], v.Solution.T[i], ht)
		if math.Abs(dq) > 2*hq+scale || math.Abs(dt) > 2*ht+1e-9 {
			t.Errorf("%s: followed Q %.3f, T %.3f; view factors Q %.3f, T %.3f (combined half-widths %.3f W, %.3f K)",
				n.Name, f.Solution.Q[i], f.Solution.T[i], v.Solution.Q[i], v.Solution.T[i], hq, ht)
		}
	}
}
