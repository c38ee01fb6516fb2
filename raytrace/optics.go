package raytrace

import (
	"fmt"
	"math"
	"strings"

	"github.com/hemiray/hemiray/mesh"
)

// Optics are the long-wave (infrared) optical properties of one side of a
// surface, for runs that follow rays through reflections and
// transmissions (Settings.Optics). The surface is gray within the band, so
// its absorptance equals its emissivity (Kirchhoff's law); what it does
// not absorb or transmit it reflects (ρ = 1 − ε − τ), the share Specular
// of that as a mirror does and the rest diffusely.
type Optics struct {
	Emissivity float64 `json:"emissivity"`
	// Specular is the share of the reflected energy reflected as by a
	// mirror (0: diffuse, 1: ideal mirror).
	Specular float64 `json:"specular,omitempty"`
	// Transmittance is the share of the incident energy that passes
	// straight through a thin two-sided sheet (no refraction offset).
	Transmittance float64 `json:"transmittance,omitempty"`
}

// String describes the optics in the words of the case file.
func (o Optics) String() string {
	return fmt.Sprintf("emissivity %g, specular %g, transmittance %g", o.Emissivity, o.Specular, o.Transmittance)
}

// Check reports a property outside its range.
func (o Optics) Check() error {
	switch {
	case !(o.Emissivity > 0 && o.Emissivity <= 1):
		return fmt.Errorf("emissivity %v is outside (0, 1]", o.Emissivity)
	case !(o.Specular >= 0 && o.Specular <= 1):
		return fmt.Errorf("specular %v is outside [0, 1]", o.Specular)
	case !(o.Transmittance >= 0 && o.Transmittance < 1):
		return fmt.Errorf("transmittance %v is outside [0, 1)", o.Transmittance)
	case o.Emissivity+o.Transmittance > 1+1e-12:
		return fmt.Errorf("emissivity %v and transmittance %v add up to more than 1", o.Emissivity, o.Transmittance)
	}
	return nil
}

// Plain reports whether the side is opaque and diffuse: following rays
// over such surfaces only gives Gebhart's factors, which the view factors
// give too.
func (o Optics) Plain() bool { return o.Specular == 0 && o.Transmittance == 0 }

// fate holds one node's interaction thresholds for a uniform number u of a
// ray that meets it: absorbed when u < absorb, passed through when
// u < transmit, mirrored when u < mirror, else reflected diffusely.
type fate struct {
	absorb, transmit, mirror float64
}

// fates returns the interaction thresholds of every node from the optics
// of its surface side (keyed NAME, and NAME.back for the back of a
// two-sided surface). Every node needs its side's optics; a transmitting
// surface must be two-sided, with the same transmittance both ways.
func fates(m *mesh.Mesh, nodes []Node, optics map[string]Optics) ([]fate, error) {
	fs := make([]fate, len(nodes))
	for i, n := range nodes {
		surf := m.Surfaces[n.Surface].Name
		key := surf
		if n.Back {
			key += ".back"
		}
		o, ok := optics[key]
		if !ok {
			return nil, fmt.Errorf("rays followed through reflections need the optics of every surface side: none for %s", key)
		}
		if err := o.Check(); err != nil {
			return nil, fmt.Errorf("optics of %s: %w", key, err)
		}
		if o.Transmittance > 0 {
			other := surf + ".back"
			if n.Back {
				other = surf
			}
			b, ok := optics[other]
			if !ok {
				return nil, fmt.Errorf("%s transmits (transmittance %v), so it must be a two-sided sheet", surf, o.Transmittance)
			}
			if b.Transmittance != o.Transmittance {
				return nil, fmt.Errorf("the two sides of %s transmit differently (%v and %v): a sheet transmits alike both ways", surf, o.Transmittance, b.Transmittance)
			}
		}
		rho := math.Max(0, 1-o.Emissivity-o.Transmittance)
		fs[i] = fate{absorb: o.Emissivity, transmit: o.Emissivity + o.Transmittance}
		fs[i].mirror = fs[i].transmit + rho*o.Specular
	}
	return fs, nil
}

// checkOpticsKeys refuses optics for surface sides the model does not
// have, so that a misspelt name cannot pass unnoticed.
func checkOpticsKeys(m *mesh.Mesh, optics map[string]Optics) error {
	for key := range optics {
		base := strings.TrimSuffix(key, ".back")
		if m.SurfaceIndex(key) < 0 && m.SurfaceIndex(base) < 0 {
			return fmt.Errorf("optics are given for %q, which is not a surface of the model", key)
		}
	}
	return nil
}
