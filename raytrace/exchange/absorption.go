package exchange

import "math"

// solveAbsorption solves an enclosure given by absorption factors B (see
// Problem.Absorption). With them every node's net outgoing flow is
//
//	Q_i = ε_iA_iσ(T_i⁴ − Σ_j B_ij T_j⁴ − B_i,amb T_amb⁴)
//
// (Gebhart 1961, generalized to any reflection law by Mahan, Radiation
// Heat Transfer: A Statistical Approach, 2002; from memory), which is the
// net-radiation balance of black nodes of area ε_iA_i seeing each other
// with view factors B_ij: so it is solved as that black enclosure, a heat
// flux first turned into the flow through the node's real area. A
// radiosity has no meaning for a specular node and is reported as NaN.
func solveAbsorption(p Problem) (*Solution, error) {
	if _, err := p.check(); err != nil {
		return nil, err
	}
	n := len(p.Area)
	b := p
	b.Absorption = false
	b.Area, b.Emissivity, b.Cond = make([]float64, n), make([]float64, n), make([]Condition, n)
	for k := range n {
		b.Area[k], b.Emissivity[k], b.Cond[k] = p.Emissivity[k]*p.Area[k], 1, p.Cond[k]
		if c := p.Cond[k]; c.Kind == HeatFlux {
			b.Cond[k] = Condition{Kind: HeatFlow, Value: c.Value * p.Area[k]}
		}
	}
	sol, err := Solve(b)
	if err != nil {
		return nil, err
	}
	for k := range n {
		sol.q[k] = sol.Q[k] / p.Area[k]
		sol.J[k] = math.NaN()
	}
	return sol, nil
}

// EmissionAreas returns ε_iA_i of every node: the areas that weigh the
// reciprocity of absorption factors, ε_iA_iB_ij = ε_jA_jB_ji.
func EmissionAreas(area, eps []float64) []float64 {
	out := make([]float64, len(area))
	for i := range area {
		out[i] = eps[i] * area[i]
	}
	return out
}
