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
	F       []FactorRow // per row, columns increasing, zero pairs omitted
	Ambient []float64   // F_i,amb
	// MovedAmbient is how far F_i,amb moved, in standard errors.
	MovedAmbient []float64
	// Reciprocity is max |A_i F_ij − A_j F_ji| / max A_i F_ij; Summation is
	// max |1 − Σ_j F_ij − F_i,amb|; before and after smoothing.
	ReciprocityBefore, ReciprocityAfter float64
	SummationBefore, SummationAfter     float64
	MaxMoved                            float64 // largest |moved| over all entries
	Iterations                          int

	// The counts, for Moved.
	hits []CountRow
	rays []int64
	// The arrays all rows of F share, for Workspace.Recycle.
	cols []int32
	vals []float64
}

// Moved returns how far F[i].Val[k] moved from the raw estimate, in
// standard errors of the raw estimate; NaN after ForgetCounts. It is
// computed from the counts when asked: stored, it would be another 8
// bytes an entry (of 20) in every smoothing, replicates' included, that
// only the pairs file reads.
func (r *Result) Moved(i, k int) float64 {
	if r.hits == nil {
		return math.NaN()
	}
	rays := r.rays[i]
	return moved(float64(r.hits[i].At(r.F[i].Col[k]))/float64(rays), r.F[i].Val[k], rays)
}

// ForgetCounts makes Moved NaN, for a matrix whose counts encode given
// factors and carry no standard error.
func (r *Result) ForgetCounts() { r.hits, r.rays = nil, nil }

// NodeError is a problem with the counts of one node (Node is its index).
type NodeError struct {
	Node int
	Msg  string
}

func (e *NodeError) Error() string { return fmt.Sprintf("smooth: node %d: %s", e.Node, e.Msg) }

// ErrNotConverged is returned when Newton's method fails to meet the tolerance.
var ErrNotConverged = errors.New("smooth: Newton iteration did not converge (with few rays per node among many nodes, the pairs seen may admit no reciprocal matrix whose rows sum to 1: trace more rays per node, or make fewer, larger nodes)")

// pairs are the unordered node pairs i < j seen, with their pooled counts,
// by rows as a sparse matrix is: pairs start[i] … start[i+1]−1 are node
// i's, with partners j and counts c in parallel arrays, so the loops
// stream only what they read and keep node i's sums in a register. Every
// sum still takes its terms in (i, j) order, bit for bit as a flat list
// of pairs would.
type pairs struct {
	start []int
	j     []int32
	c     []float64
	// w[p] = c/(λ_i+λ_j)², the Hessian's entry, refreshed once per Newton
	// step: the conjugate-gradient passes of a step then do no division.
	w []float64
}

func (ps *pairs) add(j int32, c float64) {
	ps.j, ps.c = append(ps.j, j), append(ps.c, c)
}

// Smooth returns the constrained maximum-likelihood matrix for the counts.
func Smooth(in Counts) (*Result, error) { return (*Workspace)(nil).Smooth(in) }

// Smooth is Smooth with arrays lent by w.
func (w *Workspace) Smooth(in Counts) (*Result, error) {
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
	offd, diagC := poolPairs(in, w)
	defer func() {
		w.giveInts(offd.j)
		w.giveFloats(offd.c)
	}()
	lam := make([]float64, n)
	for i := range n {
		lam[i] = float64(in.Rays[i]) / in.Area[i]
	}
	// The Hessian's weights go back as soon as Newton is done, for a
	// smoothing beside this one while this one assembles its rows.
	offd.w = w.lendFloats(len(offd.j))
	iters, err := newton(lam, in.Area, &offd, diagC)
	w.giveFloats(offd.w)
	offd.w = nil
	if err != nil {
		return nil, err
	}
	return assemble(in, &offd, lam, iters, w), nil
}

// poolPairs pools the counts of each unordered pair i < j seen: row i's
// counts above the diagonal merged with column i's below it (the lower
// triangle transposed: half of the counts). Pairs come out in (i, j)
// order, so every floating-point sum, and so the result, is the same bit
// for bit from run to run. diagC[i] is k_ii + k_i,amb.
func poolPairs(in Counts, w *Workspace) (offd pairs, diagC []float64) {
	n := len(in.Area)
	low := transposeLower(in.Hits, w)
	defer func() {
		w.giveInts(low.j)
		w.giveFloats(low.k)
	}()
	// Count the pairs first: arrays of the exact size, lent or new.
	above := make([]int, n) // position of row i's first count above the diagonal
	total := 0
	for i := range n {
		a := &in.Hits[i]
		above[i] = firstAbove(a, i)
		total += unionLen(a.Col[above[i]:], low.j[low.start[i]:low.start[i+1]])
	}
	offd = pairs{start: make([]int, n+1), j: w.lendInts(total)[:0], c: w.lendFloats(total)[:0]}
	diagC = make([]float64, n)
	for i := range n {
		if in.Ambient != nil {
			diagC[i] = float64(in.Ambient[i])
		}
		offd.start[i] = len(offd.j)
		a := &in.Hits[i]
		if d := diagonalAt(a, i); d >= 0 {
			diagC[i] += float64(a.Val[d])
		}
		x := above[i]
		mergeCounts(a.Col[x:], a.Val[x:], low.j[low.start[i]:low.start[i+1]], low.k[low.start[i]:low.start[i+1]], func(j int32, kij int64, kji float64) {
			offd.add(j, float64(kij)+kji)
		})
	}
	offd.start[n] = len(offd.j)
	return offd, diagC
}

// unionLen is the number of distinct values in two increasing lists.
func unionLen(a, b []int32) int {
	x, y, n := 0, 0, 0
	for x < len(a) && y < len(b) {
		switch {
		case a[x] < b[y]:
			x++
		case b[y] < a[x]:
			y++
		default:
			x++
			y++
		}
		n++
	}
	return n + len(a) - x + len(b) - y
}

// lowerCounts is the strictly lower triangle of the counts, transposed:
// row i holds k_ji of the nodes j > i, j increasing, in arrays shared by
// all rows (j[start[i]:start[i+1]] and k alike).
type lowerCounts struct {
	start []int
	j     []int32
	k     []float64 // exact: counts below 2⁵³
}

func transposeLower(hits []CountRow, w *Workspace) lowerCounts {
	n := len(hits)
	t := lowerCounts{start: make([]int, n+1)}
	for j := range hits {
		for _, i := range hits[j].Col[:firstAbove(&hits[j], j-1)] {
			t.start[i+1]++
		}
	}
	for i := range n {
		t.start[i+1] += t.start[i]
	}
	t.j, t.k = w.lendInts(t.start[n]), w.lendFloats(t.start[n])
	next := append([]int(nil), t.start[:n]...)
	for j := range hits {
		r := &hits[j]
		for m, i := range r.Col[:firstAbove(r, j-1)] {
			t.j[next[i]], t.k[next[i]] = int32(j), float64(r.Val[m])
			next[i]++
		}
	}
	return t
}

// mergeCounts calls fn for every column present in (ca, ka) or (cb, kb),
// both increasing, with the count of each (0 where absent), columns
// increasing.
func mergeCounts(ca []int32, ka []int64, cb []int32, kb []float64, fn func(j int32, a int64, b float64)) {
	x, y := 0, 0
	for x < len(ca) || y < len(cb) {
		switch {
		case y == len(cb) || (x < len(ca) && ca[x] < cb[y]):
			fn(ca[x], ka[x], 0)
			x++
		case x == len(ca) || cb[y] < ca[x]:
			fn(cb[y], 0, kb[y])
			y++
		default:
			fn(ca[x], ka[x], kb[y])
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
func dual(lam, area []float64, offd *pairs, diagC []float64) float64 {
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
	js, cs := offd.j, offd.c[:len(offd.j)]
	for i, li := range lam {
		for p := offd.start[i]; p < offd.start[i+1]; p++ {
			s := li + lam[js[p]]
			if !(s > 0) {
				return math.Inf(1)
			}
			d -= cs[p] * math.Log(s)
		}
	}
	return d
}

// gradient writes ∇D = A_i − Σ_j s_ij − s_i,amb into g and returns its
// largest component relative to the area, and whether λ lies in D's domain
// (see dual); outside it the figure means nothing.
func gradient(g, lam, area []float64, offd *pairs, diagC []float64) (float64, bool) {
	in := true
	for i := range g {
		g[i] = area[i] - diagC[i]/lam[i]
		in = in && (diagC[i] == 0 || lam[i] > 0)
	}
	js, cs := offd.j, offd.c[:len(offd.j)]
	for i, li := range lam {
		gi := g[i]
		for p := offd.start[i]; p < offd.start[i+1]; p++ {
			j := js[p]
			sum := li + lam[j]
			in = in && sum > 0
			s := cs[p] / sum
			gi -= s
			g[j] -= s
		}
		g[i] = gi
	}
	r := 0.0
	for i := range g {
		r = max(r, math.Abs(g[i])/area[i])
	}
	return r, in
}

// weigh refreshes the Hessian's off-diagonal entries w = c_ij/(λ_i+λ_j)²
// and writes its diagonal, Σ_j w_ij + diagC_i/λ_i², into diag.
func weigh(diag, lam []float64, offd *pairs, diagC []float64) {
	for i := range diag {
		diag[i] = diagC[i] / (lam[i] * lam[i])
	}
	js, cs, ws := offd.j, offd.c[:len(offd.j)], offd.w[:len(offd.j)]
	for i, li := range lam {
		di := diag[i]
		for p := offd.start[i]; p < offd.start[i+1]; p++ {
			j := js[p]
			s := li + lam[j]
			w := cs[p] / (s * s)
			ws[p] = w
			di += w
			diag[j] += w
		}
		diag[i] = di
	}
}

// hessMul writes H·x into y: H_ii = Σ_j w_ij + diagC_i/λ_i², H_ij = w_ij,
// with w from the last weigh.
func hessMul(y, x, lam []float64, offd *pairs, diagC []float64) {
	for i := range y {
		y[i] = diagC[i] / (lam[i] * lam[i]) * x[i]
	}
	js, ws := offd.j, offd.w[:len(offd.j)]
	for i, xi := range x {
		yi := y[i]
		for p := offd.start[i]; p < offd.start[i+1]; p++ {
			j := js[p]
			s := ws[p] * (xi + x[j])
			yi += s
			y[j] += s
		}
		y[i] = yi
	}
}

const (
	tolerance = 1e-13 // summation residual relative to area
	maxNewton = 200
)

// newton minimises D over λ in place and returns the iterations used.
func newton(lam, area []float64, offd *pairs, diagC []float64) (int, error) {
	n := len(lam)
	g, step, trial, gt := make([]float64, n), make([]float64, n), make([]float64, n), make([]float64, n)
	gnorm, _ := gradient(g, lam, area, offd, diagC)
	// D at λ, computed only when the line search needs it: a step that
	// halves the gradient is accepted without it (the logarithms are the
	// costliest part of an iteration).
	d, haveD := 0.0, false
	for it := 1; it <= maxNewton; it++ {
		if gnorm < tolerance {
			return it - 1, nil
		}
		// Newton step: H·step = −g, by conjugate gradients preconditioned
		// with the diagonal of H.
		conjugateGradient(step, g, lam, offd, diagC, forcing(gnorm))
		// Backtracking line search keeping λ in the domain: accept a step
		// that halves the gradient or meets the Armijo condition. Near the
		// optimum D changes by less than its rounding, so the first test
		// is what ends the iteration there.
		slope := 0.0
		for i := range g {
			slope += g[i] * step[i]
		}
		t := 1.0
		for k := 0; ; k++ {
			for i := range lam {
				trial[i] = lam[i] + t*step[i]
			}
			gtnorm, in := gradient(gt, trial, area, offd, diagC)
			if in && gtnorm < 0.5*gnorm {
				copy(lam, trial)
				g, gt, gnorm, haveD = gt, g, gtnorm, false
				break
			}
			if in {
				if !haveD {
					d, haveD = dual(lam, area, offd, diagC), true
				}
				if dt := dual(trial, area, offd, diagC); dt <= d+1e-4*t*slope {
					copy(lam, trial)
					g, gt, gnorm, d = gt, g, gtnorm, dt
					break
				}
			}
			if t *= 0.5; k > 60 {
				return it, ErrNotConverged
			}
		}
	}
	if gnorm < 1e-9 {
		return maxNewton, nil
	}
	return maxNewton, ErrNotConverged
}

// forcing is the relative residual to which a Newton step's linear system
// is solved: loose while the gradient is large, as tight as the gradient
// once it is small, which keeps Newton's quadratic convergence (inexact
// Newton: Dembo, Eisenstat & Steihaug, "Inexact Newton methods", SIAM J.
// Numer. Anal. 19(2), 1982; Eisenstat & Walker, SIAM J. Sci. Comput.
// 17(1), 1996). Early steps then take a few conjugate-gradient passes
// instead of a dozen.
func forcing(gnorm float64) float64 { return min(max(gnorm, 1e-15), 0.1) }

// conjugateGradient solves H·x = −g for x to the relative residual tol (an
// inexact Newton step is fine: the line search guards it).
func conjugateGradient(x, g, lam []float64, offd *pairs, diagC []float64, tol float64) {
	n := len(x)
	diag := make([]float64, n)
	weigh(diag, lam, offd, diagC)
	b := make([]float64, n)
	for i := range b {
		b[i] = -g[i]
	}
	sparse.CG(func(y, v []float64) { hessMul(y, v, lam, offd, diagC) }, diag, b, x, tol, 10*n+100)
}
