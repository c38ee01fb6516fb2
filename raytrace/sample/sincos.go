package sample

// sinCos returns math.Sin(x) and math.Cos(x), bit for bit, for |x| < 2²⁹
// (the reduction below is exact only there; ConcentricDisk needs
// |x| ≤ 3π/4). The two share their reduction to an octant and the square
// of the reduced angle, and skip the checks for NaN, infinities and huge
// arguments; ray generation called both, and they were a tenth of the
// bench's time per ray. The method and coefficients are Cephes's (S. L.
// Moshier, "Methods and Programs for Mathematical Functions", 1989), which
// Go's math package also uses; a test checks the results are identical to
// it, so that rays, and so every output, stay the same to the bit.
func sinCos(x float64) (sin, cos float64) {
	const (
		pi4A       = 7.85398125648498535156e-1 // π/4 split in three parts, the first two exact in few bits
		pi4B       = 3.77489470793079817668e-8
		pi4C       = 2.69515142907905952645e-15
		s0         = 1.58962301576546568060e-10 // sin(z) ≈ z + z³·P(z²)
		s1         = -2.50507477628578072866e-8
		s2         = 2.75573136213857245213e-6
		s3         = -1.98412698295895385996e-4
		s4         = 8.33333333332211858878e-3
		s5         = -1.66666666666666307295e-1
		c0         = -1.13585365213876817300e-11 // cos(z) ≈ 1 − z²/2 + z⁴·Q(z²)
		c1         = 2.08757008419747316778e-9
		c2         = -2.75573141792967388112e-7
		c3         = 2.48015872888517045348e-5
		c4         = -1.38888888888730564116e-3
		c5         = 4.16666666666665929218e-2
		fourOverPi = 4 / 3.14159265358979323846264338327950288419716939937510582097494459
	)
	if x == 0 {
		return x, 1
	}
	sinNeg := x < 0
	if sinNeg {
		x = -x
	}
	// The octant j of x and the angle z from its nearest multiple of π/4
	// (an even octant, so that |z| ≤ π/4).
	j := uint64(x * fourOverPi)
	y := float64(j)
	if j&1 == 1 {
		j++
		y++
	}
	j &= 7
	z := ((x - y*pi4A) - y*pi4B) - y*pi4C
	cosNeg := false
	if j > 3 {
		j -= 4
		sinNeg, cosNeg = !sinNeg, !cosNeg
	}
	if j > 1 {
		cosNeg = !cosNeg
	}
	zz := z * z
	ps := z + z*zz*((((((s0*zz)+s1)*zz+s2)*zz+s3)*zz+s4)*zz+s5)
	pc := 1.0 - 0.5*zz + zz*zz*((((((c0*zz)+c1)*zz+c2)*zz+c3)*zz+c4)*zz+c5)
	if j == 1 || j == 2 {
		sin, cos = pc, ps
	} else {
		sin, cos = ps, pc
	}
	if sinNeg {
		sin = -sin
	}
	if cosNeg {
		cos = -cos
	}
	return sin, cos
}
