package sample

import (
	"unsafe"

	"github.com/hemiray/hemiray/raytrace/internal/prefetch"
)

// Alias picks label i with probability w_i/Σw in O(1) (Walker's alias
// method, in the numerically stable construction of Vose, "A linear algorithm
// for generating random numbers with a given distribution", IEEE Trans.
// Software Eng. 17(9), 1991). A pick reads one 16-byte entry, which holds
// both labels it can return, so that a table larger than the caches costs
// one cache miss per pick, and that one can be prefetched (Prefetch).
type Alias struct {
	e []aliasEntry
}

// aliasEntry is slot i: keep label own if the slot's uniform fraction is
// below prob, else take label other.
type aliasEntry struct {
	prob       float64
	own, other int32
}

// NewAlias builds the table for non-negative weights with a positive sum;
// the labels are the indices 0 … len(w)−1.
func NewAlias(w []float64) Alias {
	labels := make([]int32, len(w))
	for i := range labels {
		labels[i] = int32(i)
	}
	return NewLabeledAlias(labels, func(i int32) float64 { return w[i] })
}

// NewLabeledAlias is NewAlias over labels (facet ids, say) with Pick
// returning a label, which saves the caller a lookup per pick; weight gives
// each label's weight.
func NewLabeledAlias(labels []int32, weight func(label int32) float64) Alias {
	n := len(labels)
	w := make([]float64, n)
	for i, l := range labels {
		w[i] = weight(l)
	}
	prob, alias := make([]float64, n), make([]int32, n)
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
		prob[s], alias[s] = scaled[s], l
		scaled[l] = scaled[l] + scaled[s] - 1
		if scaled[l] < 1 {
			large = large[:len(large)-1]
			small = append(small, l)
		}
	}
	for _, i := range large {
		prob[i], alias[i] = 1, i
	}
	for _, i := range small { // only rounding leaves entries here
		prob[i], alias[i] = 1, i
	}
	a := Alias{e: make([]aliasEntry, n)}
	for i := range a.e {
		a.e[i] = aliasEntry{prob: prob[i], own: labels[i], other: labels[alias[i]]}
	}
	return a
}

// Len returns the number of labels.
func (a *Alias) Len() int { return len(a.e) }

// slot returns the entry uniform u falls in and u's fraction within it.
func (a *Alias) slot(u float64) (int, float64) {
	x := u * float64(len(a.e))
	i := min(int(x), len(a.e)-1)
	return i, x - float64(i)
}

// Pick returns a label for uniform u in [0, 1).
func (a *Alias) Pick(u float64) int32 {
	i, frac := a.slot(u)
	e := &a.e[i]
	if frac < e.prob {
		return e.own
	}
	return e.other
}

// Prefetch starts loading the entry Pick(u) will read, so that the picks
// of a batch of rays wait for memory together rather than one by one.
func (a *Alias) Prefetch(u float64) {
	i, _ := a.slot(u)
	prefetch.Line(unsafe.Pointer(&a.e[i]))
}
