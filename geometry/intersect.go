package geometry

import "math"

// Shear holds the per-ray constants of the watertight ray–triangle test of
// Woop, Benthin & Wald, "Watertight ray/triangle intersection", J. Computer
// Graphics Techniques 2(1), 2013. The ray is translated to the origin and
// sheared so that it runs along +z; each triangle is then tested in 2-D with
// edge functions computed from the same transformed vertices for both
// triangles of a shared edge, so a ray through an edge or a vertex cannot
// slip between neighbours.
type Shear struct {
	o          [3]float64
	kx, ky, kz int
	sx, sy, sz float64
}

// NewShear prepares the test for rays from o along d (d ≠ 0).
func NewShear(o, d Vec3) Shear {
	dd := [3]float64{d.X, d.Y, d.Z}
	kz := 0
	if math.Abs(dd[1]) > math.Abs(dd[kz]) {
		kz = 1
	}
	if math.Abs(dd[2]) > math.Abs(dd[kz]) {
		kz = 2
	}
	kx, ky := (kz+1)%3, (kz+2)%3
	if dd[kz] < 0 { // keep the winding of the projected triangle
		kx, ky = ky, kx
	}
	return Shear{
		o:  [3]float64{o.X, o.Y, o.Z},
		kx: kx, ky: ky, kz: kz,
		sx: dd[kx] / dd[kz], sy: dd[ky] / dd[kz], sz: 1 / dd[kz],
	}
}

// diffProd returns a·b − c·d with each product rounded separately. The
// explicit conversions forbid the compiler to fuse them into an FMA (the Go
// spec allows fusing otherwise), which would break the exact antisymmetry
// of shared edges. When the rounded result is zero the exact sign is
// recovered from the products' rounding errors, which are exact with FMA;
// that is the paper's fallback to higher precision.
func diffProd(a, b, c, d float64) float64 {
	p, q := float64(a*b), float64(c*d)
	r := p - q
	if r == 0 && p == q {
		r = math.FMA(a, b, -p) - math.FMA(c, d, -q)
	}
	return r
}

// Triangle tests the ray against triangle (a, b, c) for hits with
// 0 < t < tMax. It returns the distance t (in units of the ray's direction
// length), the barycentric weights b1 of b and b2 of c, and whether the
// front (the side (b−a)×(c−a) points to) was hit.
func (s *Shear) Triangle(a, b, c *[3]float64, tMax float64) (t, b1, b2 float64, front, ok bool) {
	kx, ky, kz := s.kx, s.ky, s.kz
	az, bz, cz := a[kz]-s.o[kz], b[kz]-s.o[kz], c[kz]-s.o[kz]
	ax := a[kx] - s.o[kx] - s.sx*az
	ay := a[ky] - s.o[ky] - s.sy*az
	bx := b[kx] - s.o[kx] - s.sx*bz
	by := b[ky] - s.o[ky] - s.sy*bz
	cx := c[kx] - s.o[kx] - s.sx*cz
	cy := c[ky] - s.o[ky] - s.sy*cz

	u := diffProd(cx, by, cy, bx)
	v := diffProd(ax, cy, ay, cx)
	w := diffProd(bx, ay, by, ax)
	if (u < 0 || v < 0 || w < 0) && (u > 0 || v > 0 || w > 0) {
		return 0, 0, 0, false, false
	}
	det := u + v + w
	if det == 0 {
		return 0, 0, 0, false, false
	}
	az, bz, cz = s.sz*az, s.sz*bz, s.sz*cz
	tt := float64(u*az) + float64(v*bz) + float64(w*cz)
	// Compare t = tt/det with (0, tMax) without dividing.
	if det > 0 {
		if tt <= 0 || tt >= tMax*det {
			return 0, 0, 0, false, false
		}
	} else if tt >= 0 || tt <= tMax*det {
		return 0, 0, 0, false, false
	}
	inv := 1 / det
	// det > 0 exactly when the ray meets the counter-clockwise side.
	return tt * inv, v * inv, w * inv, det > 0, true
}

// IntersectTriangle is the watertight test of one ray against one triangle,
// for hits with r.TMin < t < r.TMax. It is the reference the BVH is checked
// against; the BVH calls Shear.Triangle directly.
func IntersectTriangle(r Ray, tri Triangle) (t, b1, b2 float64, front, ok bool) {
	s := NewShear(r.Origin, r.Dir)
	a, b, c := tri.V0.Array(), tri.V1.Array(), tri.V2.Array()
	t, b1, b2, front, ok = s.Triangle(&a, &b, &c, r.TMax)
	if ok && t <= r.TMin {
		ok = false
	}
	return
}

// Array returns v as [X, Y, Z].
func (v Vec3) Array() [3]float64 { return [3]float64{v.X, v.Y, v.Z} }

// gamma(n) bounds the relative rounding error of n float64 operations:
// nu/(1−nu) (Pharr, Jakob & Humphreys, Physically Based Rendering, 3rd ed.,
// sec. 3.9).
func gamma(n float64) float64 {
	const u = 0x1p-53
	return n * u / (1 - n*u)
}

// OffsetOrigin moves point p, computed as b0·a + b1·b + b2·c on triangle
// (a, b, c), off the triangle's plane to the side of unit normal n, by more
// than the rounding error of that computation, so that a ray leaving p
// cannot hit the triangle's own plane again. The offset scales with the
// coordinates' magnitude: no absolute epsilon (pbrt's OffsetRayOrigin,
// Pharr et al. sec. 3.9.5; same goal as Wächter & Binder, Ray Tracing Gems,
// ch. 6, 2019).
func OffsetOrigin(p, a, b, c Vec3, b0, b1, b2 float64, n Vec3) Vec3 {
	g := gamma(7)
	ex := g * (math.Abs(b0*a.X) + math.Abs(b1*b.X) + math.Abs(b2*c.X))
	ey := g * (math.Abs(b0*a.Y) + math.Abs(b1*b.Y) + math.Abs(b2*c.Y))
	ez := g * (math.Abs(b0*a.Z) + math.Abs(b1*b.Z) + math.Abs(b2*c.Z))
	d := math.Abs(n.X)*ex + math.Abs(n.Y)*ey + math.Abs(n.Z)*ez
	o := p.Add(n.Scale(d))
	// Round away from p, so the offset survives the addition's rounding.
	return Vec3{away(o.X, n.X), away(o.Y, n.Y), away(o.Z, n.Z)}
}

func away(x, dir float64) float64 {
	switch {
	case dir > 0:
		return math.Nextafter(x, math.Inf(1))
	case dir < 0:
		return math.Nextafter(x, math.Inf(-1))
	}
	return x
}
