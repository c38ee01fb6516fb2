package geometry

import "math"

// Box is an axis-aligned bounding box. The zero-thickness box of a flat,
// axis-aligned face is valid; only the inverted box from EmptyBox is empty.
type Box struct {
	Min, Max Vec3
}

// EmptyBox returns the inverted box that is the identity of Union.
func EmptyBox() Box {
	inf := math.Inf(1)
	return Box{Vec3{inf, inf, inf}, Vec3{-inf, -inf, -inf}}
}

// IsEmpty reports whether b contains no point (Min > Max on some axis).
// A box with Min == Max on an axis is not empty.
func (b Box) IsEmpty() bool {
	return b.Min.X > b.Max.X || b.Min.Y > b.Max.Y || b.Min.Z > b.Max.Z
}

// Extend returns the smallest box holding b and p.
func (b Box) Extend(p Vec3) Box { return Box{b.Min.Min(p), b.Max.Max(p)} }

// Union returns the smallest box holding a and b.
func (b Box) Union(o Box) Box { return Box{b.Min.Min(o.Min), b.Max.Max(o.Max)} }

// Diagonal returns Max − Min (zero or negative components for flat or empty boxes).
func (b Box) Diagonal() Vec3 { return b.Max.Sub(b.Min) }

// Center returns the midpoint of the box.
func (b Box) Center() Vec3 { return b.Min.Add(b.Max).Scale(0.5) }

// SurfaceArea returns the area of the box's six faces, 0 for an empty box.
// A flat box has the area of its two faces, which keeps SAH costs of flat
// CAD faces meaningful.
func (b Box) SurfaceArea() float64 {
	if b.IsEmpty() {
		return 0
	}
	d := b.Diagonal()
	return 2 * (d.X*d.Y + d.Y*d.Z + d.Z*d.X)
}

// LargestAxis returns the axis (0, 1, 2) along which the box is longest.
func (b Box) LargestAxis() int {
	d := b.Diagonal()
	switch {
	case d.X >= d.Y && d.X >= d.Z:
		return 0
	case d.Y >= d.Z:
		return 1
	}
	return 2
}
