package main

import (
	"errors"
	"fmt"
	"math"

	"gonum.org/v1/gonum/stat/distuv"

	"github.com/hemiray/hemiray/raytrace"
	"github.com/hemiray/hemiray/raytrace/exchange"
	"github.com/hemiray/hemiray/raytrace/smooth"
)

// nodeInfo is what surfaces.csv says of a node's inputs.
type nodeInfo struct {
	Emissivity float64
	Condition  string // "temperature", "heat_flux", … ("shared" for the back of a two-sided sheet)
	Value      float64
}

// analysis is the smoothed matrix, the exchange solution and its intervals.
type analysis struct {
	sm       *smooth.Result
	sol      *exchange.Solution
	info     []nodeInfo
	S        [][]float64 // exchange areas A_iℱ_ij, m²; nil above the dense limit
	toAmb    []float64
	ambientT float64
	// Half-widths of T and Q from replicates (nil without replicates).
	THalf, QHalf []float64
	Replicates   int
	notes        []string
}

// smoothTally smooths a tally (pooled or a replicate).
func smoothTally(res *raytrace.Result, t *raytrace.Tally) (*smooth.Result, error) {
	c := smooth.Counts{Area: make([]float64, len(res.Nodes)), Rays: t.Rays, Hits: make([][]smooth.Entry, len(res.Nodes))}
	for i, n := range res.Nodes {
		c.Area[i] = n.Area
		for k, j := range t.Hits[i].Col {
			c.Hits[i] = append(c.Hits[i], smooth.Entry{J: j, K: t.Hits[i].Count[k]})
		}
	}
	if res.HasAmbient() {
		c.Ambient = t.Escaped
	}
	return smooth.Smooth(c)
}

// problem builds the exchange problem of the case for a smoothed matrix.
func problem(lc *loadedCase, res *raytrace.Result, sm *smooth.Result) (exchange.Problem, []nodeInfo, error) {
	n := len(res.Nodes)
	p := exchange.Problem{
		Area: make([]float64, n), Emissivity: make([]float64, n), Cond: make([]exchange.Condition, n),
		F: make([][]exchange.Entry, n),
	}
	info := make([]nodeInfo, n)
	if res.HasAmbient() {
		if lc.c.Ambient.Temperature == nil {
			return p, nil, fmt.Errorf("%s: rays leave the model (it is open), so the case needs [ambient] temperature = … K", lc.path)
		}
		p.Ambient = sm.Ambient
		p.AmbientT = *lc.c.Ambient.Temperature
	}
	surfArea := make([]float64, len(lc.mesh.Surfaces))
	for _, s := range lc.mesh.Surfaces {
		surfArea[lc.mesh.SurfaceIndex(s.Name)] = s.Area
	}
	front := map[string]int{} // node name of a front side → index, to pair backs
	for i, nd := range res.Nodes {
		p.Area[i] = nd.Area
		for _, e := range sm.F[i] {
			p.F[i] = append(p.F[i], exchange.Entry{J: e.J, F: e.F})
		}
		surf := lc.mesh.Surfaces[nd.Surface].Name
		own := lc.spec(surf)
		side := own
		if nd.Back {
			side = lc.spec(surf + ".back")
		}
		if side.Emissivity == nil {
			return p, nil, fmt.Errorf("%s: no emissivity for %s: set it in [surfaces.%q] or [defaults]", lc.path, nd.Name, surf)
		}
		p.Emissivity[i] = *side.Emissivity
		info[i].Emissivity = p.Emissivity[i]
		c, err := condition(own, nd.Area/surfArea[nd.Surface])
		if err != nil {
			return p, nil, fmt.Errorf("%s: surface %s: %w", lc.path, surf, err)
		}
		if !own.twoSided() {
			p.Cond[i] = c
			info[i].Condition, info[i].Value = c.Kind.String(), c.Value
			continue
		}
		// The two sides of a sheet share one temperature; a flux applies to
		// the sheet's area, a flow to the sheet.
		if !nd.Back {
			front[nd.Name] = i
			continue
		}
		fi, ok := front[nd.Name[:len(nd.Name)-len(".back")]]
		if !ok {
			return p, nil, fmt.Errorf("internal: no front node for %s", nd.Name)
		}
		if c.Kind == exchange.HeatFlux {
			c = exchange.Condition{Kind: exchange.HeatFlow, Value: c.Value * nd.Area}
		}
		p.Groups = append(p.Groups, []int{fi, i})
		p.GroupCond = append(p.GroupCond, c)
		info[fi].Condition, info[fi].Value = c.Kind.String()+" (both sides)", c.Value
		info[i].Condition = "shared with " + res.Nodes[fi].Name
	}
	return p, info, nil
}

// condition turns a surface's settings into a condition; share is the
// node's fraction of the surface (a heat flow is spread by area).
func condition(sp surfaceSpec, share float64) (exchange.Condition, error) {
	switch {
	case sp.Temperature != nil:
		return exchange.Condition{Kind: exchange.Temperature, Value: *sp.Temperature}, nil
	case sp.HeatFlux != nil:
		return exchange.Condition{Kind: exchange.HeatFlux, Value: *sp.HeatFlux}, nil
	case sp.HeatFlow != nil:
		return exchange.Condition{Kind: exchange.HeatFlow, Value: *sp.HeatFlow * share}, nil
	case sp.Adiabatic != nil && *sp.Adiabatic:
		return exchange.Condition{Kind: exchange.Adiabatic}, nil
	}
	return exchange.Condition{}, errors.New("no boundary condition: give temperature, heat_flux, heat_flow or adiabatic (or a default)")
}

// analyse smooths, solves, computes exchange areas and, with replicates,
// t-intervals on T and Q.
func analyse(lc *loadedCase, res *raytrace.Result) (*analysis, error) {
	a := &analysis{}
	var err error
	if a.sm, err = smoothTally(res, &res.Tally); err != nil {
		return nil, err
	}
	p, info, err := problem(lc, res, a.sm)
	if err != nil {
		return nil, err
	}
	a.info, a.ambientT = info, p.AmbientT
	if a.sol, err = exchange.Solve(p); err != nil {
		return nil, err
	}
	if len(res.Nodes) <= exchange.DenseLimit {
		if a.S, a.toAmb, err = exchange.ExchangeAreas(p.Area, p.Emissivity, p.F, p.Ambient); err != nil {
			return nil, err
		}
	} else {
		a.notes = append(a.notes, fmt.Sprintf("conductances.csv not written: %d nodes exceed the dense limit of %d for exchange factors", len(res.Nodes), exchange.DenseLimit))
	}
	// Replicates: smooth and solve each, then a t-interval on the pooled value
	// with standard error sd/√R (methods d5; Student's t with R−1 degrees of freedom).
	var Ts, Qs [][]float64
	for r := range res.Replicas {
		sm, err := smoothTally(res, &res.Replicas[r])
		if err != nil {
			a.notes = append(a.notes, fmt.Sprintf("replicate %d skipped: %v", r, err))
			continue
		}
		pr, _, err := problem(lc, res, sm)
		if err != nil {
			return nil, err
		}
		sol, err := exchange.Solve(pr)
		if err != nil {
			a.notes = append(a.notes, fmt.Sprintf("replicate %d skipped: %v", r, err))
			continue
		}
		Ts, Qs = append(Ts, sol.T), append(Qs, sol.Q)
	}
	if R := len(Ts); R >= 2 {
		a.Replicates = R
		t := distuv.StudentsT{Mu: 0, Sigma: 1, Nu: float64(R - 1)}.Quantile(0.5 + res.Options.Confidence/2)
		a.THalf, a.QHalf = make([]float64, len(res.Nodes)), make([]float64, len(res.Nodes))
		for i := range res.Nodes {
			a.THalf[i] = t * sdOf(Ts, i) / math.Sqrt(float64(R))
			a.QHalf[i] = t * sdOf(Qs, i) / math.Sqrt(float64(R))
		}
	}
	return a, nil
}

// sdOf is the sample standard deviation of column i over the rows.
func sdOf(rows [][]float64, i int) float64 {
	m := 0.0
	for _, r := range rows {
		m += r[i]
	}
	m /= float64(len(rows))
	s := 0.0
	for _, r := range rows {
		s += (r[i] - m) * (r[i] - m)
	}
	return math.Sqrt(s / float64(len(rows)-1))
}
