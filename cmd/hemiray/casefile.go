package main

import (
	"bytes"
	"errors"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strings"

	"github.com/pelletier/go-toml/v2"

	"github.com/hemiray/hemiray/mesh"
)

// caseFile is a case as written in TOML; README.md documents every key.
type caseFile struct {
	Model struct {
		Files   []string `toml:"files"`
		Units   string   `toml:"units"`
		GroupBy string   `toml:"group_by"`
	} `toml:"model"`
	Rays struct {
		PerNode    int64   `toml:"per_node"`
		HalfWidth  float64 `toml:"halfwidth"`
		MaxPerNode int64   `toml:"max_per_node"`
		Seed       uint64  `toml:"seed"`
		Confidence float64 `toml:"confidence"`
		Facets     bool    `toml:"facets"`
		Replicates int     `toml:"replicates"`
	} `toml:"rays"`
	Ambient struct {
		Temperature *float64 `toml:"temperature"`
	} `toml:"ambient"`
	Output struct {
		Dir string `toml:"dir"`
	} `toml:"output"`
	Defaults surfaceSpec            `toml:"defaults"`
	Surfaces map[string]surfaceSpec `toml:"surfaces"`
}

// surfaceSpec is the settings of one node (or the defaults).
type surfaceSpec struct {
	Emissivity  *float64 `toml:"emissivity"`
	TwoSided    *bool    `toml:"two_sided"`
	Flip        *bool    `toml:"flip"`
	Temperature *float64 `toml:"temperature"`
	HeatFlux    *float64 `toml:"heat_flux"`
	HeatFlow    *float64 `toml:"heat_flow"`
	Adiabatic   *bool    `toml:"adiabatic"`
}

// loadedCase is a case file read and checked, with its mesh loaded.
type loadedCase struct {
	path string // the case file
	doc  []byte
	c    caseFile
	dir  string // folder of the case file: mesh paths are relative to it
	mesh *mesh.Mesh
}

// caseError is a problem at a line of a case file.
func caseError(path string, line int, format string, args ...any) error {
	if line > 0 {
		return fmt.Errorf("%s:%d: %s", path, line, fmt.Sprintf(format, args...))
	}
	return fmt.Errorf("%s: %s", path, fmt.Sprintf(format, args...))
}

// readCase parses and checks a case file and loads its meshes.
func readCase(path string) (*loadedCase, error) {
	doc, err := os.ReadFile(path)
	if err != nil {
		return nil, err
	}
	lc := &loadedCase{path: path, doc: doc, dir: filepath.Dir(path)}
	dec := toml.NewDecoder(bytes.NewReader(doc))
	dec.DisallowUnknownFields()
	if err := dec.Decode(&lc.c); err != nil {
		var strict *toml.StrictMissingError
		var de *toml.DecodeError
		switch {
		case errors.As(err, &strict) && len(strict.Errors) > 0:
			e := strict.Errors[0]
			line, _ := e.Position()
			return nil, caseError(path, line, "unknown key %q (README.md lists the keys)", strings.Join(e.Key(), "."))
		case errors.As(err, &de):
			line, _ := de.Position()
			return nil, caseError(path, line, "%s", strings.TrimPrefix(de.Error(), "toml: "))
		}
		return nil, caseError(path, 0, "%v", err)
	}
	c := &lc.c
	if len(c.Model.Files) == 0 {
		return nil, caseError(path, lc.line([]string{"model"}, "files"), "model.files lists no mesh file")
	}
	unit := mesh.Metre
	if c.Model.Units != "" {
		if unit, err = mesh.ParseUnit(c.Model.Units); err != nil {
			return nil, caseError(path, lc.line([]string{"model"}, "units"), "%v", err)
		}
	}
	if g := c.Model.GroupBy; g != "" && g != "group" && g != "material" {
		return nil, caseError(path, lc.line([]string{"model"}, "group_by"), "group_by is %q; use \"group\" or \"material\"", g)
	}
	if r := c.Rays; r.PerNode < 0 || r.MaxPerNode < 0 || r.HalfWidth < 0 || r.HalfWidth >= 0.5 || r.Confidence < 0 || r.Confidence >= 1 || r.Replicates < 0 || r.Replicates == 1 {
		return nil, caseError(path, lc.line([]string{"rays"}, ""), "rays: per_node and max_per_node must be positive, halfwidth in (0, 0.5), confidence in (0, 1), replicates 0 or at least 2")
	}
	if t := c.Ambient.Temperature; t != nil && !(*t >= 0) {
		return nil, caseError(path, lc.line([]string{"ambient"}, "temperature"), "ambient temperature %v K is negative", *t)
	}
	var files []string
	for _, f := range c.Model.Files {
		if !filepath.IsAbs(f) {
			f = filepath.Join(lc.dir, f)
		}
		files = append(files, f)
	}
	lc.mesh, err = mesh.Load(files, mesh.LoadOptions{Unit: unit, GroupByMaterial: c.Model.GroupBy == "material"})
	if err != nil {
		return nil, err
	}
	if err := lc.checkSurfaces(); err != nil {
		return nil, err
	}
	for i, s := range lc.mesh.Surfaces {
		if lc.spec(s.Name).flip() {
			lc.mesh.FlipSurface(i)
		}
	}
	return lc, nil
}

// checkSurfaces checks names and values of the surface tables.
func (lc *loadedCase) checkSurfaces() error {
	var known []string
	for _, s := range lc.mesh.Surfaces {
		known = append(known, s.Name)
	}
	if err := lc.checkSpec([]string{"defaults"}, lc.c.Defaults); err != nil {
		return err
	}
	for name, sp := range lc.c.Surfaces {
		table := []string{"surfaces", name}
		base, isBack := strings.CutSuffix(name, ".back")
		switch {
		case isBack && lc.mesh.SurfaceIndex(base) >= 0:
			if !lc.spec(base).twoSided() {
				return caseError(lc.path, lc.line(table, ""), "[surfaces.%q] sets the back of %s, which is not two_sided", name, base)
			}
			if sp.TwoSided != nil || sp.Flip != nil {
				return caseError(lc.path, lc.line(table, ""), "two_sided and flip belong to [surfaces.%q], not to its back", base)
			}
			if sp.conditions() > 0 {
				return caseError(lc.path, lc.line(table, ""), "the two sides of %s share one temperature: give its condition in [surfaces.%q]", base, base)
			}
		case lc.mesh.SurfaceIndex(name) < 0:
			return caseError(lc.path, lc.line(table, ""), "no surface %q in the model; its surfaces are: %s", name, strings.Join(known, ", "))
		}
		if err := lc.checkSpec(table, sp); err != nil {
			return err
		}
	}
	return nil
}

func (lc *loadedCase) checkSpec(table []string, sp surfaceSpec) error {
	if e := sp.Emissivity; e != nil && !(*e > 0 && *e <= 1) {
		return caseError(lc.path, lc.line(table, "emissivity"), "emissivity %v is outside (0, 1]", *e)
	}
	if t := sp.Temperature; t != nil && !(*t > 0) {
		return caseError(lc.path, lc.line(table, "temperature"), "temperature %v K must be positive (kelvin)", *t)
	}
	for _, v := range []*float64{sp.HeatFlux, sp.HeatFlow} {
		if v != nil && (math.IsNaN(*v) || math.IsInf(*v, 0)) {
			return caseError(lc.path, lc.line(table, ""), "heat flux or flow is not a finite number")
		}
	}
	if n := sp.conditions(); n > 1 {
		return caseError(lc.path, lc.line(table, ""), "[%s] sets %d boundary conditions; give one of temperature, heat_flux, heat_flow or adiabatic", strings.Join(table, "."), n)
	}
	if sp.Adiabatic != nil && !*sp.Adiabatic {
		return caseError(lc.path, lc.line(table, "adiabatic"), "adiabatic = false is not a condition; give temperature, heat_flux or heat_flow instead")
	}
	return nil
}

func (sp surfaceSpec) conditions() int {
	n := 0
	for _, set := range []bool{sp.Temperature != nil, sp.HeatFlux != nil, sp.HeatFlow != nil, sp.Adiabatic != nil} {
		if set {
			n++
		}
	}
	return n
}

func (sp surfaceSpec) twoSided() bool { return sp.TwoSided != nil && *sp.TwoSided }
func (sp surfaceSpec) flip() bool     { return sp.Flip != nil && *sp.Flip }

// spec returns the settings of node name: its own table over the defaults.
// A node that sets a condition replaces the default condition.
func (lc *loadedCase) spec(name string) surfaceSpec {
	out := lc.c.Defaults
	own, ok := lc.c.Surfaces[name]
	if !ok {
		return out
	}
	if own.conditions() > 0 {
		out.Temperature, out.HeatFlux, out.HeatFlow, out.Adiabatic = nil, nil, nil, nil
	}
	for _, f := range []struct{ dst, src **float64 }{
		{&out.Emissivity, &own.Emissivity}, {&out.Temperature, &own.Temperature},
		{&out.HeatFlux, &own.HeatFlux}, {&out.HeatFlow, &own.HeatFlow},
	} {
		if *f.src != nil {
			*f.dst = *f.src
		}
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

// twoSidedSurfaces lists the surfaces declared two-sided.
func (lc *loadedCase) twoSidedSurfaces() []string {
	var out []string
	for _, s := range lc.mesh.Surfaces {
		if lc.spec(s.Name).twoSided() {
			out = append(out, s.Name)
		}
	}
	return out
}

// line finds the line of key in table (of the table header when key is
// ""), or 0. The TOML library reports positions of syntax errors only, so
// checks of values look their keys up here.
func (lc *loadedCase) line(table []string, key string) int {
	cur := []string{}
	header := 0
	for i, raw := range strings.Split(string(lc.doc), "\n") {
		l := strings.TrimSpace(raw)
		if strings.HasPrefix(l, "[") && !strings.HasPrefix(l, "[[") {
			cur = splitKey(strings.Trim(l[:strings.Index(l+"]", "]")], "[ "))
			if equalKeys(cur, table) {
				header = i + 1
				if key == "" {
					return header
				}
			}
			continue
		}
		if key != "" && equalKeys(cur, table) {
			if k, _, ok := strings.Cut(l, "="); ok && strings.Trim(strings.TrimSpace(k), `"`) == key {
				return i + 1
			}
		}
	}
	return header
}

// splitKey splits a dotted TOML key, keeping quoted parts whole.
func splitKey(s string) []string {
	var parts []string
	var b strings.Builder
	quoted := false
	for _, r := range s {
		switch {
		case r == '"':
			quoted = !quoted
		case r == '.' && !quoted:
			parts = append(parts, strings.TrimSpace(b.String()))
			b.Reset()
		default:
			b.WriteRune(r)
		}
	}
	return append(parts, strings.TrimSpace(b.String()))
}

func equalKeys(a, b []string) bool {
	if len(a) != len(b) {
		return false
	}
	for i := range a {
		if a[i] != b[i] {
			return false
		}
	}
	return true
}
