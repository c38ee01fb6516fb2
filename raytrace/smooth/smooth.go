package smooth

import (
	"errors"
	"fmt"
	"github.com/hemiray/hemiray/raytrace/internal/sparse"
	"math"
)

// CountRow is a row of counts (columns increasing); FactorRow a row of view
// factors. Both are the one sparse row type of the tallies and the solver.
type (
	CountRow  = sparse.Row[int64]
	FactorRow = sparse.Row[float64]
)

// Counts are the raw tallies of a trace: Rays[i] rays from node i, Hits[i]
// its hits by target node (columns increasing), Ambient[i] the rays that left
// the model (nil or zeros for a closed model).
type Counts struct {
	Area    []float64
	Rays    []int64
	Hits    []CountRow
	Ambient []int64
}

// Result is a smoothed matrix and its diagnostics.
type Result struct {
	F []FactorRow // per row, columns increasing, zero pairs omitted
	// Moved[i][k] is how far F[i].Val[k] moved from the raw estimate, in
	// standard errors of the raw estimate.
	Moved   [][]float64
	Ambient []float64 // F_i,amb
	// MovedAmbient is how far F_i,amb moved, in standard errors.
	MovedAmbient []float64
	// Reciprocity is max |A_i F_ij − A_j F_ji| / max A_i F_ij; Summation is
	// max |1 − Σ_j F_ij − F_i,amb|; before and after smoothing.
	ReciprocityBefore, ReciprocityAfter float64
	SummationBefore, SummationAfter     float64
	MaxMoved                            float64 // largest |moved| over all entries
	Iterations                          int
}

// NodeError is a problem with the counts of one node (Node is its index).
type NodeError struct {
	Node int
	Msg  string
}

func (e *NodeError) Error() string { return fmt.Sprintf("smooth: node %d: %s", e.Node, e.Msg) }

// ErrNotConverged is returned when Newton's method fails to meet the tolerance.
var ErrNotConverged = errors.New("smooth: Newton iteration did not converge (with few rays per node among many nodes, the pairs seen may admit no reciprocal matrix whose rows sum to 1: trace more rays per node, or make fewer, larger nodes)")

// pair is an unordered node pair i < j (or i == j) with its pooled count.
type pair struct {
	i, j int32
	c    float64
}

// Smooth returns the constrained maximum-likelihood matrix for the counts.
func Smooth(in Counts) (*Result, error) {
	n := len(in.Area)
	if len(in.Rays) != n || len(in.Hits) != n || (in.Ambient != nil && len(in.Ambient) != n) {
		return nil, errors.New("smooth: Area, Rays, Hits and Ambient have different lengths")
	}
	amb := func(i int) float64 {
		if in.Ambient == nil {
			return 0
		}
		return float64(in.Ambient[i])
	}
	for i := range n {
		if !(in.Area[i] > 0) || in.Rays[i] <= 0 {
			return nil, &NodeError{i, fmt.Sprintf("area %v and %d rays; both must be positive", in.Area[i], in.Rays[i])}
		}
		if in.Hits[i].Sum() == 0 && amb(i) == 0 {
			return nil, &NodeError{i, "no ray from it reached a node or the ambient"}
		}
	}
	for i := range n {
		if !in.Hits[i].Increasing(n) {
			return nil, fmt.Errorf("smooth: the columns of row %d are not increasing within [0, %d)", i, n)
		}
		for _, k := range in.Hits[i].Val {
			if k < 0 {
				return nil, fmt.Errorf("smooth: row %d has a negative count %d", i, k)
			}
		}
	}
	// Pool the counts of each unordered pair, walking every row with its
	// transpose: pairs come out in (i, j) order, so every floating-point sum,
	// and so the result, is the same bit for bit from run to run.
	tr := sparse.Transpose(in.Hits)
	entries := 0
	for i := range n {
		entries += in.Hits[i].Len()
	}
	// Every pair seen has a count in at least one direction, so there are
	// at most as many pairs as entries: one allocation instead of a slice
	// that doubles (10⁷ pairs and more at 10⁴ nodes).
	offd := make([]pair, 0, entries)
	diagC := make([]float64, n) // k_ii + k_i,amb
	for i := range n {
		diagC[i] = amb(i)
		mergeRows(&in.Hits[i], &tr[i], func(j int32, kij, kji int64) {
			switch {
			case int(j) == i:
				diagC[i] += float64(kij)
			case int(j) > i:
				offd = append(offd, pair{int32(i), j, float64(kij + kji)})
			}
		})
	}
	lam := make([]float64, n)
	for i := range n {
		lam[i] = float64(in.Rays[i]) / in.Area[i]
	}
	iters, err := newton(lam, in.Area, offd, diagC)
	if err != nil {
		return nil, err
	}
	return assemble(in, tr, lam, iters), nil
}

// mergeRows calls fn for every column present in row a or b, with the
// counts of each (0 where absent), columns increasing.
func mergeRows(a, b *CountRow, fn func(j int32, ka, kb int64)) {
	x, y := 0, 0
	for x < len(a.Col) || y < len(b.Col) {
		switch {
		case y == len(b.Col) || (x < len(a.Col) && a.Col[x] < b.Col[y]):
			fn(a.Col[x], a.Val[x], 0)
			x++
		case x == len(a.Col) || b.Col[y] < a.Col[x]:
			fn(b.Col[y], 0, b.Val[y])
			y++
		default:
			fn(a.Col[x], a.Val[x], b.Val[y])
			x++
			y++
		}
	}
}

// dual returns D(λ), or +Inf outside its domain: λ_i > 0 where node i has
// self or ambient counts (log λ_i), λ_i + λ_j > 0 for every pair seen. A
// node with neither may take λ_i ≤ 0: a large node whose rays land on
// small ones needs it (its s_ij = c_ij/(λ_i + λ_j) must sum to its large
// area while each partner's λ_j is held high by its own small sum), and in
// fine splits of 10⁴ nodes the optimum lies there.
func dual(lam, area []float64, offd []pair, diagC []float64) float64 {
	d := 0.0
	for i, l := range lam {
		d += l * area[i]
		if diagC[i] > 0 {
			if !(l > 0) {
				return math.Inf(1)
			}
			d -= diagC[i] * math.Log(l)
		}
	}
	for _, p := range offd {
		s := lam[p.i] + lam[p.j]
		if !(s > 0) {
			return math.Inf(1)
		}
		d -= p.c * math.Log(s)
	}
	return d
}

// gradient writes ∇D = A_i − Σ_j s_ij − s_i,amb into g and returns its
// largest component relative to the area.
func gradient(g, lam, area []float64, offd []pair, diagC []float64) float64 {
	for i := range g {
		g[i] = area[i] - diagC[i]/lam[i]
	}
	for _, p := range offd {
		s := p.c / (lam[p.i] + lam[p.j])
		g[p.i] -= s
		g[p.j] -= s
	}
	r := 0.0
	for i := range g {
		r = math.Max(r, math.Abs(g[i])/area[i])
	}
	return r
}

// hessMul writes H·x into y: H_ii = Σ_j c_ij/(λ_i+λ_j)² + diagC_i/λ_i²,
// H_ij = c_ij/(λ_i+λ_j)².
func hessMul(y, x, lam []float64, offd []pair, diagC []float64) {
	for i := range y {
		y[i] = diagC[i] / (lam[i] * lam[i]) * x[i]
	}
	for _, p := range offd {
		w := p.c / ((lam[p.i] + lam[p.j]) * (lam[p.i] + lam[p.j]))
		s := w * (x[p.i] + x[p.j])
		y[p.i] += s
		y[p.j] += s
	}
}

const (
	tolerance = 1e-13 // summation residual relative to area
	maxNewton = 200
)

// newton minimises D over λ in place and returns the iterations used.
func newton(lam, area []float64, offd []pair, diagC []float64) (int, error) {
	n := len(lam)
	g, step, trial := make([]float64, n), make([]float64, n), make([]float64, n)
	d := dual(lam, area, offd, diagC)
	gt := make([]float64, n)
	for it := 1; it <= maxNewton; it++ {
		gnorm := gradient(g, lam, area, offd, diagC)
		if gnorm < tolerance {
			return it - 1, nil
		}
		// Newton step: H·step = −g, by conjugate gradients preconditioned
		// with the diagonal of H.
		conjugateGradient(step, g, lam, offd, diagC)
		// Backtracking line search keeping λ > 0 (Armijo condition). Near
		// the optimum D changes by less than its rounding; a step that
		// shrinks the residual is then accepted on that ground.
		slope := 0.0
		for i := range g {
			slope += g[i] * step[i]
		}
		t := 1.0
		for k := 0; ; k++ {
			for i := range lam {
				trial[i] = lam[i] + t*step[i]
			}
			dt := dual(trial, area, offd, diagC)
			if dt <= d+1e-4*t*slope || (!math.IsInf(dt, 1) && gradient(gt, trial, area, offd, diagC) < 0.5*gnorm) {
				copy(lam, trial)
				d = dt
				break
			}
			if t *= 0.5; k > 60 {
				return it, ErrNotConverged
			}
		}
	}
	if gradient(g, lam, area, offd, diagC) < 1e-9 {
		return maxNewton, nil
	}
	return maxNewton, ErrNotConverged
}

// conjugateGradient solves H·x = −g for x (an inexact Newton step is
// fine: the line search guards it).
func conjugateGradient(x, g, lam []float64, offd []pair, diagC []float64) {
	n := len(x)
	diag := make([]float64, n)
	for i := range diag {
		diag[i] = diagC[i] / (lam[i] * lam[i])
	}
	for _, p := range offd {
		w := p.c / ((lam[p.i] + lam[p.j]) * (lam[p.i] + lam[p.j]))
		diag[p.i] += w
		diag[p.j] += w
	}
	b := make([]float64, n)
	for i := range b {
		b[i] = -g[i]
	}
	sparse.CG(func(y, v []float64) { hessMul(y, v, lam, offd, diagC) }, diag, b, x, 1e-15, 10*n+100)
}
