package smooth

import "sync"

// Workspace lends smoothings their large arrays (one or a few values per
// count or pair) and takes them back, so that smoothings one after another
// in one workspace, such as the replicates of a trace, reuse memory
// instead of touching new memory. At 10⁴ nodes a smoothing's arrays come
// to gigabytes, and on some machines first touching memory costs seconds
// a gigabyte. The results do not depend on which arrays are lent. A nil
// *Workspace lends nothing: every array is new. Safe for concurrent use.
type Workspace struct {
	mu     sync.Mutex
	ints   [][]int32
	floats [][]float64
}

// lend returns a slice of length n from the free ones (the smallest with
// room) or a new one with a sixteenth more room, so that a later, slightly
// larger request of the same kind still fits; its contents are undefined.
func lend[T int32 | float64](w *Workspace, free *[][]T, n int) []T {
	w.mu.Lock()
	defer w.mu.Unlock()
	best := -1
	for k, s := range *free {
		if cap(s) >= n && (best < 0 || cap(s) < cap((*free)[best])) {
			best = k
		}
	}
	if best < 0 {
		return make([]T, n, n+n/16)
	}
	s := (*free)[best]
	*free = append((*free)[:best], (*free)[best+1:]...)
	return s[:n]
}

func giveBack[T int32 | float64](w *Workspace, free *[][]T, s []T) {
	if cap(s) > 0 {
		w.mu.Lock()
		*free = append(*free, s)
		w.mu.Unlock()
	}
}

func (w *Workspace) lendInts(n int) []int32 {
	if w == nil {
		return make([]int32, n)
	}
	return lend(w, &w.ints, n)
}

func (w *Workspace) lendFloats(n int) []float64 {
	if w == nil {
		return make([]float64, n)
	}
	return lend(w, &w.floats, n)
}

func (w *Workspace) giveInts(s []int32) {
	if w != nil {
		giveBack(w, &w.ints, s)
	}
}

func (w *Workspace) giveFloats(s []float64) {
	if w != nil {
		giveBack(w, &w.floats, s)
	}
}

// Recycle hands r's matrix back to w for later smoothings; r must not be
// used afterwards.
func (w *Workspace) Recycle(r *Result) {
	w.giveInts(r.cols)
	w.giveFloats(r.vals)
	r.F, r.cols, r.vals = nil, nil, nil
}
