package exchange

import (
	"errors"
	"fmt"
	"github.com/hemiray/hemiray/raytrace/internal/sparse"
	"math"
)

// Sigma is the Stefan–Boltzmann constant in W/(m²·K⁴) (CODATA 2018, exact
// since the 2019 SI redefinition: 5.670374419…e-8).
const Sigma = 5.670374419e-8

// Kind is a boundary condition's kind.
type Kind int

// The boundary conditions.
const (
	Temperature Kind = iota // Value in K
	HeatFlux                // Value in W/m², net outgoing
	HeatFlow                // Value in W, net outgoing
	Adiabatic               // no net exchange (reradiating)
)

func (k Kind) String() string {
	return [...]string{"temperature", "heat_flux", "heat_flow", "adiabatic"}[k]
}

// Condition is one node's (or group's) boundary condition.
type Condition struct {
	Kind  Kind
	Value float64
}

// Row is a sparse row of view factors: F = Val[k] in column Col[k],
// columns increasing (the sparse row type the tallies and smoothing use too).
type Row = sparse.Row[float64]

// Problem is an enclosure to solve. F rows are sparse with columns
// increasing; Ambient[k] is F_k,amb (nil for a closed model).
type Problem struct {
	Area       []float64 // m²
	Emissivity []float64 // in (0, 1]
	Cond       []Condition
	F          []Row
	Ambient    []float64
	AmbientT   float64 // K
	// Groups lists sets of nodes that share one temperature; GroupCond is
	// each group's condition (Temperature, HeatFlow for the group's total,
	// or Adiabatic). The members' own Cond are ignored.
	Groups    [][]int
	GroupCond []Condition
	// Absorption says that F and Ambient hold absorption factors B_ij, the
	// share of node i's emission that node j absorbs after any number of
	// reflections and transmissions (rays followed through them), rather
	// than view factors; reciprocity then reads ε_iA_iB_ij = ε_jA_jB_ji.
	Absorption bool
	// Reciprocal says that A_kF_kj = A_jF_jk is known to hold to
	// round-off (ε_kA_kB_kj = ε_jA_jB_jk for absorption factors), as
	// smoothing makes it: an iterative solve then takes the symmetry of
	// its matrix for granted instead of pairing every view factor with
	// its mirror, which at 10⁴ nodes took longer than the solve itself.
	// Leave it false for factors of unknown origin.
	Reciprocal bool
	// Load, if set, is the power each node absorbs from outside the
	// infrared exchange in W (sunlight): it enters every node's energy
	// balance (see solveLoaded).
	Load []float64
}

// Solution holds per-node results: T in K, J and q in W/m², Q in W (net
// outgoing; negative when the node absorbs).
type Solution struct {
	T, J, Q, q []float64
	// ToAmbient is the net power the ambient absorbs, W. Energy balance:
	// Σ_k Q_k + Absorbed = ToAmbient; Imbalance is the difference of the
	// infrared flows over max |Q_k|.
	ToAmbient float64
	Imbalance float64
	// Absorbed is the total of the loads, W: with them the balance reads
	// Σ_k Q_k + Absorbed = ToAmbient.
	Absorbed float64
	Dense    bool // solved by LU rather than iteratively
	method   string
}

// Flux returns the net outgoing flux of node k in W/m².
func (s *Solution) Flux(k int) float64 { return s.q[k] }

// NodeError is a problem with one node (Node is its index).
type NodeError struct {
	Node int
	Msg  string
}

func (e *NodeError) Error() string { return fmt.Sprintf("exchange: node %d: %s", e.Node, e.Msg) }

// ErrNoTemperature is returned for a closed enclosure without any fixed
// temperature: its temperatures are undetermined.
var ErrNoTemperature = errors.New("exchange: a closed enclosure needs at least one node with a fixed temperature (or an ambient)")

// check validates the problem and returns the group of each node (−1 none).
func (p *Problem) check() ([]int, error) {
	n := len(p.Area)
	if len(p.Emissivity) != n || len(p.Cond) != n || len(p.F) != n || (p.Ambient != nil && len(p.Ambient) != n) || len(p.Groups) != len(p.GroupCond) {
		return nil, errors.New("exchange: the problem's slices have different lengths")
	}
	group := make([]int, n)
	for k := range group {
		group[k] = -1
	}
	for g, members := range p.Groups {
		if len(members) == 0 {
			return nil, fmt.Errorf("exchange: group %d is empty", g)
		}
		for _, k := range members {
			if group[k] >= 0 {
				return nil, &NodeError{k, "in two groups"}
			}
			group[k] = g
		}
		if c := p.GroupCond[g]; c.Kind == HeatFlux {
			return nil, fmt.Errorf("exchange: group %d: give a heat flow (W) or a temperature, not a flux", g)
		}
	}
	fixedT := false
	for k := range n {
		if !(p.Area[k] > 0) {
			return nil, &NodeError{k, fmt.Sprintf("area %v", p.Area[k])}
		}
		if e := p.Emissivity[k]; !(e > 0 && e <= 1) {
			return nil, &NodeError{k, fmt.Sprintf("emissivity %v is outside (0, 1]", e)}
		}
		if !p.F[k].Increasing(n) {
			return nil, fmt.Errorf("exchange: row %d of F: columns must increase within [0, %d), one value each", k, n)
		}
		c := p.Cond[k]
		if g := group[k]; g >= 0 {
			c = p.GroupCond[g]
		}
		if c.Kind == Temperature {
			if !(c.Value > 0) {
				return nil, &NodeError{k, fmt.Sprintf("temperature %v K must be positive", c.Value)}
			}
			fixedT = true
		}
		if math.IsNaN(c.Value) || math.IsInf(c.Value, 0) {
			return nil, &NodeError{k, fmt.Sprintf("condition value %v", c.Value)}
		}
	}
	open := false
	for _, a := range p.Ambient {
		open = open || a > 0
	}
	if open && !(p.AmbientT >= 0) {
		return nil, fmt.Errorf("exchange: ambient temperature %v K", p.AmbientT)
	}
	if !fixedT && !open {
		return nil, ErrNoTemperature
	}
	return group, nil
}
