package sample

import (
	"math"
	"testing"
)

// netCounts reports whether the first 2^m points put exactly one point in
// every box of 2^a × 2^b equal cells (a + b = m) of dimensions d1, d2 (the
// (0, m, 2)-net property; with d1 == d2 and b = 0, the 1-D stratification
// of every dimension of a Sobol' sequence). Definitions from Niederreiter,
// "Random Number Generation and Quasi-Monte Carlo Methods", SIAM 1992.
func isNet(points [][SobolDims]float64, d1, d2, a, b int) bool {
	seen := map[[2]int]bool{}
	for _, p := range points {
		c := [2]int{int(p[d1] * float64(int(1)<<a)), int(p[d2] * float64(int(1)<<b))}
		if seen[c] {
			return false
		}
		seen[c] = true
	}
	return len(seen) == len(points)
}

// The unscrambled and the scrambled points keep Sobol's structure: every
// dimension stratified at every power of two, and dimensions 1 and 2 a
// (0, m, 2)-net (Sobol' 1967; scrambling preserves nets, Owen 1995).
func TestSobolNets(t *testing.T) {
	const m = 10
	plain := make([][SobolDims]float64, 1<<m)
	for i := range plain {
		for d := range SobolDims {
			plain[i][d] = float64(sobol(uint32(i), d)) * 0x1p-32
		}
	}
	s := NewSobol(7, 3, 1)
	scrambled := make([][SobolDims]float64, 1<<m)
	for i := range scrambled {
		s.Point(uint64(i), &scrambled[i])
	}
	for name, pts := range map[string][][SobolDims]float64{"plain": plain, "scrambled": scrambled} {
		for k := 1; k <= m; k++ {
			for d := range SobolDims {
				if !isNet(pts[:1<<k], d, d, k, 0) {
					t.Errorf("%s: dimension %d not stratified at 2^%d", name, d+1, k)
				}
			}
			for a := 0; a <= k; a++ {
				if !isNet(pts[:1<<k], 0, 1, a, k-a) {
					t.Errorf("%s: dimensions 1, 2 not a (0,%d,2)-net in %d × %d boxes", name, k, 1<<a, 1<<(k-a))
				}
			}
		}
	}
	if scrambled[0] == plain[0] || scrambled[5] == plain[5] {
		t.Error("scrambling changed nothing")
	}
}

// Each randomized point is uniform (unbiased estimates), and the estimate
// of a smooth integral from 1,024 points varies far less than plain Monte
// Carlo's σ²/N (RQMC variance o(1/N) for such integrands: Owen, "Scrambled
// net variance for integrals of smooth functions", Ann. Stat. 25, 1997).
func TestSobolUnbiasedAndBetter(t *testing.T) {
	f := func(u *[SobolDims]float64) float64 { return u[0] * u[1] * (1 + u[2]) * (0.5 + u[3]*u[4]) }
	const exact = 0.25 * 1.5 * 0.75
	const n, reps = 1024, 200
	var est [reps]float64
	var u [SobolDims]float64
	for r := range reps {
		s := NewSobol(11, 0, r)
		sum := 0.0
		for i := range n {
			s.Point(uint64(i), &u)
			sum += f(&u)
		}
		est[r] = sum / n
	}
	mean, v := 0.0, 0.0
	for _, e := range est {
		mean += e / reps
	}
	for _, e := range est {
		v += (e - mean) * (e - mean) / (reps - 1)
	}
	if math.Abs(mean-exact) > 4*math.Sqrt(v/reps) {
		t.Errorf("mean of %d randomizations %v, exact %v (se %v)", reps, mean, exact, math.Sqrt(v/reps))
	}
	// Plain Monte Carlo's variance of the same estimate: Var f / n, with
	// Var f from the same randomizations' points taken as a plain sample.
	st := NewStream(3, 0, 0)
	m1, m2 := 0.0, 0.0
	for range 200000 {
		for d := range SobolDims {
			u[d] = st.Float64()
		}
		x := f(&u)
		m1, m2 = m1+x, m2+x*x
	}
	m1, m2 = m1/200000, m2/200000
	mc := (m2 - m1*m1) / n
	if v > mc/50 {
		t.Errorf("RQMC variance %v is not 50× below plain Monte Carlo's %v", v, mc)
	}
	t.Logf("variance: RQMC %.3g, plain MC %.3g (ratio %.0f)", v, mc, mc/v)
}
