//go:build !amd64

package bvh

// prefetch is a no-op where no prefetch instruction is wired in.
func prefetch(addr uintptr) {}
