package smooth

import (
	"math"
	"sort"
)

// assemble builds the smoothed rows from λ and measures the change.
func assemble(in Counts, lam []float64, iters int) *Result {
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
	// Raw counts by (i, j) for the diagnostics.
	rawK := make([]map[int32]int64, n)
	cols := make([]map[int32]bool, n)
	for i := range n {
		rawK[i] = map[int32]int64{}
		cols[i] = map[int32]bool{}
		for _, e := range in.Hits[i] {
			rawK[i][e.J] += e.K
		}
	}
	for i := range n {
		for j := range rawK[i] {
			cols[i][j] = true
			cols[j][int32(i)] = true
		}
	}
	// Reciprocity and summation before.
	maxS := 0.0
	for i := range n {
		for _, k := range rawK[i] {
			maxS = math.Max(maxS, in.Area[i]*raw(i, k))
		}
	}
	for i := range n {
		sum := 0.0
		if in.Ambient != nil {
			sum += raw(i, in.Ambient[i])
		}
		for j, k := range rawK[i] {
			sum += raw(i, k)
			back := raw(int(j), rawK[j][int32(i)])
			res.ReciprocityBefore = math.Max(res.ReciprocityBefore, math.Abs(in.Area[i]*raw(i, k)-in.Area[j]*back)/maxS)
		}
		res.SummationBefore = math.Max(res.SummationBefore, math.Abs(1-sum))
	}
	// Smoothed rows: s_ij = c_ij/(λ_i+λ_j), s_ii = k_ii/λ_i, F = s/A.
	maxS = 0
	for i := range n {
		var js []int32
		for j := range cols[i] {
			js = append(js, j)
		}
		sort.Slice(js, func(a, b int) bool { return js[a] < js[b] })
		sum := 0.0
		for _, j := range js {
			var s float64
			if int(j) == i {
				s = float64(rawK[i][j]) / lam[i]
			} else {
				s = float64(rawK[i][j]+rawK[j][int32(i)]) / (lam[i] + lam[j])
			}
			f := s / in.Area[i]
			maxS = math.Max(maxS, s)
			m := moved(i, raw(i, rawK[i][j]), f)
			res.MaxMoved = math.Max(res.MaxMoved, math.Abs(m))
			res.F[i] = append(res.F[i], Factor{J: j, F: f, Moved: m})
			sum += f
		}
		if in.Ambient != nil && in.Ambient[i] > 0 {
			res.Ambient[i] = float64(in.Ambient[i]) / lam[i] / in.Area[i]
			res.MovedAmbient[i] = moved(i, raw(i, in.Ambient[i]), res.Ambient[i])
			res.MaxMoved = math.Max(res.MaxMoved, math.Abs(res.MovedAmbient[i]))
		}
		res.SummationAfter = math.Max(res.SummationAfter, math.Abs(1-sum-res.Ambient[i]))
	}
	for i := range n {
		for _, e := range res.F[i] {
			back := 0.0
			row := res.F[e.J]
			if k := sort.Search(len(row), func(k int) bool { return row[k].J >= int32(i) }); k < len(row) && int(row[k].J) == i {
				back = row[k].F
			}
			res.ReciprocityAfter = math.Max(res.ReciprocityAfter, math.Abs(in.Area[i]*e.F-in.Area[e.J]*back)/maxS)
		}
	}
	return res
}
