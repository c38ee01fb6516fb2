package analysis

import (
	"errors"
	"fmt"
	"strings"

	"github.com/hemiray/hemiray/mesh"
	"github.com/hemiray/hemiray/raytrace"
	"github.com/hemiray/hemiray/raytrace/exchange"
	"github.com/hemiray/hemiray/raytrace/smooth"
)

// NodeInfo is what a node's inputs were: its emissivity and its condition
// as the case states it (Value in K, W/m² or W; Condition "shared with X"
// for the back of a two-sided sheet, whose condition is on its front).
type NodeInfo struct {
	Emissivity float64
	Condition  string
	Value      float64
}

// emissivity returns the emissivity of node n of surface surf.
func (c *Case) emissivity(surf string, n raytrace.Node) (float64, error) {
	side := c.Spec(surf)
	if n.Back {
		side = c.Spec(surf + ".back")
	}
	if side.Emissivity == nil {
		return 0, fmt.Errorf("%s: no emissivity for %s: set it in [surfaces.%q] or [defaults]", c.Path, n.Name, surf)
	}
	return *side.Emissivity, nil
}

// condition turns a surface's settings into a condition; share is the
// node's fraction of the surface's area (a heat flow is spread by area, a
// flux and a temperature hold for every part).
func condition(sp SurfaceSpec, share float64) (exchange.Condition, error) {
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

// problem builds the exchange problem of case c on the nodes of m for a
// smoothed matrix; open says whether the model has an ambient column.
//
// Two-sided sheets: the two sides share one temperature, so they form one
// group. A heat_flux on a sheet is per unit of the sheet's area (the area of
// one side), so the group carries the flow flux·A, leaving through both
// faces together; a heat_flow is the sheet's.
func problem(c *Case, m *mesh.Mesh, nodes []raytrace.Node, sm *smooth.Result, open bool) (exchange.Problem, []NodeInfo, error) {
	n := len(nodes)
	p := exchange.Problem{
		Area: make([]float64, n), Emissivity: make([]float64, n), Cond: make([]exchange.Condition, n),
		F: sm.F,
		// Smoothing measured its own reciprocity: round-off, as a rule.
		Reciprocal: sm.ReciprocityAfter <= 1e-12,
	}
	info := make([]NodeInfo, n)
	if open {
		if c.Ambient.Temperature == nil {
			return p, nil, fmt.Errorf("%s: rays leave the model (it is open), so the case needs [ambient] temperature = … K", c.Path)
		}
		p.Ambient = sm.Ambient
		p.AmbientT = *c.Ambient.Temperature
	}
	front := make(map[string]int) // front node name → index, to pair the backs
	for i, nd := range nodes {
		p.Area[i] = nd.Area
		surf := m.Surfaces[nd.Surface].Name
		eps, err := c.emissivity(surf, nd)
		if err != nil {
			return p, nil, err
		}
		p.Emissivity[i], info[i].Emissivity = eps, eps
		own := c.Spec(surf)
		cond, err := condition(own, nd.Area/m.Surfaces[nd.Surface].Area)
		if err != nil {
			return p, nil, fmt.Errorf("%s: surface %s: %w", c.Path, surf, err)
		}
		if !own.IsTwoSided() {
			p.Cond[i] = cond
			info[i].Condition, info[i].Value = cond.Kind.String(), cond.Value
			continue
		}
		if !nd.Back {
			front[nd.Name] = i
			continue
		}
		fi, ok := front[strings.TrimSuffix(nd.Name, ".back")]
		if !ok {
			return p, nil, fmt.Errorf("no front node for %s", nd.Name)
		}
		if cond.Kind == exchange.HeatFlux {
			cond = exchange.Condition{Kind: exchange.HeatFlow, Value: cond.Value * nd.Area}
		}
		p.Groups = append(p.Groups, []int{fi, i})
		p.GroupCond = append(p.GroupCond, cond)
		info[fi].Condition, info[fi].Value = cond.Kind.String()+" (both sides)", cond.Value
		info[i].Condition = "shared with " + nodes[fi].Name
	}
	return p, info, nil
}
