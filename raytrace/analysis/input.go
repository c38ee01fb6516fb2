package analysis

import (
	"crypto/sha256"
	"encoding/csv"
	"encoding/hex"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"slices"
	"strconv"
	"strings"

	"github.com/hemiray/hemiray/mesh"
	"github.com/hemiray/hemiray/raytrace"
)

// Input is a model ready to trace: its mesh, the files it came from and
// the settings that fix its tallies; Case is nil for meshes given directly.
type Input struct {
	Case     *Case
	Mesh     *mesh.Mesh
	Files    []string
	Settings raytrace.Settings
	// NodeOf is the facet → node map read from the case's node_map file
	// (nil without one); NodeMapFile is that file, hashed with the meshes.
	NodeOf      []string
	NodeMapFile string
	// Beams are the case's suns and Solar the solar-band optics of every
	// surface side (nil without suns); Sunlight is what the nodes absorb
	// of them once traced (TraceSun).
	Beams    []raytrace.Beam
	Solar    map[string]raytrace.Optics
	Sunlight *raytrace.Irradiation
}

// Open validates c, loads its meshes, checks its surface tables against
// the model's surfaces and flips the surfaces marked flip.
func Open(c *Case) (*Input, error) {
	if err := c.Validate(); err != nil {
		return nil, err
	}
	unit := mesh.Metre
	if c.Model.Units != "" {
		var err error
		if unit, err = mesh.ParseUnit(c.Model.Units); err != nil {
			return nil, keyErr([]string{"model", "units"}, "%v", err)
		}
	}
	for name := range c.Model.Names {
		if !slices.Contains(c.Model.Files, name) {
			return nil, keyErr([]string{"model", "names"}, "%q is not one of model.files", name)
		}
	}
	var files []string
	m := &mesh.Mesh{}
	for _, listed := range c.Model.Files {
		f := listed
		if !filepath.IsAbs(f) {
			f = filepath.Join(c.Dir, f)
		}
		files = append(files, f)
		part, err := mesh.LoadFile(f, mesh.LoadOptions{Unit: unit, GroupByMaterial: c.Model.GroupBy == "material"})
		if err != nil {
			return nil, err
		}
		if name, ok := c.Model.Names[listed]; ok {
			if len(part.Surfaces) != 1 {
				return nil, keyErr([]string{"model", "names"}, "%s has %d surfaces; [model.names] names the surface of a single-surface file (use [model.rename] for the others)", listed, len(part.Surfaces))
			}
			part.Surfaces[0].Name = name
		}
		if err := m.Append(part); err != nil {
			return nil, fmt.Errorf("%w (or name them in [model.names])", err)
		}
	}
	if len(c.Model.Rename) > 0 {
		if err := m.RenameSurfaces(c.Model.Rename); err != nil {
			return nil, keyErr([]string{"model", "rename"}, "%v", err)
		}
	}
	if err := c.checkSurfaces(m); err != nil {
		return nil, err
	}
	names := SurfaceNames(m)
	for i, name := range names {
		if c.Spec(name).IsFlipped() {
			m.FlipSurface(i)
		}
	}
	in := &Input{Case: c, Mesh: m, Files: files, Settings: c.Settings(names)}
	var err error
	if in.Settings.Optics, err = c.optics(names); err != nil {
		return nil, err
	}
	if in.Beams, in.Solar, err = c.sunlight(names); err != nil {
		return nil, err
	}
	if nm := c.Model.NodeMap; nm != "" {
		in.NodeMapFile = nm
		if !filepath.IsAbs(nm) {
			in.NodeMapFile = filepath.Join(c.Dir, nm)
		}
		var err error
		if in.NodeOf, err = readNodeMap(in.NodeMapFile, len(m.Facets)); err != nil {
			return nil, keyErr([]string{"model", "node_map"}, "%v", err)
		}
	}
	return in, nil
}

// OpenMeshes loads mesh files given without a case; s.Units and
// s.GroupByMaterial say how to read them.
func OpenMeshes(files []string, s raytrace.Settings) (*Input, error) {
	unit, err := mesh.ParseUnit(s.Units)
	if err != nil {
		return nil, err
	}
	s.Units = string(unit)
	m, err := mesh.Load(files, mesh.LoadOptions{Unit: unit, GroupByMaterial: s.GroupByMaterial})
	if err != nil {
		return nil, err
	}
	return &Input{Mesh: m, Files: files, Settings: s}, nil
}

// checkSurfaces checks the names in the surface tables against m.
func (c *Case) checkSurfaces(m *mesh.Mesh) error {
	for _, name := range sortedKeys(c.Surfaces) {
		sp := c.Surfaces[name]
		table := []string{"surfaces", name}
		base, isBack := strings.CutSuffix(name, ".back")
		switch {
		case isBack && m.SurfaceIndex(base) >= 0:
			if !c.Spec(base).IsTwoSided() {
				return keyErr(table, "[surfaces.%q] sets the back of %s, which is not two_sided", name, base)
			}
			if sp.TwoSided != nil || sp.Flip != nil || sp.Split != "" {
				return keyErr(table, "two_sided, flip and split belong to [surfaces.%q], not to its back", base)
			}
			if sp.conditions() > 0 {
				return keyErr(table, "the two sides of %s share one temperature: give its condition in [surfaces.%q]", base, base)
			}
			if sp.Transmittance != nil || sp.SolarTransmittance != nil {
				return keyErr(table, "a sheet transmits alike both ways: give the transmittance of %s in [surfaces.%q]", base, base)
			}
		case m.SurfaceIndex(name) < 0:
			return keyErr(table, "no surface %q in the model; its surfaces are: %s", name, strings.Join(SurfaceNames(m), ", "))
		}
	}
	return nil
}

// SurfaceNames returns the names of m's surfaces in order.
func SurfaceNames(m *mesh.Mesh) []string {
	out := make([]string, len(m.Surfaces))
	for i, s := range m.Surfaces {
		out[i] = s.Name
	}
	return out
}

// Options returns the estimator options of the input (threads and the
// other runtime knobs at their defaults).
func (in *Input) Options() raytrace.Options {
	return raytrace.Options{Settings: in.Settings, NodeOf: in.NodeOf}
}

// Nodes returns the radiation nodes of the input.
func (in *Input) Nodes() ([]raytrace.Node, error) { return raytrace.Nodes(in.Mesh, in.Options()) }

// Digests returns the SHA-256 of every input file.
func (in *Input) Digests() ([]raytrace.FileDigest, error) {
	var out []raytrace.FileDigest
	files := in.Files
	if in.NodeMapFile != "" {
		files = append(slices.Clone(files), in.NodeMapFile)
	}
	for _, f := range files {
		b, err := os.ReadFile(f)
		if err != nil {
			return nil, err
		}
		sum := sha256.Sum256(b)
		abs, err := filepath.Abs(f)
		if err != nil {
			return nil, err
		}
		out = append(out, raytrace.FileDigest{Path: abs, SHA256: hex.EncodeToString(sum[:])})
	}
	return out, nil
}

// Hash returns the input hash: the settings and the files' bytes.
func (in *Input) Hash() (string, error) {
	d, err := in.Digests()
	if err != nil {
		return "", err
	}
	return in.Settings.Hash(d), nil
}

// Preflight checks, before any ray is traced, that every node of a case
// has an emissivity and a boundary condition.
func (in *Input) Preflight() error {
	if in.Case == nil {
		return fmt.Errorf("an exchange solve needs a case file with emissivities and conditions")
	}
	nodes, err := in.Nodes()
	if err != nil {
		return err
	}
	for _, n := range nodes {
		surf := in.Mesh.Surfaces[n.Surface].Name
		if _, err := in.Case.emissivity(surf, n); err != nil {
			return err
		}
		if _, err := condition(in.Case.Spec(surf), 1); err != nil {
			return fmt.Errorf("%s: surface %s: %w", in.Case.Path, surf, err)
		}
	}
	return nil
}

// Describe says in one line what was read: surfaces, facets, total area,
// size and the unit the files were read in — so that a forgotten
// units = "mm" (a 400 m oven) shows before any ray is traced.
func (in *Input) Describe() string {
	b := in.Mesh.Bounds()
	d := b.Max.Sub(b.Min)
	unit := in.Settings.Units
	if unit == "" {
		unit = "m"
	}
	return fmt.Sprintf("model: %d surfaces, %d facets, total area %.4g m², size %.4g × %.4g × %.4g m (files read in %s)",
		len(in.Mesh.Surfaces), len(in.Mesh.Facets), in.Mesh.TotalArea(), d.X, d.Y, d.Z, unit)
}

// Notes are things about the case a user may not have meant: the back of a
// two-sided surface taking the default emissivity while its front has its
// own; and that rays are followed through reflections, which changes what
// the matrices hold.
func (in *Input) Notes() []string {
	if in.Case == nil {
		return nil
	}
	var out []string
	if in.Settings.Optics != nil {
		out = append(out, "rays are followed through reflections and transmissions (a specular or transmitting surface, or follow_reflections): the matrices are absorption factors B (absorption*.csv), not view factors")
	}
	for _, name := range SurfaceNames(in.Mesh) {
		front := in.Case.Surfaces[name]
		back, hasBack := in.Case.Surfaces[name+".back"]
		if in.Case.Spec(name).IsTwoSided() && front.Emissivity != nil && (!hasBack || back.Emissivity == nil) && in.Case.Defaults.Emissivity != nil {
			out = append(out, fmt.Sprintf("the back of two-sided %s takes the default emissivity %g, its front %g: set [surfaces.%q] emissivity if the sides differ",
				name, *in.Case.Defaults.Emissivity, *front.Emissivity, name+".back"))
		}
	}
	return out
}

// readNodeMap reads a facet → node map: CSV lines "facet,node" (a header
// line "facet,node" allowed), facet the 0-based index in load order.
func readNodeMap(path string, facets int) ([]string, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, err
	}
	defer f.Close()
	r := csv.NewReader(f)
	r.FieldsPerRecord = 2
	out := make([]string, facets)
	for line := 1; ; line++ {
		rec, err := r.Read()
		if errors.Is(err, io.EOF) {
			return out, nil
		}
		if err != nil {
			return nil, fmt.Errorf("%s: %w", path, err)
		}
		if line == 1 && rec[0] == "facet" {
			continue
		}
		k, err := strconv.Atoi(strings.TrimSpace(rec[0]))
		name := strings.TrimSpace(rec[1])
		switch {
		case err != nil || k < 0 || k >= facets:
			return nil, fmt.Errorf("%s:%d: facet %q is not an index in [0, %d)", path, line, rec[0], facets)
		case name == "":
			return nil, fmt.Errorf("%s:%d: no node name", path, line)
		case out[k] != "":
			return nil, fmt.Errorf("%s:%d: facet %d is mapped twice", path, line, k)
		}
		out[k] = name
	}
}
