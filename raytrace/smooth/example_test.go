package smooth_test

import (
	"fmt"

	"github.com/hemiray/hemiray/raytrace/smooth"
)

// Smooth raw counts of a closed two-surface enclosure (a small convex body
// of area 1 inside a shell of area 4): reciprocity forces F21 = A1·F12/A2.
func ExampleSmooth() {
	r, err := smooth.Smooth(smooth.Counts{
		Area: []float64{1, 4},
		Rays: []int64{1000, 1000},
		Hits: []smooth.CountRow{{Col: []int32{1}, Val: []int64{1000}}, {Col: []int32{0, 1}, Val: []int64{262, 738}}},
	})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("F12 = %.3f, F21 = %.4f, F22 = %.4f, summation holds: %v\n", r.F[0].Val[0], r.F[1].Val[0], r.F[1].Val[1], r.SummationAfter < 1e-12)
	// Output: F12 = 1.000, F21 = 0.2500, F22 = 0.7500, summation holds: true
}
