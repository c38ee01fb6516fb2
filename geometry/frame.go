package geometry

import "math"

// Frame is an orthonormal basis (T, B, N), right-handed: T×B = N.
type Frame struct {
	T, B, N Vec3
}

// NewFrame builds a frame about unit vector n without branches that lose
// precision near the poles (Duff, Burgess, Christensen, Hery, Kensler, Liani
// & Villemin, "Building an orthonormal basis, revisited", JCGT 6(1), 2017).
func NewFrame(n Vec3) Frame {
	sign := math.Copysign(1, n.Z)
	a := -1 / (sign + n.Z)
	b := n.X * n.Y * a
	return Frame{
		T: Vec3{1 + sign*n.X*n.X*a, sign * b, -sign * n.X},
		B: Vec3{b, sign + n.Y*n.Y*a, -n.Y},
		N: n,
	}
}

// ToWorld returns the world direction with local coordinates (x, y, z).
func (f Frame) ToWorld(x, y, z float64) Vec3 {
	return Vec3{
		f.T.X*x + f.B.X*y + f.N.X*z,
		f.T.Y*x + f.B.Y*y + f.N.Y*z,
		f.T.Z*x + f.B.Z*y + f.N.Z*z,
	}
}
