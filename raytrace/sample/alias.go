package sample

// Alias picks index i with probability w_i/Σw in O(1) (Walker's alias
// method, in the numerically stable construction of Vose, "A linear algorithm
// for generating random numbers with a given distribution", IEEE Trans.
// Software Eng. 17(9), 1991). One 16-byte entry per index keeps it compact.
type Alias struct {
	prob  []float64
	alias []int32
}

// NewAlias builds the table for non-negative weights with a positive sum.
func NewAlias(w []float64) Alias {
	n := len(w)
	a := Alias{prob: make([]float64, n), alias: make([]int32, n)}
	total := 0.0
	for _, x := range w {
		total += x
	}
	scaled := make([]float64, n)
	small := make([]int32, 0, n)
	large := make([]int32, 0, n)
	for i, x := range w {
		scaled[i] = x * float64(n) / total
		if scaled[i] < 1 {
			small = append(small, int32(i))
		} else {
			large = append(large, int32(i))
		}
	}
	for len(small) > 0 && len(large) > 0 {
		s, l := small[len(small)-1], large[len(large)-1]
		small = small[:len(small)-1]
		a.prob[s], a.alias[s] = scaled[s], l
		scaled[l] = scaled[l] + scaled[s] - 1
		if scaled[l] < 1 {
			large = large[:len(large)-1]
			small = append(small, l)
		}
	}
	for _, i := range large {
		a.prob[i], a.alias[i] = 1, i
	}
	for _, i := range small { // only rounding leaves entries here
		a.prob[i], a.alias[i] = 1, i
	}
	return a
}

// Len returns the number of indices.
func (a *Alias) Len() int { return len(a.prob) }

// Pick returns an index for uniform u in [0, 1).
func (a *Alias) Pick(u float64) int {
	n := float64(len(a.prob))
	x := u * n
	i := int(x)
	if i >= len(a.prob) {
		i = len(a.prob) - 1
	}
	if x-float64(i) < a.prob[i] {
		return i
	}
	return int(a.alias[i])
}
