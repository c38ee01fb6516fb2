package exchange_test

import (
	"fmt"

	"github.com/hemiray/hemiray/raytrace/exchange"
)

// Solve a heater plate facing a parallel plate held at 300 K (large plates,
// F = 1 both ways): the heater's temperature for 1 kW/m² net.
func ExampleSolve() {
	p := exchange.Problem{
		Area:       []float64{1, 1},
		Emissivity: []float64{0.8, 0.5},
		Cond:       []exchange.Condition{{Kind: exchange.HeatFlux, Value: 1000}, {Kind: exchange.Temperature, Value: 300}},
		F:          []exchange.Row{{Col: []int32{1}, Val: []float64{1}}, {Col: []int32{0}, Val: []float64{1}}},
	}
	sol, err := exchange.Solve(p)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("heater %.1f K, cold plate takes %.0f W\n", sol.T[0], -sol.Q[1])
	// σT1⁴ = σT2⁴ + q(1/ε1 + 1/ε2 − 1) = 459.3 + 2250 W/m² → 467.5 K.

	// Output: heater 467.5 K, cold plate takes 1000 W
}
