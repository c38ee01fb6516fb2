package exchange

import (
	"errors"
	"fmt"
	"math"
)

// solveLoaded solves an enclosure whose nodes also absorb power from
// outside the infrared exchange (Problem.Load: sunlight, say). A node's
// energy balance is then
//
//	(infrared leaving) − (infrared arriving) = given net flow + Load,
//
// so a node with a flux, flow or adiabatic condition must give off its load
// by radiation besides its own flow, while a node held at a temperature
// simply has its load taken off its net flow. The reported Q and q are the
// net flows with the loads counted in (what conduction or a heater must
// supply), so that a flow condition reads back as given; Absorbed is the
// total load.
func solveLoaded(p Problem) (*Solution, error) {
	n := len(p.Area)
	if len(p.Load) != n {
		return nil, errors.New("exchange: the problem's slices have different lengths")
	}
	for k, l := range p.Load {
		if math.IsNaN(l) || math.IsInf(l, 0) {
			return nil, &NodeError{k, fmt.Sprintf("load %v W", l)}
		}
	}
	b := p
	b.Load = nil
	b.Cond = make([]Condition, n)
	for k, c := range p.Cond {
		b.Cond[k] = withLoad(c, p.Load[k], p.Area[k])
	}
	b.GroupCond = make([]Condition, len(p.GroupCond))
	for g, c := range p.GroupCond {
		load := 0.0
		for _, k := range p.Groups[g] {
			load += p.Load[k]
		}
		b.GroupCond[g] = withLoad(c, load, math.NaN()) // groups take flows, never fluxes
	}
	sol, err := Solve(b)
	if err != nil {
		return nil, err
	}
	for k, l := range p.Load {
		sol.Q[k] -= l
		sol.q[k] -= l / p.Area[k]
		sol.Absorbed += l
	}
	return sol, nil
}

// withLoad returns condition c of a node (or group) of area a that also
// absorbs load watts, as a condition on its infrared net flow.
func withLoad(c Condition, load, a float64) Condition {
	if load == 0 {
		return c
	}
	switch c.Kind {
	case HeatFlux:
		return Condition{Kind: HeatFlux, Value: c.Value + load/a}
	case HeatFlow:
		return Condition{Kind: HeatFlow, Value: c.Value + load}
	case Adiabatic:
		return Condition{Kind: HeatFlow, Value: load}
	}
	return c
}
