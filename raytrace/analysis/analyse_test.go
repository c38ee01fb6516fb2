package analysis

import (
	"math"
	"testing"

	"github.com/hemiray/hemiray/geometry"
	"github.com/hemiray/hemiray/mesh"
	"github.com/hemiray/hemiray/raytrace"
	"github.com/hemiray/hemiray/raytrace/exchange"
	"github.com/hemiray/hemiray/raytrace/smooth"
)

func ptr[T any](v T) *T { return &v }

// Student-t half-widths for small replicate counts against the two-sided
// 95 % quantiles of Student's t distribution, t_{0.975,ν} (standard tables,
// e.g. Abramowitz & Stegun, Handbook of Mathematical Functions, 1964,
// Table 26.10; values from memory to four significant figures). Rows with
// a known sample standard deviation s give t·s/√R.
func TestTIntervalQuantiles(t *testing.T) {
	tests := []struct {
		rows  [][]float64
		s     float64 // sample standard deviation of the column
		table float64 // t_{0.975, R−1}
	}{
		{[][]float64{{1}, {3}}, math.Sqrt2, 12.706},
		{[][]float64{{1}, {2}, {3}}, 1, 4.303},
		{[][]float64{{0}, {0}, {2}, {2}}, math.Sqrt(4.0 / 3), 3.182},
		{[][]float64{{1}, {2}, {3}, {4}, {5}, {6}, {7}, {8}}, math.Sqrt(6), 2.365},
	}
	for _, tc := range tests {
		R := float64(len(tc.rows))
		want := tc.table * tc.s / math.Sqrt(R)
		got := TInterval(tc.rows, 0.95)[0]
		if math.Abs(got-want) > 2e-4*want {
			t.Errorf("R=%v: half-width %v, table gives %v", R, got, want)
		}
	}
}

// sheetInBox is a 2 m² sheet (one facet pair) inside a black box held at
// 300 K; both sides of the sheet see only the box (F = 1), the box sees
// the sheet's sides in proportion to area (reciprocity A_i F_ij = A_j F_ji).
func sheetInBox(t *testing.T, c *Case) (*Input, []raytrace.Node, *smooth.Result) {
	t.Helper()
	v := func(x, y, z float64) geometry.Vec3 { return geometry.Vec3{X: x, Y: y, Z: z} }
	m := mesh.Rectangle("sheet", v(0, 0, 1), v(2, 0, 0), v(0, 1, 0), 1, 1)
	if err := m.Append(mesh.Merge("box", mesh.Box("", geometry.Box{Min: v(-1, -1, 0), Max: v(3, 2, 2)}, 1, true))); err != nil {
		t.Fatal(err)
	}
	ab := m.Surfaces[1].Area
	c.Ambient.Temperature = nil
	c.Surfaces["box"] = SurfaceSpec{Emissivity: ptr(1.0), Temperature: ptr(300.0)}
	in := &Input{Case: c, Mesh: m}
	var nodes []raytrace.Node
	var sm smooth.Result
	toBox := smooth.FactorRow{Col: []int32{2}, Val: []float64{1}}
	if c.Spec("sheet").IsTwoSided() {
		nodes = []raytrace.Node{{Name: "sheet", Area: 2}, {Name: "sheet.back", Back: true, Area: 2}, {Name: "box", Surface: 1, Area: ab}}
		sm.F = []smooth.FactorRow{toBox, toBox, {Col: []int32{0, 1, 2}, Val: []float64{2 / ab, 2 / ab, 1 - 4/ab}}}
	} else { // facet nodes: the two triangles of 1 m² each
		nodes = []raytrace.Node{{Name: "sheet#0", Area: 1}, {Name: "sheet#1", Area: 1}, {Name: "box", Surface: 1, Area: ab}}
		sm.F = []smooth.FactorRow{toBox, toBox, {Col: []int32{0, 1, 2}, Val: []float64{1 / ab, 1 / ab, 1 - 2/ab}}}
	}
	return in, nodes, &sm
}

// blackT is the temperature of a black surface of area A giving off Q to
// black surroundings at Tb that it sees entirely: Q = σA(T⁴ − Tb⁴)
// (Incropera & DeWitt, Fundamentals of Heat and Mass Transfer, 6th ed.,
// eq. 13.13 with F = 1; from memory).
func blackT(Q, A, Tb float64) float64 { return math.Pow(Tb*Tb*Tb*Tb+Q/(exchange.Sigma*A), 0.25) }

// A heat flux on a two-sided sheet is per unit of the sheet's area: the
// sheet gives off flux·A through both faces together, at one temperature.
func TestTwoSidedSheetFluxAndFlow(t *testing.T) {
	for _, tc := range []struct {
		name string
		spec SurfaceSpec
		Q    float64 // W the sheet gives off
	}{
		{"heat_flux 100 W/m² on 2 m²", SurfaceSpec{TwoSided: ptr(true), Emissivity: ptr(1.0), HeatFlux: ptr(100.0)}, 200},
		{"heat_flow 50 W", SurfaceSpec{TwoSided: ptr(true), Emissivity: ptr(1.0), HeatFlow: ptr(50.0)}, 50},
	} {
		c := &Case{Surfaces: map[string]SurfaceSpec{"sheet": tc.spec, "sheet.back": {Emissivity: ptr(1.0)}}}
		in, nodes, sm := sheetInBox(t, c)
		a, err := in.solve(nodes, func() (*smooth.Result, error) { return sm, nil }, nil, false, false, 0.95)
		if err != nil {
			t.Fatal(err)
		}
		sol := a.Solution
		if q := sol.Q[0] + sol.Q[1]; math.Abs(q-tc.Q) > 1e-9*tc.Q {
			t.Errorf("%s: the sheet gives off %v W, want %v", tc.name, q, tc.Q)
		}
		// Both sides radiate: 4 m² of black surface at one temperature.
		if want := blackT(tc.Q, 4, 300); math.Abs(sol.T[0]-want) > 1e-9*want || sol.T[1] != sol.T[0] {
			t.Errorf("%s: T = %v, %v K; closed form %v K", tc.name, sol.T[0], sol.T[1], want)
		}
		if a.Info[1].Condition != "shared with sheet" {
			t.Errorf("%s: back's condition %q", tc.name, a.Info[1].Condition)
		}
	}
}

// A surface's heat flow is shared over its facet nodes by area.
func TestHeatFlowSharedByArea(t *testing.T) {
	c := &Case{Surfaces: map[string]SurfaceSpec{"sheet": {Emissivity: ptr(1.0), HeatFlow: ptr(50.0)}}}
	in, nodes, sm := sheetInBox(t, c)
	a, err := in.solve(nodes, func() (*smooth.Result, error) { return sm, nil }, nil, false, false, 0.95)
	if err != nil {
		t.Fatal(err)
	}
	for k := range 2 { // 1 m² of 2 m² each: 25 W each, by hand
		if q := a.Solution.Q[k]; math.Abs(q-25) > 1e-9 {
			t.Errorf("facet node %d gives off %v W, want 25", k, q)
		}
		if want := blackT(25, 1, 300); math.Abs(a.Solution.T[k]-want) > 1e-9*want {
			t.Errorf("facet node %d: T = %v K, closed form %v K", k, a.Solution.T[k], want)
		}
	}
	if q := a.Solution.Q[2]; math.Abs(q+50) > 1e-9 {
		t.Errorf("the box takes up %v W, want −50", q)
	}
}
