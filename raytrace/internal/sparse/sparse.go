// Package sparse is the small sparse linear-algebra kit that smoothing and
// the exchange solver share: a compressed-sparse-row matrix, a dot product
// and conjugate gradients with a Jacobi (diagonal) preconditioner.
package sparse

import (
	"math"
	"slices"
	"sort"
)

// CSR is a square matrix in compressed sparse row form: the entries of row
// r are Col[Start[r]:Start[r+1]] (increasing) and their values; Diag holds
// the diagonal.
type CSR struct {
	N     int
	Start []int
	Col   []int32
	Val   []float64
	Diag  []float64
}

// FromTriplets builds an n×n CSR matrix from entries (rows[k], cols[k],
// vals[k]); entries at the same place are summed. Indices must be in
// [0, n). The matrix may take over cols and vals (when rows come in
// order, as assembly usually gives them): the caller must not use them
// afterwards. Not copying spares the memory, and on large systems the
// time of touching fresh pages, which dominated the assembly.
func FromTriplets(n int, rows, cols []int32, vals []float64) *CSR {
	// Counting sort of the triplets by row, then each row by column.
	c := &CSR{N: n, Start: make([]int, n+1), Diag: make([]float64, n)}
	for _, r := range rows {
		c.Start[r+1]++
	}
	for r := range n {
		c.Start[r+1] += c.Start[r]
	}
	col, val := cols, vals
	if !slices.IsSorted(rows) {
		col, val = make([]int32, len(rows)), make([]float64, len(rows))
		next := slices.Clone(c.Start[:n])
		for k, r := range rows {
			col[next[r]], val[next[r]] = cols[k], vals[k]
			next[r]++
		}
	}
	out := 0
	for r := range n {
		lo, hi := c.Start[r], c.Start[r+1]
		seg := col[lo:hi]
		switch {
		case slices.IsSorted(seg):
		case slices.IsSorted(seg[1:]):
			// In order but for the first entry (a diagonal assembled
			// before its row, as a rule): move it to its place.
			c0, v0 := seg[0], val[lo]
			p, _ := slices.BinarySearch(seg[1:], c0)
			copy(seg[:p], seg[1:p+1])
			copy(val[lo:lo+p], val[lo+1:lo+p+1])
			seg[p], val[lo+p] = c0, v0
		default:
			sort.Sort(rowSegment{seg, val[lo:hi]})
		}
		c.Start[r] = out
		for k := lo; k < hi; k++ {
			if out > c.Start[r] && col[out-1] == col[k] {
				val[out-1] += val[k]
				continue
			}
			col[out], val[out] = col[k], val[k]
			out++
		}
	}
	c.Start[n] = out
	c.Col, c.Val = col[:out], val[:out]
	for r := range n {
		c.Diag[r] = c.At(r, r)
	}
	return c
}

// rowSegment sorts one row's columns and values together (a stable order
// is not needed: equal columns are summed).
type rowSegment struct {
	col []int32
	val []float64
}

func (r rowSegment) Len() int           { return len(r.col) }
func (r rowSegment) Less(a, b int) bool { return r.col[a] < r.col[b] }
func (r rowSegment) Swap(a, b int) {
	r.col[a], r.col[b] = r.col[b], r.col[a]
	r.val[a], r.val[b] = r.val[b], r.val[a]
}

// At returns the entry at row r, column col.
func (c *CSR) At(r, col int) float64 {
	lo, hi := c.Start[r], c.Start[r+1]
	k, found := slices.BinarySearch(c.Col[lo:hi], int32(col))
	if found {
		return c.Val[lo+k]
	}
	return 0
}

// Symmetric reports whether c equals its transpose (pattern, and values to
// a relative 1e-9), in O(entries) and without a copy of c.
func (c *CSR) Symmetric() bool {
	// Rows are visited in order, so the entries (j, r) that mirror row r's
	// entries below the diagonal come up in row j in increasing r: one
	// cursor per row, past its diagonal, pairs them without a transpose.
	next := make([]int, c.N)
	for j := range c.N {
		k := c.Start[j]
		for k < c.Start[j+1] && int(c.Col[k]) <= j {
			k++
		}
		next[j] = k
	}
	for r := range c.N {
		for k := c.Start[r]; k < c.Start[r+1] && int(c.Col[k]) < r; k++ {
			j := c.Col[k]
			m := next[j]
			if m == c.Start[j+1] || int(c.Col[m]) != r {
				return false
			}
			if v, w := c.Val[k], c.Val[m]; math.Abs(v-w) > 1e-9*math.Max(math.Abs(v), math.Abs(w)) {
				return false
			}
			next[j]++
		}
	}
	for j := range c.N { // every entry above the diagonal was paired
		if next[j] != c.Start[j+1] {
			return false
		}
	}
	return true
}

// Mul writes c·x into y.
func (c *CSR) Mul(y, x []float64) {
	for r := range c.N {
		s := 0.0
		for k := c.Start[r]; k < c.Start[r+1]; k++ {
			s += c.Val[k] * x[c.Col[k]]
		}
		y[r] = s
	}
}

// Dot returns Σ a_i b_i.
func Dot(a, b []float64) float64 {
	s := 0.0
	for i := range a {
		s += a[i] * b[i]
	}
	return s
}

// CG solves A·x = b for a symmetric positive definite A, given as mul
// (y = A·x) and its diagonal, by conjugate gradients with the Jacobi
// preconditioner (Saad, "Iterative Methods for Sparse Linear Systems",
// 2nd ed., SIAM 2003, Algorithm 9.1; from memory). x starts at 0. It stops
// when ‖r‖ ≤ tol·‖b‖ (converged) or after maxIter iterations, or when
// pᵀAp ≤ 0 shows A is not positive definite along p (not converged; x is
// then the last iterate).
func CG(mul func(y, x []float64), diag, b, x []float64, tol float64, maxIter int) (converged bool) {
	n := len(b)
	r, z, p, ap := slices.Clone(b), make([]float64, n), make([]float64, n), make([]float64, n)
	bn := math.Sqrt(Dot(b, b))
	rz := 0.0
	for i := range r {
		x[i] = 0
		z[i] = r[i] / diag[i]
		p[i] = z[i]
		rz += r[i] * z[i]
	}
	if bn == 0 {
		return true
	}
	for range maxIter {
		mul(ap, p)
		pap := Dot(p, ap)
		if !(pap > 0) {
			return false
		}
		a := rz / pap
		for i := range x {
			x[i] += a * p[i]
			r[i] -= a * ap[i]
		}
		if math.Sqrt(Dot(r, r)) <= tol*bn {
			return true
		}
		rzNew := 0.0
		for i := range r {
			z[i] = r[i] / diag[i]
			rzNew += r[i] * z[i]
		}
		beta := rzNew / rz
		rz = rzNew
		for i := range p {
			p[i] = z[i] + beta*p[i]
		}
	}
	return false
}
