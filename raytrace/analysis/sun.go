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

// SkySpec is the [sky] table: diffuse light alike from every direction
// (no ground, no horizon), of Irradiance W/m² on one side of a plate that
// sees nothing but sky.
type SkySpec struct {
	Irradiance float64 `toml:"irradiance"`
	Rays       int64   `toml:"rays"` // default DefaultSunRays
}

// DefaultSunRays is the number of rays of a sun without its own count.
const DefaultSunRays = 1000000

// sunName is what a sun may be called: its name goes into file names.
var sunName = regexp.MustCompile(`^[A-Za-z0-9_-]{1,40}$`)

// checkSuns checks the [[sun]] tables.
func (c *Case) checkSuns() error {
	if sk := c.Sky; !(sk.Irradiance >= 0 && sk.Irradiance <= maxHeat) || sk.Rays < 0 || sk.Rays > 1<<40 {
		return keyErr([]string{"sky"}, "sky irradiance %v W/m² must be in [0, %g] and rays %d in [1, 2^40]", sk.Irradiance, maxHeat, sk.Rays)
	}
	seen := map[string]bool{}
	for k, s := range c.Suns {
		key := []string{"sun", fmt.Sprint(k + 1)}
		switch {
		case !sunName.MatchString(s.Name):
			return keyErr(key, "sun %d needs a name of letters, digits, _ or - (up to 40; it names the output files), not %q", k+1, s.Name)
		case s.Name == "sky":
			return keyErr(key, "\"sky\" names the state under the [sky] alone: call the sun something else")
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
	if len(c.Suns) == 0 && c.Sky.Irradiance == 0 {
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
	if sk := c.Sky; sk.Irradiance > 0 {
		b := raytrace.Beam{Name: "sky", Irradiance: sk.Irradiance, Rays: sk.Rays, Diffuse: true}
		if b.Rays == 0 {
			b.Rays = DefaultSunRays
		}
		beams = append(beams, b)
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
	// Beam is the sun as traced (or the sky, for a state under the sky
	// alone); LaunchArea its launch area (m²) and BackShare the share of
	// its rays that ended on the back of a one-sided surface. Load and
	// Escaped include the sky's when the case has one.
	Beam                  raytrace.Beam
	LaunchArea, BackShare float64
}

// state is one steady state to solve: its name and the beams whose
// absorbed power loads its nodes (a sun, and the sky if the case has one).
type state struct {
	name  string
	beams []int
}

// states lists the steady states of the case: one without sunlight, one
// per sun, or one under the sky alone.
func (in *Input) states() []state {
	ir := in.Sunlight
	if ir == nil {
		return []state{{}}
	}
	sky := -1
	for b, bm := range ir.Beams {
		if bm.Diffuse {
			sky = b
		}
	}
	var out []state
	for b, bm := range ir.Beams {
		if bm.Diffuse {
			continue
		}
		st := state{name: bm.Name, beams: []int{b}}
		if sky >= 0 {
			st.beams = append(st.beams, sky)
		}
		out = append(out, st)
	}
	if len(out) == 0 {
		out = append(out, state{name: ir.Beams[sky].Name, beams: []int{sky}})
	}
	return out
}

// load returns the power each of n nodes absorbs in state s: pooled for
// replicate −1, else of that replicate; nil without beams.
func (in *Input) load(s state, n, rep int) []float64 {
	if len(s.beams) == 0 {
		return nil
	}
	ir := in.Sunlight
	out := make([]float64, n)
	for _, b := range s.beams {
		if rep >= 0 && rep < ir.Replicates() {
			for j, w := range ir.Replicate(rep, b) {
				out[j] += w
			}
			continue
		}
		for j := range out {
			w, _ := ir.Absorbed(b, j)
			out[j] += w
		}
	}
	return out
}

// sunState fills in a state's loads, their half-widths (the beams are
// independent: half-widths add in quadrature) and what leaves the model.
func (in *Input) sunState(s state, n int) SunState {
	ir := in.Sunlight
	out := SunState{Name: s.name, Load: in.load(s, n, -1), LoadHalf: make([]float64, n)}
	for _, b := range s.beams {
		for j := range n {
			_, h := ir.Absorbed(b, j)
			out.LoadHalf[j] = math.Hypot(out.LoadHalf[j], h)
		}
		out.Escaped += ir.Escaped(b)
	}
	b := s.beams[0]
	out.Beam, out.LaunchArea, out.BackShare = ir.Beams[b], ir.LaunchArea[b], ir.Back[b]
	return out
}
