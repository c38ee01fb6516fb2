package sample

import (
	"math"
	"testing"
)

func TestStreamDeterministicAndDistinct(t *testing.T) {
	a, b := NewStream(7, 3, 0), NewStream(7, 3, 0)
	c := NewStream(7, 3, 1)
	same, diff := true, 0
	for range 1000 {
		x, y, z := a.Uint64(), b.Uint64(), c.Uint64()
		same = same && x == y
		if x != z {
			diff++
		}
	}
	if !same || diff < 999 {
		t.Errorf("same key same values: %v; different batch differs %d/1000", same, diff)
	}
	s := NewStream(1, 2, 3)
	s.Skip(10)
	r := NewStream(1, 2, 3)
	for range 10 {
		r.Uint64()
	}
	if s.Uint64() != r.Uint64() {
		t.Error("Skip(10) differs from ten draws")
	}
}

func TestStreamUniform(t *testing.T) {
	// Chi-square over 64 bins, 640,000 draws: 63 degrees of freedom, the
	// 0.999 quantile is about 103 (chi-square tables, e.g. NIST/SEMATECH
	// e-Handbook of Statistical Methods, sec. 1.3.6.7.4).
	s := NewStream(42, 0, 0)
	var bins [64]int
	const n = 640000
	for range n {
		bins[int(s.Float64()*64)]++
	}
	chi := 0.0
	for _, c := range bins {
		d := float64(c) - n/64
		chi += d * d / (n / 64)
	}
	if chi > 103 {
		t.Errorf("chi-square = %.1f over 63 dof, want < 103", chi)
	}
}

func TestCosineHemisphere(t *testing.T) {
	s := NewStream(1, 1, 1)
	const n = 400000
	var sumZ, sumZ2 float64
	for range n {
		u1, u2 := s.Float64(), s.Float64()
		x, y, z := CosineHemisphere(u1, u2)
		if math.Abs(x*x+y*y+z*z-1) > 1e-12 || z < 0 {
			t.Fatalf("direction (%v,%v,%v) not on the upper unit hemisphere", x, y, z)
		}
		v1, v2 := InvertCosineHemisphere(x, y, z)
		if math.Abs(v1-u1) > 1e-9 || math.Abs(v2-u2) > 1e-9 {
			t.Fatalf("Invert(CosineHemisphere(%v,%v)) = (%v,%v)", u1, u2, v1, v2)
		}
		sumZ += z
		sumZ2 += z * z
	}
	// Under density cos θ/π: E[cos θ] = 2/3, E[cos² θ] = 1/2 (direct integration).
	// Standard errors: sd(cos θ) = √(1/2 − 4/9) ≈ 0.236, so 5σ ≈ 0.0019 at n = 4e5.
	if m := sumZ / n; math.Abs(m-2.0/3) > 0.0019 {
		t.Errorf("E[cos] = %v, want 2/3", m)
	}
	if m := sumZ2 / n; math.Abs(m-0.5) > 0.0019 {
		t.Errorf("E[cos²] = %v, want 1/2", m)
	}
	if p := CosineHemispherePDF(1); p != 1/math.Pi {
		t.Errorf("PDF(1) = %v", p)
	}
}

func TestUniformTriangle(t *testing.T) {
	// The mean of a uniform point on a triangle is its centroid: E[b1] = E[b2] = 1/3.
	s := NewStream(9, 0, 0)
	const n = 300000
	var m1, m2 float64
	for range n {
		b1, b2 := UniformTriangle(s.Float64(), s.Float64())
		if b1 < 0 || b2 < 0 || b1+b2 > 1 {
			t.Fatalf("(%v,%v) outside the triangle", b1, b2)
		}
		m1 += b1
		m2 += b2
	}
	// sd of b1 is √(1/18) ≈ 0.236; 5σ/√n ≈ 0.0022.
	if math.Abs(m1/n-1.0/3) > 0.0022 || math.Abs(m2/n-1.0/3) > 0.0022 {
		t.Errorf("mean barycentrics (%v, %v), want 1/3", m1/n, m2/n)
	}
}

func TestAlias(t *testing.T) {
	w := []float64{0, 1, 2, 3, 4, 0.5}
	a := NewAlias(w)
	s := NewStream(5, 0, 0)
	const n = 1000000
	counts := make([]int, len(w))
	for range n {
		counts[a.Pick(s.Float64())]++
	}
	total := 10.5
	for i, c := range counts {
		p := w[i] / total
		sd := math.Sqrt(p * (1 - p) / n)
		if math.Abs(float64(c)/n-p) > 5*sd+1e-12 {
			t.Errorf("index %d: frequency %v, want %v ± %v", i, float64(c)/n, p, 5*sd)
		}
	}
}

// A labelled table returns the labels with the indices' frequencies.
func TestLabeledAlias(t *testing.T) {
	w := map[int32]float64{70: 3, 71: 0, 72: 1}
	a := NewLabeledAlias([]int32{70, 71, 72}, func(l int32) float64 { return w[l] })
	s := NewStream(9, 0, 0)
	const n = 400000
	counts := map[int32]int{}
	for range n {
		counts[a.Pick(s.Float64())]++
	}
	if len(counts) != 2 || counts[71] != 0 {
		t.Fatalf("labels drawn: %v, want only 70 and 72", counts)
	}
	// p = 3/4: sd = √(p(1−p)/n) ≈ 6.8e-4; allow 5 sd.
	if f := float64(counts[70]) / n; f < 0.75-0.0035 || f > 0.75+0.0035 {
		t.Errorf("label 70 drawn with frequency %v, want 0.75", f)
	}
}

func TestAllocs(t *testing.T) {
	s := NewStream(1, 2, 3)
	a := NewAlias([]float64{1, 2, 3})
	if n := testing.AllocsPerRun(100, func() {
		u := s.Float64()
		_ = a.Pick(u)
		CosineHemisphere(u, s.Float64())
	}); n != 0 {
		t.Errorf("%v allocations per sample, want 0", n)
	}
}

// BenchmarkRay draws the numbers and warps of one ray.
func BenchmarkRay(b *testing.B) {
	s := NewStream(1, 2, 3)
	a := NewAlias([]float64{1, 2, 3, 4})
	var sink float64
	for b.Loop() {
		k := a.Pick(s.Float64())
		b1, b2 := UniformTriangle(s.Float64(), s.Float64())
		x, y, z := CosineHemisphere(s.Float64(), s.Float64())
		sink += float64(k) + b1 + b2 + x + y + z
	}
	_ = sink
}
