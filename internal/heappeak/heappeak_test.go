package heappeak

import (
	"testing"
	"time"
)

var sink []byte

// A work that holds 64 MB for a while peaks at least that high, and one
// that allocates nothing stays near zero.
func TestRun(t *testing.T) {
	peak, err := Run(time.Millisecond, func() error {
		sink = make([]byte, 64<<20)
		for i := range sink {
			sink[i] = byte(i)
		}
		time.Sleep(20 * time.Millisecond)
		return nil
	})
	sink = nil
	if err != nil || peak < 64<<20 {
		t.Errorf("peak %d bytes, %v; want at least %d", peak, err, 64<<20)
	}
	if peak, _ := Run(time.Millisecond, func() error { time.Sleep(10 * time.Millisecond); return nil }); peak > 8<<20 {
		t.Errorf("idle work peaked at %d bytes", peak)
	}
}
