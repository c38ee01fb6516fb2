package exchange

import (
	"fmt"
	"math"
	"runtime"
	"sync"
	"sync/atomic"
	"time"

	"github.com/hemiray/hemiray/raytrace/internal/sparse"
)

// Conductors are a model's total exchange areas S_ij = A_iℱ_ij in m², a
// symmetric matrix kept sparse: Lower[i] holds S_ij for j < i (columns
// increasing). Multiply by Sigma for radiative conductances in W/K⁴.
type Conductors struct {
	Lower []Row
	// ToAmbient is each node's exchange area with the ambient (nil for a
	// closed model).
	ToAmbient []float64
	// Self is each node's exchange area with itself: emission it absorbs
	// again (a concave node, or after reflections). It carries no heat but
	// closes the sum Σ_j≠i S_ij + Self_i + ToAmbient_i = ε_iA_i, with the
	// dropped conductors (below) counted in.
	Self []float64
	// Threshold is the share of emission below which a conductor was
	// dropped: S_ij < Threshold·min(ε_iA_i, ε_jA_j), so that it is
	// negligible to both of its nodes. Dropped is, per node, the share of
	// its emission ε_iA_i that the dropped conductors carried.
	Threshold float64
	Dropped   []float64
	// Dense says the factors came from one dense LU factorisation;
	// otherwise each column came from conjugate gradients, and Iterations
	// is the most any column took.
	Dense      bool
	Iterations int
	// Elapsed is the wall time taken (for reports on where a run's time
	// went; no output file depends on it).
	Elapsed time.Duration
}

// Kept returns the number of conductors between nodes in Lower.
func (c *Conductors) Kept() int {
	k := 0
	for i := range c.Lower {
		k += len(c.Lower[i].Col)
	}
	return k
}

// ConductorDenseLimit is the most nodes whose exchange areas TotalExchange
// takes from a dense factorisation (5.8 GB at 12,000 nodes): where most
// pairs see each other it beats the column solves, whose cost grows as
// nodes × entries of F (at 6,000 nodes the factorisation measured 159 s;
// the column solves, at 8 passes of 0.6 ns per entry and column, come to
// about 130 s with 1/8 of the pairs in view and 8 times that with all).
const ConductorDenseLimit = 12000

// conductorDenseLimit is ConductorDenseLimit, lowered by tests to exercise
// the column solves.
var conductorDenseLimit = ConductorDenseLimit

// denseConductors says whether TotalExchange takes the dense path for n
// nodes with entries entries of F (black: no reflections to sum).
func denseConductors(n, entries int, black bool) bool {
	return n <= conductorDenseLimit && 8*entries >= n*n && !black
}

// ExchangeBytes estimates the memory TotalExchange needs for n nodes and
// entries entries of F: 40·n² bytes on the dense path, else the symmetric
// matrix and the conductors (about 40 bytes an entry) and the workers'
// block vectors.
func ExchangeBytes(n, entries int) int64 {
	if denseConductors(n, entries, false) {
		return 40 * int64(n) * int64(n)
	}
	return 40*int64(entries) + int64(runtime.GOMAXPROCS(0))*6*8*blockWidth*int64(n)
}

// cgTolerance is the relative residual at which a column's solve stops:
// far below the Monte Carlo error of any view factor.
const cgTolerance = 1e-10

// blockWidth is the number of columns solved side by side per pass over
// the matrix.
const blockWidth = 16

// TotalExchange returns the total exchange areas of nodes with areas A_i,
// emissivities ε_i, reciprocal view factors F (rows, columns increasing)
// and, for an open model, view factors to the ambient. Conductors with
// S_ij < threshold·min(ε_iA_i, ε_jA_j) are left out and their share
// reported per node.
//
// Gebhart's factors come from one dense LU factorisation (memory about
// 40·n² bytes; on this project's machine 14–19 s at 3,000 nodes, 159 s at
// 6,000, cubic beyond) up to ConductorDenseLimit nodes when more than 1/8
// of the pairs see each other;
// otherwise, where the column solves below cost less (about 8 passes of
// 0.6 ns per entry of F per column), each column comes from a sparse
// symmetric solve: with K = AF
// (symmetrised), W = RA⁻¹ and P = W^½ K W^½,
//
//	S = E N E,  N = K + K W^½ (I − P)⁻¹ W^½ K,
//
// which is the series N = K + KWK + KWKWK + … (the emission absorbed after
// 0, 1, 2, … reflections) summed in closed form; I − P is symmetric
// positive definite when every ε > 0, so conjugate gradients apply, one
// column per solve, 16 solves per pass over the matrix, the columns shared
// among GOMAXPROCS workers. Memory is that of F plus 6·8·16·n bytes per
// worker; time is about iterations × entries of F × n / 16 multiply-adds
// per pass. The ambient column is S_i,amb = ε_i (A f_amb + K W^½ (I − P)⁻¹
// W^½ A f_amb)_i by the same series.
func TotalExchange(area, eps []float64, F []Row, ambient []float64, threshold float64) (*Conductors, error) {
	n := len(area)
	if len(eps) != n || len(F) != n || (ambient != nil && len(ambient) != n) {
		return nil, fmt.Errorf("exchange: %d areas, %d emissivities, %d rows of F", n, len(eps), len(F))
	}
	if !(threshold >= 0 && threshold < 1) {
		return nil, fmt.Errorf("exchange: conductor threshold %v is outside [0, 1)", threshold)
	}
	for i := range F {
		if !F[i].Increasing(n) {
			return nil, fmt.Errorf("exchange: row %d of F: columns must increase within [0, %d), one value each", i, n)
		}
		if !(area[i] > 0) || !(eps[i] > 0 && eps[i] <= 1) {
			return nil, &NodeError{i, fmt.Sprintf("area %v, emissivity %v", area[i], eps[i])}
		}
	}
	start := time.Now()
	c := &Conductors{Lower: make([]Row, n), Self: make([]float64, n), Dropped: make([]float64, n), Threshold: threshold}
	if ambient != nil {
		c.ToAmbient = make([]float64, n)
	}
	entries := 0
	for i := range F {
		entries += len(F[i].Col)
	}
	black := true // no reflections: S = AF, which the column solves give at once
	for _, e := range eps {
		black = black && e == 1
	}
	if denseConductors(n, entries, black) {
		S, amb, err := denseExchangeAreas(area, eps, F, ambient)
		if err != nil {
			return nil, err
		}
		for j := range n {
			c.keep(j, S[j], area, eps) // S is symmetric: row j is column j
		}
		if ambient != nil {
			copy(c.ToAmbient, amb)
		}
		c.Dense, c.Elapsed = true, time.Since(start)
		return c, nil
	}
	err := c.iterate(area, eps, F, ambient)
	c.Elapsed = time.Since(start)
	return c, err
}

// keep stores column j of S (all n entries, symmetric) below the diagonal
// in Lower[j], leaving out conductors below the threshold and adding their
// share to Dropped[j].
func (c *Conductors) keep(j int, s []float64, area, eps []float64) {
	ej := eps[j] * area[j]
	var row Row
	dropped := 0.0
	for i, v := range s {
		if i == j || !(v > 0) {
			continue // the diagonal carries no heat; round-off below zero is none
		}
		if v < c.Threshold*min(ej, eps[i]*area[i]) {
			dropped += v
			continue
		}
		if i < j {
			row.Append(int32(i), v)
		}
	}
	c.Lower[j], c.Self[j] = row, s[j]
	c.Dropped[j] = dropped / ej
}

// iterate fills c column by column from the symmetric series form.
func (c *Conductors) iterate(area, eps []float64, F []Row, ambient []float64) error {
	n := len(area)
	K := symmetrised(area, F)
	w := make([]float64, n) // W^½
	diag := make([]float64, n)
	for i := range n {
		w[i] = math.Sqrt((1 - eps[i]) / area[i])
		diag[i] = 1 - w[i]*w[i]*K[i].At(int32(i))
	}
	columns := n
	if ambient != nil {
		columns++ // column n is the ambient's
	}
	blocks := (columns + blockWidth - 1) / blockWidth
	var next atomic.Int64
	var mu sync.Mutex
	var firstErr error
	var failed atomic.Bool // a column failed: the others stop taking work
	var wg sync.WaitGroup
	for range min(blocks, runtime.GOMAXPROCS(0)) {
		wg.Go(func() {
			ws := newWorkspace(n, blockWidth)
			for b := int(next.Add(1) - 1); b < blocks && !failed.Load(); b = int(next.Add(1) - 1) {
				lo, hi := b*blockWidth, min((b+1)*blockWidth, columns)
				iters, err := c.solveBlock(ws, K, w, diag, area, eps, ambient, lo, hi)
				mu.Lock()
				c.Iterations = max(c.Iterations, iters)
				if err != nil && firstErr == nil {
					firstErr = err
				}
				mu.Unlock()
				if err != nil {
					failed.Store(true)
					return
				}
			}
		})
	}
	wg.Wait()
	return firstErr
}

// workspace is one worker's block of vectors, interleaved.
type workspace struct {
	b, x, t, y, col []float64
}

func newWorkspace(n, m int) *workspace {
	return &workspace{b: make([]float64, n*m), x: make([]float64, n*m), t: make([]float64, n*m), y: make([]float64, n*m), col: make([]float64, n)}
}

// solveBlock computes columns lo…hi−1 (n meaning the ambient's).
func (c *Conductors) solveBlock(ws *workspace, K sparse.Rows, w, diag, area, eps, ambient []float64, lo, hi int) (int, error) {
	n, m := len(area), hi-lo
	b, x, t, y := ws.b[:n*m], ws.x[:n*m], ws.t[:n*m], ws.y[:n*m]
	// b_c = W^½ · (column of K, or A f_amb).
	clear(b)
	for q := range m {
		if j := lo + q; j < n {
			row := &K[j]
			for k, i := range row.Col {
				b[int(i)*m+q] = w[i] * row.Val[k]
			}
		} else {
			for i := range n {
				b[i*m+q] = w[i] * area[i] * ambient[i]
			}
		}
	}
	// (I − P)·v = v − W^½ K W^½ v.
	mul := func(out, v []float64) {
		for i := range n {
			for q := range m {
				t[i*m+q] = w[i] * v[i*m+q]
			}
		}
		K.MulBlock(out, t, m)
		for i := range n {
			for q := range m {
				out[i*m+q] = v[i*m+q] - w[i]*out[i*m+q]
			}
		}
	}
	iters, ok := sparse.BlockCG(mul, diag, b, x, m, cgTolerance, 10*n+100)
	if !ok {
		return iters, fmt.Errorf("%w: exchange factors of columns %d–%d after %d iterations", ErrNotConverged, lo, hi-1, iters)
	}
	// y = K W^½ x, the emission absorbed after one or more reflections.
	for i := range n {
		for q := range m {
			t[i*m+q] = w[i] * x[i*m+q]
		}
	}
	K.MulBlock(y, t, m)
	for q := range m {
		j := lo + q
		s := ws.col
		if j < n {
			row := &K[j]
			for i := range n {
				s[i] = y[i*m+q]
			}
			for k, i := range row.Col {
				s[i] += row.Val[k]
			}
			for i := range n {
				s[i] *= eps[i] * eps[j]
			}
			c.keep(j, s, area, eps)
		} else {
			for i := range n {
				c.ToAmbient[i] = eps[i] * (area[i]*ambient[i] + y[i*m+q])
			}
		}
	}
	return iters, nil
}

// symmetrised returns K = ½(AF + (AF)ᵀ) as rows, columns increasing:
// smoothing makes AF symmetric to round-off, and the series form needs it
// exactly.
func symmetrised(area []float64, F []Row) sparse.Rows {
	af := make([]Row, len(F))
	for i := range F {
		af[i] = Row{Col: F[i].Col, Val: make([]float64, len(F[i].Val))}
		for k, f := range F[i].Val {
			af[i].Val[k] = 0.5 * area[i] * f
		}
	}
	T := sparse.Transpose(af)
	K := make(sparse.Rows, len(F))
	for i := range F {
		K[i] = af[i].Add(T[i])
	}
	return K
}
