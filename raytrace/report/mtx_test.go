package report

import (
	"bytes"
	"fmt"
	"os"
	"path/filepath"
	"runtime"
	"testing"
)

// writeMTX formats rows on several cores a window at a time; the file must
// be what one loop with fmt writes, for row counts around the chunk and
// window sizes and on one core or more.
func TestMTXFormattedInOrder(t *testing.T) {
	entry := func(i, k int) (int, float64) { return (i*7 + k*13) % 5000, float64(i+1) / float64(k+3) }
	for _, procs := range []int{1, 2, 3} {
		old := runtime.GOMAXPROCS(procs)
		for _, rows := range []int{0, 1, 255, 256, 257, 1500, 5000} {
			var want bytes.Buffer
			fmt.Fprintf(&want, "%%%%MatrixMarket matrix coordinate real general\n%% test\n%d %d %d\n", rows, 5000, 0)
			for i := range rows {
				for k := range i % 5 {
					j, v := entry(i, k)
					fmt.Fprintf(&want, "%d %d %v\n", i+1, j+1, v)
				}
			}
			path := filepath.Join(t.TempDir(), "m.mtx")
			err := writeMTX(path, "general", "test", rows, 5000, 0, rows, func(i int, put func(i, j int, v float64)) {
				for k := range i % 5 {
					j, v := entry(i, k)
					put(i, j, v)
				}
			})
			if err != nil {
				t.Fatal(err)
			}
			got, err := os.ReadFile(path)
			if err != nil {
				t.Fatal(err)
			}
			if !bytes.Equal(got, want.Bytes()) {
				t.Errorf("%d rows on %d cores: the file differs from a sequential write (%d bytes, want %d)", rows, procs, len(got), want.Len())
			}
		}
		runtime.GOMAXPROCS(old)
	}
}
