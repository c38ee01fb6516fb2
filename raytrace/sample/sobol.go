package sample

import "math/bits"

// SobolDims is the number of dimensions of the Sobol' points: one ray's
// numbers (facet pick, point on the facet, direction).
const SobolDims = 5

// sobolV are the direction numbers V_k = m_k·2^(32−k), k = 1…32, of the
// first five dimensions of Sobol's sequence (Sobol', USSR Comput. Math.
// Math. Phys. 7, 1967), from the primitive polynomials and initial m of
// Joe & Kuo, "Constructing Sobol sequences with better two-dimensional
// projections", SIAM J. Sci. Comput. 30, 2008 (their table
// new-joe-kuo-6.21201; from memory, checked by the net tests):
//
//	dim 1: van der Corput (V_k = 2^(32−k))
//	dim 2: s = 1, a = 0, m = 1
//	dim 3: s = 2, a = 1, m = 1 3
//	dim 4: s = 3, a = 1, m = 1 3 1
//	dim 5: s = 3, a = 2, m = 1 1 1
var sobolV = func() (v [SobolDims][32]uint32) {
	params := [SobolDims - 1]struct {
		s, a uint32
		m    []uint32
	}{{1, 0, []uint32{1}}, {2, 1, []uint32{1, 3}}, {3, 1, []uint32{1, 3, 1}}, {3, 2, []uint32{1, 1, 1}}}
	for k := range 32 {
		v[0][k] = 1 << (31 - k)
	}
	for d, p := range params {
		w := &v[d+1]
		for k := range p.s {
			w[k] = p.m[k] << (31 - k)
		}
		for k := p.s; k < 32; k++ {
			w[k] = w[k-p.s] ^ w[k-p.s]>>p.s
			for j := uint32(1); j < p.s; j++ {
				w[k] ^= ((p.a >> (p.s - 1 - j)) & 1) * w[k-j]
			}
		}
	}
	return v
}()

// sobol returns coordinate d of point i of the (unscrambled) sequence as
// 32 bits, the first digit highest.
func sobol(i uint32, d int) uint32 {
	x := uint32(0)
	for k := 0; i != 0; k, i = k+1, i>>1 {
		if i&1 != 0 {
			x ^= sobolV[d][k]
		}
	}
	return x
}

// nestedScramble applies a hash-based approximation of Owen's nested
// uniform scrambling (Owen, "Randomly permuted (t,m,s)-nets and
// (t,s)-sequences", 1995) to 32 digits: a Laine–Karras-style permutation
// of the reversed bits (Laine & Karras, "Stratified sampling for
// stochastic transparency", EGSR 2011) with the improved constants of
// Burley, "Practical hash-based Owen scrambling", JCGT 9(4), 2020 (from
// memory). Every step (x ^= x·even, + seed, x·odd) changes a bit only
// through the bits below it, which after the reversal are the digits above
// it in the point: digits are permuted within each elementary interval,
// which keeps the net structure, and a uniform seed makes every point
// uniform. The original Laine–Karras constants left the low digits
// correlated enough to make a model of 200,000 randomly strewn facets 1.5×
// worse than plain Monte Carlo; these do not.
func nestedScramble(x, seed uint32) uint32 {
	x = bits.Reverse32(x)
	x ^= x * 0x3d20adea
	x += seed
	x *= (seed >> 16) | 1
	x ^= x * 0x05526c56
	x ^= x * 0x53a22864
	return bits.Reverse32(x)
}

// Sobol is one randomization of the first SobolDims dimensions of Sobol's
// sequence: Point(i) are its points in order, each coordinate uniform on
// [0, 1) and the first 2^m points of every dimension stratified into 2^m
// equal intervals. Independent keys give independent randomizations, whose
// estimates can be averaged and whose spread estimates the error
// (randomized quasi-Monte Carlo; L'Ecuyer & Lemieux, "Recent advances in
// randomized quasi-Monte Carlo methods", 2002).
type Sobol struct {
	key uint64
}

// NewSobol returns the randomization of (seed, emitter, replicate).
func NewSobol(seed uint64, emitter int64, replicate int) Sobol {
	k := Mix(seed + 0x5851F42D4C957F2D)
	k = Mix(k ^ uint64(emitter) + golden)
	k = Mix(k ^ uint64(replicate) + 0x3C6EF372FE94F82A)
	return Sobol{key: k}
}

// Point writes point i into u. Points beyond 2³² take a fresh
// randomization for each block of 2³² (independent, so still unbiased).
// The 21 bits below the net's 32 are filled from the hash, so that every
// coordinate is uniform at float64 resolution.
func (s Sobol) Point(i uint64, u *[SobolDims]float64) {
	block := Mix(s.key ^ i>>32)
	for d := range SobolDims {
		h := Mix(block + uint64(d+1)*golden)
		x := nestedScramble(sobol(uint32(i), d), uint32(h))
		low := Mix(h^i) >> 43 // 21 bits
		u[d] = (float64(x)*0x1p21 + float64(low)) * 0x1p-53
	}
}
