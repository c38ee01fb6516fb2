package smooth

import (
	"math"

	"github.com/hemiray/hemiray/raytrace/internal/sparse"
)

// assemble builds the smoothed rows from λ and measures the change. tr is
// the transpose of the counts (see transpose).
func assemble(in Counts, tr []CountRow, lam []float64, iters int) *Result {
	n := len(in.Area)
	res := &Result{F: make([]FactorRow, n), Moved: make([][]float64, n), Ambient: make([]float64, n), MovedAmbient: make([]float64, n), Iterations: iters}
	raw := func(i int, k int64) float64 { return float64(k) / float64(in.Rays[i]) }
	se := func(i int, f float64) float64 { return math.Sqrt(f * (1 - f) / float64(in.Rays[i])) }
	moved := func(i int, rawF, newF float64) float64 {
		s := se(i, rawF)
		if s == 0 {
			if rawF == newF {
				return 0
			}
			// A factor estimated as 0 or 1 has a zero binomial error; use the
			// error of one count instead.
			s = se(i, 1/float64(in.Rays[i]))
		}
		return (newF - rawF) / s
	}
	// Largest raw and smoothed exchange areas, to scale reciprocity errors.
	maxRaw, maxNew := 0.0, 0.0
	for i := range n {
		for _, k := range in.Hits[i].Val {
			maxRaw = math.Max(maxRaw, in.Area[i]*raw(i, k))
		}
	}
	for i := range n {
		rawSum, newSum := 0.0, 0.0
		if in.Ambient != nil {
			rawSum += raw(i, in.Ambient[i])
		}
		// Columns are the union of row i and column i: smoothing shares each
		// pair's counts between both directions.
		size := in.Hits[i].Len() + tr[i].Len()
		res.F[i] = FactorRow{Col: make([]int32, 0, size), Val: make([]float64, 0, size)}
		res.Moved[i] = make([]float64, 0, size)
		mergeRows(&in.Hits[i], &tr[i], func(j int32, kij, kji int64) {
			var s float64
			if int(j) == i {
				s = float64(kij) / lam[i]
			} else {
				s = float64(kij+kji) / (lam[i] + lam[j])
			}
			f := s / in.Area[i]
			maxNew = math.Max(maxNew, s)
			m := moved(i, raw(i, kij), f)
			res.MaxMoved = math.Max(res.MaxMoved, math.Abs(m))
			res.F[i].Append(j, f)
			res.Moved[i] = append(res.Moved[i], m)
			rawSum += raw(i, kij)
			newSum += f
			back := raw(int(j), kji)
			res.ReciprocityBefore = math.Max(res.ReciprocityBefore, math.Abs(in.Area[i]*raw(i, kij)-in.Area[j]*back)/maxRaw)
		})
		if in.Ambient != nil && in.Ambient[i] > 0 {
			res.Ambient[i] = float64(in.Ambient[i]) / lam[i] / in.Area[i]
			res.MovedAmbient[i] = moved(i, raw(i, in.Ambient[i]), res.Ambient[i])
			res.MaxMoved = math.Max(res.MaxMoved, math.Abs(res.MovedAmbient[i]))
		}
		res.SummationBefore = math.Max(res.SummationBefore, math.Abs(1-rawSum))
		res.SummationAfter = math.Max(res.SummationAfter, math.Abs(1-newSum-res.Ambient[i]))
	}
	// The smoothed pattern is symmetric (each row is the union of a row and
	// a column of the counts), so row i of the transpose holds the same
	// columns as row i: walk them side by side, O(entries).
	back := sparse.Transpose(res.F)
	for i := range n {
		row, col := &res.F[i], &back[i]
		for k, j := range row.Col {
			b := 0.0
			if k < len(col.Col) && col.Col[k] == j {
				b = col.Val[k]
			} else {
				b = res.F[j].At(int32(i)) // not expected: a pattern that is not symmetric
			}
			res.ReciprocityAfter = math.Max(res.ReciprocityAfter, math.Abs(in.Area[i]*row.Val[k]-in.Area[j]*b)/maxNew)
		}
	}
	return res
}
