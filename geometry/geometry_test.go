package geometry

import (
	"math"
	"math/rand/v2"
	"testing"
)

func TestTriangleBasics(t *testing.T) {
	// Right triangle with legs 3 and 4: area 6, normal +z for CCW order (elementary).
	tr := Triangle{Vec3{0, 0, 1}, Vec3{3, 0, 1}, Vec3{0, 4, 1}}
	if a := tr.Area(); a != 6 {
		t.Errorf("Area = %v, want 6", a)
	}
	if n := tr.Normal(); n != (Vec3{0, 0, 1}) {
		t.Errorf("Normal = %v, want +z", n)
	}
	if c := tr.Centroid(); c != (Vec3{1, 4.0 / 3, 1}) {
		t.Errorf("Centroid = %v", c)
	}
	flat := tr.Bounds()
	if flat.IsEmpty() || flat.SurfaceArea() != 2*3*4 {
		t.Errorf("flat box %v: empty %v, area %v, want 24", flat, flat.IsEmpty(), flat.SurfaceArea())
	}
	if !EmptyBox().IsEmpty() || EmptyBox().Union(flat) != flat {
		t.Error("EmptyBox is not the identity of Union")
	}
}

func TestIntersectTriangleFrontBack(t *testing.T) {
	tr := Triangle{Vec3{0, 0, 0}, Vec3{1, 0, 0}, Vec3{0, 1, 0}}
	dirs := []Vec3{{0, 0, -1}, {0.1, 0.2, -1}, {1, 1, -0.5}, {-0.3, 0.1, -0.2}}
	for _, d := range dirs {
		for _, sign := range []float64{1, -1} {
			dir := d.Scale(sign)
			target := Vec3{0.2, 0.3, 0}
			o := target.Sub(dir.Scale(2))
			tt, b1, b2, front, ok := IntersectTriangle(Ray{Origin: o, Dir: dir, TMax: math.Inf(1)}, tr)
			if !ok {
				t.Fatalf("dir %v: miss", dir)
			}
			if math.Abs(tt-2) > 1e-14 || math.Abs(b1-0.2) > 1e-14 || math.Abs(b2-0.3) > 1e-14 {
				t.Errorf("dir %v: t=%v b=(%v,%v), want 2 (0.2,0.3)", dir, tt, b1, b2)
			}
			if want := dir.Z < 0; front != want {
				t.Errorf("dir %v: front=%v, want %v", dir, front, want)
			}
		}
	}
}

// Rays aimed at the shared edges and the shared vertex of a fan of
// triangles, all facing the rays (a shallow cone: no silhouette edge a
// grazing ray could legitimately pass), must hit at least one of them
// (Woop et al. 2013, the watertightness property).
func TestWatertightSharedEdges(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 1))
	const n = 7
	c := Vec3{0.3, -0.2, 0.1}
	var fan []Triangle
	var rim []Vec3
	for i := range n {
		a := 2 * math.Pi * float64(i) / n
		rim = append(rim, Vec3{math.Cos(a), math.Sin(a), 0})
	}
	for i := range n {
		fan = append(fan, Triangle{c, rim[i], rim[(i+1)%n]})
	}
	misses := 0
	for k := 0; k < 200000; k++ {
		// A point exactly on a spoke (shared edge) or the centre vertex.
		i := rng.IntN(n)
		s := rng.Float64()
		if k%10 == 0 {
			s = 0
		}
		target := c.Add(rim[i].Sub(c).Scale(s))
		o := Vec3{rng.Float64()*4 - 2, rng.Float64()*4 - 2, 1 + rng.Float64()}
		hit := false
		for _, tr := range fan {
			if _, _, _, _, ok := IntersectTriangle(Ray{Origin: o, Dir: target.Sub(o), TMax: 2}, tr); ok {
				hit = true
				break
			}
		}
		if !hit {
			misses++
		}
	}
	if misses != 0 {
		t.Errorf("%d of 200000 rays through shared edges missed every triangle", misses)
	}
}

func TestFrameOrthonormal(t *testing.T) {
	rng := rand.New(rand.NewPCG(2, 2))
	ns := []Vec3{{0, 0, 1}, {0, 0, -1}, {1, 0, 0}, {0, -1, 0}}
	for range 1000 {
		ns = append(ns, Vec3{rng.NormFloat64(), rng.NormFloat64(), rng.NormFloat64()}.Normalize())
	}
	for _, n := range ns {
		f := NewFrame(n)
		if math.Abs(f.T.Len()-1) > 1e-14 || math.Abs(f.B.Len()-1) > 1e-14 ||
			math.Abs(f.T.Dot(f.B)) > 1e-14 || f.T.Cross(f.B).Sub(n).Len() > 1e-14 {
			t.Fatalf("NewFrame(%v) = %+v is not right-handed orthonormal", n, f)
		}
	}
}

func TestOffsetOriginClearsPlane(t *testing.T) {
	// Points on triangles far from the origin, offset along the normal, must
	// lie strictly on the normal's side of the exact plane.
	rng := rand.New(rand.NewPCG(3, 3))
	for _, scale := range []float64{1e-3, 1, 1e4} {
		for range 10000 {
			base := Vec3{rng.Float64(), rng.Float64(), rng.Float64()}.Scale(scale * 10)
			a := base
			b := base.Add(Vec3{rng.Float64(), rng.Float64(), rng.Float64()}.Scale(scale))
			c := base.Add(Vec3{rng.Float64(), rng.Float64(), rng.Float64()}.Scale(scale))
			tr := Triangle{a, b, c}
			n := tr.Normal()
			u1, u2 := rng.Float64(), rng.Float64()
			b1, b2 := u1*(1-u2), u1*u2
			p := tr.Point(b1, b2)
			o := OffsetOrigin(p, a, b, c, 1-b1-b2, b1, b2, n)
			// Ray back toward the plane along −n must hit it at t > 0, and a ray
			// along +n must not (the self-hit the offset prevents).
			if _, _, _, _, ok := IntersectTriangle(Ray{Origin: o, Dir: n, TMax: math.Inf(1)}, tr); ok {
				t.Fatalf("scale %g: offset origin still hits its own triangle going away", scale)
			}
		}
	}
}
