package analysis

import (
	"fmt"

	"github.com/hemiray/hemiray/raytrace"
)

// Follows reports whether the case's rays are followed through reflections:
// when a surface side is specular or transmits in the infrared, or [rays]
// follow_reflections asks for it.
func (c *Case) Follows(surfaces []string) bool {
	if c.Rays.FollowReflections {
		return true
	}
	for _, name := range surfaces {
		sides := []SurfaceSpec{c.Spec(name)}
		if sides[0].IsTwoSided() {
			sides = append(sides, c.Spec(name+".back"))
		}
		for _, sp := range sides {
			if (sp.Specular != nil && *sp.Specular > 0) || (sp.Transmittance != nil && *sp.Transmittance > 0) {
				return true
			}
		}
	}
	return false
}

// band names one spectral band's keys in a surface table and picks them.
type band struct {
	absorbKey, specKey, transKey string
	pick                         func(SurfaceSpec) (absorb, spec, trans *float64)
}

var (
	infrared = band{"emissivity", "specular", "transmittance", func(sp SurfaceSpec) (a, s, t *float64) {
		return sp.Emissivity, sp.Specular, sp.Transmittance
	}}
	solar = band{"solar_absorptance", "solar_specular", "solar_transmittance", func(sp SurfaceSpec) (a, s, t *float64) {
		return sp.SolarAbsorptance, sp.SolarSpecular, sp.SolarTransmittance
	}}
)

// optics returns the infrared optics of every surface side for a run that
// follows rays (nil for one that does not): they fix its tallies, so they
// go into its Settings.
func (c *Case) optics(surfaces []string) (map[string]raytrace.Optics, error) {
	if !c.Follows(surfaces) {
		return nil, nil
	}
	return c.bandOptics(surfaces, infrared)
}

// bandOptics returns one band's optics of every surface side (NAME, and
// NAME.back for a two-sided surface). A sheet's transmittance is that of
// its front table, and only a two-sided sheet may transmit.
func (c *Case) bandOptics(surfaces []string, b band) (map[string]raytrace.Optics, error) {
	out := map[string]raytrace.Optics{}
	for _, name := range surfaces {
		front := c.Spec(name)
		tau := 0.0
		if _, _, t := b.pick(front); t != nil {
			tau = *t
		}
		if tau > 0 && !front.IsTwoSided() {
			return nil, keyErr([]string{"surfaces", name, b.transKey}, "%s transmits, so it must be a thin sheet: set two_sided = true (each side is then a node)", name)
		}
		keys := []string{name}
		if front.IsTwoSided() {
			keys = append(keys, name+".back")
		}
		for _, key := range keys {
			absorb, spec, _ := b.pick(c.Spec(key))
			if absorb == nil {
				return nil, fmt.Errorf("%s: no %s for %s: set it in [surfaces.%q] or [defaults]", c.Path, b.absorbKey, key, key)
			}
			o := raytrace.Optics{Emissivity: *absorb, Transmittance: tau}
			if spec != nil {
				o.Specular = *spec
			}
			if err := o.Check(); err != nil {
				return nil, keyErr([]string{"surfaces", key}, "%s: %v", b.absorbKey, err)
			}
			out[key] = o
		}
	}
	return out, nil
}
