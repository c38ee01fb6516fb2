package exchange

import (
	"math"
	"math/rand/v2"
	"testing"
)

// mixedEnclosure is randomEnclosure (open, a quarter of the pairs in
// view, some nodes seeing themselves) with every F_ij scaled by a random
// factor in [1−skew, 1+skew] (skew > 0: no longer reciprocal) and
// conditions of every kind: fixed temperatures (gray and black), fluxes,
// flows, adiabatic nodes; with groups, nodes 2g and 2g+1 of the first n/4
// share a temperature (a two-sided sheet), gray or black.
func mixedEnclosure(n int, seed uint64, skew float64, groups bool) Problem {
	p := randomEnclosure(n, seed, true, 0.25)
	p.AmbientT = 250
	rng := rand.New(rand.NewPCG(seed, 2))
	for i := range p.F {
		for k := range p.F[i].Val {
			p.F[i].Val[k] *= 1 + skew*(2*rng.Float64()-1)
		}
		p.Ambient[i] = max(0, 1-p.F[i].Sum())
	}
	for i := range n {
		switch i % 5 {
		case 0:
			p.Cond[i] = Condition{Temperature, 350 + float64(i)}
		case 1:
			p.Cond[i] = Condition{Temperature, 300 + float64(i)}
			p.Emissivity[i] = 1
		case 2:
			p.Cond[i] = Condition{HeatFlux, 50}
		case 3:
			p.Cond[i] = Condition{HeatFlow, 20}
		default:
			p.Cond[i] = Condition{Adiabatic, 0}
		}
	}
	if groups {
		kinds := []Condition{{Temperature, 420}, {HeatFlow, 40}, {Adiabatic, 0}}
		for k := 0; 2*k+1 < n/4; k++ {
			p.Groups = append(p.Groups, []int{2 * k, 2*k + 1})
			p.GroupCond = append(p.GroupCond, kinds[k%len(kinds)])
			if k%2 == 0 {
				p.Emissivity[2*k], p.Emissivity[2*k+1] = 1, 1 // a black sheet: one unknown for both
			}
		}
	}
	return p
}

// The iterative paths (the system applied from F's rows, without a copy)
// must agree with dense LU on the same problem, and take conjugate
// gradients exactly when the system is symmetric.
func TestIterativeMatchesDense(t *testing.T) {
	cases := []struct {
		name     string
		skew     float64
		groups   bool
		declared bool // Problem.Reciprocal
		method   string
	}{
		{"reciprocal", 0, false, false, byCG},
		{"reciprocal with groups", 0, true, false, byCG},
		{"reciprocal, declared", 0, true, true, byCG},
		{"not reciprocal", 0.05, false, false, byGaussSeidel},
		{"not reciprocal with groups", 0.05, true, false, byGaussSeidel},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			for seed := range uint64(3) {
				p := mixedEnclosure(80, seed, c.skew, c.groups)
				p.Reciprocal = c.declared
				dense, err := Solve(p)
				if err != nil {
					t.Fatal(err)
				}
				denseLimit = 10
				iter, err := Solve(p)
				denseLimit = DenseLimit
				if err != nil {
					t.Fatal(err)
				}
				if dense.method != byLU || iter.method != c.method {
					t.Fatalf("methods %q and %q, want %q and %q", dense.method, iter.method, byLU, c.method)
				}
				qmax := 0.0
				for _, q := range dense.Q {
					qmax = math.Max(qmax, math.Abs(q))
				}
				for i := range p.Area {
					if math.Abs(dense.T[i]-iter.T[i]) > 1e-8*dense.T[i] || math.Abs(dense.Q[i]-iter.Q[i]) > 1e-8*qmax {
						t.Fatalf("seed %d node %d: LU T=%v Q=%v, %s T=%v Q=%v", seed, i, dense.T[i], dense.Q[i], iter.method, iter.T[i], iter.Q[i])
					}
				}
				// Without reciprocity energy does not balance, by either method.
				if c.skew == 0 && (dense.Imbalance > 1e-9 || iter.Imbalance > 1e-9) {
					t.Errorf("seed %d: imbalance %g (LU), %g (%s)", seed, dense.Imbalance, iter.Imbalance, iter.method)
				}
			}
		})
	}
}

// BenchmarkSolveCrowded solves 4,000 nodes with a quarter of all pairs in
// view (4·10⁶ view factors) by conjugate gradients: the system of a
// finely split enclosure, where most nodes see most others.
func BenchmarkSolveCrowded(b *testing.B) {
	p := mixedEnclosure(4000, 1, 0, false)
	b.ResetTimer()
	for b.Loop() {
		sol, err := Solve(p)
		if err != nil {
			b.Fatal(err)
		}
		if sol.method != byCG {
			b.Fatalf("solved by %s", sol.method)
		}
	}
}

// Problem.Reciprocal is taken at its word: declared for factors that are
// not reciprocal, the solve takes conjugate gradients without pairing the
// factors (which is why the analysis declares it only for smoothed ones).
func TestReciprocalTakenAtItsWord(t *testing.T) {
	p := mixedEnclosure(80, 1, 0.05, false)
	p.Reciprocal = true
	denseLimit = 10
	defer func() { denseLimit = DenseLimit }()
	if sol, err := Solve(p); err == nil && sol.method != byCG {
		t.Errorf("solved by %s: the declaration was not used", sol.method)
	}
}
