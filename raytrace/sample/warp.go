package sample

import "math"

// UniformTriangle maps (u1, u2) to barycentric weights (b1, b2) of a point
// uniformly distributed over a triangle: p = (1−b1−b2)·a + b1·b + b2·c, with
// b1 = √u1·(1−u2), b2 = √u1·u2 (Osada, Funkhouser, Chazelle & Dobkin,
// "Shape distributions", ACM TOG 21(4), 2002).
func UniformTriangle(u1, u2 float64) (b1, b2 float64) {
	r := math.Sqrt(u1)
	return r * (1 - u2), r * u2
}

// ConcentricDisk maps the unit square to the unit disk keeping strata
// compact (Shirley & Chiu, "A low distortion map between disk and square",
// J. Graphics Tools 2(3), 1997).
func ConcentricDisk(u1, u2 float64) (x, y float64) {
	a, b := 2*u1-1, 2*u2-1
	if a == 0 && b == 0 {
		return 0, 0
	}
	var r, phi float64
	if math.Abs(a) > math.Abs(b) {
		r, phi = a, math.Pi/4*(b/a)
	} else {
		r, phi = b, math.Pi/2-math.Pi/4*(a/b)
	}
	sin, cos := sinCos(phi)
	return r * cos, r * sin
}

// InvertConcentricDisk is the inverse of ConcentricDisk.
func InvertConcentricDisk(x, y float64) (u1, u2 float64) {
	theta := math.Atan2(y, x)
	r := math.Hypot(x, y)
	if theta < -math.Pi/4 {
		theta += 2 * math.Pi
	}
	var a, b float64
	switch {
	case theta < math.Pi/4:
		a, b = r, 4/math.Pi*theta*r
	case theta < 3*math.Pi/4:
		b, a = r, -(4/math.Pi*theta-2)*r
	case theta < 5*math.Pi/4:
		a, b = -r, -(4/math.Pi*theta-4)*r
	default:
		b, a = -r, (4/math.Pi*theta-6)*r
	}
	return (a + 1) / 2, (b + 1) / 2
}

// CosineHemisphere maps (u1, u2) to a direction (x, y, z), z ≥ 0, about the
// +z axis with density cos θ/π: a point of the concentric disk lifted to the
// hemisphere (Malley's method; Pharr et al., Physically Based Rendering).
// This is the direction law of a diffuse (Lambertian) emitter, so the
// fraction of such rays that reach a surface first is the view factor.
func CosineHemisphere(u1, u2 float64) (x, y, z float64) {
	x, y = ConcentricDisk(u1, u2)
	return x, y, math.Sqrt(math.Max(0, 1-x*x-y*y))
}

// CosineHemispherePDF is the density of CosineHemisphere per steradian.
func CosineHemispherePDF(cosTheta float64) float64 { return cosTheta / math.Pi }

// InvertCosineHemisphere returns the (u1, u2) that CosineHemisphere maps to
// the direction (x, y, z).
func InvertCosineHemisphere(x, y, z float64) (u1, u2 float64) {
	return InvertConcentricDisk(x, y)
}

// UniformSphere maps (u1, u2) in [0, 1)² to a uniformly distributed unit
// vector: z uniform in [−1, 1] (Archimedes' hat-box theorem: equal
// heights of a sphere's zones have equal areas; common practice) and the
// azimuth uniform.
func UniformSphere(u1, u2 float64) (x, y, z float64) {
	z = 1 - 2*u1
	r := math.Sqrt(max(0, 1-z*z))
	phi := 2 * math.Pi * u2
	return r * math.Cos(phi), r * math.Sin(phi), z
}
