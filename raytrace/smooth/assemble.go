package smooth

import "math"

// assemble builds the smoothed rows from λ and the pairs, and measures
// the change. Row i is its pairs with nodes j < i (kept in rows j, met in
// increasing j), its diagonal, then its own pairs j > i: every pair is
// visited once and written to both of its rows, and a pair's count in
// the other direction is its pooled count less this one's, so no
// transpose of the counts is needed.
func assemble(in Counts, offd *pairs, lam []float64, iters int, w *Workspace) *Result {
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
	// The length of every row first, so that all rows share two arrays of
	// the exact size; next[i] is where row i's next pair below the
	// diagonal goes.
	start := make([]int, n+1)
	diag := make([]int, n) // position of k_ii in row i of the counts, −1 when absent
	for i := range n {
		diag[i] = diagonalAt(&in.Hits[i], i)
		start[i+1] += offd.start[i+1] - offd.start[i]
		if diag[i] >= 0 {
			start[i+1]++
		}
		for _, j := range offd.j[offd.start[i]:offd.start[i+1]] {
			start[j+1]++
		}
	}
	for i := range n {
		start[i+1] += start[i]
	}
	next := append([]int(nil), start[:n]...)
	cols, vals := w.lendInts(start[n]), w.lendFloats(start[n])
	res.cols, res.vals = cols, vals
	// Row sums, raw and smoothed, in column order as a row is read: the
	// ambient first for the raw one, then the pairs below the diagonal
	// as they come.
	rawSum, newSum := make([]float64, n), make([]float64, n)
	if in.Ambient != nil {
		for i := range n {
			rawSum[i] = raw(i, in.Ambient[i])
		}
	}
	for i := range n {
		a := &in.Hits[i]
		rays, area, li := float64(in.Rays[i]), in.Area[i], lam[i]
		at := next[i] // the pairs below the diagonal are in place
		x := 0        // the counts of row i, walked beside its pairs
		if d := diag[i]; d >= 0 {
			s := float64(a.Val[d]) / li
			f := s / area
			rawF := float64(a.Val[d]) / rays
			cols[at], vals[at] = int32(i), f
			at++
			maxNew = max(maxNew, s)
			res.MaxMoved = max(res.MaxMoved, math.Abs(moved(rawF, f, in.Rays[i])))
			rawSum[i] += rawF
			newSum[i] += f
			x = d + 1
		} else {
			x = firstAbove(a, i)
		}
		for p := offd.start[i]; p < offd.start[i+1]; p++ {
			j, c := offd.j[p], offd.c[p]
			var kij int64
			if x < len(a.Col) && a.Col[x] == j {
				kij = a.Val[x]
				x++
			}
			kji := c - float64(kij) // exact: counts below 2⁵³
			s := c / (li + lam[j])
			fij, fji := s/area, s/in.Area[j]
			rawIJ, rawJI := float64(kij)/rays, kji/float64(in.Rays[j])
			cols[at], vals[at] = j, fij
			at++
			q := next[j]
			cols[q], vals[q] = int32(i), fji
			next[j]++
			maxNew = max(maxNew, s)
			res.MaxMoved = max(res.MaxMoved, math.Abs(moved(rawIJ, fij, in.Rays[i])), math.Abs(moved(rawJI, fji, in.Rays[j])))
			rawSum[i] += rawIJ
			newSum[i] += fij
			rawSum[j] += rawJI
			newSum[j] += fji
			res.ReciprocityBefore = max(res.ReciprocityBefore, math.Abs(area*rawIJ-in.Area[j]*rawJI)/maxRaw)
			// Both rows hold this pair from the same s, so the
			// reciprocity error is known here.
			recip = max(recip, math.Abs(area*fij-in.Area[j]*fji))
		}
		res.F[i] = FactorRow{Col: cols[start[i]:start[i+1]:start[i+1]], Val: vals[start[i]:start[i+1]:start[i+1]]}
		if in.Ambient != nil && in.Ambient[i] > 0 {
			res.Ambient[i] = float64(in.Ambient[i]) / lam[i] / in.Area[i]
			res.MovedAmbient[i] = moved(raw(i, in.Ambient[i]), res.Ambient[i], in.Rays[i])
			res.MaxMoved = max(res.MaxMoved, math.Abs(res.MovedAmbient[i]))
		}
		res.SummationBefore = max(res.SummationBefore, math.Abs(1-rawSum[i]))
		res.SummationAfter = max(res.SummationAfter, math.Abs(1-newSum[i]-res.Ambient[i]))
	}
	if maxNew > 0 {
		res.ReciprocityAfter = recip / maxNew
	}
	return res
}

// diagonalAt returns the position of column i in row r, or −1.
func diagonalAt(r *CountRow, i int) int {
	if k := firstAbove(r, i-1); k < len(r.Col) && int(r.Col[k]) == i {
		return k
	}
	return -1
}

// firstAbove returns the position of the first column of r above c.
func firstAbove(r *CountRow, c int) int {
	lo, hi := 0, len(r.Col)
	for lo < hi {
		m := int(uint(lo+hi) >> 1)
		if int(r.Col[m]) <= c {
			lo = m + 1
		} else {
			hi = m
		}
	}
	return lo
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
