package sparse

import "math"

// Rows is a square matrix as sparse rows (columns increasing), the form the
// smoothing hands on: it multiplies a block of vectors at once.
type Rows []Row[float64]

// MulBlock writes a·x into y for m vectors stored interleaved, row-major:
// element i of vector c is x[i*m+c]. Each vector's sums are formed in the
// same order whatever m is, so results do not depend on how vectors are
// grouped into blocks.
func (a Rows) MulBlock(y, x []float64, m int) {
	if m == 16 {
		a.mulBlock16(y, x)
		return
	}
	for r := range a {
		yr := y[r*m : r*m+m]
		clear(yr)
		row := &a[r]
		for k, c := range row.Col {
			v := row.Val[k]
			xc := x[int(c)*m : int(c)*m+m]
			for q := range yr {
				yr[q] += v * xc[q]
			}
		}
	}
}

// mulBlock16 is MulBlock for blocks of 16 vectors, the width the exchange
// areas use: each row is swept twice, 8 vectors at a time, so that the 8
// sums stay in registers and fixed-size arrays drop the bounds checks (each
// sum is still formed in the same order).
func (a Rows) mulBlock16(y, x []float64) {
	for r := range a {
		row := &a[r]
		for h := 0; h < 16; h += 8 {
			var s0, s1, s2, s3, s4, s5, s6, s7 float64
			for k, c := range row.Col {
				v := row.Val[k]
				xc := (*[8]float64)(x[int(c)*16+h:])
				s0 += v * xc[0]
				s1 += v * xc[1]
				s2 += v * xc[2]
				s3 += v * xc[3]
				s4 += v * xc[4]
				s5 += v * xc[5]
				s6 += v * xc[6]
				s7 += v * xc[7]
			}
			*(*[8]float64)(y[r*16+h:]) = [8]float64{s0, s1, s2, s3, s4, s5, s6, s7}
		}
	}
}

// BlockCG solves A·x_c = b_c for m right-hand sides at once (interleaved as
// in MulBlock), for a symmetric positive definite A given as mul (y = A·x
// for a block) and its diagonal: conjugate gradients with the Jacobi
// preconditioner run side by side, each vector with its own step lengths
// and its own stop, so that one matrix pass serves m solves (CG as in Saad,
// "Iterative Methods for Sparse Linear Systems", 2nd ed., SIAM 2003,
// Algorithm 9.1; from memory). A vector's arithmetic is that of a solve on
// its own. x starts at 0; vector c stops when ‖r_c‖ ≤ tol·‖b_c‖. It returns
// the most iterations any vector took and whether all converged within
// maxIter (or pᵀAp ≤ 0 showed A not positive definite).
func BlockCG(mul func(y, x []float64), diag, b, x []float64, m int, tol float64, maxIter int) (iters int, converged bool) {
	n := len(diag)
	r, z, p, ap := make([]float64, n*m), make([]float64, n*m), make([]float64, n*m), make([]float64, n*m)
	copy(r, b)
	bn, rz, rr := make([]float64, m), make([]float64, m), make([]float64, m)
	pap, alpha := make([]float64, m), make([]float64, m)
	active := make([]bool, m)
	left := 0
	for i := range n {
		for c := range m {
			k := i*m + c
			x[k] = 0
			z[k] = r[k] / diag[i]
			p[k] = z[k]
			rz[c] += r[k] * z[k]
			bn[c] += b[k] * b[k]
		}
	}
	for c := range m {
		if bn[c] > 0 {
			active[c] = true
			left++
		}
		bn[c] = math.Sqrt(bn[c])
	}
	for ; left > 0 && iters < maxIter; iters++ {
		mul(ap, p)
		clear(pap)
		for i := range n {
			for c := range m {
				pap[c] += p[i*m+c] * ap[i*m+c]
			}
		}
		for c := range m {
			if active[c] && !(pap[c] > 0) {
				return iters, false
			}
			alpha[c] = 0
			if active[c] {
				alpha[c] = rz[c] / pap[c]
			}
		}
		clear(rr)
		for i := range n {
			for c := range m {
				k := i*m + c
				x[k] += alpha[c] * p[k]
				r[k] -= alpha[c] * ap[k]
				rr[c] += r[k] * r[k]
			}
		}
		for c := range m {
			if active[c] && math.Sqrt(rr[c]) <= tol*bn[c] {
				active[c] = false
				left--
			}
		}
		clear(pap) // reused for the new r·z
		for i := range n {
			for c := range m {
				k := i*m + c
				z[k] = r[k] / diag[i]
				pap[c] += r[k] * z[k]
			}
		}
		for c := range m {
			alpha[c] = 0 // now β for each vector
			if active[c] {
				alpha[c] = pap[c] / rz[c]
				rz[c] = pap[c]
			}
		}
		for i := range n {
			for c := range m {
				k := i*m + c
				if active[c] {
					p[k] = z[k] + alpha[c]*p[k]
				} else {
					p[k] = 0 // a finished vector adds nothing to the next pass
				}
			}
		}
	}
	return iters, left == 0
}
