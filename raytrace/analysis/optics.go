package analysis

import (
	"fmt"

	"github.com/hemiray/hemiray/raytrace"
)

// Follows reports whether the case's rays are followed through reflections:
// when a surface side is specular or transmits, or [rays]
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

// optics returns the optics of every surface side for a run that follows
// rays (nil for one that does not): they fix its tallies, so they go into
// its Settings. A sheet's transmittance is that of its front table.
func (c *Case) optics(surfaces []string) (map[string]raytrace.Optics, error) {
	if !c.Follows(surfaces) {
		return nil, nil
	}
	out := map[string]raytrace.Optics{}
	for _, name := range surfaces {
		front := c.Spec(name)
		tau := 0.0
		if front.Transmittance != nil {
			tau = *front.Transmittance
		}
		if tau > 0 && !front.IsTwoSided() {
			return nil, keyErr([]string{"surfaces", name, "transmittance"}, "%s transmits, so it must be a thin sheet: set two_sided = true (each side is then a node)", name)
		}
		keys := []string{name}
		if front.IsTwoSided() {
			keys = append(keys, name+".back")
		}
		for _, key := range keys {
			sp := c.Spec(key)
			if sp.Emissivity == nil {
				return nil, fmt.Errorf("%s: no emissivity for %s: set it in [surfaces.%q] or [defaults]", c.Path, key, key)
			}
			o := raytrace.Optics{Emissivity: *sp.Emissivity, Transmittance: tau}
			if sp.Specular != nil {
				o.Specular = *sp.Specular
			}
			if err := o.Check(); err != nil {
				return nil, keyErr([]string{"surfaces", key}, "%v", err)
			}
			out[key] = o
		}
	}
	return out, nil
}
