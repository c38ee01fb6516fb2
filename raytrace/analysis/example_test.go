package analysis_test

import (
	"context"
	"fmt"

	"github.com/hemiray/hemiray/raytrace/analysis"
)

// From a mesh file to temperatures and heat flows: an open cabinet (a floor
// and a back wall, testdata/cabinet_multi.stl) whose floor is held at 350 K
// while the back wall only reradiates, in a 293 K room.
func Example() {
	f := func(x float64) *float64 { return &x }
	c := &analysis.Case{
		Dir:      "../../testdata",
		Model:    analysis.ModelSpec{Files: []string{"cabinet_multi.stl"}},
		Rays:     analysis.RaySpec{PerNode: 40000, Seed: 1, Replicates: 4},
		Ambient:  analysis.AmbientSpec{Temperature: f(293)},
		Defaults: analysis.SurfaceSpec{Emissivity: f(0.9)},
		Surfaces: map[string]analysis.SurfaceSpec{
			"floor":     {Temperature: f(350)},
			"back_wall": {Adiabatic: new(true)},
		},
	}
	in, err := analysis.Open(c)
	if err != nil {
		panic(err)
	}
	t, err := in.Trace(context.Background(), analysis.Run{}) // no Dir: no tally file
	if err != nil {
		panic(err)
	}
	a, err := in.Analyse(t.Result)
	if err != nil {
		panic(err)
	}
	for i, n := range a.Nodes {
		fmt.Printf("%-9s T = %5.1f K ± %.2f   Q = %7.1f W ± %.2f\n", n.Name, a.Solution.T[i], a.THalf[i], a.Solution.Q[i], a.QHalf[i])
	}
	fmt.Printf("to the room: %.1f W\n", a.Solution.ToAmbient)
	// Output:
	// floor     T = 350.0 K ± 0.00   Q =    44.7 W ± 0.03
	// back_wall T = 308.5 K ± 0.10   Q =     0.0 W ± 0.00
	// to the room: 44.7 W
}
