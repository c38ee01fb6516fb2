package sample

import (
	"math"
	"math/rand/v2"
	"testing"
)

// sinCos agrees with the standard library's math.Sin and math.Cos (the
// reference) to the bit: on a million angles over the range ConcentricDisk
// uses and beyond, and at the octant edges, where the reduction changes
// branch.
func TestSinCosMatchesMath(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 8))
	xs := []float64{0, math.Copysign(0, -1), math.Pi / 4, -math.Pi / 4, math.Pi / 2, 3 * math.Pi / 4, math.Pi, 1e-300, 5e-324}
	for k := 1; k < 16; k++ {
		e := float64(k) * math.Pi / 4
		xs = append(xs, math.Nextafter(e, 0), math.Nextafter(e, 10), -math.Nextafter(e, 0))
	}
	for range 1000000 {
		xs = append(xs, (rng.Float64()*2-1)*math.Pi)
	}
	for range 10000 {
		xs = append(xs, (rng.Float64()*2-1)*1e6)
	}
	for _, x := range xs {
		s, c := sinCos(x)
		if math.Float64bits(s) != math.Float64bits(math.Sin(x)) || math.Float64bits(c) != math.Float64bits(math.Cos(x)) {
			t.Fatalf("sinCos(%v) = %v, %v; math: %v, %v", x, s, c, math.Sin(x), math.Cos(x))
		}
	}
}

func BenchmarkConcentricDisk(b *testing.B) {
	u := 0.1
	var sx float64
	for b.Loop() {
		x, y := ConcentricDisk(u, 1-u)
		sx += x + y
		u += 0x1p-20
		if u >= 1 {
			u -= 1
		}
	}
	_ = sx
}
