package mesh

import (
	"math"
	"testing"

	"github.com/hemiray/hemiray/geometry"
)

// The triangulation work of a whole file is bounded, not only each
// polygon's: once the file's budget is spent, further polygons are fanned
// at once (a file of many pathological faces cannot take hours), and every
// polygon still gives n − 2 triangles.
func TestTriangulationBudgetPerFile(t *testing.T) {
	old := fileBudget
	fileBudget = 200000
	defer func() { fileBudget = old }()
	// A comb: a concave outline of n corners whose ears are hard to find.
	const n = 400
	var v []geometry.Vec3
	var poly []int32
	for i := range n / 2 {
		x := float64(i)
		v = append(v, geometry.Vec3{X: x, Y: 0}, geometry.Vec3{X: x + 0.5, Y: 10 + math.Mod(x, 3)})
	}
	for i := range v {
		poly = append(poly, int32(i))
	}
	var c earClipper
	for k := range 20 {
		if got := len(c.triangulate(v, poly)); got != n-2 {
			t.Fatalf("polygon %d: %d triangles, want %d", k, got, n-2)
		}
	}
	if c.spent > fileBudget {
		t.Errorf("spent %d point-in-ear tests, budget %d", c.spent, fileBudget)
	}
	if c.spent < fileBudget/2 {
		t.Errorf("spent only %d tests: the comb is not hard enough to test the budget", c.spent)
	}
}
