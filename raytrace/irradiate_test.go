package raytrace

import (
	"context"
	"fmt"
	"math"
	"reflect"
	"testing"

	"github.com/hemiray/hemiray/geometry"
	"github.com/hemiray/hemiray/mesh"
)

func v3(x, y, z float64) geometry.Vec3 { return geometry.Vec3{X: x, Y: y, Z: z} }

// irradiated traces beams onto m with plain Monte Carlo (binomial errors).
func irradiated(t *testing.T, m *mesh.Mesh, two []string, optics map[string]Optics, beams ...Beam) *Irradiation {
	t.Helper()
	ir, err := Irradiate(context.Background(), m, Options{Settings: Settings{Seed: 3, Sampling: SamplingMC, TwoSided: two}}, beams, optics)
	if err != nil {
		t.Fatal(err)
	}
	return ir
}

// absorbs checks the power node name absorbs from beam b against its
// exact value: within 4.5 binomial standard errors of the share of the
// beam's rays.
func absorbs(t *testing.T, ir *Irradiation, b int, name string, want float64) {
	t.Helper()
	j := ir.res.NodeIndex(name)
	got, _ := ir.Absorbed(b, j)
	total := ir.Beams[b].Irradiance * ir.LaunchArea[b]
	p := want / total
	if tol := 4.5 * total * math.Sqrt(p*(1-p)/float64(ir.Beams[b].Rays)); math.Abs(got-want) > tol+1e-12*total {
		t.Errorf("%s absorbs %.5g W of beam %s, exact %.5g W (tolerance %.2g)", name, got, ir.Beams[b].Name, want, tol)
	}
}

// A flat plate under a beam at angle θ to its normal absorbs α·E·A·cos θ
// (common practice: the beam's power through the plate's projected area,
// times the absorptance).
func TestBeamOnPlate(t *testing.T) {
	const alpha, E = 0.7, 1000.0
	m := mesh.Rectangle("plate", v3(0, 0, 0), v3(2, 0, 0), v3(0, 1, 0), 2, 2)
	var beams []Beam
	for _, deg := range []float64{0, 30, 60, 85} {
		th := deg * math.Pi / 180
		beams = append(beams, Beam{Name: fmt.Sprintf("%g°", deg), Direction: v3(math.Sin(th), 0.3*math.Sin(th), -math.Cos(th)), Irradiance: E, Rays: 100000})
	}
	ir := irradiated(t, m, nil, map[string]Optics{"plate": {Emissivity: alpha}}, beams...)
	for b, bm := range beams {
		cos := -bm.Direction.Normalize().Z
		absorbs(t, ir, b, "plate", alpha*E*2*cos)
		if ir.Back[b] != 0 {
			t.Errorf("beam %s: %.3g of the rays met the plate's back", bm.Name, ir.Back[b])
		}
	}
}

// An opaque black square held parallel over a black floor casts a shadow of
// its own size wherever the beam comes from (the projection of a plane
// figure onto a parallel plane along any direction is congruent to it;
// common practice): the square absorbs E·A·cos θ, the floor E·(A_floor −
// A)·cos θ while the shadow lies on it.
func TestBeamShadow(t *testing.T) {
	const E = 800.0
	m := mesh.Rectangle("floor", v3(0, 0, 0), v3(2, 0, 0), v3(0, 2, 0), 4, 4)
	if err := m.Append(mesh.Rectangle("square", v3(0.5, 0.5, 0.5), v3(1, 0, 0), v3(0, 1, 0), 1, 1)); err != nil {
		t.Fatal(err)
	}
	th := 40 * math.Pi / 180
	beams := []Beam{{Name: "overhead", Direction: v3(0, 0, -1), Irradiance: E, Rays: 100000},
		{Name: "oblique", Direction: v3(0, math.Sin(th), -math.Cos(th)), Irradiance: E, Rays: 100000}}
	ir := irradiated(t, m, nil, map[string]Optics{"floor": {Emissivity: 1}, "square": {Emissivity: 1}}, beams...)
	for b, cos := range []float64{1, math.Cos(th)} {
		absorbs(t, ir, b, "square", E*cos)
		absorbs(t, ir, b, "floor", E*3*cos)
	}
}

// A sheet of solar absorptance α and transmittance τ over a black plate of
// its size, the beam normal to both: the sheet absorbs αEA, the plate τEA,
// and the sheet's reflection leaves (common practice).
func TestBeamThroughSheet(t *testing.T) {
	const E, alpha, tau = 1000.0, 0.2, 0.5
	for _, spec := range []float64{0, 1} {
		t.Run(fmt.Sprintf("specular %g", spec), func(t *testing.T) {
			m := mesh.Rectangle("plate", v3(0, 0, 0), v3(1, 0, 0), v3(0, 1, 0), 1, 1)
			if err := m.Append(mesh.Rectangle("sheet", v3(0, 0, 0.2), v3(1, 0, 0), v3(0, 1, 0), 1, 1)); err != nil {
				t.Fatal(err)
			}
			sheet := Optics{Emissivity: alpha, Transmittance: tau, Specular: spec}
			ir := irradiated(t, m, []string{"sheet"}, map[string]Optics{"plate": {Emissivity: 1}, "sheet": sheet, "sheet.back": sheet},
				Beam{Name: "down", Direction: v3(0, 0, -1), Irradiance: E, Rays: 100000})
			absorbs(t, ir, 0, "sheet", alpha*E)
			absorbs(t, ir, 0, "plate", tau*E)
			absorbs(t, ir, 0, "sheet.back", 0)
		})
	}
}

// A square duct with mirror walls (solar absorptance 10⁻⁹, wholly specular)
// passes the beam that enters its open top down to a black bottom, however
// often it is reflected on the way: the bottom absorbs E·A_open·cos θ
// (common practice). Rays that meet the duct's outside hit the back of its
// one-sided walls, which is reported.
func TestBeamThroughMirrorDuct(t *testing.T) {
	const E = 500.0
	box := mesh.Box("", geometry.Box{Max: v3(1, 1, 3)}, 1, true)
	var m *mesh.Mesh
	for _, s := range box.Surfaces {
		if s.Name == "zmax" {
			continue // the open top
		}
		var facets [][3]int32
		for _, f := range s.Facets {
			facets = append(facets, box.Facets[f])
		}
		part := mesh.Merge(s.Name, &mesh.Mesh{Vertices: box.Vertices, Facets: facets})
		if m == nil {
			m = part
		} else if err := m.Append(part); err != nil {
			t.Fatal(err)
		}
	}
	optics := map[string]Optics{"zmin": {Emissivity: 1}}
	for _, w := range []string{"xmin", "xmax", "ymin", "ymax"} {
		optics[w] = Optics{Emissivity: 1e-9, Specular: 1}
	}
	th := 35 * math.Pi / 180
	ir := irradiated(t, m, nil, optics, Beam{Name: "slant", Direction: v3(math.Sin(th), 0, -math.Cos(th)), Irradiance: E, Rays: 200000})
	absorbs(t, ir, 0, "zmin", E*math.Cos(th))
	if ir.Back[0] == 0 {
		t.Error("no ray met the duct's outside")
	}
}

// A beam's numbers depend on the seed, the beam and the ray only: any
// thread count gives the same tallies.
func TestBeamDeterminism(t *testing.T) {
	m := ReferenceCases()[1].Mesh
	beams := []Beam{{Name: "a", Direction: v3(0.2, -0.4, -1), Irradiance: 1, Rays: 20000}, {Name: "b", Direction: v3(-1, 0, -0.1), Irradiance: 1, Rays: 9000}}
	var got []*Irradiation
	for _, th := range []int{1, 3} {
		ir, err := Irradiate(context.Background(), m, Options{Settings: Settings{Seed: 8, BatchSize: 1024}, Threads: th}, beams, halfMirrors(m))
		if err != nil {
			t.Fatal(err)
		}
		got = append(got, ir)
	}
	if !reflect.DeepEqual(got[0].res.Tally, got[1].res.Tally) || !reflect.DeepEqual(got[0].res.Replicas, got[1].res.Replicas) {
		t.Error("beam tallies differ between 1 and 3 threads")
	}
}

// Light alike from every direction, of irradiance E on a plate that sees
// only it: a plate facing up, one metre over a black floor of its size,
// absorbs αEA; the floor sees the sky but where the plate hides it, so it
// absorbs E·A·(1 − F), F the view factor between the two squares (Howell's
// catalogue, C-11; by reciprocity with the sky, common practice).
func TestDiffuseSky(t *testing.T) {
	const E, alpha = 300.0, 0.4
	m := mesh.Rectangle("plate", v3(0, 0, 1), v3(1, 0, 0), v3(0, 1, 0), 1, 1)
	if err := m.Append(mesh.Rectangle("floor", v3(0, 0, 0), v3(1, 0, 0), v3(0, 1, 0), 1, 1)); err != nil {
		t.Fatal(err)
	}
	ir := irradiated(t, m, nil, map[string]Optics{"plate": {Emissivity: alpha}, "floor": {Emissivity: 1}},
		Beam{Name: "sky", Irradiance: E, Rays: 4000000, Diffuse: true})
	absorbs(t, ir, 0, "plate", alpha*E)
	absorbs(t, ir, 0, "floor", E*(1-geometry.FParallelRectangles(1, 1, 1)))
}
