package report

import (
	"bytes"
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"runtime"
	"strconv"
	"testing"
)

// writeMTX formats rows on several cores a window at a time; the file must
// be what one loop with fmt writes, for row counts around the chunk and
// window sizes and on one core or more.
func TestMTXFormattedInOrder(t *testing.T) {
	// Values repeat within a row, as raw factors k/N do.
	entry := func(i, k int) (int, float64) { return (i*7 + k*13) % 5000, float64(i%3+k%2+1) / float64(i+3) }
	for _, procs := range []int{1, 2, 3} {
		old := runtime.GOMAXPROCS(procs)
		for _, rows := range []int{0, 1, 63, 64, 65, 255, 256, 257, 511, 512, 513, 1500, 5000} {
			var want bytes.Buffer
			fmt.Fprintf(&want, "%%%%MatrixMarket matrix coordinate real general\n%% test\n%d %d %d\n", rows, 5000, 0)
			for i := range rows {
				for k := range i % 5 {
					j, v := entry(i, k)
					fmt.Fprintf(&want, "%d %d %v\n", i+k%2+1, j+1, v)
				}
			}
			path := filepath.Join(t.TempDir(), "m.mtx")
			err := writeMTX(path, "general", "test", rows, 5000, 0, rows, func(i int, put func(i, j int, v float64)) {
				for k := range i % 5 {
					j, v := entry(i, k)
					put(i+k%2, j, v) // a group may write to more than one row
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

// The memo gives strconv's text for every number, whether remembered,
// evicted by another number of the same slot, or new: 20,000 draws from
// 300 values (more values than slots), zeros of both signs among them.
func TestFloatMemo(t *testing.T) {
	values := []float64{0, math.Copysign(0, -1), 1, 1e-300, math.MaxFloat64}
	for k := 1; len(values) < 300; k++ {
		values = append(values, float64(k)/3000, 1/float64(k*k+7))
	}
	rng := rand.New(rand.NewPCG(1, 2))
	var memo floatMemo
	var got, want []byte
	for range 20000 {
		v := values[rng.IntN(len(values))]
		got = memo.append(got[:0], v)
		want = strconv.AppendFloat(want[:0], v, 'g', -1, 64)
		if !bytes.Equal(got, want) {
			t.Fatalf("%v: memo gives %q, want %q", v, got, want)
		}
	}
}

// BenchmarkWriteMTX writes a raw-factor matrix of the closed-sphere kind:
// 2,000 rows of 1,000 entries k/N (N = 3,000, k mostly 1 to 3), 2·10⁶
// lines.
func BenchmarkWriteMTX(b *testing.B) {
	const rows, per, rays = 2000, 1000, 3000
	// Raw factors k/N repeat a few values; smoothed ones are all
	// different, full 17-digit numbers.
	for _, m := range []struct {
		name  string
		value func(i, k int) float64
	}{
		{"raw", func(i, k int) float64 { return float64(1+(i*k)%3) / rays }},
		{"smoothed", func(i, k int) float64 { return (1 + 0.37*math.Sin(float64(i*per+k))) / 7919 }},
	} {
		b.Run(m.name, func(b *testing.B) {
			dir := b.TempDir()
			for b.Loop() {
				err := writeMTX(filepath.Join(dir, "m.mtx"), "general", "bench", rows, 10000, rows*per, rows, func(i int, put func(i, j int, v float64)) {
					for k := range per {
						put(i, k*10, m.value(i, k))
					}
				})
				if err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}
