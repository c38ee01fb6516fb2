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
		Hits: [][]smooth.Entry{{{J: 1, K: 1000}}, {{J: 0, K: 262}, {J: 1, K: 738}}},
	})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("F12 = %.3f, F21 = %.4f, F22 = %.4f, summation holds: %v\n", r.F[0][0].F, r.F[1][0].F, r.F[1][1].F, r.SummationAfter < 1e-12)
	// Output: F12 = 1.000, F21 = 0.2500, F22 = 0.7500, summation holds: true
}
