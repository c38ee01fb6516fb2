package bvh

import (
	"cmp"
	"math"
	"slices"
	"unsafe"

	"github.com/hemiray/hemiray/raytrace/internal/prefetch"
)

// The walls of an enclosure are mostly flat and axis-aligned (rooms,
// cabinets, ovens, the bench's closed box), and every ray that reaches one
// crosses its plane at a single point. A run of facets lying exactly in one
// axis-aligned plane therefore gets a uniform 2-D grid over that plane in
// place of a subtree: a ray that enters the run's flat box computes where
// it crosses the plane and tests only the facets whose boxes cover that
// cell, instead of walking four or five levels of boxes that all lie in
// the same plane.
//
// The answer is exact, not approximate: a facet the ray can hit contains
// the crossing point, so its box does; cells are found with the same
// monotone formula at build and query time, so the cell range of a point
// within a facet's box lies within the facet's cell range; and the query
// widens the computed point by far more than its rounding error (and the
// watertight test's) before taking its cell range. The facets found are
// then tested with the same watertight test as a leaf's.

const (
	// gridCount is the Count of a binary or wide slot that holds a plane
	// grid, whose index is then its Offset or Child. It cannot be a leaf's
	// count (maxLeafSize is far below it).
	gridCount = 255
	// cellsPerFacet sets a grid's resolution: cells of about two facets
	// each, so that each facet's box overlaps a few cells and a cell lists
	// a few facets (measured on the bench's box: half and twice as many
	// cells traced no faster).
	cellsPerFacet = 0.5
	// maxRefsPerFacet bounds the grid's memory: a run whose facets' boxes
	// cover more cells than this per facet on average (long slivers across
	// a face) keeps its subtree.
	maxRefsPerFacet = 8
	// pointSlack widens the computed crossing point, relative to the
	// coordinates it is computed from; 2⁻⁴⁰ is thousands of times the
	// rounding errors it covers (see enterGrid).
	pointSlack = 0x1p-40
)

// planeGrid is the grid of one run of facets in the plane x[axis] = c.
// Cell (i, j) covers u0 + i/su ≤ x[u] < u0 + (i+1)/su and the like on v,
// the cells at the edges extending to infinity; its facets (indices into
// Tree.tris) are Tree.cellTris[Tree.cells[first+k] : Tree.cells[first+k+1]]
// with k = j·nu + i.
type planeGrid struct {
	c, u0, v0, su, sv float64
	size              float64 // the larger side of the run's box
	axis, u, v        int32
	nu, nv            int32
	first             int32
}

// cellOf returns the cell index of coordinate x on an axis whose cells
// start at x0, su per unit, n of them. Monotone in x; NaN goes to cell 0.
func cellOf(x, x0, su float64, n int32) int32 {
	f := (x - x0) * su
	if !(f >= 0) {
		return 0
	}
	if f >= float64(n-1) {
		return n - 1
	}
	return int32(f)
}

// gridAxis returns the axis on which every prim of ps lies in one plane
// (the same float32 coordinate for all their vertices), or −1.
func gridAxis(ps []prim) int {
	if len(ps) == 0 {
		return -1
	}
	for k := range 3 {
		c := ps[0].b.lo[k]
		flat := true
		for i := range ps {
			if ps[i].b.lo[k] != c || ps[i].b.hi[k] != c {
				flat = false
				break
			}
		}
		if flat {
			return k
		}
	}
	return -1
}

// addGrid builds the grid of the run b.prims[lo:hi], which lies in a plane
// normal to axis k, and returns its index; −1 when the facets' boxes would
// cover too many cells (the run then keeps a subtree).
func (b *builder) addGrid(lo, hi, k int) int32 {
	ps := b.prims[lo:hi]
	u, v := (k+1)%3, (k+2)%3
	run := empty
	for i := range ps {
		run.grow(&ps[i].b)
	}
	w := float64(run.hi[u]) - float64(run.lo[u])
	h := float64(run.hi[v]) - float64(run.lo[v])
	target := max(1, math.Round(cellsPerFacet*float64(len(ps))))
	nu, nv := 1.0, 1.0
	switch {
	case w > 0 && h > 0:
		nu = max(1, min(target, math.Round(math.Sqrt(target*w/h))))
		nv = max(1, min(target, math.Round(target/nu)))
	case w > 0:
		nu = target
	case h > 0:
		nv = target
	}
	g := planeGrid{
		c: float64(run.lo[k]), u0: float64(run.lo[u]), v0: float64(run.lo[v]),
		axis: int32(k), u: int32(u), v: int32(v), nu: int32(nu), nv: int32(nv),
		first: int32(len(b.cells)), size: max(w, h),
	}
	if w > 0 {
		g.su = nu / w
	}
	if h > 0 {
		g.sv = nv / h
	}
	// Count the references first, so that a run of slivers is refused
	// before anything is allocated for it.
	span := func(p *prim) (i0, i1, j0, j1 int32) {
		i0, i1 = cellOf(float64(p.b.lo[u]), g.u0, g.su, g.nu), cellOf(float64(p.b.hi[u]), g.u0, g.su, g.nu)
		j0, j1 = cellOf(float64(p.b.lo[v]), g.v0, g.sv, g.nv), cellOf(float64(p.b.hi[v]), g.v0, g.sv, g.nv)
		return
	}
	refs := 0
	for i := range ps {
		i0, i1, j0, j1 := span(&ps[i])
		refs += int(i1-i0+1) * int(j1-j0+1)
	}
	if refs > maxRefsPerFacet*len(ps) || len(b.cellTris)+refs > math.MaxInt32 {
		return -1
	}
	ncell := int(g.nu) * int(g.nv)
	base := len(b.cellTris)
	starts := make([]int32, ncell+1)
	for i := range ps {
		i0, i1, j0, j1 := span(&ps[i])
		for j := j0; j <= j1; j++ {
			for i := i0; i <= i1; i++ {
				starts[int(j)*int(g.nu)+int(i)+1]++
			}
		}
	}
	starts[0] = int32(base)
	for c := 1; c <= ncell; c++ {
		starts[c] += starts[c-1]
	}
	b.cellTris = append(b.cellTris, make([]int32, refs)...)
	fill := append([]int32(nil), starts[:ncell]...)
	for p := range ps {
		i0, i1, j0, j1 := span(&ps[p])
		for j := j0; j <= j1; j++ {
			for i := i0; i <= i1; i++ {
				c := int(j)*int(g.nu) + int(i)
				b.cellTris[fill[c]] = int32(lo + p)
				fill[c]++
			}
		}
	}
	// Most overlapped first: a cell's own facets come before those that
	// only reach into it, and the visit stops at the first hit.
	cellArea := func(p *prim, c int) float64 {
		i, j := c%int(g.nu), c/int(g.nu)
		ulo, vlo := g.u0+float64(i)/g.su, g.v0+float64(j)/g.sv
		du := min(float64(p.b.hi[u]), ulo+1/g.su) - max(float64(p.b.lo[u]), ulo)
		dv := min(float64(p.b.hi[v]), vlo+1/g.sv) - max(float64(p.b.lo[v]), vlo)
		return max(du, 0) * max(dv, 0)
	}
	for c := range ncell {
		list := b.cellTris[starts[c]:starts[c+1]]
		slices.SortStableFunc(list, func(x, y int32) int {
			return cmp.Compare(cellArea(&b.prims[y], c), cellArea(&b.prims[x], c))
		})
	}
	b.cells = append(b.cells, starts...)
	b.grids = append(b.grids, g)
	return int32(len(b.grids) - 1)
}

// A grid visit reads three arrays in a chain (the cell's start, its list
// of facets, the facets), each likely a cache miss on a large model. So
// it is split into stages, each of which prefetches what the next reads
// and returns, like a node step, so that the batch's other lanes work
// while the data arrives (the stage is kept in the lane's count: see
// step). Without the stages the grid traced slower than the subtree it
// replaced, stalled on those loads.
const (
	gridCells = -1 - iota // the cell's start and end are on their way
	gridList              // the cell's list of facets is
	gridTris              // the facets are
)

// enterGrid starts the visit of grid gi: it finds the cell where the
// ray crosses the plane and prefetches the cell's start. A point within
// rounding of a cell's edge (rare) is looked up in every cell it may
// lie in, at once. True when an any-hit query is answered.
func (t *Tree) enterGrid(l *lane, gi int32) bool {
	g := &t.grids[gi]
	tp := (g.c - l.o3[g.axis]) / l.d3[g.axis]
	ou, du, ov, dv := l.o3[g.u], l.d3[g.u], l.o3[g.v], l.d3[g.v]
	pu, pv := ou+tp*du, ov+tp*dv
	if !(math.Abs(pu) < math.MaxFloat64/4 && math.Abs(pv) < math.MaxFloat64/4) {
		// A ray that entered the run's box crosses its plane at a
		// finite point; this one runs in the plane, which the
		// watertight test rejects for every facet.
		l.count = 0
		return false
	}
	// The slack covers the rounding of pu and pv, of the watertight
	// test (in coordinates relative to the origin) and of mayContain's
	// edge functions (relative to the run's size).
	eu := pointSlack * (math.Abs(ou) + math.Abs(pu) + math.Abs(g.u0) + g.size)
	ev := pointSlack * (math.Abs(ov) + math.Abs(pv) + math.Abs(g.v0) + g.size)
	i0, i1 := cellOf(pu-eu, g.u0, g.su, g.nu), cellOf(pu+eu, g.u0, g.su, g.nu)
	j0, j1 := cellOf(pv-ev, g.v0, g.sv, g.nv), cellOf(pv+ev, g.v0, g.sv, g.nv)
	l.pu, l.pv, l.pe, l.pg = pu, pv, 2*(eu+ev), g
	if i0 == i1 && j0 == j1 {
		l.cur, l.count = g.first+j0*g.nu+i0, gridCells
		prefetch.Line(unsafe.Pointer(&t.cells[l.cur]))
		return false
	}
	for j := j0; j <= j1; j++ {
		for i := i0; i <= i1; i++ {
			c := g.first + j*g.nu + i
			if t.testCell(l, t.cells[c], t.cells[c+1]) {
				return true
			}
		}
	}
	l.count = 0
	return false
}

// gridStep advances a grid visit by one stage; true when an any-hit
// query is answered. A finished visit leaves count 0.
func (t *Tree) gridStep(l *lane) bool {
	switch l.count {
	case gridCells:
		c := l.cur
		l.cur, l.hi = t.cells[c], t.cells[c+1]
		if l.cur < l.hi {
			prefetch.Lines(unsafe.Pointer(&t.cellTris[l.cur]), unsafe.Pointer(&t.cellTris[l.hi-1]))
		}
		l.count = gridList
		return false
	case gridList:
		if l.cur < l.hi {
			fetchTris(&t.cellTris[l.cur], int(l.hi-l.cur), unsafe.SliceData(t.tris))
		}
		l.count = gridTris
		return false
	}
	l.count = 0
	return t.testCell(l, l.cur, l.hi)
}

// testCell tests the ray against the facets cellTris[lo:hi] that may
// contain the crossing point; true when an any-hit query is answered.
func (t *Tree) testCell(l *lane, lo, hi int32) bool {
	u, v := l.pg.u, l.pg.v
	pu, pv, e := l.pu, l.pv, l.pe
	for _, k := range t.cellTris[lo:hi] {
		tri := &t.tris[k]
		au, av := float64(tri.v[u]), float64(tri.v[v])
		bu, bv := float64(tri.v[3+u]), float64(tri.v[3+v])
		cu, cv := float64(tri.v[6+u]), float64(tri.v[6+v])
		if !mayContain(pu, pv, au, av, bu, bv, cu, cv, e) {
			continue
		}
		before := l.tMax
		if l.hitTri(tri) {
			return true
		}
		if l.tMax < before {
			// The others lie in the same plane: they can only be hit at
			// the same distance (a shared edge or corner), give or take
			// rounding, and then either facet is as right.
			return false
		}
	}
	return false
}

// mayContain is false only when point p lies more than e outside the
// triangle (a, b, c) of either winding: its edge functions (twice the
// signed areas) are compared with e times an upper bound of the edge's
// length.
func mayContain(pu, pv, au, av, bu, bv, cu, cv, e float64) bool {
	s0 := (bu-au)*(pv-av) - (bv-av)*(pu-au)
	s1 := (cu-bu)*(pv-bv) - (cv-bv)*(pu-bu)
	s2 := (au-cu)*(pv-cv) - (av-cv)*(pu-cu)
	t0 := e * (math.Abs(bu-au) + math.Abs(bv-av))
	t1 := e * (math.Abs(cu-bu) + math.Abs(cv-bv))
	t2 := e * (math.Abs(au-cu) + math.Abs(av-cv))
	return s0 >= -t0 && s1 >= -t1 && s2 >= -t2 || s0 <= t0 && s1 <= t1 && s2 <= t2
}

// gridTests is the SAH cost of a grid visit in triangle tests (the facets
// of a cell, measured on the bench's box), for Stats only.
const gridTests = 4
