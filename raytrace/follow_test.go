package raytrace

import (
	"context"
	"fmt"
	"math"
	"testing"

	"gonum.org/v1/gonum/mat"

	"github.com/hemiray/hemiray/geometry"
	"github.com/hemiray/hemiray/mesh"
)

// followed traces m with rays followed through reflections (plain Monte
// Carlo, so that each factor's standard error is the binomial one).
func followed(t *testing.T, m *mesh.Mesh, rays int64, two []string, optics map[string]Optics) *Result {
	t.Helper()
	r, err := Estimate(context.Background(), m, Options{Settings: Settings{
		Rays: rays, Seed: 7, Sampling: SamplingMC, TwoSided: two, Optics: optics,
	}})
	if err != nil {
		t.Fatal(err)
	}
	return r
}

// near checks one absorption factor against its exact value: within
// 4.5 standard errors (a false alarm about once in 150,000 checks) and the
// stated tessellation allowance, if any.
func near(t *testing.T, r *Result, from, to string, want float64, allow ...float64) {
	t.Helper()
	i, j := r.NodeIndex(from), r.Ambient()
	if to != "ambient" {
		j = r.NodeIndex(to)
	}
	f := r.Factor(i, j)
	tol := 4.5*math.Sqrt(want*(1-want)/float64(f.Rays)) + 1e-12
	for _, a := range allow {
		tol += a
	}
	if math.Abs(f.F-want) > tol {
		t.Errorf("B(%s→%s) = %.5f, exact %.5f: off by %.2g, more than %.2g", from, to, f.F, want, f.F-want, tol)
	}
}

// spherePatches is the inside of a sphere of radius 1 as six surfaces
// p0 … p5 (the faces of the cube it is projected from, n×n cells each).
func spherePatches(t *testing.T, n int) *mesh.Mesh {
	sph := mesh.Sphere("s", geometry.Vec3{}, 1, n, true)
	per := 2 * n * n
	var m *mesh.Mesh
	for k := range 6 {
		part := mesh.Merge(fmt.Sprintf("p%d", k), &mesh.Mesh{Vertices: sph.Vertices, Facets: sph.Facets[k*per : (k+1)*per]})
		if m == nil {
			m = part
		} else if err := m.Append(part); err != nil {
			t.Fatal(err)
		}
	}
	return m
}

// All-diffuse, opaque patches lining a sphere, each of its own emissivity:
// Gebhart's factors B = (I − F R)⁻¹ F E (Gebhart, "Surface temperature
// calculations in radiant surroundings of arbitrary complexity", Int. J.
// Heat Mass Transfer 3, 1961) with F_ij = A_j/A, the view factor between
// any two areas inside a sphere (Siegel & Howell, Thermal Radiation Heat
// Transfer; from memory). Inside a sphere a diffuse emitter irradiates every
// point alike, so the uniform-irradiation premise of Gebhart's method holds
// exactly; in a cube it does not (a face's reflections favour its
// neighbours' near edges), and the ray-followed factors, which need no such
// premise, differ from Gebhart's on coarse nodes by up to 0.02 there.
// Tessellation: the faceted sphere's F depart from A_j/A by less than
// 10⁻³ at n = 24 (common practice: second order in the facet size).
func TestFollowGebhartSphere(t *testing.T) {
	m := spherePatches(t, 24)
	eps := []float64{0.2, 0.9, 0.5, 0.35, 1, 0.65}
	optics := map[string]Optics{}
	for k, e := range eps {
		optics[fmt.Sprintf("p%d", k)] = Optics{Emissivity: e}
	}
	r := followed(t, m, 200000, nil, optics)
	n := len(r.Nodes)
	total := m.TotalArea()
	IFR, FE := mat.NewDense(n, n, nil), mat.NewDense(n, n, nil)
	for i := range n {
		for j := range n {
			f := m.Surfaces[j].Area / total
			IFR.Set(i, j, -f*(1-eps[j]))
			FE.Set(i, j, f*eps[j])
		}
		IFR.Set(i, i, 1+IFR.At(i, i))
	}
	var B mat.Dense
	if err := B.Solve(IFR, FE); err != nil {
		t.Fatal(err)
	}
	for i, a := range r.Nodes {
		for j, b := range r.Nodes {
			near(t, r, a.Name, b.Name, B.At(i, j), 1e-3)
		}
		if s := r.RowSum(i); s != 1 {
			t.Errorf("row %s sums to %v in a closed sphere", a.Name, s)
		}
	}
}

// mirrorBox is a box of the given height over the unit square whose side
// walls are near-perfect mirrors (emissivity 10⁻⁹, wholly specular): seen
// from inside, its floor and ceiling are two infinite parallel plates.
func mirrorBox(h float64) (*mesh.Mesh, map[string]Optics) {
	m := mesh.Box("", geometry.Box{Max: geometry.Vec3{X: 1, Y: 1, Z: h}}, 2, true)
	optics := map[string]Optics{}
	for _, w := range []string{"xmin", "xmax", "ymin", "ymax"} {
		optics[w] = Optics{Emissivity: 1e-9, Specular: 1}
	}
	return m, optics
}

// Infinite parallel plates exchange Q = σA(T₁⁴ − T₂⁴)/(1/ε₁ + 1/ε₂ − 1)
// whatever mix of specular and diffuse reflection they have (Siegel &
// Howell, Thermal Radiation Heat Transfer, the chapter on specular
// surfaces; from memory), that is ε₁B₁₂ = 1/(1/ε₁ + 1/ε₂ − 1); by the
// series of reflections between them B₁₁ = ρ₂ε₁/(1 − ρ₁ρ₂) (common
// practice).
func TestFollowParallelPlates(t *testing.T) {
	const e1, e2 = 0.5, 0.3
	for _, c := range []struct{ s1, s2 float64 }{{0, 0}, {1, 0}, {1, 1}, {0.4, 0.7}} {
		t.Run(fmt.Sprintf("specular %.1f and %.1f", c.s1, c.s2), func(t *testing.T) {
			m, optics := mirrorBox(0.5)
			optics["zmin"] = Optics{Emissivity: e1, Specular: c.s1}
			optics["zmax"] = Optics{Emissivity: e2, Specular: c.s2}
			r := followed(t, m, 60000, nil, optics)
			b12 := 1 / (1/e1 + 1/e2 - 1) / e1
			near(t, r, "zmin", "zmax", b12)
			near(t, r, "zmin", "zmin", (1-e2)*e1/(1-(1-e1)*(1-e2)))
			near(t, r, "zmax", "zmin", e1*b12/e2) // reciprocity, equal areas
		})
	}
}

// A thin sheet of emissivity ε and transmittance τ between a floor of
// emissivity ε₁ and a black ceiling, mirror walls around: of the floor's
// emission the ceiling gets τ/(1 − ρρ₁), the sheet ε/(1 − ρρ₁) and the
// floor itself ρε₁/(1 − ρρ₁), ρ = 1 − ε − τ (the series of reflections
// between floor and sheet; common practice).
func TestFollowSheetTransmits(t *testing.T) {
	const e1, e, tau = 0.6, 0.25, 0.5
	for _, spec := range []float64{0, 1} {
		t.Run(fmt.Sprintf("sheet specular %.0f", spec), func(t *testing.T) {
			m, optics := mirrorBox(1)
			sheet := mesh.Rectangle("sheet", geometry.Vec3{Z: 0.5}, geometry.Vec3{X: 1}, geometry.Vec3{Y: 1}, 1, 1)
			if err := m.Append(sheet); err != nil {
				t.Fatal(err)
			}
			optics["zmin"] = Optics{Emissivity: e1}
			optics["zmax"] = Optics{Emissivity: 1}
			optics["sheet"] = Optics{Emissivity: e, Transmittance: tau, Specular: spec}
			optics["sheet.back"] = Optics{Emissivity: e, Transmittance: tau, Specular: spec}
			r := followed(t, m, 100000, []string{"sheet"}, optics)
			rho := 1 - e - tau
			den := 1 - rho*(1-e1)
			near(t, r, "zmin", "zmax", tau/den)
			near(t, r, "zmin", "sheet.back", e/den)
			near(t, r, "zmin", "zmin", rho*e1/den)
			near(t, r, "zmin", "sheet", 0)
		})
	}
}

// Concentric spheres, inner 1 diffuse, outer 2 an ideal mirror: every ray
// from 1 that 2 reflects comes back to 1, so the exchange is that of
// parallel plates, ε₁B₁₂ = 1/(1/ε₁ + 1/ε₂ − 1); a diffuse outer sphere gives
// ε₁B₁₂ = 1/(1/ε₁ + (A₁/A₂)(1/ε₂ − 1)) (Siegel & Howell, Thermal Radiation
// Heat Transfer, the chapter on specular surfaces; from memory).
//
// The mirror's flat facets tilt its normal away from the radius, which
// lets grazing rays miss the inner sphere: the error is first order in the
// facet size (measured: 0.072, 0.036, 0.020, 0.010 at n = 12, 24, 48, 96
// cells a cube face), so the mirror case is checked by Richardson's
// extrapolation of two meshes, 2B(2n) − B(n), which removes that term.
func TestFollowConcentricSpheres(t *testing.T) {
	const e1, e2 = 0.5, 0.2
	spheres := func(n int) *mesh.Mesh {
		inner := mesh.Sphere("inner", geometry.Vec3{}, 0.5, n/2, false)
		if err := inner.Append(mesh.Sphere("outer", geometry.Vec3{}, 1, n, true)); err != nil {
			t.Fatal(err)
		}
		return inner
	}
	b12 := func(m *mesh.Mesh, spec float64, rays int64) Factor {
		r := followed(t, m, rays, nil, map[string]Optics{
			"inner": {Emissivity: e1}, "outer": {Emissivity: e2, Specular: spec},
		})
		return r.Factor(r.NodeIndex("inner"), r.NodeIndex("outer"))
	}
	t.Run("diffuse outer", func(t *testing.T) {
		m := spheres(32)
		a1, a2 := m.Surfaces[0].Area, m.Surfaces[1].Area
		f, want := b12(m, 0, 100000), 1/(1/e1+a1/a2*(1/e2-1))/e1
		if d := math.Abs(f.F - want); d > 4.5*f.StdErr {
			t.Errorf("B(inner→outer) = %.5f ± %.5f, closed form %.5f", f.F, f.StdErr, want)
		}
	})
	t.Run("mirror outer", func(t *testing.T) {
		coarse, fine := b12(spheres(40), 1, 300000), b12(spheres(80), 1, 300000)
		x, se := 2*fine.F-coarse.F, math.Sqrt(4*fine.StdErr*fine.StdErr+coarse.StdErr*coarse.StdErr)
		want := 1 / (1/e1 + 1/e2 - 1) / e1
		t.Logf("B12 = %.5f (n=40), %.5f (n=80), extrapolated %.5f ± %.5f; closed form %.5f", coarse.F, fine.F, x, se, want)
		if math.Abs(x-want) > 4.5*se {
			t.Errorf("extrapolated B(inner→outer) = %.5f ± %.5f, closed form %.5f", x, se, want)
		}
	})
}

// Intervals of followed rays (RQMC replicates, Student-t) cover: over 200
// seeds the 95 % intervals of B₁₂ and B₁₁ between mirror-walled parallel
// plates contain the exact values (see TestFollowParallelPlates) in 92–98 %
// of runs (±2.7 binomial standard deviations at 200 runs).
func TestFollowIntervalCoverage(t *testing.T) {
	if testing.Short() {
		t.Skip("200 traces")
	}
	const e1, e2, runs = 0.5, 0.3, 200
	m, optics := mirrorBox(0.5)
	optics["zmin"] = Optics{Emissivity: e1, Specular: 1}
	optics["zmax"] = Optics{Emissivity: e2}
	b12 := 1 / (1/e1 + 1/e2 - 1) / e1
	b11 := (1 - e2) * e1 / (1 - (1-e1)*(1-e2))
	covered := [2]int{}
	for seed := range uint64(runs) {
		r, err := Estimate(context.Background(), m, Options{Settings: Settings{Rays: 2000, Seed: seed + 500, Optics: optics}})
		if err != nil {
			t.Fatal(err)
		}
		i := r.NodeIndex("zmin")
		for k, c := range []struct {
			j    int
			want float64
		}{{r.NodeIndex("zmax"), b12}, {i, b11}} {
			if f := r.Factor(i, c.j); f.Lo <= c.want && c.want <= f.Hi {
				covered[k]++
			}
		}
	}
	for k, name := range []string{"B12", "B11"} {
		if c := float64(covered[k]) / runs; c < 0.92 || c > 0.98 {
			t.Errorf("%s: coverage %.3f over %d seeds, want 0.92–0.98", name, c, runs)
		} else {
			t.Logf("%s: coverage %.3f", name, c)
		}
	}
}

// Long coaxial cylinders, inner 1 diffuse, outer 2 an ideal mirror, made
// infinitely long by mirror end plates (the images of a finite length
// between two plane mirrors normal to the axis repeat it without end): as
// for concentric spheres, ε₁B₁₂ = 1/(1/ε₁ + 1/ε₂ − 1) (Siegel & Howell,
// Thermal Radiation Heat Transfer, the chapter on specular surfaces; from
// memory). The outer prism's flat sides tilt the mirror, an error first
// order in the side's angle, removed by extrapolating 64 and 128 sides.
func TestFollowCoaxialCylinders(t *testing.T) {
	const e1, e2 = 0.6, 0.3
	b12 := func(sides int) Factor {
		m := mesh.Cylinder("outer", geometry.Vec3{}, geometry.Vec3{Z: 1}, 1, sides, 1, true, true)
		if err := m.Append(mesh.Cylinder("inner", geometry.Vec3{}, geometry.Vec3{Z: 1}, 0.4, sides, 1, false, false)); err != nil {
			t.Fatal(err)
		}
		mirror := Optics{Emissivity: 1e-9, Specular: 1}
		r := followed(t, m, 150000, nil, map[string]Optics{
			"inner": {Emissivity: e1}, "outer": {Emissivity: e2, Specular: 1}, "outer_bottom": mirror, "outer_top": mirror,
		})
		return r.Factor(r.NodeIndex("inner"), r.NodeIndex("outer"))
	}
	coarse, fine := b12(64), b12(128)
	x, se := 2*fine.F-coarse.F, math.Sqrt(4*fine.StdErr*fine.StdErr+coarse.StdErr*coarse.StdErr)
	want := 1 / (1/e1 + 1/e2 - 1) / e1
	t.Logf("B12 = %.5f (64 sides), %.5f (128), extrapolated %.5f ± %.5f; closed form %.5f", coarse.F, fine.F, x, se, want)
	if math.Abs(x-want) > 4.5*se {
		t.Errorf("extrapolated B(inner→outer) = %.5f ± %.5f, closed form %.5f", x, se, want)
	}
}
