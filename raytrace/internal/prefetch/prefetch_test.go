package prefetch

import (
	"testing"
	"unsafe"
)

// A prefetch is only a hint: it must accept any address, mapped or not,
// and change nothing.
func TestHintChangesNothing(t *testing.T) {
	b := []int64{1, 2, 3}
	Line(unsafe.Pointer(&b[1]))
	Lines(unsafe.Pointer(&b[0]), unsafe.Pointer(&b[2]))
	Line(nil)
	if b[0] != 1 || b[1] != 2 || b[2] != 3 {
		t.Fatalf("memory changed: %v", b)
	}
}
