package render

import "math"

// NiceTicks returns round tick values covering [lo, hi], about n of them:
// steps of 1, 2 or 5 times a power of ten (Heckbert, "Nice numbers for
// graph labels", Graphics Gems, 1990), only those inside [lo, hi].
func NiceTicks(lo, hi float64, n int) []float64 {
	if !(hi > lo) || n < 2 || math.IsInf(hi-lo, 0) {
		return []float64{lo}
	}
	step := niceNumber((hi-lo)/float64(n-1), true)
	var out []float64
	for k := math.Ceil(lo / step); k*step <= hi+step*1e-9 && len(out) < 4*n; k++ {
		v := k * step
		if math.Abs(v) < step*1e-9 {
			v = 0 // not −0 or 1e-17
		}
		out = append(out, v)
	}
	return out
}

// niceNumber returns a 1, 2 or 5 times a power of ten near x: the nearest
// one when round, else the smallest one not below x.
func niceNumber(x float64, round bool) float64 {
	e := math.Floor(math.Log10(x))
	f := x / math.Pow(10, e)
	var nice float64
	switch {
	case round && f < 1.5, !round && f <= 1:
		nice = 1
	case round && f < 3, !round && f <= 2:
		nice = 2
	case round && f < 7, !round && f <= 5:
		nice = 5
	default:
		nice = 10
	}
	return nice * math.Pow(10, e)
}
