package heappeak

import (
	"runtime"
	"sync/atomic"
	"time"
)

// Run collects garbage, runs fn, and returns the largest heap it held
// above the heap before it, sampled every interval (a sample can miss a
// peak shorter than that), and fn's error.
func Run(interval time.Duration, fn func() error) (uint64, error) {
	runtime.GC()
	var ms runtime.MemStats
	runtime.ReadMemStats(&ms)
	base := ms.HeapAlloc
	var peak atomic.Uint64
	done, stopped := make(chan struct{}), make(chan struct{})
	go func() {
		defer close(stopped)
		var ms runtime.MemStats
		for {
			runtime.ReadMemStats(&ms)
			peak.Store(max(peak.Load(), ms.HeapAlloc))
			select {
			case <-done:
				return
			case <-time.After(interval):
			}
		}
	}()
	err := fn()
	close(done)
	<-stopped
	return peak.Load() - min(peak.Load(), base), err
}
