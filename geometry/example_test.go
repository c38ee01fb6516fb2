package geometry_test

import (
	"fmt"

	"github.com/hemiray/hemiray/geometry"
)

// The catalogue's value for opposed unit squares one metre apart.
func ExampleFParallelRectangles() {
	fmt.Printf("%.5f\n", geometry.FParallelRectangles(1, 1, 1))
	// Output: 0.19982
}
