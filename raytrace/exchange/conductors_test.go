package exchange

import (
	"fmt"
	"math"
	"math/rand/v2"
	"slices"
	"testing"
)

// bothPaths returns p's conductors from the dense factorisation and from
// the column-by-column conjugate gradients, with no threshold.
func bothPaths(t *testing.T, p Problem) []*Conductors {
	t.Helper()
	dense, err := TotalExchange(p.Area, p.Emissivity, p.F, p.Ambient, 0)
	if err != nil {
		t.Fatal(err)
	}
	conductorDenseLimit = 0
	defer func() { conductorDenseLimit = ConductorDenseLimit }()
	iter, err := TotalExchange(p.Area, p.Emissivity, p.F, p.Ambient, 0)
	if err != nil {
		t.Fatal(err)
	}
	// Black nodes (no reflections) always take the column solves, which
	// then need no iteration.
	reflecting := slices.ContainsFunc(p.Emissivity, func(e float64) bool { return e < 1 })
	if dense.Dense != reflecting || iter.Dense {
		t.Fatalf("paths not taken: dense %v, iterative %v", dense.Dense, iter.Dense)
	}
	return []*Conductors{dense, iter}
}

// closedSums returns Σ_j≠i S_ij + Self_i + ToAmbient_i + dropped per node,
// which must be ε_iA_i (common practice: every emitted unit is absorbed
// somewhere or leaves).
func closedSums(c *Conductors) []float64 {
	n := len(c.Lower)
	sum := make([]float64, n)
	for i := range n {
		sum[i] += c.Self[i]
		if c.ToAmbient != nil {
			sum[i] += c.ToAmbient[i]
		}
		for k, j := range c.Lower[i].Col {
			v := c.Lower[i].Val[k]
			sum[i] += v
			sum[j] += v
		}
	}
	return sum
}

// randomEnclosure is n nodes of random areas and emissivities whose view
// factors are reciprocal and sum with the ambient to 1: a random symmetric
// exchange K = AF with every row below the node's area.
func randomEnclosure(n int, seed uint64, open bool, density float64) Problem {
	rng := rand.New(rand.NewPCG(seed, 1))
	p := Problem{Area: make([]float64, n), Emissivity: make([]float64, n), F: make([]Row, n), Cond: make([]Condition, n)}
	K := make([][]float64, n)
	for i := range n {
		p.Area[i] = 0.5 + rng.Float64()
		p.Emissivity[i] = 0.05 + 0.95*rng.Float64()
		K[i] = make([]float64, n)
	}
	for i := range n {
		for j := i; j < n; j++ {
			if rng.Float64() < density {
				K[i][j] = rng.Float64()
				K[j][i] = K[i][j]
			}
		}
	}
	// Scale so that the fullest row sums to its area (closed) or to 90 %.
	scale := math.Inf(1)
	for i := range n {
		s := 0.0
		for _, v := range K[i] {
			s += v
		}
		scale = min(scale, p.Area[i]/s)
	}
	if open {
		scale *= 0.9
		p.Ambient = make([]float64, n)
	}
	for i := range n {
		s := 0.0
		for j, v := range K[i] {
			if v > 0 {
				p.F[i].Append(int32(j), scale*v/p.Area[i])
				s += scale * v / p.Area[i]
			}
		}
		if open {
			p.Ambient[i] = max(0, 1-s)
		} else if s < 1 {
			// Closed: the shortfall returns to the node itself (a concave node).
			p.F[i] = p.F[i].Add(Row{Col: []int32{int32(i)}, Val: []float64{1 - s}})
		}
	}
	return p
}

// The conjugate-gradient columns give the dense factorisation's exchange
// areas to 10⁻⁸ of a node's emission, open and closed, and both close the sum rule.
func TestTotalExchangePathsAgree(t *testing.T) {
	for _, open := range []bool{false, true} {
		p := randomEnclosure(60, 7, open, 0.3)
		c := bothPaths(t, p)
		d, it := c[0], c[1]
		for i := range d.Lower {
			for j := range i {
				a, b := d.Lower[i].At(int32(j)), it.Lower[i].At(int32(j))
				if math.Abs(a-b) > 1e-8*p.Emissivity[i]*p.Area[i] {
					t.Fatalf("open %v: S[%d][%d] dense %v, iterative %v", open, i, j, a, b)
				}
			}
			if math.Abs(d.Self[i]-it.Self[i]) > 1e-9 || (open && math.Abs(d.ToAmbient[i]-it.ToAmbient[i]) > 1e-9) {
				t.Fatalf("open %v node %d: self %v/%v, ambient %v/%v", open, i, d.Self[i], it.Self[i], d.ToAmbient, it.ToAmbient)
			}
		}
		for _, x := range c {
			for i, s := range closedSums(x) {
				near(t, fmt.Sprintf("open %v dense %v sum %d", open, x.Dense, i), s, p.Emissivity[i]*p.Area[i], 1e-9)
			}
		}
		if it.Iterations == 0 || it.Iterations > 200 {
			t.Errorf("iterations %d", it.Iterations)
		}
	}
}

// Dropping: exactly the conductors negligible to both nodes go, their share
// is reported per node, and the sum rule still closes.
func TestTotalExchangeThreshold(t *testing.T) {
	p := randomEnclosure(60, 3, true, 0.3)
	full, err := TotalExchange(p.Area, p.Emissivity, p.F, p.Ambient, 0)
	if err != nil {
		t.Fatal(err)
	}
	const tau = 0.01
	for _, iterative := range []bool{false, true} {
		if iterative {
			conductorDenseLimit = 0
		}
		c, err := TotalExchange(p.Area, p.Emissivity, p.F, p.Ambient, tau)
		conductorDenseLimit = ConductorDenseLimit
		if err != nil {
			t.Fatal(err)
		}
		dropped := make([]float64, len(p.Area))
		kept, gone := 0, 0
		for i := range full.Lower {
			for k, j := range full.Lower[i].Col {
				s := full.Lower[i].Val[k]
				small := s < tau*min(p.Emissivity[i]*p.Area[i], p.Emissivity[j]*p.Area[j])
				has := c.Lower[i].At(j) > 0
				if small == has {
					t.Fatalf("S[%d][%d] = %v: small %v, kept %v", i, j, s, small, has)
				}
				if small {
					dropped[i] += s / (p.Emissivity[i] * p.Area[i])
					dropped[j] += s / (p.Emissivity[j] * p.Area[j])
					gone++
				} else {
					kept++
				}
			}
		}
		if gone == 0 || kept == 0 || c.Kept() != kept {
			t.Fatalf("threshold %v dropped %d, kept %d (Kept %d): pick a case that tests both", tau, gone, kept, c.Kept())
		}
		for i, s := range closedSums(c) {
			near(t, fmt.Sprintf("dropped share %d", i), c.Dropped[i], dropped[i], 1e-9)
			near(t, fmt.Sprintf("sum %d", i), s+c.Dropped[i]*p.Emissivity[i]*p.Area[i], p.Emissivity[i]*p.Area[i], 1e-9)
		}
	}
}

// BenchmarkTotalExchange: 1,500 nodes with 1 % and 10 % of pairs in view,
// by the dense factorisation and by conjugate gradients.
func BenchmarkTotalExchange(b *testing.B) {
	for _, density := range []float64{0.01, 0.1} {
		p := randomEnclosure(1500, 1, true, density)
		for _, dense := range []bool{true, false} {
			b.Run(fmt.Sprintf("density=%g/dense=%v", density, dense), func(b *testing.B) {
				if !dense {
					conductorDenseLimit = 0
					defer func() { conductorDenseLimit = ConductorDenseLimit }()
				}
				var c *Conductors
				for b.Loop() {
					var err error
					if c, err = TotalExchange(p.Area, p.Emissivity, p.F, p.Ambient, 0); err != nil {
						b.Fatal(err)
					}
				}
				b.ReportMetric(float64(c.Iterations), "iterations")
			})
		}
	}
}
