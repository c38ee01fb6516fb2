package geometry

// Triangle is three vertices in counter-clockwise order seen from the front.
type Triangle struct {
	V0, V1, V2 Vec3
}

// Cross returns (V1−V0)×(V2−V0): the front normal scaled by twice the area.
func (t Triangle) Cross() Vec3 { return t.V1.Sub(t.V0).Cross(t.V2.Sub(t.V0)) }

// Area returns the triangle's area, half the length of Cross.
func (t Triangle) Area() float64 { return 0.5 * t.Cross().Len() }

// Normal returns the unit front normal, or zero for a degenerate triangle.
func (t Triangle) Normal() Vec3 { return t.Cross().Normalize() }

// Centroid returns the mean of the three vertices.
func (t Triangle) Centroid() Vec3 { return t.V0.Add(t.V1).Add(t.V2).Scale(1.0 / 3) }

// Bounds returns the triangle's bounding box.
func (t Triangle) Bounds() Box { return EmptyBox().Extend(t.V0).Extend(t.V1).Extend(t.V2) }

// Point returns the point with barycentric weights (1−b1−b2, b1, b2).
func (t Triangle) Point(b1, b2 float64) Vec3 {
	return t.V0.Scale(1 - b1 - b2).Add(t.V1.Scale(b1)).Add(t.V2.Scale(b2))
}
