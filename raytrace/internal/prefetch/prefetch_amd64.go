package prefetch

import "unsafe"

// Line starts loading the cache line holding p.
//
//go:noescape
func Line(p unsafe.Pointer)

// Lines starts loading the cache lines holding p and q (the two ends of a
// record that may straddle a line boundary).
//
//go:noescape
func Lines(p, q unsafe.Pointer)
