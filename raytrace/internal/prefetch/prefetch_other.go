//go:build !amd64

package prefetch

import "unsafe"

// Line does nothing where no prefetch instruction is wired in.
func Line(p unsafe.Pointer) {}

// Lines does nothing where no prefetch instruction is wired in.
func Lines(p, q unsafe.Pointer) {}
