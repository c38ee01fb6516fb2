package exchange

import (
	"math"
	"testing"
)

// A plate (or a two-sided sheet) that sees only surroundings at Ta and
// absorbs a load S: in radiative equilibrium (adiabatic) εAσ(T⁴ − Ta⁴) = S
// per radiating side, held at T it needs Q = εAσ(T⁴ − Ta⁴) − S (common
// practice: the energy balance of a surface in an open environment).
func TestLoads(t *testing.T) {
	const a, eps, ta, s = 2.0, 0.8, 250.0, 900.0
	open := func(n int, cond ...Condition) Problem {
		p := Problem{Area: make([]float64, n), Emissivity: make([]float64, n), Cond: cond, F: make([]Row, n), Ambient: make([]float64, n), AmbientT: ta, Load: make([]float64, n)}
		for k := range n {
			p.Area[k], p.Emissivity[k], p.Ambient[k] = a, eps, 1
		}
		p.Load[0] = s
		return p
	}
	teq := math.Pow(math.Pow(ta, 4)+s/(eps*a*Sigma), 0.25)
	for _, absorption := range []bool{false, true} {
		p := open(1, Condition{Kind: Adiabatic})
		p.Absorption = absorption
		sol, err := Solve(p)
		if err != nil {
			t.Fatal(err)
		}
		near(t, "equilibrium T", sol.T[0], teq, 1e-12)
		near(t, "adiabatic Q", sol.Q[0]+1, 1, 1e-12)
		if sol.Absorbed != s || math.Abs(sol.Q[0]+sol.Absorbed-sol.ToAmbient) > 1e-9*s {
			t.Errorf("balance: Q %v + absorbed %v ≠ to ambient %v", sol.Q[0], sol.Absorbed, sol.ToAmbient)
		}
		p = open(1, Condition{Temperature, 400})
		p.Absorption = absorption
		sol, err = Solve(p)
		if err != nil {
			t.Fatal(err)
		}
		near(t, "held Q", sol.Q[0], eps*a*Sigma*(math.Pow(400, 4)-math.Pow(ta, 4))-s, 1e-12)
		near(t, "held q", sol.Flux(0), (eps*a*Sigma*(math.Pow(400, 4)-math.Pow(ta, 4))-s)/a, 1e-12)
		// A heat flow given too: it leaves by radiation with the load.
		p = open(1, Condition{HeatFlow, 100})
		sol, err = Solve(p)
		if err != nil {
			t.Fatal(err)
		}
		near(t, "heated T", sol.T[0], math.Pow(math.Pow(ta, 4)+(s+100)/(eps*a*Sigma), 0.25), 1e-12)
		near(t, "heated Q", sol.Q[0], 100, 1e-12)
	}
	// A two-sided sheet, the load on its front: both sides radiate it.
	p := open(2, Condition{}, Condition{})
	p.Groups, p.GroupCond = [][]int{{0, 1}}, []Condition{{Kind: Adiabatic}}
	sol, err := Solve(p)
	if err != nil {
		t.Fatal(err)
	}
	near(t, "sheet T", sol.T[0], math.Pow(math.Pow(ta, 4)+s/(2*eps*a*Sigma), 0.25), 1e-12)
	near(t, "sheet back T", sol.T[1], sol.T[0], 1e-12)
}
