package mesh

import (
	"bytes"
	"runtime"
	"runtime/metrics"
	"testing"

	"github.com/hemiray/hemiray/geometry"
)

// benchSphere is about a million facets (12·289² = 1,002,252).
func benchSphere() *Mesh { return Sphere("s", geometry.Vec3{}, 1, 289, false) }

// peakHeap runs fn and returns the largest live heap seen by a sampler.
func readBench(b *testing.B, data []byte, read func() (*Mesh, error)) {
	b.SetBytes(int64(len(data)))
	b.ReportAllocs()
	var peak uint64
	for b.Loop() {
		runtime.GC()
		base := heapLive()
		stop := make(chan uint64)
		go func() {
			var p uint64
			for {
				select {
				case <-stop:
					stop <- p
					return
				default:
					if h := heapLive(); h > base && h-base > p {
						p = h - base
					}
					runtime.Gosched()
				}
			}
		}()
		if _, err := read(); err != nil {
			b.Fatal(err)
		}
		stop <- 0
		if p := <-stop; p > peak {
			peak = p
		}
	}
	b.ReportMetric(float64(peak)/float64(len(data)), "peakheap/filesize")
}

func heapLive() uint64 {
	s := []metrics.Sample{{Name: "/memory/classes/heap/objects:bytes"}}
	metrics.Read(s)
	return s[0].Value.Uint64()
}

func BenchmarkReadSTLBinary(b *testing.B) {
	var buf bytes.Buffer
	if err := WriteSTL(&buf, benchSphere(), "sphere"); err != nil {
		b.Fatal(err)
	}
	data := buf.Bytes()
	readBench(b, data, func() (*Mesh, error) { return ReadSTL(bytes.NewReader(data), "sphere.stl", Metre) })
}

func BenchmarkReadOBJ(b *testing.B) {
	var buf bytes.Buffer
	if err := WriteOBJ(&buf, benchSphere()); err != nil {
		b.Fatal(err)
	}
	data := buf.Bytes()
	readBench(b, data, func() (*Mesh, error) {
		return ReadOBJ(bytes.NewReader(data), "sphere.obj", OBJOptions{Unit: Metre})
	})
}
