package smooth

import "math"

// assemble builds the smoothed rows from λ and measures the change. tr is
// the transpose of the counts (see transpose).
func assemble(in Counts, tr []CountRow, lam []float64, iters int) *Result {
	n := len(in.Area)
	res := &Result{F: make([]FactorRow, n), Ambient: make([]float64, n), MovedAmbient: make([]float64, n), Iterations: iters, hits: in.Hits, rays: in.Rays}
	raw := func(i int, k int64) float64 { return float64(k) / float64(in.Rays[i]) }
	// Largest raw and smoothed exchange areas, to scale reciprocity errors.
	maxRaw, maxNew, recip := 0.0, 0.0, 0.0
	for i := range n {
		for _, k := range in.Hits[i].Val {
			maxRaw = max(maxRaw, in.Area[i]*raw(i, k))
		}
	}
	// Row i's columns are the union of row i and column i of the counts
	// (smoothing shares each pair's counts between both directions). Count
	// them first, so that all rows share two arrays of the exact size.
	start := make([]int, n+1)
	for i := range n {
		start[i+1] = start[i] + unionLen(in.Hits[i].Col, tr[i].Col)
	}
	cols, vals := make([]int32, start[n]), make([]float64, start[n])
	for i := range n {
		a, b := &in.Hits[i], &tr[i]
		lo, hi := start[i], start[i+1]
		col, val := cols[lo:hi:hi], vals[lo:hi:hi]
		rays, area, li := float64(in.Rays[i]), in.Area[i], lam[i]
		rawSum, newSum := 0.0, 0.0
		if in.Ambient != nil {
			rawSum += raw(i, in.Ambient[i])
		}
		x, y := 0, 0
		for e := range col {
			// The next column of the union, with its count in each
			// direction (0 where absent).
			var j int32
			var kij, kji int64
			switch {
			case y == len(b.Col) || (x < len(a.Col) && a.Col[x] < b.Col[y]):
				j, kij = a.Col[x], a.Val[x]
				x++
			case x == len(a.Col) || b.Col[y] < a.Col[x]:
				j, kji = b.Col[y], b.Val[y]
				y++
			default:
				j, kij, kji = a.Col[x], a.Val[x], b.Val[y]
				x++
				y++
			}
			var s float64
			if int(j) == i {
				s = float64(kij) / li
			} else {
				s = float64(kij+kji) / (li + lam[j])
			}
			f := s / area
			rawF := float64(kij) / rays
			m := moved(rawF, f, in.Rays[i])
			col[e], val[e] = j, f
			maxNew = max(maxNew, s)
			res.MaxMoved = max(res.MaxMoved, math.Abs(m))
			rawSum += rawF
			newSum += f
			back := raw(int(j), kji)
			res.ReciprocityBefore = max(res.ReciprocityBefore, math.Abs(area*rawF-in.Area[j]*back)/maxRaw)
			// Row j holds s/A_j for this pair, from the same s (λ_i + λ_j
			// is λ_j + λ_i bit for bit), so its reciprocity error is known
			// here without a transpose of the result.
			recip = max(recip, math.Abs(area*f-in.Area[j]*(s/in.Area[j])))
		}
		res.F[i] = FactorRow{Col: col, Val: val}
		if in.Ambient != nil && in.Ambient[i] > 0 {
			res.Ambient[i] = float64(in.Ambient[i]) / lam[i] / in.Area[i]
			res.MovedAmbient[i] = moved(raw(i, in.Ambient[i]), res.Ambient[i], in.Rays[i])
			res.MaxMoved = max(res.MaxMoved, math.Abs(res.MovedAmbient[i]))
		}
		res.SummationBefore = max(res.SummationBefore, math.Abs(1-rawSum))
		res.SummationAfter = max(res.SummationAfter, math.Abs(1-newSum-res.Ambient[i]))
	}
	if maxNew > 0 {
		res.ReciprocityAfter = recip / maxNew
	}
	return res
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

// moved is how far a factor moved from its raw estimate rawF (of rays
// rays) to newF, in standard errors of the raw estimate.
func moved(rawF, newF float64, rays int64) float64 {
	se := func(f float64) float64 { return math.Sqrt(f * (1 - f) / float64(rays)) }
	s := se(rawF)
	if s == 0 {
		if rawF == newF {
			return 0
		}
		// A factor estimated as 0 or 1 has a zero binomial error; use the
		// error of one count instead.
		s = se(1 / float64(rays))
	}
	return (newF - rawF) / s
}
