package mesh

import (
	"fmt"
	"strings"
)

// Unit is a length unit a mesh file is written in.
type Unit string

// The length units hemiray reads. Everything inside is metres.
const (
	Metre      Unit = "m"
	Centimetre Unit = "cm"
	Millimetre Unit = "mm"
	Inch       Unit = "in"
	Foot       Unit = "ft"
)

// Metres returns the length of one u in metres (exact by definition of the
// inch as 25.4 mm and the foot as 12 in).
func (u Unit) Metres() float64 {
	switch u {
	case Metre, "":
		return 1
	case Centimetre:
		return 0.01
	case Millimetre:
		return 0.001
	case Inch:
		return 0.0254
	case Foot:
		return 0.3048
	}
	return 0
}

// ParseUnit reads a unit name (m, cm, mm, in, ft; case-insensitive).
func ParseUnit(s string) (Unit, error) {
	u := Unit(strings.ToLower(strings.TrimSpace(s)))
	if u.Metres() == 0 || u == "" {
		return "", fmt.Errorf("unknown length unit %q (use m, cm, mm, in or ft)", s)
	}
	return u, nil
}
