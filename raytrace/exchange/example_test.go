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

// The radiative conductance between two long concentric cylinders (radii
// 0.1 m and 0.25 m, per metre of length; the inner sees only the outer,
// F21 = r1/r2): σA1ℱ12 with A1ℱ12 = A1/(1/ε1 + (A1/A2)(1/ε2 − 1))
// (Incropera & DeWitt, the two-surface enclosure).
func ExampleTotalExchange() {
	a1, a2 := 2*3.141592653589793*0.1, 2*3.141592653589793*0.25
	c, err := exchange.TotalExchange(
		[]float64{a1, a2}, []float64{0.6, 0.9},
		[]exchange.Row{{Col: []int32{1}, Val: []float64{1}}, {Col: []int32{0, 1}, Val: []float64{0.4, 0.6}}},
		nil, 0)
	if err != nil {
		fmt.Println(err)
		return
	}
	s := c.Lower[1].At(0)
	fmt.Printf("A1ℱ12 = %.4f m², conductance %.4g W/K⁴\n", s, exchange.Sigma*s)
	// A1ℱ12 = 0.6283/(1/0.6 + 0.4·(1/0.9 − 1)) = 0.6283/1.7111 = 0.3672 m².

	// Output: A1ℱ12 = 0.3672 m², conductance 2.082e-08 W/K⁴
}
