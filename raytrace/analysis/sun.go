package analysis

import (
	"context"
	"fmt"
	"math"
	"regexp"

	"github.com/hemiray/hemiray/geometry"
	"github.com/hemiray/hemiray/raytrace"
	"github.com/hemiray/hemiray/raytrace/exchange"
)

// SunSpec is one [[sun]] table: a parallel beam of Irradiance W/m² (on a
// plane normal to it) coming from the direction Toward points to (from
// the model towards the sun), or from Azimuth and Elevation in degrees:
// elevation above the horizontal plane, azimuth counter-clockwise seen
// from above, from +x. Up is the case's output.up axis (z, or y).
type SunSpec struct {
	Name       string    `toml:"name"`
	Toward     []float64 `toml:"toward"`
	Azimuth    *float64  `toml:"azimuth"`
	Elevation  *float64  `toml:"elevation"`
	Irradiance float64   `toml:"irradiance"`
	Rays       int64     `toml:"rays"` // default DefaultSunRays
}

// DefaultSunRays is the number of rays of a sun without its own count.
const DefaultSunRays = 1000000

// sunName is what a sun may be called: its name goes into file names.
var sunName = regexp.MustCompile(`^[A-Za-z0-9_-]{1,40}$`)

// checkSuns checks the [[sun]] tables.
func (c *Case) checkSuns() error {
	seen := map[string]bool{}
	for k, s := range c.Suns {
		key := []string{"sun", fmt.Sprint(k + 1)}
		switch {
		case !sunName.MatchString(s.Name):
			return keyErr(key, "sun %d needs a name of letters, digits, _ or - (up to 40; it names the output files), not %q", k+1, s.Name)
		case seen[s.Name]:
			return keyErr(key, "two suns are called %q", s.Name)
		case !(s.Irradiance > 0 && s.Irradiance <= maxHeat):
			return keyErr(key, "sun %s: irradiance %v W/m² must be positive (about 1361 W/m² above the atmosphere near Earth)", s.Name, s.Irradiance)
		case s.Rays < 0 || s.Rays > 1<<40:
			return keyErr(key, "sun %s: rays %d is outside [1, 2^40]", s.Name, s.Rays)
		}
		seen[s.Name] = true
		angles := s.Azimuth != nil || s.Elevation != nil
		switch {
		case s.Toward != nil && angles:
			return keyErr(key, "sun %s: give toward or azimuth and elevation, not both", s.Name)
		case s.Toward != nil:
			if len(s.Toward) != 3 {
				return keyErr(key, "sun %s: toward needs three numbers [x, y, z]", s.Name)
			}
			if v := (geometry.Vec3{X: s.Toward[0], Y: s.Toward[1], Z: s.Toward[2]}); !v.IsFinite() || !(v.Len() > 0) {
				return keyErr(key, "sun %s: toward %v is not a direction", s.Name, s.Toward)
			}
		case s.Azimuth == nil || s.Elevation == nil:
			return keyErr(key, "sun %s: give its direction as toward = [x, y, z] or as azimuth and elevation (degrees)", s.Name)
		case !(math.Abs(*s.Elevation) <= 90) || !(math.Abs(*s.Azimuth) <= 360):
			return keyErr(key, "sun %s: elevation %v must be in [-90, 90] and azimuth %v in [-360, 360] degrees", s.Name, *s.Elevation, *s.Azimuth)
		}
	}
	return nil
}

// toward returns the unit vector from the model towards sun s.
func (c *Case) toward(s SunSpec) geometry.Vec3 {
	if s.Toward != nil {
		return geometry.Vec3{X: s.Toward[0], Y: s.Toward[1], Z: s.Toward[2]}.Normalize()
	}
	az, el := *s.Azimuth*math.Pi/180, *s.Elevation*math.Pi/180
	h, up := math.Cos(el), math.Sin(el)
	if c.Output.Up == "y" { // z up turned to y up: (x, y, z) → (x, z, −y)
		return geometry.Vec3{X: h * math.Cos(az), Y: up, Z: -h * math.Sin(az)}
	}
	return geometry.Vec3{X: h * math.Cos(az), Y: h * math.Sin(az), Z: up}
}

// sunlight returns the case's beams and the solar optics of every surface
// side (nil, nil without suns).
func (c *Case) sunlight(surfaces []string) ([]raytrace.Beam, map[string]raytrace.Optics, error) {
	if len(c.Suns) == 0 {
		return nil, nil, nil
	}
	optics, err := c.bandOptics(surfaces, solar)
	if err != nil {
		return nil, nil, err
	}
	beams := make([]raytrace.Beam, len(c.Suns))
	for k, s := range c.Suns {
		beams[k] = raytrace.Beam{Name: s.Name, Direction: c.toward(s).Scale(-1), Irradiance: s.Irradiance, Rays: s.Rays}
		if beams[k].Rays == 0 {
			beams[k].Rays = DefaultSunRays
		}
	}
	return beams, optics, nil
}

// TraceSun traces the case's suns onto the nodes (threads ≤ 0: GOMAXPROCS)
// and keeps the result in in.Sunlight. The beams' numbers depend only on
// the seed, so every run and solve of a case gets the same loads.
func (in *Input) TraceSun(ctx context.Context, threads int) error {
	if len(in.Beams) == 0 {
		return nil
	}
	opts := in.Options()
	opts.Threads = threads
	ir, err := raytrace.Irradiate(ctx, in.Mesh, opts, in.Beams, in.Solar)
	if err != nil {
		return err
	}
	in.Sunlight = ir
	return nil
}

// SunState is one sun's absorbed power and the steady state with it.
type SunState struct {
	Name string
	// Load is the power each node absorbs, W, and LoadHalf its interval
	// half-width; Escaped the power that leaves the model, W.
	Load, LoadHalf []float64
	Escaped        float64
	Solution       *exchange.Solution
	THalf, QHalf   []float64
	// Beam is the sun as traced; LaunchArea its launch rectangle (m²) and
	// BackShare the share of its rays that ended on the back of a
	// one-sided surface.
	Beam                  raytrace.Beam
	LaunchArea, BackShare float64
}

// state is one steady state to solve: its name and its loads per node
// (pooled for replicate −1, else of that replicate; nil without loads).
type state struct {
	name string
	load func(rep int) []float64
}

// states lists the steady states of the case: one without sunlight, or
// one per sun.
func (in *Input) states(n int) []state {
	ir := in.Sunlight
	if ir == nil {
		return []state{{load: func(int) []float64 { return nil }}}
	}
	var out []state
	for b := range ir.Beams {
		out = append(out, state{name: ir.Beams[b].Name, load: func(rep int) []float64 {
			if rep < 0 || rep >= ir.Replicates() {
				load := make([]float64, n)
				for j := range load {
					load[j], _ = ir.Absorbed(b, j)
				}
				return load
			}
			return ir.Replicate(rep, b)
		}})
	}
	return out
}
