package geometry

// Ray is a half-line Origin + t·Dir for t in (TMin, TMax). Dir need not be
// unit length; t is then measured in units of |Dir|.
type Ray struct {
	Origin, Dir Vec3
	TMin, TMax  float64
}

// At returns the point Origin + t·Dir.
func (r Ray) At(t float64) Vec3 { return r.Origin.Add(r.Dir.Scale(t)) }
