// Package geometry holds the small value types the rest of hemiray is built
// on: Vec3, Ray, Box and Triangle, in float64 and SI units.
//
// # Conventions
//
// Space is right-handed. A triangle's front is the side its counter-clockwise
// normal (v1−v0)×(v2−v0) points to. Boxes start inverted (Min = +Inf,
// Max = −Inf) so that a union is a plain component-wise min/max; a box of zero
// thickness (a flat, axis-aligned CAD face) is a valid, non-empty box.
//
// Nothing here allocates, prints or reads a file.
package geometry
