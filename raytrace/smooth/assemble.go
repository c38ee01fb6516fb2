package smooth

import (
	"math"
	"sort"
)

// assemble builds the smoothed rows from λ and measures the change. tr is
// the transpose of the counts (see transpose).
func assemble(in Counts, tr [][]Entry, lam []float64, iters int) *Result {
	n := len(in.Area)
	res := &Result{F: make([][]Factor, n), Ambient: make([]float64, n), MovedAmbient: make([]float64, n), Iterations: iters}
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
		for _, e := range in.Hits[i] {
			maxRaw = math.Max(maxRaw, in.Area[i]*raw(i, e.K))
		}
	}
	for i := range n {
		rawSum, newSum := 0.0, 0.0
		if in.Ambient != nil {
			rawSum += raw(i, in.Ambient[i])
		}
		// Columns are the union of row i and column i: smoothing shares each
		// pair's counts between both directions.
		res.F[i] = make([]Factor, 0, len(in.Hits[i])+len(tr[i]))
		mergeRows(in.Hits[i], tr[i], func(j int32, kij, kji int64) {
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
			res.F[i] = append(res.F[i], Factor{J: j, F: f, Moved: m})
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
	for i := range n {
		for _, e := range res.F[i] {
			back := 0.0
			row := res.F[e.J]
			if k := sort.Search(len(row), func(k int) bool { return row[k].J >= int32(i) }); k < len(row) && int(row[k].J) == i {
				back = row[k].F
			}
			res.ReciprocityAfter = math.Max(res.ReciprocityAfter, math.Abs(in.Area[i]*e.F-in.Area[e.J]*back)/maxNew)
		}
	}
	return res
}
