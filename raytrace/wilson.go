package raytrace

import (
	"math"

	"gonum.org/v1/gonum/stat/distuv"
)

// zScore returns the two-sided standard-normal quantile for confidence c
// (0.95 → 1.959964): √2·erf⁻¹(c).
func zScore(c float64) float64 { return math.Sqrt2 * math.Erfinv(c) }

// tScore returns the two-sided quantile of Student's t with R − 1 degrees
// of freedom at o's confidence, for intervals from R replicates (0 without
// replicates).
func tScore(o Options) float64 {
	if o.Replicates < 2 {
		return 0
	}
	return distuv.StudentsT{Mu: 0, Sigma: 1, Nu: float64(o.Replicates - 1)}.Quantile(0.5 + o.Confidence/2)
}

// Wilson returns the Wilson score interval for k successes in n trials at
// standard-normal quantile z (Wilson 1927; Brown, Cai & DasGupta,
// Statistical Science 16, 2001, eq. 4):
//
//	centre = (p̂ + z²/2n) / (1 + z²/n)
//	half   = z·√(p̂(1−p̂)/n + z²/4n²) / (1 + z²/n)
func Wilson(k, n int64, z float64) (lo, hi float64) {
	if n <= 0 {
		return 0, 1
	}
	nf := float64(n)
	p := float64(k) / nf
	z2 := z * z
	den := 1 + z2/nf
	centre := (p + z2/(2*nf)) / den
	half := z * math.Sqrt(p*(1-p)/nf+z2/(4*nf*nf)) / den
	return math.Max(0, centre-half), math.Min(1, centre+half)
}
