package geometry

import "math"

// The reference catalogue: closed-form diffuse view factors from the
// literature, used by tests and by `hemiray verify` to check the Monte Carlo
// estimator. Each function names its source; configuration numbers are
// those of J.R. Howell's online catalogue of radiation configuration
// factors (also reproduced in Howell, Mengüç, Daun & Siegel, Thermal
// Radiation Heat Transfer, 7th ed., CRC Press 2021, appendix C); the
// numbers and formulas are from memory, and each formula was checked
// against tabulated values or an independent Monte Carlo integration when
// it was added (see viewfactor_test.go).

// FParallelRectangles is the view factor between two directly opposed,
// parallel, equal rectangles a × b at distance c (Howell catalogue C-11).
func FParallelRectangles(a, b, c float64) float64 {
	x, y := a/c, b/c
	x1, y1 := math.Sqrt(1+x*x), math.Sqrt(1+y*y)
	return 2 / (math.Pi * x * y) * (math.Log(x1*y1/math.Sqrt(1+x*x+y*y)) +
		x*y1*math.Atan(x/y1) + y*x1*math.Atan(y/x1) - x*math.Atan(x) - y*math.Atan(y))
}

// FPerpendicularRectangles is the view factor from rectangle 1 (w × l) to
// rectangle 2 (h × l), perpendicular and sharing the edge of length l
// (Howell catalogue C-14).
func FPerpendicularRectangles(w, h, l float64) float64 {
	W, H := w/l, h/l
	W2, H2 := W*W, H*H
	s := math.Sqrt(W2 + H2)
	lnArg := (1 + W2) * (1 + H2) / (1 + W2 + H2) *
		math.Pow(W2*(1+W2+H2)/((1+W2)*(W2+H2)), W2) *
		math.Pow(H2*(1+H2+W2)/((1+H2)*(H2+W2)), H2)
	return (W*math.Atan(1/W) + H*math.Atan(1/H) - s*math.Atan(1/s) + 0.25*math.Log(lnArg)) / (math.Pi * W)
}

// FCoaxialDisks is the view factor from a disk of radius r1 to a parallel,
// coaxial disk of radius r2 at distance h (Howell catalogue C-41).
func FCoaxialDisks(r1, r2, h float64) float64 {
	R1, R2 := r1/h, r2/h
	x := 1 + (1+R2*R2)/(R1*R1)
	return 0.5 * (x - math.Sqrt(x*x-4*(R2/R1)*(R2/R1)))
}

// FConcentricSpheresOuterToInner is the view factor from the inside of a
// sphere of radius r2 to a concentric sphere of radius r1 < r2 inside it:
// (r1/r2)², by reciprocity with F(inner→outer) = 1 (Howell catalogue;
// Incropera & DeWitt, Fundamentals of Heat and Mass Transfer, table of
// two-surface enclosures).
func FConcentricSpheresOuterToInner(r1, r2 float64) float64 { return (r1 / r2) * (r1 / r2) }

// FSphereToDisk is the view factor from a sphere to a coaxial disk of
// radius a whose plane is at distance h > radius from the sphere's centre:
// ½(1 − 1/√(1 + (a/h)²)), independent of the sphere's radius (Howell
// catalogue, sphere to coaxial disk).
func FSphereToDisk(a, h float64) float64 {
	return 0.5 * (1 - 1/math.Sqrt(1+(a/h)*(a/h)))
}

// FLongConcentricCylindersOuterToInner is the view factor from the inside
// of an infinitely long cylinder of radius r2 to a concentric cylinder of
// radius r1 inside it: r1/r2 (reciprocity with F(inner→outer) = 1; same
// sources as the spheres).
func FLongConcentricCylindersOuterToInner(r1, r2 float64) float64 { return r1 / r2 }

// FCoaxialCylindersOuterToInner is the view factor from the inner surface
// of a cylinder of radius r2 to the outer surface of a coaxial cylinder of
// radius r1 < r2, both of length l with their ends flush (Howell
// catalogue, finite concentric cylinders, outer to inner).
func FCoaxialCylindersOuterToInner(r1, r2, l float64) float64 {
	R, L := r2/r1, l/r1
	A := L*L + R*R - 1
	B := L*L - R*R + 1
	return 1/R - 1/(math.Pi*R)*(math.Acos(B/A)-
		1/(2*L)*(math.Sqrt((A+2)*(A+2)-4*R*R)*math.Acos(B/(R*A))+B*math.Asin(1/R)-math.Pi*A/2))
}

// FHingedPlates is the view factor between two infinitely long, equal
// plates that share an edge and open at angle theta (radians):
// 1 − sin(θ/2) (Hottel's crossed-string method; Howell catalogue).
func FHingedPlates(theta float64) float64 { return 1 - math.Sin(theta/2) }
