package raytrace

import (
	"slices"

	"github.com/hemiray/hemiray/raytrace/internal/sparse"
)

// Row is a sparse row of integer tallies: Val[k] events in column Col[k],
// columns increasing. Memory follows the pairs actually hit, which keeps
// facet-level models of many thousand nodes within reach.
type Row = sparse.Row[int64]

// Tally is the raw integer outcome of tracing: for each emitting node its
// rays, its hits on every node, its escapes and its back-face hits on
// one-sided surfaces. Tallies of disjoint ray sets add exactly.
type Tally struct {
	Rays    []int64 // rays traced from each node
	Escaped []int64 // rays from each node that left the model
	Hits    []Row   // per emitting node: hits by target node
	Back    []Row   // per emitting node: back-face hits by target surface
}

func newTally(nodes int) *Tally {
	return &Tally{Rays: make([]int64, nodes), Escaped: make([]int64, nodes), Hits: make([]Row, nodes), Back: make([]Row, nodes)}
}

// scratch accumulates one work unit densely, then emits sparse rows.
type scratch struct {
	hits, back []int64
	touched    []NodeID
	touchedB   []SurfaceID
}

func newScratch(nodes, surfaces int) *scratch {
	return &scratch{hits: make([]int64, nodes), back: make([]int64, surfaces)}
}

func (s *scratch) hit(j NodeID) {
	if s.hits[j] == 0 {
		s.touched = append(s.touched, j)
	}
	s.hits[j]++
}

func (s *scratch) backHit(surface SurfaceID) {
	if s.back[surface] == 0 {
		s.touchedB = append(s.touchedB, surface)
	}
	s.back[surface]++
}

// take returns the accumulated rows and clears the scratch.
func (s *scratch) take() (hits, back Row) {
	hits, back = drain(s.hits, s.touched), drain(s.back, s.touchedB)
	s.touched, s.touchedB = s.touched[:0], s.touchedB[:0]
	return hits, back
}

// drain turns the touched entries of a dense row into a sparse row and
// zeroes them.
func drain[ID NodeID | SurfaceID](dense []int64, touched []ID) Row {
	slices.Sort(touched)
	r := Row{Col: make([]int32, len(touched)), Val: make([]int64, len(touched))}
	for k, c := range touched {
		r.Col[k], r.Val[k] = int32(c), dense[c]
		dense[c] = 0
	}
	return r
}
