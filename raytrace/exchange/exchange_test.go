package exchange

import (
	"fmt"
	"math"
	"testing"
)

func eb(t float64) float64 { return Sigma * math.Pow(t, 4) }

func near(t *testing.T, what string, got, want, rel float64) {
	t.Helper()
	if math.Abs(got-want) > rel*math.Abs(want) {
		t.Errorf("%s = %.10g, want %.10g (rel. tol. %g)", what, got, want, rel)
	}
}

// twoSurface builds a closed two-surface enclosure: surface 1 (area a1)
// sees only surface 2; F21 = a1/a2, F22 = 1 − a1/a2.
func twoSurface(a1, a2, e1, e2, t1, t2 float64) Problem {
	return Problem{
		Area: []float64{a1, a2}, Emissivity: []float64{e1, e2},
		Cond: []Condition{{Temperature, t1}, {Temperature, t2}},
		F:    []Row{rowOf(1, 1), rowOf(0, a1/a2, 1, 1-a1/a2)},
	}
}

// Two-surface enclosures: Q = σA1(T1⁴ − T2⁴)/(1/ε1 + (A1/A2)(1/ε2 − 1))
// (Incropera & DeWitt, Fundamentals of Heat and Mass Transfer, eq. 13.24;
// Howell et al. 2021, the two-surface enclosure).
func TestTwoSurfaceEnclosures(t *testing.T) {
	tests := []struct {
		name           string
		a1, a2, e1, e2 float64
	}{
		// Large parallel plates: A1 = A2, F12 = 1.
		{"parallel plates", 1, 1, 0.8, 0.3},
		// Long concentric cylinders r1 = 0.1, r2 = 0.25 per metre of length.
		{"concentric cylinders", 2 * math.Pi * 0.1, 2 * math.Pi * 0.25, 0.6, 0.9},
		// Concentric spheres r1 = 0.3, r2 = 0.5.
		{"concentric spheres", 4 * math.Pi * 0.09, 4 * math.Pi * 0.25, 0.2, 0.45},
		{"black", 1, 2, 1, 1},
	}
	for _, tc := range tests {
		const t1, t2 = 800, 350
		p := twoSurface(tc.a1, tc.a2, tc.e1, tc.e2, t1, t2)
		// Parallel plates: F22 = 0 since a1 = a2.
		sol, err := Solve(p)
		if err != nil {
			t.Fatalf("%s: %v", tc.name, err)
		}
		want := Sigma * tc.a1 * (math.Pow(t1, 4) - math.Pow(t2, 4)) / (1/tc.e1 + tc.a1/tc.a2*(1/tc.e2-1))
		near(t, tc.name+" Q1", sol.Q[0], want, 1e-12)
		near(t, tc.name+" Q2", sol.Q[1], -want, 1e-12)
		if sol.Imbalance > 1e-12 {
			t.Errorf("%s: energy imbalance %g", tc.name, sol.Imbalance)
		}
		// Conductance: σ·A1ℱ12·(T1⁴ − T2⁴) is the same heat flow.
		for _, c := range bothPaths(t, p) {
			near(t, fmt.Sprintf("%s conductance (dense %v)", tc.name, c.Dense), Sigma*c.Lower[1].At(0)*(math.Pow(t1, 4)-math.Pow(t2, 4)), want, 1e-12)
		}
	}
}

// A radiation shield (a thin sheet, both sides at one temperature, no net
// heat) between large parallel plates: q = σ(T1⁴ − T2⁴) /
// [(1/ε1 + 1/ε2 − 1) + (1/ε3a + 1/ε3b − 1)] (Incropera & DeWitt eq. 13.26).
func TestRadiationShield(t *testing.T) {
	const t1, t2 = 600, 300
	e1, e2, e3a, e3b := 0.7, 0.5, 0.1, 0.3
	// Nodes: 0 plate 1, 1 shield side facing 1, 2 shield side facing 2, 3 plate 2.
	p := Problem{
		Area:       []float64{1, 1, 1, 1},
		Emissivity: []float64{e1, e3a, e3b, e2},
		Cond:       []Condition{{Temperature, t1}, {}, {}, {Temperature, t2}},
		F:          []Row{rowOf(1, 1), rowOf(0, 1), rowOf(3, 1), rowOf(2, 1)},
		Groups:     [][]int{{1, 2}},
		GroupCond:  []Condition{{Adiabatic, 0}},
	}
	sol, err := Solve(p)
	if err != nil {
		t.Fatal(err)
	}
	want := Sigma * (math.Pow(t1, 4) - math.Pow(t2, 4)) / ((1/e1 + 1/e2 - 1) + (1/e3a + 1/e3b - 1))
	near(t, "shielded flux", sol.Q[0], want, 1e-12)
	if math.Abs(sol.Q[1]+sol.Q[2]) > 1e-9*want {
		t.Errorf("shield net heat %g", sol.Q[1]+sol.Q[2])
	}
	if sol.T[1] != sol.T[2] {
		t.Errorf("shield sides at %v and %v K", sol.T[1], sol.T[2])
	}
	// Its temperature from the series network: σT3⁴ = σT1⁴ − q(1/ε1 + 1/ε3a − 1).
	near(t, "shield temperature", eb(sol.T[1]), eb(t1)-want*(1/e1+1/e3a-1), 1e-12)
	// A black shield (ε = 1 both sides) takes the substitution path.
	p.Emissivity[1], p.Emissivity[2] = 1, 1
	sol, err = Solve(p)
	if err != nil {
		t.Fatal(err)
	}
	want = Sigma * (math.Pow(t1, 4) - math.Pow(t2, 4)) / ((1/e1 + 1/e2 - 1) + 1)
	near(t, "black shield flux", sol.Q[0], want, 1e-12)
}

// Three-surface enclosure with one reradiating surface: a long duct of
// equilateral triangular section, each wall of width 1 (F_ij = 1/2 by the
// crossed-string rule). The network (Incropera & DeWitt, sec. 13.3.4, the
// reradiating surface) gives q1 = (Eb1 − Eb2)/(R1 + R2 + R_equiv) with
// R_i = (1−ε_i)/(ε_i A_i), R_equiv = [A1F12 + (1/(A1F1R) + 1/(A2F2R))⁻¹]⁻¹.
func TestReradiatingThreeSurface(t *testing.T) {
	const t1, t2 = 1000, 500
	e1, e2 := 0.8, 0.4
	row := func(i int) Row { // F = 1/2 to each of the other two walls
		var r Row
		for j := range int32(3) {
			if int(j) != i {
				r.Append(j, 0.5)
			}
		}
		return r
	}
	p := Problem{
		Area: []float64{1, 1, 1}, Emissivity: []float64{e1, e2, 0.5},
		Cond: []Condition{{Temperature, t1}, {Temperature, t2}, {Adiabatic, 0}},
		F:    []Row{row(0), row(1), row(2)},
	}
	sol, err := Solve(p)
	if err != nil {
		t.Fatal(err)
	}
	r1, r2 := (1-e1)/e1, (1-e2)/e2
	req := 1 / (0.5 + 1/(1/0.5+1/0.5))
	want := (eb(t1) - eb(t2)) / (r1 + r2 + req)
	near(t, "q1", sol.Q[0], want, 1e-12)
	near(t, "q2", sol.Q[1], -want, 1e-12)
	if math.Abs(sol.Q[2]) > 1e-9*want {
		t.Errorf("reradiating wall Q = %g", sol.Q[2])
	}
	// Its radiosity is the midpoint of J1 and J2 (equal resistances).
	near(t, "reradiating T", eb(sol.T[2]), (sol.J[0]+sol.J[1])/2, 1e-12)
	// Symmetry of conductances and their row sums (ε_i A_i when closed).
	for _, c := range bothPaths(t, p) {
		sums := closedSums(c)
		for i := range sums {
			near(t, fmt.Sprintf("Σ_j A_iℱ_ij (dense %v)", c.Dense), sums[i], p.Emissivity[i]*p.Area[i], 1e-12)
		}
	}
}

// A fixed-flux surface whose temperature is the unknown: a heater plate
// facing a large cold parallel plate. With q1 given, σT1⁴ = σT2⁴ +
// q1(1/ε1 + 1/ε2 − 1) (parallel plates, inverted).
func TestFixedFluxUnknownTemperature(t *testing.T) {
	const q1, t2 = 2500.0, 300.0
	e1, e2 := 0.9, 0.7
	p := Problem{
		Area: []float64{1, 1}, Emissivity: []float64{e1, e2},
		Cond: []Condition{{HeatFlux, q1}, {Temperature, t2}},
		F:    []Row{rowOf(1, 1), rowOf(0, 1)},
	}
	sol, err := Solve(p)
	if err != nil {
		t.Fatal(err)
	}
	near(t, "σT1⁴", eb(sol.T[0]), eb(t2)+q1*(1/e1+1/e2-1), 1e-12)
	near(t, "Q1", sol.Q[0], q1, 1e-12)
}

// An open plate radiating to the ambient only: Q = εAσ(T⁴ − T_amb⁴).
func TestAmbient(t *testing.T) {
	p := Problem{
		Area: []float64{2}, Emissivity: []float64{0.35},
		Cond:    []Condition{{Temperature, 450}},
		F:       []Row{{}},
		Ambient: []float64{1}, AmbientT: 290,
	}
	sol, err := Solve(p)
	if err != nil {
		t.Fatal(err)
	}
	want := 0.35 * 2 * (eb(450) - eb(290))
	near(t, "Q", sol.Q[0], want, 1e-12)
	near(t, "to ambient", sol.ToAmbient, want, 1e-12)
	// An adiabatic plate facing only the ambient sits at the ambient temperature.
	p.Cond[0] = Condition{Adiabatic, 0}
	sol, err = Solve(p)
	if err != nil {
		t.Fatal(err)
	}
	near(t, "adiabatic T", sol.T[0], 290, 1e-12)
}

func TestErrors(t *testing.T) {
	closed := Problem{
		Area: []float64{1, 1}, Emissivity: []float64{0.5, 0.5},
		Cond: []Condition{{HeatFlux, 10}, {Adiabatic, 0}},
		F:    []Row{rowOf(1, 1), rowOf(0, 1)},
	}
	if _, err := Solve(closed); err != ErrNoTemperature {
		t.Errorf("closed enclosure without temperatures: %v, want ErrNoTemperature", err)
	}
	bad := twoSurface(1, 1, 1.2, 0.5, 300, 400)
	if _, err := Solve(bad); err == nil {
		t.Error("emissivity 1.2 accepted")
	}
	// A surface asked to absorb 1 MW/m² from 300 K surroundings cannot.
	imp := Problem{
		Area: []float64{1, 1}, Emissivity: []float64{0.5, 0.5},
		Cond: []Condition{{HeatFlux, -1e6}, {Temperature, 300}},
		F:    []Row{rowOf(1, 1), rowOf(0, 1)},
	}
	if _, err := Solve(imp); err == nil {
		t.Error("impossible flux accepted")
	}
}

// The sparse iterative path (conjugate gradients) must agree with the
// dense LU path on the same problem.
func TestSparseMatchesDense(t *testing.T) {
	// A ring of strips, each seeing its two neighbours and the ambient.
	const n = 400
	p := Problem{Area: make([]float64, n), Emissivity: make([]float64, n), Cond: make([]Condition, n), F: make([]Row, n), Ambient: make([]float64, n), AmbientT: 280}
	for i := range n {
		p.Area[i] = 1
		p.Emissivity[i] = 0.3 + 0.6*float64(i%7)/7
		p.Cond[i] = Condition{Adiabatic, 0}
		if i%10 == 0 {
			p.Cond[i] = Condition{Temperature, 400 + float64(i%13)}
		}
		a, b := (i+n-1)%n, (i+1)%n
		if a > b {
			a, b = b, a
		}
		p.F[i] = rowOf(float64(a), 0.3, float64(b), 0.3)
		p.Ambient[i] = 0.4
	}
	dense, err := Solve(p)
	if err != nil {
		t.Fatal(err)
	}
	denseLimit = 10
	defer func() { denseLimit = DenseLimit }()
	sparse, err := Solve(p)
	if err != nil {
		t.Fatal(err)
	}
	if !dense.Dense || sparse.Dense {
		t.Fatalf("paths not taken: dense %v, sparse %v", dense.Dense, sparse.Dense)
	}
	for i := range n {
		if math.Abs(dense.T[i]-sparse.T[i]) > 1e-9*dense.T[i] || math.Abs(dense.Q[i]-sparse.Q[i]) > 1e-8*eb(400) {
			t.Fatalf("node %d: dense T=%v Q=%v, sparse T=%v Q=%v", i, dense.T[i], dense.Q[i], sparse.T[i], sparse.Q[i])
		}
	}
	if sparse.Imbalance > 1e-9 {
		t.Errorf("sparse imbalance %g", sparse.Imbalance)
	}
}

// BenchmarkSolve solves dense (300 nodes) and sparse (20,000 nodes) rings.
func BenchmarkSolve(b *testing.B) {
	for _, n := range []int{300, 20000} {
		p := Problem{Area: make([]float64, n), Emissivity: make([]float64, n), Cond: make([]Condition, n), F: make([]Row, n), Ambient: make([]float64, n), AmbientT: 280}
		for i := range n {
			p.Area[i], p.Emissivity[i], p.Cond[i] = 1, 0.5, Condition{Adiabatic, 0}
			if i%10 == 0 {
				p.Cond[i] = Condition{Temperature, 400}
			}
			a, c := (i+n-1)%n, (i+1)%n
			if a > c {
				a, c = c, a
			}
			p.F[i] = rowOf(float64(a), 0.3, float64(c), 0.3)
			p.Ambient[i] = 0.4
		}
		b.Run(fmt.Sprint(n), func(b *testing.B) {
			for b.Loop() {
				if _, err := Solve(p); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

// rowOf builds a row from (column, F) pairs given in increasing columns.
func rowOf(pairs ...float64) Row {
	var r Row
	for k := 0; k < len(pairs); k += 2 {
		r.Append(int32(pairs[k]), pairs[k+1])
	}
	return r
}
