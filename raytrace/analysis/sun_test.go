package analysis

import (
	"math"
	"runtime"
	"strings"
	"testing"

	"github.com/hemiray/hemiray/geometry"
	"github.com/hemiray/hemiray/mesh"
	"github.com/hemiray/hemiray/raytrace"
	"github.com/hemiray/hemiray/raytrace/exchange"
)

// A plate in deep space (surroundings at 0 K) turned to the sun at angle θ
// and insulated behind reaches radiative equilibrium at
// εσT⁴ = αE cos θ (Gilmore (ed.), Spacecraft Thermal Control Handbook,
// 2002, the energy balance of an isolated surface; from memory). Two suns
// in one case give one steady state each.
func TestSunEquilibriumPlate(t *testing.T) {
	const alpha, eps, E = 0.6, 0.85, 1361.0
	m := mesh.Rectangle("plate", geometry.Vec3{}, geometry.Vec3{X: 1}, geometry.Vec3{Y: 0.5}, 2, 2)
	zero := 0.0
	c := &Case{
		Rays:    RaySpec{PerNode: 1000, Seed: 2},
		Ambient: AmbientSpec{Temperature: &zero},
		Surfaces: map[string]SurfaceSpec{
			"plate": {Emissivity: ptr(eps), SolarAbsorptance: ptr(alpha), Adiabatic: ptr(true)},
		},
		Suns: []SunSpec{
			{Name: "facing", Toward: []float64{0, 0, 1}, Irradiance: E, Rays: 100000},
			{Name: "slanted", Azimuth: ptr(30.0), Elevation: ptr(30.0), Irradiance: E, Rays: 100000},
		},
	}
	a := analysed(t, openWith(t, m, c))
	if len(a.Suns) != 2 {
		t.Fatalf("%d sun states, want 2", len(a.Suns))
	}
	for k, cos := range []float64{1, math.Cos(60 * math.Pi / 180)} {
		s := a.Suns[k]
		load := alpha * E * 0.5 * cos
		if math.Abs(s.Load[0]-load) > 2*s.LoadHalf[0] || s.LoadHalf[0] > 0.01*load {
			t.Errorf("%s: plate absorbs %.4g ± %.2g W, exact %.4g W", s.Name, s.Load[0], s.LoadHalf[0], load)
		}
		want := math.Pow(alpha*E*cos/(eps*exchange.Sigma), 0.25)
		if T := s.Solution.T[0]; math.Abs(T-want) > 2*s.THalf[0] || s.THalf[0] > 1 {
			t.Errorf("%s: plate at %.3f ± %.3f K, equilibrium %.3f K", s.Name, T, s.THalf[0], want)
		}
		if q := s.Solution.Q[0]; math.Abs(q) > 1e-9*load {
			t.Errorf("%s: an insulated plate gives off %v W net", s.Name, q)
		}
	}
	if a.Solution != a.Suns[0].Solution {
		t.Error("the main solution is not the first sun's")
	}
}

// Without a solar absorptance a sun cannot be traced: the case says which
// surface lacks it.
func TestSunNeedsAbsorptance(t *testing.T) {
	c := &Case{
		Model:    ModelSpec{Files: []string{"x.obj"}},
		Surfaces: map[string]SurfaceSpec{"plate": {Emissivity: ptr(0.5)}},
		Suns:     []SunSpec{{Name: "noon", Toward: []float64{0, 0, 1}, Irradiance: 1000}},
	}
	if _, _, err := c.sunlight([]string{"plate"}); err == nil || !strings.Contains(err.Error(), "no solar_absorptance for plate") {
		t.Errorf("missing absorptance: %v", err)
	}
	for _, bad := range []SunSpec{
		{Name: "a b", Toward: []float64{0, 0, 1}, Irradiance: 1},
		{Name: "x", Irradiance: 1},
		{Name: "x", Toward: []float64{0, 0}, Irradiance: 1},
		{Name: "x", Toward: []float64{0, 0, 1}, Azimuth: ptr(1.0), Elevation: ptr(1.0), Irradiance: 1},
		{Name: "x", Toward: []float64{0, 0, 1}},
		{Name: "x", Azimuth: ptr(0.0), Elevation: ptr(95.0), Irradiance: 1},
		{Name: "sky", Toward: []float64{0, 0, 1}, Irradiance: 1},
	} {
		c.Suns = []SunSpec{bad}
		if err := c.Validate(); err == nil {
			t.Errorf("sun %+v accepted", bad)
		}
	}
}

// A sky of irradiance E_s adds to the sun on every state: the plate facing
// the sun at equilibrium reaches εσT⁴ = α(E cos θ + E_s) (the same energy
// balance; the plate's front sees only sky).
func TestSunAndSky(t *testing.T) {
	const alpha, eps, E, Es = 0.6, 0.85, 1000.0, 200.0
	m := mesh.Rectangle("plate", geometry.Vec3{}, geometry.Vec3{X: 1}, geometry.Vec3{Y: 0.5}, 2, 2)
	zero := 0.0
	c := &Case{
		Rays:     RaySpec{PerNode: 1000, Seed: 2},
		Ambient:  AmbientSpec{Temperature: &zero},
		Surfaces: map[string]SurfaceSpec{"plate": {Emissivity: ptr(eps), SolarAbsorptance: ptr(alpha), Adiabatic: ptr(true)}},
		Suns:     []SunSpec{{Name: "facing", Toward: []float64{0, 0, 1}, Irradiance: E, Rays: 200000}},
		Sky:      SkySpec{Irradiance: Es, Rays: 2000000},
	}
	a := analysed(t, openWith(t, m, c))
	s := a.Suns[0]
	load := alpha * (E + Es) * 0.5
	if math.Abs(s.Load[0]-load) > 2*s.LoadHalf[0] || s.LoadHalf[0] > 0.02*load {
		t.Errorf("plate absorbs %.4g ± %.2g W, exact %.4g W", s.Load[0], s.LoadHalf[0], load)
	}
	want := math.Pow(alpha*(E+Es)/(eps*exchange.Sigma), 0.25)
	if T := s.Solution.T[0]; math.Abs(T-want) > 2*s.THalf[0] {
		t.Errorf("plate at %.3f ± %.3f K, equilibrium %.3f K", T, s.THalf[0], want)
	}
	c.Suns = nil // the sky alone: a state of its own
	a = analysed(t, openWith(t, m, c))
	if len(a.Suns) != 1 || a.Suns[0].Name != "sky" {
		t.Fatalf("states %+v, want the sky's", a.Suns)
	}
	if l, h := a.Suns[0].Load[0], a.Suns[0].LoadHalf[0]; math.Abs(l-alpha*Es*0.5) > 2*h {
		t.Errorf("under the sky alone the plate absorbs %.4g ± %.2g W, exact %.4g", l, h, alpha*Es*0.5)
	}
}

// The memory estimate counts the pooled matrix's entries and one
// replicate per further worker, bytesPerEntry each.
func TestAnalysisBytes(t *testing.T) {
	row := func(cols ...int32) raytrace.Row {
		r := raytrace.Row{}
		for _, c := range cols {
			r.Append(c, 1)
		}
		return r
	}
	res := &raytrace.Result{Tally: raytrace.Tally{Hits: []raytrace.Row{row(0, 1, 2), row(1)}},
		Replicas: []raytrace.Tally{{Hits: []raytrace.Row{row(0), row(1)}}, {Hits: []raytrace.Row{row(0, 2), row(1)}}}}
	side := int64(min(2, max(1, runtime.GOMAXPROCS(0)-1)))
	if got, want := AnalysisBytes(res), bytesPerEntry*(4+side*3); got != want {
		t.Errorf("AnalysisBytes = %d, want %d", got, want)
	}
}
