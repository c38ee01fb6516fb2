package sparse

import (
	"math"
	"math/rand/v2"
	"slices"
	"testing"
)

// The 1-D Poisson matrix tridiag(−1, 2, −1) with b = A·1 has the solution
// x = 1 (a standard test problem, e.g. Saad 2003, ch. 2; common practice).
func TestCGPoisson(t *testing.T) {
	const n = 50
	var rows, cols []int32
	var vals []float64
	for i := range int32(n) {
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
	if FromTriplets(2, []int32{0, 1}, []int32{1, 0}, []float64{1, 2}).Symmetric() || FromTriplets(2, []int32{0}, []int32{1}, []float64{1}).Symmetric() {
		t.Error("an asymmetric matrix is taken for symmetric")
	}
	// An indefinite matrix is reported, not solved.
	neg := FromTriplets(2, []int32{0, 1}, []int32{0, 1}, []float64{1, -1})
	if CG(neg.Mul, []float64{1, 1}, []float64{1, 1}, make([]float64, 2), 1e-12, 10) {
		t.Error("CG claims convergence on an indefinite matrix")
	}
}

// Symmetric against the definition A = Aᵀ, on a random symmetric matrix
// and on copies of it with one entry changed, one mirror missing, or rows
// assembled out of column order.
func TestSymmetricCases(t *testing.T) {
	rng := rand.New(rand.NewPCG(9, 9))
	const n = 40
	var rows, cols []int32
	var vals []float64
	for i := range int32(n) {
		rows, cols, vals = append(rows, i), append(cols, i), append(vals, 4)
		for j := i + 1; j < n; j++ {
			if rng.IntN(4) == 0 {
				v := rng.Float64()
				rows, cols, vals = append(rows, i, j), append(cols, j, i), append(vals, v, v)
			}
		}
	}
	changed := slices.Clone(vals)
	changed[slices.IndexFunc(rows, func(r int32) bool { return r != 0 })-1] *= 1 + 1e-6 // row 0's last entry, off the diagonal
	shuffled := rng.Perm(len(rows))
	perm := func(x []int32) []int32 {
		y := make([]int32, len(x))
		for k, p := range shuffled {
			y[k] = x[p]
		}
		return y
	}
	permVals := make([]float64, len(vals))
	for k, p := range shuffled {
		permVals[k] = vals[p]
	}
	for _, tc := range []struct {
		name       string
		rows, cols []int32
		vals       []float64
		want       bool
	}{
		{"symmetric", rows, cols, vals, true},
		{"one value changed", rows, cols, changed, false},
		{"upper entry without its mirror", append(slices.Clone(rows), 0), append(slices.Clone(cols), n-1), append(slices.Clone(vals), 7), false},
		{"lower entry without its mirror", append(slices.Clone(rows), n-1), append(slices.Clone(cols), 0), append(slices.Clone(vals), 7), false},
		{"assembled out of order", perm(rows), perm(cols), permVals, true},
		{"a mirror in the wrong column", []int32{0, 1, 2, 0, 1}, []int32{0, 1, 2, 2, 0}, []float64{4, 4, 4, 7, 7}, false},
	} {
		// FromTriplets may take over cols and vals: give it copies.
		if got := FromTriplets(n, tc.rows, slices.Clone(tc.cols), slices.Clone(tc.vals)).Symmetric(); got != tc.want {
			t.Errorf("%s: Symmetric() = %v, want %v", tc.name, got, tc.want)
		}
	}
}

// Triplets in row order (taken over in place) and the same triplets
// shuffled (counting-sorted into new arrays), duplicates included, give
// the same matrix, duplicates summed. Rows 0 … n−1 have random columns;
// rows n … 2n−1 are assembled as the exchange solver does, the diagonal
// first and then increasing columns, the diagonal's among them now and
// then.
func TestFromTripletsInPlaceAndSorted(t *testing.T) {
	rng := rand.New(rand.NewPCG(11, 11))
	const n, size = 30, 60
	var rows, cols []int32
	var vals []float64
	for i := range int32(n) {
		for range 1 + rng.IntN(6) {
			rows, cols, vals = append(rows, i), append(cols, int32(rng.IntN(size))), append(vals, float64(rng.IntN(100)))
		}
	}
	for i := int32(n); i < size; i++ {
		rows, cols, vals = append(rows, i), append(cols, i), append(vals, 1000)
		for j := range int32(size) {
			if rng.IntN(3) == 0 || j == i && rng.IntN(2) == 0 {
				rows, cols, vals = append(rows, i), append(cols, j), append(vals, float64(rng.IntN(100)))
			}
		}
	}
	shuffled := rng.Perm(len(rows))
	r2, c2, v2 := make([]int32, len(rows)), make([]int32, len(rows)), make([]float64, len(rows))
	for k, p := range shuffled {
		r2[k], c2[k], v2[k] = rows[p], cols[p], vals[p]
	}
	dense := make([][]float64, size)
	for i := range dense {
		dense[i] = make([]float64, size)
	}
	for k := range rows {
		dense[rows[k]][cols[k]] += vals[k]
	}
	for _, c := range []*CSR{FromTriplets(size, rows, slices.Clone(cols), slices.Clone(vals)), FromTriplets(size, r2, c2, v2)} {
		for i := range size {
			if !slices.IsSorted(c.Col[c.Start[i]:c.Start[i+1]]) {
				t.Fatalf("row %d columns not increasing: %v", i, c.Col[c.Start[i]:c.Start[i+1]])
			}
			for j := range size {
				if c.At(i, j) != dense[i][j] {
					t.Fatalf("A[%d][%d] = %v, want %v", i, j, c.At(i, j), dense[i][j])
				}
			}
			if c.Diag[i] != dense[i][i] {
				t.Fatalf("diag %d = %v, want %v", i, c.Diag[i], dense[i][i])
			}
		}
		if c.Start[size] != len(c.Col) {
			t.Fatalf("entries %d, Start[n] %d", len(c.Col), c.Start[size])
		}
	}
}

// BlockCG solves each vector exactly as CG alone would, to the bit, each
// stopping on its own (one converges in an iteration, others take many),
// whatever the block width: the exchange areas then do not depend on how
// columns are grouped or how many workers share them.
func TestBlockCGMatchesCG(t *testing.T) {
	const n = 50
	rng := rand.New(rand.NewPCG(5, 5))
	var rows Rows = make(Rows, n)
	dense := make([][]float64, n)
	for i := range dense {
		dense[i] = make([]float64, n)
	}
	for i := range n {
		for j := range i {
			if j >= 10 && rng.Float64() < 0.2 { // rows 0–9 only on the diagonal
				v := -rng.Float64()
				dense[i][j], dense[j][i] = v, v
			}
		}
	}
	diag := make([]float64, n)
	for i := range n {
		s := 1.0
		for _, v := range dense[i] {
			s -= v
		}
		dense[i][i], diag[i] = s, s
		for j, v := range dense[i] {
			if v != 0 {
				rows[i].Append(int32(j), v)
			}
		}
	}
	const vectors = 7
	b := make([][]float64, vectors)
	want := make([][]float64, vectors)
	for c := range b {
		b[c] = make([]float64, n)
		for i := range b[c] {
			b[c][i] = rng.NormFloat64()
		}
		if c == 3 {
			clear(b[c]) // a zero right-hand side is done at once
		}
		if c == 5 {
			clear(b[c][10:]) // on the diagonal block: one iteration, while the others take many
		}
		want[c] = make([]float64, n)
		mul := func(y, x []float64) { rows.MulBlock(y, x, 1) }
		if !CG(mul, diag, b[c], want[c], 1e-12, 500) {
			t.Fatal("CG did not converge")
		}
	}
	for _, m := range []int{1, 3, vectors} {
		for lo := 0; lo < vectors; lo += m {
			w := min(m, vectors-lo)
			bb, x := make([]float64, n*w), make([]float64, n*w)
			for q := range w {
				for i := range n {
					bb[i*w+q] = b[lo+q][i]
				}
			}
			mul := func(y, x []float64) { rows.MulBlock(y, x, w) }
			if _, ok := BlockCG(mul, diag, bb, x, w, 1e-12, 500); !ok {
				t.Fatalf("block of %d did not converge", w)
			}
			for q := range w {
				for i := range n {
					if x[i*w+q] != want[lo+q][i] {
						t.Fatalf("width %d, vector %d, entry %d: %v, CG alone %v", m, lo+q, i, x[i*w+q], want[lo+q][i])
					}
				}
			}
		}
	}
}
