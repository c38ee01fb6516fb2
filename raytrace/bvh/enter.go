package bvh

import (
	"math"
	"unsafe"
)

// enter4 returns, for each of the four children of the wide node at p,
// the order key of the distance at which the ray enters its box (the slab
// test of Kay & Kajiya 1986; see slab.go), with the child's slot in its
// two low bits, or a key of at least slotMiss if the ray misses the box or
// enters it beyond tMax. Clearing the two low bits lowers a key by at most
// 3 units in the last place, so ordering by it stays near-exact and
// culling by it conservative. Written out for the four children (a
// function per child is not inlined) so their loads and compares
// interleave.
func (l *lane) enter4(p unsafe.Pointer) (k0, k1, k2, k3 int64) {
	ox, oy, oz := l.o3[0], l.o3[1], l.o3[2]
	ix, iy, iz, fx, fy, fz := l.ix, l.iy, l.iz, l.fx, l.fy, l.fz
	nx, ny, nz, mx, my, mz := l.nx, l.ny, l.nz, l.mx, l.my, l.mz
	p1, p2, p3 := unsafe.Add(p, 4), unsafe.Add(p, 8), unsafe.Add(p, 12)
	a0 := int64(math.Float64bits((bound(p, nx) - ox) * ix))
	a1 := int64(math.Float64bits((bound(p1, nx) - ox) * ix))
	a2 := int64(math.Float64bits((bound(p2, nx) - ox) * ix))
	a3 := int64(math.Float64bits((bound(p3, nx) - ox) * ix))
	b0 := int64(math.Float64bits((bound(p, mx)-ox)*fx + 0))
	b1 := int64(math.Float64bits((bound(p1, mx)-ox)*fx + 0))
	b2 := int64(math.Float64bits((bound(p2, mx)-ox)*fx + 0))
	b3 := int64(math.Float64bits((bound(p3, mx)-ox)*fx + 0))
	a0 = max(a0, int64(math.Float64bits((bound(p, ny)-oy)*iy)))
	a1 = max(a1, int64(math.Float64bits((bound(p1, ny)-oy)*iy)))
	a2 = max(a2, int64(math.Float64bits((bound(p2, ny)-oy)*iy)))
	a3 = max(a3, int64(math.Float64bits((bound(p3, ny)-oy)*iy)))
	b0 = min(b0, int64(math.Float64bits((bound(p, my)-oy)*fy+0)))
	b1 = min(b1, int64(math.Float64bits((bound(p1, my)-oy)*fy+0)))
	b2 = min(b2, int64(math.Float64bits((bound(p2, my)-oy)*fy+0)))
	b3 = min(b3, int64(math.Float64bits((bound(p3, my)-oy)*fy+0)))
	a0 = max(a0, int64(math.Float64bits((bound(p, nz)-oz)*iz)), 0)
	a1 = max(a1, int64(math.Float64bits((bound(p1, nz)-oz)*iz)), 0)
	a2 = max(a2, int64(math.Float64bits((bound(p2, nz)-oz)*iz)), 0)
	a3 = max(a3, int64(math.Float64bits((bound(p3, nz)-oz)*iz)), 0)
	tMaxKey := l.tMaxKey
	b0 = min(b0, int64(math.Float64bits((bound(p, mz)-oz)*fz+0)), tMaxKey)
	b1 = min(b1, int64(math.Float64bits((bound(p1, mz)-oz)*fz+0)), tMaxKey)
	b2 = min(b2, int64(math.Float64bits((bound(p2, mz)-oz)*fz+0)), tMaxKey)
	b3 = min(b3, int64(math.Float64bits((bound(p3, mz)-oz)*fz+0)), tMaxKey)
	// A box the ray misses gets key never, so it sorts last.
	if a0 > b0 {
		a0 = never
	}
	if a1 > b1 {
		a1 = never
	}
	if a2 > b2 {
		a2 = never
	}
	if a3 > b3 {
		a3 = never
	}
	return a0 &^ 3, a1&^3 | 1, a2&^3 | 2, a3&^3 | 3
}
