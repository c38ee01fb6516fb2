package exchange

import (
	"errors"
	"fmt"
	"math"
)

// DenseLimit is the number of unknowns up to which Solve factorises a dense
// matrix; larger systems are solved iteratively on a sparse matrix.
const DenseLimit = 3000

// denseLimit is DenseLimit, lowered by tests to exercise the sparse path.
var denseLimit = DenseLimit

// ErrNotConverged is returned when the iterative solver misses its tolerance.
var ErrNotConverged = errors.New("exchange: iterative solver did not converge")

// Solve solves the enclosure.
func Solve(p Problem) (*Solution, error) {
	if p.Load != nil {
		return solveLoaded(p)
	}
	if p.Absorption {
		return solveAbsorption(p)
	}
	group, err := p.check()
	if err != nil {
		return nil, err
	}
	n := len(p.Area)
	cond := func(k int) Condition {
		if g := group[k]; g >= 0 {
			return p.GroupCond[g]
		}
		return p.Cond[k]
	}
	eb := func(t float64) float64 { return Sigma * t * t * t * t }
	ambE := eb(p.AmbientT)
	fAmb := func(k int) float64 {
		if p.Ambient == nil {
			return 0
		}
		return p.Ambient[k]
	}

	// Unknowns: J of every node whose radiosity is not known, and E = σT⁴ of
	// every group without a fixed temperature. A black node with a fixed
	// temperature has J = σT⁴ known (−1); a black member of a group has
	// J = E_group and takes the group's unknown.
	varJ := make([]int, n)
	varE := make([]int, len(p.Groups))
	nv := 0
	for g := range p.Groups {
		varE[g] = -1
		if p.GroupCond[g].Kind != Temperature {
			varE[g] = nv
			nv++
		}
	}
	knownJ := make([]float64, n)
	for k := range n {
		c, g := cond(k), group[k]
		switch {
		case c.Kind == Temperature && p.Emissivity[k] == 1:
			varJ[k] = -1
			knownJ[k] = eb(c.Value)
		case g >= 0 && varE[g] >= 0 && p.Emissivity[k] == 1:
			varJ[k] = varE[g]
		default:
			varJ[k] = nv
			nv++
		}
	}
	s := &system{n: nv, rhs: make([]float64, nv), f: p.F, scale: make([]float64, n), v: varJ, reciprocal: p.Reciprocal}
	// irradiation puts node k's view-factor terms −a·Σ_j F_kj J_j in row
	// varJ[k] (read from F itself, see system) and moves those of known
	// radiosities, with a·F_amb·σT_amb⁴, to the right-hand side.
	irradiation := func(k int, a float64) {
		r := varJ[k]
		s.scale[k] = a
		for i, j := range p.F[k].Col {
			if varJ[j] < 0 {
				s.rhs[r] += a * p.F[k].Val[i] * knownJ[j]
			}
		}
		s.rhs[r] += a * fAmb(k) * ambE
	}
	for g, c := range p.GroupCond {
		if varE[g] >= 0 && c.Kind == HeatFlow {
			s.rhs[varE[g]] += c.Value
		}
	}
	for k := range n {
		c, g := cond(k), group[k]
		a, eps := p.Area[k], p.Emissivity[k]
		rho := 1 - eps
		switch {
		case varJ[k] < 0:
			// Known radiosity: no row.
		case c.Kind == Temperature && g < 0 || c.Kind == Temperature && varE[g] < 0:
			r := varJ[k]
			s.add(r, r, a/rho)
			irradiation(k, a)
			s.rhs[r] += a * eps / rho * eb(c.Value)
		case g >= 0 && eps < 1:
			// Gray member of a shared-temperature group:
			// (A/ρ)J − AΣFJ − (Aε/ρ)E = A F_amb σT_amb⁴, and its share
			// Q_k = (Aε/ρ)(E − J_k) of the group row.
			r, e := varJ[k], varE[g]
			w := a * eps / rho
			s.add(r, r, a/rho)
			s.add(r, e, -w)
			irradiation(k, a)
			s.add(e, e, w)
			s.add(e, r, -w)
		case g >= 0:
			// Black member: J = E, and Q_k = A(E − ΣFJ − F_amb σT_amb⁴)
			// joins the group row.
			e := varE[g]
			s.add(e, e, a)
			irradiation(k, a)
		default:
			// Fixed flux, flow or adiabatic.
			r := varJ[k]
			s.add(r, r, a)
			irradiation(k, a)
			switch c.Kind {
			case HeatFlux:
				s.rhs[r] += c.Value * a
			case HeatFlow:
				s.rhs[r] += c.Value
			}
		}
	}
	x, method, err := s.solve()
	if err != nil {
		return nil, err
	}

	sol := &Solution{T: make([]float64, n), J: make([]float64, n), Q: make([]float64, n), q: make([]float64, n), Dense: method == byLU, method: method}
	for k := range n {
		if v := varJ[k]; v >= 0 {
			sol.J[k] = x[v]
		} else {
			sol.J[k] = knownJ[k]
		}
	}
	for k := range n {
		gk := fAmb(k) * ambE
		for i, j := range p.F[k].Col {
			gk += p.F[k].Val[i] * sol.J[j]
		}
		sol.q[k] = sol.J[k] - gk
		sol.Q[k] = p.Area[k] * sol.q[k]
		sol.ToAmbient += p.Area[k] * fAmb(k) * (sol.J[k] - ambE)
		c, g, eps := cond(k), group[k], p.Emissivity[k]
		var e4 float64 // σT⁴
		switch {
		case c.Kind == Temperature:
			sol.T[k] = c.Value
			continue
		case g >= 0:
			e4 = x[varE[g]]
		default:
			e4 = sol.J[k] + (1-eps)/eps*sol.q[k]
		}
		if !(e4 >= 0) {
			return nil, &NodeError{k, fmt.Sprintf("its condition cannot be met: it needs σT⁴ = %.4g W/m² < 0 (it must absorb more than its surroundings can give)", e4)}
		}
		sol.T[k] = math.Sqrt(math.Sqrt(e4 / Sigma))
	}
	qmax, sum := 0.0, 0.0
	for _, q := range sol.Q {
		qmax = math.Max(qmax, math.Abs(q))
		sum += q
	}
	if qmax > 0 {
		sol.Imbalance = math.Abs(sum-sol.ToAmbient) / qmax
	}
	return sol, nil
}
