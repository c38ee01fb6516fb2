package sparse

import "slices"

// Row is a sparse row: value Val[k] in column Col[k], columns strictly
// increasing. It is the one row type of the tallies (int64 counts), the
// smoothing (counts in, factors out) and the exchange solve (factors):
// two parallel arrays, 12 bytes an int64 entry, so facet-level matrices of
// many thousand nodes keep to the pairs actually seen.
type Row[V int64 | float64] struct {
	Col []int32
	Val []V
}

// At returns the value in column c (0 when absent).
func (r *Row[V]) At(c int32) V {
	if k, ok := slices.BinarySearch(r.Col, c); ok {
		return r.Val[k]
	}
	return 0
}

// Sum returns the sum of the row's values.
func (r *Row[V]) Sum() V {
	var s V
	for _, v := range r.Val {
		s += v
	}
	return s
}

// Len returns the number of stored entries.
func (r *Row[V]) Len() int { return len(r.Col) }

// Append adds value v in column c, which must be beyond the row's last.
func (r *Row[V]) Append(c int32, v V) {
	r.Col = append(r.Col, c)
	r.Val = append(r.Val, v)
}

// Add returns r + o (a new row when both have entries; neither is changed).
func (r Row[V]) Add(o Row[V]) Row[V] {
	if len(o.Col) == 0 {
		return r
	}
	if len(r.Col) == 0 {
		return o
	}
	// Count the merged columns first, so the row is allocated to size: a
	// tally row is merged many times and kept to the end of a run.
	n, i, j := 0, 0, 0
	for i < len(r.Col) && j < len(o.Col) {
		switch {
		case r.Col[i] < o.Col[j]:
			i++
		case o.Col[j] < r.Col[i]:
			j++
		default:
			i, j = i+1, j+1
		}
		n++
	}
	n += len(r.Col) - i + len(o.Col) - j
	out := Row[V]{Col: make([]int32, 0, n), Val: make([]V, 0, n)}
	i, j = 0, 0
	for i < len(r.Col) || j < len(o.Col) {
		switch {
		case j == len(o.Col) || (i < len(r.Col) && r.Col[i] < o.Col[j]):
			out.Append(r.Col[i], r.Val[i])
			i++
		case i == len(r.Col) || o.Col[j] < r.Col[i]:
			out.Append(o.Col[j], o.Val[j])
			j++
		default:
			out.Append(r.Col[i], r.Val[i]+o.Val[j])
			i++
			j++
		}
	}
	return out
}

// Increasing reports whether the columns are strictly increasing and in
// [0, n).
func (r *Row[V]) Increasing(n int) bool {
	for k, c := range r.Col {
		if c < 0 || int(c) >= n || (k > 0 && c <= r.Col[k-1]) {
			return false
		}
	}
	return len(r.Col) == len(r.Val)
}

// Transpose returns the rows of the transposed matrix of rows (a square
// one, columns below len(rows)); each comes out with columns increasing,
// as the rows are walked in order.
func Transpose[V int64 | float64](rows []Row[V]) []Row[V] {
	count := make([]int, len(rows))
	for _, r := range rows {
		for _, j := range r.Col {
			count[j]++
		}
	}
	t := make([]Row[V], len(rows))
	for j := range t {
		t[j] = Row[V]{Col: make([]int32, 0, count[j]), Val: make([]V, 0, count[j])}
	}
	for i, r := range rows {
		for k, j := range r.Col {
			t[j].Append(int32(i), r.Val[k])
		}
	}
	return t
}
