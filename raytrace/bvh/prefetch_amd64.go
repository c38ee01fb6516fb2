package bvh

// prefetch asks the processor to start loading the cache line at addr
// without waiting for it.
//
//go:noescape
func prefetch(addr uintptr)
