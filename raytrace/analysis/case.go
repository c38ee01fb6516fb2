package analysis

import (
	"fmt"
	"math"
	"path/filepath"
	"slices"
	"strings"

	"github.com/hemiray/hemiray/raytrace"
)

// Case is a thermal case: the model's mesh files, the ray settings, the
// ambient, and per surface its emissivity, sidedness and boundary
// condition. The command decodes it from TOML (the tags are the keys
// README.md documents); a Go program may fill it directly.
type Case struct {
	// Path is the case file, for messages; Dir is the folder relative
	// paths (mesh files, the output folder) are taken from.
	Path string `toml:"-"`
	Dir  string `toml:"-"`

	Model    ModelSpec              `toml:"model"`
	Rays     RaySpec                `toml:"rays"`
	Ambient  AmbientSpec            `toml:"ambient"`
	Output   OutputSpec             `toml:"output"`
	Defaults SurfaceSpec            `toml:"defaults"`
	Surfaces map[string]SurfaceSpec `toml:"surfaces"`
	// Suns are parallel beams from far away ([[sun]] tables): positions
	// of the sun through a day or around an orbit, each its own steady
	// state.
	Suns []SunSpec `toml:"sun"`
	// Sky is diffuse light alike from every direction, added to every
	// sun's state (or a state of its own without suns).
	Sky SkySpec `toml:"sky"`
}

// ModelSpec lists the mesh files and how to read them.
type ModelSpec struct {
	Files   []string `toml:"files"`
	Units   string   `toml:"units"`    // m (default), cm, mm, in, ft
	GroupBy string   `toml:"group_by"` // "group" (default) or "material"
	// Names gives the surface of a single-surface file (a binary STL, say)
	// a name, keyed by the file as listed in Files: two exports whose
	// headers say the same then load together.
	Names map[string]string `toml:"names"`
	// Rename renames surfaces after loading; old names renamed alike
	// become one surface (one radiation node).
	Rename map[string]string `toml:"rename"`
	// NodeMap is a CSV file "facet,node" naming the node of single facets
	// (0-based facet index in load order, as facets.csv and model.vtp
	// number them); facets it leaves out stay in their surface's node.
	NodeMap string `toml:"node_map"`
}

// RaySpec is the case's [rays] table; zero values take the defaults of
// raytrace.Settings.
type RaySpec struct {
	PerNode    int64   `toml:"per_node"`
	HalfWidth  float64 `toml:"halfwidth"`
	MaxPerNode int64   `toml:"max_per_node"`
	Seed       uint64  `toml:"seed"`
	Confidence float64 `toml:"confidence"`
	Facets     bool    `toml:"facets"`
	Replicates int     `toml:"replicates"`
	Sampling   string  `toml:"sampling"` // "rqmc" or "mc"
	// FollowReflections follows rays through reflections even when every
	// surface is diffuse and opaque (a specular or transmitting surface
	// always makes a run follow them): absorption factors instead of view
	// factors, without the uniform-irradiation premise of the view-factor
	// route.
	FollowReflections bool `toml:"follow_reflections"`
}

// AmbientSpec is the blackbody surroundings that escaping rays reach.
type AmbientSpec struct {
	Temperature *float64 `toml:"temperature"` // K
}

// OutputSpec says where results go.
type OutputSpec struct {
	Dir string `toml:"dir"`
	Up  string `toml:"up"` // the model's up axis for pictures: "z" (default) or "y"
	// CSV is "all" (the default) or "compact": no per-pair CSV files and no
	// tallies.csv (the .mtx files and tallies.bin carry the same numbers).
	CSV string `toml:"csv"`
	// DropConductors leaves out of the conductance files every conductor
	// that carries less than this share of both its nodes' emission
	// (0, the default, keeps all); each node's dropped share goes to
	// nodes.csv.
	DropConductors float64 `toml:"drop_conductors"`
	// Conductances false skips the total exchange areas and the
	// conductance files: their cost grows as nodes × entries of F, an hour
	// and more for 10⁴ nodes that all see each other.
	Conductances *bool `toml:"conductances"`
}

// SurfaceSpec is the settings of one node (or the defaults). Unset values
// are nil.
type SurfaceSpec struct {
	Emissivity *float64 `toml:"emissivity"`
	// Specular is the share of the reflected energy reflected as by a
	// mirror; Transmittance the share of incident energy a thin two-sided
	// sheet lets through. Either makes the run follow rays through
	// reflections (raytrace.Optics).
	Specular      *float64 `toml:"specular"`
	Transmittance *float64 `toml:"transmittance"`
	// The solar band's optics, for [[sun]] beams: absorptance, the mirror
	// share of reflection, and a sheet's transmittance.
	SolarAbsorptance   *float64 `toml:"solar_absorptance"`
	SolarSpecular      *float64 `toml:"solar_specular"`
	SolarTransmittance *float64 `toml:"solar_transmittance"`
	TwoSided           *bool    `toml:"two_sided"`
	Flip               *bool    `toml:"flip"`
	Temperature        *float64 `toml:"temperature"`
	HeatFlux           *float64 `toml:"heat_flux"`
	HeatFlow           *float64 `toml:"heat_flow"`
	Adiabatic          *bool    `toml:"adiabatic"`
	// Split makes several nodes of the surface: "grid NxM" or "patches".
	Split string `toml:"split"`
}

// DefaultReplicates is the number of replicates for heat-flow intervals
// when a case does not set rays.replicates.
const DefaultReplicates = raytrace.DefaultReplicates

// KeyError is a problem with one key of a case; Key is its path, e.g.
// ["surfaces", "board", "emissivity"] (a table when the last part names one).
type KeyError struct {
	Key []string
	Msg string
}

func (e *KeyError) Error() string { return strings.Join(e.Key, ".") + ": " + e.Msg }

func keyErr(key []string, format string, args ...any) error {
	return &KeyError{Key: key, Msg: fmt.Sprintf(format, args...)}
}

// Limits of physical inputs: beyond them a value is a typing error, and
// T⁴ or a flow would overflow into +Inf in the outputs.
const (
	maxTemperature = 1e5  // K
	maxHeat        = 1e15 // W or W/m²
)

// Validate checks the case's values (not yet its surface names, which need
// the mesh: see Open) and names the first key at fault.
func (c *Case) Validate() error {
	if len(c.Model.Files) == 0 {
		return keyErr([]string{"model", "files"}, "model.files lists no mesh file")
	}
	if g := c.Model.GroupBy; g != "" && g != "group" && g != "material" {
		return keyErr([]string{"model", "group_by"}, "group_by is %q; use \"group\" or \"material\"", g)
	}
	r := c.Rays
	switch {
	case r.PerNode < 0:
		return keyErr([]string{"rays", "per_node"}, "per_node must be positive")
	case r.MaxPerNode < 0:
		return keyErr([]string{"rays", "max_per_node"}, "max_per_node must be positive")
	case !(r.HalfWidth >= 0 && r.HalfWidth < 0.5):
		return keyErr([]string{"rays", "halfwidth"}, "halfwidth %v is not in (0, 0.5)", r.HalfWidth)
	case !(r.Confidence >= 0 && r.Confidence < 1):
		return keyErr([]string{"rays", "confidence"}, "confidence %v is not in (0, 1)", r.Confidence)
	case r.Sampling != "" && r.Sampling != raytrace.SamplingRQMC && r.Sampling != raytrace.SamplingMC:
		return keyErr([]string{"rays", "sampling"}, "sampling is %q; use %q or %q", r.Sampling, raytrace.SamplingRQMC, raytrace.SamplingMC)
	case r.Replicates < 0 || r.Replicates == 1:
		return keyErr([]string{"rays", "replicates"}, "replicates must be 0 (the default, %d) or at least 2", DefaultReplicates)
	}
	if t := c.Ambient.Temperature; t != nil && !(*t >= 0 && *t <= maxTemperature) {
		return keyErr([]string{"ambient", "temperature"}, "ambient temperature %v K is outside [0, %g]", *t, maxTemperature)
	}
	if v := c.Output.CSV; v != "" && v != "all" && v != "compact" {
		return keyErr([]string{"output", "csv"}, "csv is %q; use \"all\" or \"compact\"", v)
	}
	if d := c.Output.DropConductors; !(d >= 0 && d < 1) {
		return keyErr([]string{"output", "drop_conductors"}, "drop_conductors %v is not a share in [0, 1)", d)
	}
	if u := c.Output.Up; u != "" && u != "z" && u != "y" {
		return keyErr([]string{"output", "up"}, "up is %q; use \"z\" or \"y\"", u)
	}
	if err := c.checkSuns(); err != nil {
		return err
	}
	if err := checkSpec([]string{"defaults"}, c.Defaults); err != nil {
		return err
	}
	for _, name := range sortedKeys(c.Surfaces) {
		if err := checkSpec([]string{"surfaces", name}, c.Surfaces[name]); err != nil {
			return err
		}
	}
	return nil
}

func checkSpec(table []string, sp SurfaceSpec) error {
	key := func(k string) []string { return append(append([]string{}, table...), k) }
	if e := sp.Emissivity; e != nil && !(*e > 0 && *e <= 1) {
		return keyErr(key("emissivity"), "emissivity %v is outside (0, 1]", *e)
	}
	for _, band := range []struct {
		absorb, spec, trans      *float64
		absorbKey, specKey, tKey string
	}{
		{sp.Emissivity, sp.Specular, sp.Transmittance, "emissivity", "specular", "transmittance"},
		{sp.SolarAbsorptance, sp.SolarSpecular, sp.SolarTransmittance, "solar_absorptance", "solar_specular", "solar_transmittance"},
	} {
		if v := band.absorb; v != nil && !(*v > 0 && *v <= 1) {
			return keyErr(key(band.absorbKey), "%s %v is outside (0, 1]", band.absorbKey, *v)
		}
		if v := band.spec; v != nil && !(*v >= 0 && *v <= 1) {
			return keyErr(key(band.specKey), "%s %v is outside [0, 1] (the share of reflection that is mirror-like)", band.specKey, *v)
		}
		if v := band.trans; v != nil && !(*v >= 0 && *v < 1) {
			return keyErr(key(band.tKey), "%s %v is outside [0, 1)", band.tKey, *v)
		}
		if e, v := band.absorb, band.trans; e != nil && v != nil && *e+*v > 1 {
			return keyErr(key(band.tKey), "%s %v and %s %v add up to more than 1", band.absorbKey, *e, band.tKey, *v)
		}
	}
	if t := sp.Temperature; t != nil && !(*t > 0 && *t <= maxTemperature) {
		return keyErr(key("temperature"), "temperature %v K must be positive (kelvin) and at most %g", *t, maxTemperature)
	}
	for _, v := range []struct {
		name string
		x    *float64
	}{{"heat_flux", sp.HeatFlux}, {"heat_flow", sp.HeatFlow}} {
		if v.x != nil && !(math.Abs(*v.x) <= maxHeat) {
			return keyErr(key(v.name), "%s %v is not a finite number of at most %g in size", v.name, *v.x, maxHeat)
		}
	}
	if sp.Split != "" && sp.Split != "patches" {
		var nx, ny int
		var rest string
		if n, _ := fmt.Sscanf(sp.Split, "grid %dx%d%s", &nx, &ny, &rest); n != 2 || nx < 1 || ny < 1 || nx*ny > 1<<20 {
			return keyErr(key("split"), "split is %q; use \"patches\" or \"grid NxM\" (N, M ≥ 1)", sp.Split)
		}
	}
	if n := sp.conditions(); n > 1 {
		return keyErr(table, "[%s] sets %d boundary conditions; give one of temperature, heat_flux, heat_flow or adiabatic", strings.Join(table, "."), n)
	}
	if sp.Adiabatic != nil && !*sp.Adiabatic {
		return keyErr(key("adiabatic"), "adiabatic = false is not a condition; give temperature, heat_flux or heat_flow instead")
	}
	return nil
}

func (sp SurfaceSpec) conditions() int {
	n := 0
	for _, set := range []bool{sp.Temperature != nil, sp.HeatFlux != nil, sp.HeatFlow != nil, sp.Adiabatic != nil} {
		if set {
			n++
		}
	}
	return n
}

// IsTwoSided reports whether the spec declares a two-sided sheet.
func (sp SurfaceSpec) IsTwoSided() bool { return sp.TwoSided != nil && *sp.TwoSided }

// IsFlipped reports whether the spec flips the surface's facets.
func (sp SurfaceSpec) IsFlipped() bool { return sp.Flip != nil && *sp.Flip }

// Spec returns the settings of node name: its own table over the defaults.
// A node that sets a condition replaces the default condition.
func (c *Case) Spec(name string) SurfaceSpec {
	out := c.Defaults
	own, ok := c.Surfaces[name]
	if !ok {
		return out
	}
	if own.conditions() > 0 {
		out.Temperature, out.HeatFlux, out.HeatFlow, out.Adiabatic = nil, nil, nil, nil
	}
	for _, f := range []struct{ dst, src **float64 }{
		{&out.Emissivity, &own.Emissivity}, {&out.Temperature, &own.Temperature},
		{&out.Specular, &own.Specular}, {&out.Transmittance, &own.Transmittance},
		{&out.SolarAbsorptance, &own.SolarAbsorptance}, {&out.SolarSpecular, &own.SolarSpecular},
		{&out.SolarTransmittance, &own.SolarTransmittance},
		{&out.HeatFlux, &own.HeatFlux}, {&out.HeatFlow, &own.HeatFlow},
	} {
		if *f.src != nil {
			*f.dst = *f.src
		}
	}
	if own.Split != "" {
		out.Split = own.Split
	}
	for _, f := range []struct{ dst, src **bool }{
		{&out.TwoSided, &own.TwoSided}, {&out.Flip, &own.Flip}, {&out.Adiabatic, &own.Adiabatic},
	} {
		if *f.src != nil {
			*f.dst = *f.src
		}
	}
	return out
}

// Settings returns the ray settings of the case for the given surface
// names (two-sided and flipped lists come from the surface tables).
func (c *Case) Settings(surfaces []string) raytrace.Settings {
	r := c.Rays
	s := raytrace.Settings{
		Units: c.Model.Units, GroupByMaterial: c.Model.GroupBy == "material", Names: c.Model.Names, Rename: c.Model.Rename,
		FacetNodes: r.Facets, Rays: r.PerNode, HalfWidth: r.HalfWidth, MaxRays: r.MaxPerNode,
		Seed: r.Seed, Confidence: r.Confidence, Replicates: r.Replicates, NodeMap: c.Model.NodeMap, Sampling: r.Sampling,
	}
	if s.Seed == 0 {
		s.Seed = 1
	}
	for _, name := range surfaces {
		sp := c.Spec(name)
		if sp.IsTwoSided() {
			s.TwoSided = append(s.TwoSided, name)
		}
		if sp.IsFlipped() {
			s.Flipped = append(s.Flipped, name)
		}
		if sp.Split != "" {
			if s.Split == nil {
				s.Split = map[string]string{}
			}
			s.Split[name] = sp.Split
		}
	}
	return s
}

// OutputDir returns the case's output folder, relative to the case file,
// or "" when the case names none.
func (c *Case) OutputDir() string {
	d := c.Output.Dir
	if d == "" || filepath.IsAbs(d) {
		return d
	}
	return filepath.Join(c.Dir, d)
}

func sortedKeys[V any](m map[string]V) []string {
	keys := make([]string, 0, len(m))
	for k := range m {
		keys = append(keys, k)
	}
	slices.Sort(keys)
	return keys
}
