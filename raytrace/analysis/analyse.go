package analysis

import (
	"context"
	"errors"
	"fmt"
	"math"
	"runtime"
	"sync"
	"sync/atomic"

	"gonum.org/v1/gonum/stat/distuv"

	"github.com/hemiray/hemiray/raytrace"
	"github.com/hemiray/hemiray/raytrace/exchange"
	"github.com/hemiray/hemiray/raytrace/smooth"
)

// Result is a case analysed: the smoothed matrix, the exchange solution,
// intervals on T and Q, and exchange areas for conductances.
type Result struct {
	Nodes []raytrace.Node
	// Open says whether the model has an ambient column (rays escape).
	Open bool
	// RawAmbient is the ambient column of the matrix before smoothing
	// (RawRow gives its rows).
	RawAmbient []float64
	// The matrix before smoothing: given rows, or the counts of a trace,
	// divided only when a row is asked for (a float copy of the counts
	// would be another 8 bytes an entry, gigabytes at 10⁴ nodes, that only
	// the smoothed pairs file reads).
	rawGiven  []exchange.Row
	rawCounts *raytrace.Result
	Smoothed  *smooth.Result
	Solution  *exchange.Solution
	Info      []NodeInfo
	AmbientT  float64 // K
	// Absorption says the matrices hold absorption factors B_ij (rays
	// followed through reflections) rather than view factors F_ij.
	Absorption bool
	// Suns holds, per [[sun]] of the case, the power each node absorbs of
	// it and the steady state with those loads; Solution, THalf and QHalf
	// are those of the first sun.
	Suns []SunState
	// Conductors are the total exchange areas A_iℱ_ij in m², sparse and
	// symmetric, with those to the ambient.
	Conductors *exchange.Conductors
	// THalf and QHalf are the half-widths of the Student-t intervals on T
	// and Q from Replicates independent replicates at Confidence (nil
	// without replicates).
	THalf, QHalf []float64
	Replicates   int
	Confidence   float64
	Notes        []string
}

// Analyse smooths the tallies of res, solves the exchange with the case's
// conditions, computes exchange areas and, when res has replicates,
// Student-t intervals on T and Q.
func (in *Input) Analyse(res *raytrace.Result) (*Result, error) {
	if in.Case == nil {
		return nil, fmt.Errorf("an exchange solve needs a case file with emissivities and conditions")
	}
	for i, n := range res.Nodes {
		if res.Rays[i] == 0 {
			return nil, fmt.Errorf("no ray has been traced from %s yet (a time limit or an interrupt came too soon): continue the trace with --resume, or give it more time", n.Name)
		}
	}
	// Collect the trace's garbage (its workers' buffers) first, so that
	// the analysis reuses that memory and the check below sees what is
	// free; and the analysis's own (the smoothing workspace) at the end,
	// for the writing. On some virtual machines a first touch of memory
	// costs seconds a gigabyte, far more than collecting a heap of large
	// arrays without pointers.
	runtime.GC()
	defer runtime.GC()
	if err := in.checkMemory(res); err != nil {
		return nil, err
	}
	open := res.HasAmbient()
	absorption := res.Options.Optics != nil
	// Reciprocity weights: A_i, or ε_iA_i for absorption factors, with the
	// emissivities the rays were traced with.
	weight := make([]float64, len(res.Nodes))
	for i, n := range res.Nodes {
		weight[i] = n.Area
		if absorption {
			key := in.Mesh.Surfaces[n.Surface].Name
			if n.Back {
				key += ".back"
			}
			o, ok := res.Options.Optics[key]
			if !ok {
				return nil, fmt.Errorf("the tallies hold no optics for %s", key)
			}
			eps, err := in.Case.emissivity(in.Mesh.Surfaces[n.Surface].Name, n)
			if err != nil {
				return nil, err
			}
			if eps != o.Emissivity {
				return nil, fmt.Errorf("%s: the case's emissivity %v differs from the %v its rays were followed with: trace again", n.Name, eps, o.Emissivity)
			}
			weight[i] *= o.Emissivity
		}
	}
	// Each replicate is smoothed when its job comes and handed back once
	// solved, so that no more than one smoothed replicate per worker is
	// held beside the pooled matrix, and the smoothings share one
	// workspace: a replicate reuses the arrays the smoothings before it
	// are done with instead of touching new memory.
	ws := new(smooth.Workspace)
	pooled := func() (*smooth.Result, error) { return smoothTally(ws, weight, &res.Tally, open) }
	reps := make([]replicate, len(res.Replicas))
	for r := range reps {
		reps[r] = replicate{index: r, smooth: func() (*smooth.Result, error) { return smoothTally(ws, weight, &res.Replicas[r], open) }, done: ws.Recycle}
	}
	a, err := in.solve(res.Nodes, pooled, reps, open, absorption, res.Options.Confidence)
	if err != nil {
		return nil, nameNode(err, res.Nodes, res)
	}
	a.rawCounts, a.RawAmbient = res, make([]float64, len(res.Nodes))
	for i := range res.Nodes {
		a.RawAmbient[i] = float64(res.Escaped[i]) / float64(res.Rays[i])
	}
	return a, nil
}

// RawRow returns row i of the matrix before smoothing (columns
// increasing), its values in scratch when that has room.
func (a *Result) RawRow(i int, scratch []float64) exchange.Row {
	if a.rawCounts == nil {
		return a.rawGiven[i]
	}
	row := &a.rawCounts.Hits[i]
	out := exchange.Row{Col: row.Col, Val: scratch[:0]}
	rays := float64(a.rawCounts.Rays[i])
	for _, n := range row.Val {
		out.Val = append(out.Val, float64(n)/rays)
	}
	return out
}

// smoothTally smooths a tally (pooled or a replicate) for reciprocity with
// the given weights: the areas for view factors (A_iF_ij = A_jF_ji), the
// emission areas for absorption factors (ε_iA_iB_ij = ε_jA_jB_ji).
func smoothTally(ws *smooth.Workspace, weight []float64, t *raytrace.Tally, open bool) (*smooth.Result, error) {
	c := smooth.Counts{Area: weight, Rays: t.Rays, Hits: t.Hits}
	if open {
		c.Ambient = t.Escaped
	}
	return ws.Smooth(c)
}

// replicate is one replicate tally to smooth and solve: its number, how to
// smooth it, and what to do with the smoothed matrix once solved (nil:
// nothing).
type replicate struct {
	index  int
	smooth func() (*smooth.Result, error)
	done   func(*smooth.Result)
}

// solve smooths the pooled matrix (pooled) and solves the exchange with it
// for every steady state, computes the exchange areas, and smooths and
// solves every replicate for the intervals on T and Q. The work runs side
// by side in jobs: the pooled matrix's (smoothing, exchange areas, the
// states' solves) and one per replicate; every result goes to its own
// slot, so the order of work cannot change a bit.
func (in *Input) solve(nodes []raytrace.Node, pooled func() (*smooth.Result, error), reps []replicate, open, absorption bool, confidence float64) (*Result, error) {
	if len(in.Beams) > 0 && in.Sunlight == nil {
		if err := in.TraceSun(context.Background(), 0); err != nil {
			return nil, err
		}
	}
	states := in.states()
	var a *Result
	var perr error
	pooledSols := make([]*exchange.Solution, len(states))
	repT, repQ := make([][][]float64, len(reps)), make([][][]float64, len(reps)) // [replicate][state]
	repErr := make([]error, len(reps))
	parallel(1+len(reps), func(k int) {
		if k > 0 {
			repT[k-1], repQ[k-1], repErr[k-1] = in.solveReplicate(nodes, reps[k-1], states, open, absorption)
			return
		}
		sm, err := pooled()
		if err != nil {
			perr = err
			return
		}
		p, info, err := problem(in.Case, in.Mesh, nodes, sm, open)
		if err != nil {
			perr = err
			return
		}
		p.Absorption = absorption
		a = &Result{Nodes: nodes, Open: open, Absorption: absorption, Smoothed: sm, Info: info, AmbientT: p.AmbientT, Confidence: confidence}
		for st, s := range states {
			pr := p
			pr.Load = in.load(s, len(nodes), -1)
			if pooledSols[st], err = exchange.Solve(pr); err != nil {
				if s.name != "" {
					err = fmt.Errorf("sun %s: %w", s.name, err)
				}
				perr = err
				return
			}
		}
		if in.Case.Output.Conductances == nil || *in.Case.Output.Conductances {
			// Exchange areas: AF with the reflections summed, or directly
			// εAB when the rays were followed through them (black nodes of
			// area εA).
			area, eps := p.Area, p.Emissivity
			if absorption {
				area, eps = exchange.EmissionAreas(p.Area, p.Emissivity), ones(len(p.Area))
			}
			a.Conductors, perr = exchange.TotalExchange(area, eps, p.F, p.Ambient, in.Case.Output.DropConductors)
		}
	})
	if perr != nil {
		return nil, perr
	}
	if a.Conductors == nil {
		a.Notes = append(a.Notes, "conductances skipped (output.conductances = false or --no-conductances)")
	}
	for r, err := range repErr {
		if err != nil {
			a.Notes = append(a.Notes, fmt.Sprintf("replicate %d skipped: %v", reps[r].index, err))
		}
	}
	for st, s := range states {
		sun := SunState{Name: s.name}
		if in.Sunlight != nil {
			sun = in.sunState(s, len(nodes))
		}
		sun.Solution = pooledSols[st]
		var Ts, Qs [][]float64
		for r := range reps {
			if repErr[r] == nil {
				Ts, Qs = append(Ts, repT[r][st]), append(Qs, repQ[r][st])
			}
		}
		if len(Ts) >= 2 {
			a.Replicates = len(Ts)
			sun.THalf = TInterval(Ts, confidence)
			sun.QHalf = TInterval(Qs, confidence)
		}
		if in.Sunlight != nil {
			if sun.BackShare > raytrace.BackFaceThreshold {
				a.Notes = append(a.Notes, fmt.Sprintf("sun %s: %.3g%% of its rays met the back of a one-sided surface, where no node absorbs them: normal for the outside of an enclosure modelled from within; declare a sheet lit from behind two-sided (and give its back a solar_absorptance)", s.name, 100*sun.BackShare))
			}
			a.Suns = append(a.Suns, sun)
		}
		if st == 0 {
			a.Solution, a.THalf, a.QHalf = sun.Solution, sun.THalf, sun.QHalf
		}
	}
	return a, nil
}

// solveReplicate smooths one replicate and solves every state with it,
// returning T and Q per state; its smoothed matrix is dropped on return.
func (in *Input) solveReplicate(nodes []raytrace.Node, rep replicate, states []state, open, absorption bool) (T, Q [][]float64, err error) {
	sm, err := rep.smooth()
	if err != nil {
		return nil, nil, err
	}
	if rep.done != nil {
		defer rep.done(sm)
	}
	p, _, err := problem(in.Case, in.Mesh, nodes, sm, open)
	if err != nil {
		return nil, nil, err
	}
	p.Absorption = absorption
	for _, s := range states {
		pr := p
		pr.Load = in.load(s, len(nodes), rep.index)
		sol, err := exchange.Solve(pr)
		if err != nil {
			return nil, nil, err
		}
		T, Q = append(T, sol.T), append(Q, sol.Q)
	}
	return T, Q, nil
}

func ones(n int) []float64 {
	out := make([]float64, n)
	for i := range out {
		out[i] = 1
	}
	return out
}

// parallel runs fn(0) … fn(n−1) on up to GOMAXPROCS goroutines and waits.
func parallel(n int, fn func(k int)) {
	var wg sync.WaitGroup
	next := atomic.Int64{}
	for range min(n, runtime.GOMAXPROCS(0)) {
		wg.Go(func() {
			for k := int(next.Add(1) - 1); k < n; k = int(next.Add(1) - 1) {
				fn(k)
			}
		})
	}
	wg.Wait()
}

// TInterval returns, for every column of rows (one row per independent
// replicate, R ≥ 2 rows), the half-width t·s/√R of the Student-t interval
// on the mean at the given confidence, with s the sample standard
// deviation and t the quantile of Student's t with R−1 degrees of freedom
// (the t interval for the mean of independent batches; see the package
// documentation).
func TInterval(rows [][]float64, confidence float64) []float64 {
	R := len(rows)
	t := distuv.StudentsT{Mu: 0, Sigma: 1, Nu: float64(R - 1)}.Quantile(0.5 + confidence/2)
	out := make([]float64, len(rows[0]))
	for i := range out {
		m := 0.0
		for _, r := range rows {
			m += r[i]
		}
		m /= float64(R)
		ss := 0.0
		for _, r := range rows {
			ss += (r[i] - m) * (r[i] - m)
		}
		out[i] = t * math.Sqrt(ss/float64(R-1)) / math.Sqrt(float64(R))
		if out[i] <= 1e-12*math.Abs(m) {
			out[i] = 0 // replicates equal to round-off: a fixed value, not an uncertainty
		}
	}
	return out
}

// nameNode rewrites an error about node k of the smoothing or the solve to
// name the node instead, and, when most of the node's rays met the back of
// a one-sided surface (res given), adds the likely cause.
func nameNode(err error, nodes []raytrace.Node, res *raytrace.Result) error {
	k, msg := -1, ""
	var se *smooth.NodeError
	var ee *exchange.NodeError
	switch {
	case errors.As(err, &se):
		k, msg = se.Node, se.Msg
	case errors.As(err, &ee):
		k, msg = ee.Node, ee.Msg
	}
	if k < 0 || k >= len(nodes) {
		return err
	}
	out := fmt.Sprintf("%s: %s", nodes[k].Name, msg)
	if res != nil && res.Rays[k] > 0 && 2*res.Back[k].Sum() > res.Rays[k] {
		out += fmt.Sprintf("; %.0f%% of its rays hit the back of a one-sided surface: its normals, or a neighbour's, may be flipped (hemiray render --color side shows them; flip = true in the case fixes them)",
			100*float64(res.Back[k].Sum())/float64(res.Rays[k]))
	}
	return errors.New(out)
}
