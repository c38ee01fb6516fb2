package exchange

import (
	"fmt"
	"math"
	"slices"

	"github.com/hemiray/hemiray/raytrace/internal/sparse"
	"gonum.org/v1/gonum/mat"
)

// system is the linear system of a solve in two parts: the view-factor
// terms, row v[k] holding −scale[k]·F_kj at column v[j] for every node k
// with a row (scale[k] > 0) and every j of unknown radiosity (v[j] ≥ 0),
// read from F's rows where they are; and a few triplets for everything
// else (the diagonals, the couplings of shared-temperature groups). At
// 10⁴ nodes F holds 10⁷–10⁸ entries: a copy of them as triplets (16
// bytes each) was the largest allocation of a solve, and a solve runs for
// the pooled matrix and every replicate.
type system struct {
	n    int
	rows []int32
	cols []int32
	vals []float64
	rhs  []float64

	f     []Row
	scale []float64 // 0: node k has no row (its radiosity is known)
	v     []int     // node → unknown, −1 where the radiosity is known
	// reciprocal: the view-factor terms are known to be symmetric (see
	// Problem.Reciprocal).
	reciprocal bool
}

func (s *system) add(r, c int, v float64) {
	s.rows, s.cols, s.vals = append(s.rows, int32(r)), append(s.cols, int32(c)), append(s.vals, v)
}

// The methods of solve.
const (
	byLU          = "LU"
	byCG          = "conjugate gradients"
	byGaussSeidel = "Gauss-Seidel"
)

// solve solves the system densely (LU) when small, else by conjugate
// gradients when symmetric and Gauss–Seidel otherwise; it returns the
// solution and the method.
func (s *system) solve() ([]float64, string, error) {
	if s.n == 0 {
		return nil, byLU, nil
	}
	if s.n <= denseLimit {
		x, err := s.solveDense()
		return x, byLU, err
	}
	op := s.operator()
	x := make([]float64, s.n)
	if op.symmetric() {
		if !sparse.CG(op.mul, op.diag, s.rhs, x, iterTol, 20*s.n+1000) {
			return nil, byCG, ErrNotConverged
		}
		return x, byCG, nil
	}
	return x, byGaussSeidel, op.gaussSeidel(s.rhs, x)
}

func (s *system) solveDense() ([]float64, error) {
	m := mat.NewDense(s.n, s.n, nil)
	for k := range s.rows {
		r, c := int(s.rows[k]), int(s.cols[k])
		m.Set(r, c, m.At(r, c)+s.vals[k])
	}
	for k, a := range s.scale {
		if a == 0 {
			continue
		}
		r := s.v[k]
		for i, j := range s.f[k].Col {
			if c := s.v[j]; c >= 0 {
				m.Set(r, c, m.At(r, c)-a*s.f[k].Val[i])
			}
		}
	}
	var lu mat.LU
	lu.Factorize(m)
	if c := lu.Cond(); c > 1e14 || math.IsInf(c, 0) {
		return nil, fmt.Errorf("exchange: the system is singular (condition number %.3g): %w", c, ErrNoTemperature)
	}
	var x mat.VecDense
	if err := lu.SolveVecTo(&x, false, mat.NewVecDense(s.n, s.rhs)); err != nil {
		return nil, fmt.Errorf("exchange: %w", err)
	}
	return x.RawVector().Data, nil
}

// operator applies the system without assembling it: the triplets as a
// small CSR matrix, the view-factor terms from F.
type operator struct {
	*system
	small *sparse.CSR
	diag  []float64
	// nodes[first[r]:first[r+1]] are the nodes whose view-factor terms
	// go to row r (one, but for black members of a group, which share
	// the group's row).
	first []int
	nodes []int32
	xs    []float64 // see spread
}

func (s *system) operator() *operator {
	op := &operator{system: s, small: sparse.FromTriplets(s.n, s.rows, s.cols, s.vals), first: make([]int, s.n+1)}
	s.rows, s.cols, s.vals = nil, nil, nil // taken over by small
	for k, a := range s.scale {
		if a != 0 {
			op.first[s.v[k]+1]++
		}
	}
	for r := range s.n {
		op.first[r+1] += op.first[r]
	}
	op.nodes = make([]int32, op.first[s.n])
	next := append([]int(nil), op.first[:s.n]...)
	for k, a := range s.scale {
		if a != 0 {
			op.nodes[next[s.v[k]]] = int32(k)
			next[s.v[k]]++
		}
	}
	// The diagonal: the triplets', and view factors between nodes of one
	// unknown (F_kk of a concave node; members of a black group).
	op.diag = append([]float64(nil), op.small.Diag...)
	for r := range s.n {
		for _, k := range op.nodes[op.first[r]:op.first[r+1]] {
			for _, j := range op.nodes[op.first[r]:op.first[r+1]] {
				op.diag[r] -= s.scale[k] * s.f[k].At(j)
			}
		}
	}
	return op
}

// mul writes the system times x into y.
func (op *operator) mul(y, x []float64) {
	op.small.Mul(y, x)
	xs := op.spread(x)
	for k, a := range op.scale {
		if a != 0 {
			y[op.v[k]] -= a * dot(&op.f[k], xs)
		}
	}
}

// spread returns x by node (x[v[k]], 0 where the radiosity is known), so
// that a row of F is a plain dot product, without a lookup and a branch
// per view factor.
func (op *operator) spread(x []float64) []float64 {
	if op.xs == nil {
		op.xs = make([]float64, len(op.v))
	}
	for k, c := range op.v {
		op.xs[k] = 0
		if c >= 0 {
			op.xs[k] = x[c]
		}
	}
	return op.xs
}

// dot returns Σ_j F_j·xs_j over a row of F.
func dot(row *Row, xs []float64) float64 {
	t := 0.0
	for i, j := range row.Col {
		t += row.Val[i] * xs[j]
	}
	return t
}

// symmetric reports whether the system equals its transpose, to a
// relative 1e-9 as sparse.CSR.Symmetric: the triplets' part, and the
// view-factor terms pair by pair (scale[k]·F_kj against scale[j]·F_jk:
// reciprocity, for a row scale of the area). Terms that land on the
// diagonal or on the right-hand side need no mirror.
func (op *operator) symmetric() bool {
	if !op.small.Symmetric() {
		return false
	}
	if op.reciprocal {
		return true
	}
	// As in sparse.CSR.Symmetric: rows in order, so the mirrors of row k's
	// terms below the diagonal come up in rows j in increasing k, one
	// cursor per row.
	needs := func(k int, j int32) bool { return op.v[j] >= 0 && op.v[j] != op.v[k] }
	next := make([]int, len(op.f))
	for j := range op.f {
		next[j], _ = slices.BinarySearch(op.f[j].Col, int32(j)+1)
	}
	for k, a := range op.scale {
		if a == 0 {
			continue
		}
		row := &op.f[k]
		for i, j := range row.Col {
			if int(j) >= k {
				break
			}
			if !needs(k, j) {
				continue
			}
			mirror := &op.f[j]
			m := next[j]
			for m < len(mirror.Col) && int(mirror.Col[m]) < k {
				if needs(int(j), mirror.Col[m]) {
					return false // a term of row j with no mirror in row k
				}
				m++
			}
			if m == len(mirror.Col) || int(mirror.Col[m]) != k {
				return false
			}
			u, w := a*row.Val[i], op.scale[j]*mirror.Val[m]
			if math.Abs(u-w) > 1e-9*math.Max(math.Abs(u), math.Abs(w)) {
				return false
			}
			next[j] = m + 1
		}
	}
	for j := range op.f { // every term above the diagonal was paired
		if op.scale[j] == 0 {
			continue
		}
		for _, c := range op.f[j].Col[next[j]:] {
			if needs(j, c) {
				return false
			}
		}
	}
	return true
}

// gaussSeidel solves the system for b into x (starting from 0), for a
// diagonally dominant system.
func (op *operator) gaussSeidel(b, x []float64) error {
	clear(x)
	xs := op.spread(x)
	bn := math.Sqrt(sparse.Dot(b, b))
	res := make([]float64, op.n)
	c := op.small
	for it := 0; it < 100000; it++ {
		for r := range op.n {
			t := b[r]
			for k := c.Start[r]; k < c.Start[r+1]; k++ {
				if int(c.Col[k]) != r {
					t -= c.Val[k] * x[c.Col[k]]
				}
			}
			// Row r's view-factor terms over every node, then those on
			// the diagonal (nodes of unknown r) taken back out.
			nodes := op.nodes[op.first[r]:op.first[r+1]]
			for _, k := range nodes {
				t += op.scale[k] * dot(&op.f[k], xs)
			}
			t += (op.diag[r] - c.Diag[r]) * x[r]
			x[r] = t / op.diag[r]
			for _, k := range nodes {
				xs[k] = x[r]
			}
		}
		if it%10 == 9 {
			op.mul(res, x) // re-spreads x into xs: the same values
			for i := range res {
				res[i] -= b[i]
			}
			if math.Sqrt(sparse.Dot(res, res)) <= iterTol*bn {
				return nil
			}
		}
	}
	return ErrNotConverged
}

const iterTol = 1e-12
