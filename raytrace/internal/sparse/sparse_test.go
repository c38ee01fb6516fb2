package sparse

import (
	"math"
	"testing"
)

// The 1-D Poisson matrix tridiag(−1, 2, −1) with b = A·1 has the solution
// x = 1 (a standard test problem, e.g. Saad 2003, ch. 2; common practice).
func TestCGPoisson(t *testing.T) {
	const n = 50
	var rows, cols []int
	var vals []float64
	for i := range n {
		rows, cols, vals = append(rows, i), append(cols, i), append(vals, 2)
		if i > 0 {
			rows, cols, vals = append(rows, i, i), append(cols, i-1, i-1), append(vals, -0.5, -0.5) // summed to −1
		}
		if i < n-1 {
			rows, cols, vals = append(rows, i), append(cols, i+1), append(vals, -1)
		}
	}
	a := FromTriplets(n, rows, cols, vals)
	if !a.Symmetric() || a.At(3, 2) != -1 || a.Diag[7] != 2 {
		t.Fatalf("assembly: symmetric %v, A[3,2] = %v, diag %v", a.Symmetric(), a.At(3, 2), a.Diag[7])
	}
	one := make([]float64, n)
	for i := range one {
		one[i] = 1
	}
	b := make([]float64, n)
	a.Mul(b, one)
	if b[0] != 1 || b[n/2] != 0 || b[n-1] != 1 {
		t.Fatalf("A·1 = %v", b)
	}
	x := make([]float64, n)
	if !CG(a.Mul, a.Diag, b, x, 1e-13, 10*n) {
		t.Fatal("no convergence")
	}
	for i, v := range x {
		if math.Abs(v-1) > 1e-10 {
			t.Fatalf("x[%d] = %v, want 1", i, v)
		}
	}
	// Asymmetric values, and an asymmetric pattern, are told apart.
	if FromTriplets(2, []int{0, 1}, []int{1, 0}, []float64{1, 2}).Symmetric() || FromTriplets(2, []int{0}, []int{1}, []float64{1}).Symmetric() {
		t.Error("an asymmetric matrix is taken for symmetric")
	}
	// An indefinite matrix is reported, not solved.
	neg := FromTriplets(2, []int{0, 1}, []int{0, 1}, []float64{1, -1})
	if CG(neg.Mul, []float64{1, 1}, []float64{1, 1}, make([]float64, 2), 1e-12, 10) {
		t.Error("CG claims convergence on an indefinite matrix")
	}
}
