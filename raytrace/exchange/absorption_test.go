package exchange

import (
	"math"
	"testing"
)

// absorbing is the enclosure of two concentric spheres given by absorption
// factors: inner 1 sees only outer 2; B12 is given, B11 = 1 − B12, and
// reciprocity and closure give B21 = ε1A1B12/(ε2A2), B22 = 1 − B21.
func absorbing(a1, a2, e1, e2, b12 float64, c1, c2 Condition) Problem {
	b21 := e1 * a1 * b12 / (e2 * a2)
	return Problem{
		Area: []float64{a1, a2}, Emissivity: []float64{e1, e2}, Cond: []Condition{c1, c2},
		F:          []Row{rowOf(0, 1-b12, 1, b12), rowOf(0, b21, 1, 1-b21)},
		Absorption: true,
	}
}

// Concentric spheres r1 = 0.3, r2 = 0.5, with the absorption factors of a
// diffuse and of a mirror-like outer sphere: the heat flow must be the
// closed form Q = σA1(T1⁴ − T2⁴)/(1/ε1 + (A1/A2)(1/ε2 − 1)) for the diffuse
// one (Incropera & DeWitt, eq. 13.24) and σA1(T1⁴ − T2⁴)/(1/ε1 + 1/ε2 − 1)
// for the mirror (Siegel & Howell, the chapter on specular surfaces; from
// memory). B12 for the diffuse case comes from Gebhart's equations
// B = F E + F R B with F12 = 1, F21 = A1/A2: B12 = ε2/(1 − ρ2 F22 − ρ1ρ2F21)
// … solved here as 1/(ε1(1/ε1 + (A1/A2)(1/ε2 − 1))), which is the same.
func TestAbsorptionSolve(t *testing.T) {
	a1, a2 := 4*math.Pi*0.09, 4*math.Pi*0.25
	const e1, e2, t1, t2 = 0.4, 0.25, 700.0, 300.0
	for _, c := range []struct {
		name string
		den  float64 // Q = σA1(T1⁴ − T2⁴)/den
	}{
		{"diffuse outer", 1/e1 + a1/a2*(1/e2-1)},
		{"mirror outer", 1/e1 + 1/e2 - 1},
	} {
		b12 := 1 / (e1 * c.den)
		want := Sigma * a1 * (math.Pow(t1, 4) - math.Pow(t2, 4)) / c.den
		sol, err := Solve(absorbing(a1, a2, e1, e2, b12, Condition{Temperature, t1}, Condition{Temperature, t2}))
		if err != nil {
			t.Fatal(err)
		}
		near(t, c.name+" Q1", sol.Q[0], want, 1e-12)
		near(t, c.name+" Q2", sol.Q[1], -want, 1e-12)
		near(t, c.name+" q1", sol.Flux(0), want/a1, 1e-12)
		if !math.IsNaN(sol.J[0]) {
			t.Errorf("%s: radiosity %v given for absorption factors", c.name, sol.J[0])
		}
		// The inverse problem: the inner sphere's flux given, its
		// temperature found.
		sol, err = Solve(absorbing(a1, a2, e1, e2, b12, Condition{HeatFlux, want / a1}, Condition{Temperature, t2}))
		if err != nil {
			t.Fatal(err)
		}
		near(t, c.name+" T1 from q1", sol.T[0], t1, 1e-12)
		// The exchange areas are ε_iA_iB_ij.
		cs, err := TotalExchange(EmissionAreas([]float64{a1, a2}, []float64{e1, e2}), []float64{1, 1},
			absorbing(a1, a2, e1, e2, b12, Condition{}, Condition{}).F, nil, 0)
		if err != nil {
			t.Fatal(err)
		}
		near(t, c.name+" conductor", Sigma*cs.Lower[1].At(0)*(math.Pow(t1, 4)-math.Pow(t2, 4)), want, 1e-12)
	}
}
