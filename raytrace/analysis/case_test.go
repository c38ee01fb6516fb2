package analysis

import (
	"errors"
	"math"
	"strings"
	"testing"
)

// Values that would overflow or make no physical sense are refused at
// validation, naming the key's path, so that no +Inf or NaN reaches a
// result file.
func TestValidateNamesTheKey(t *testing.T) {
	base := func() *Case {
		return &Case{Model: ModelSpec{Files: []string{"m.obj"}}, Surfaces: map[string]SurfaceSpec{}}
	}
	tests := []struct {
		name string
		edit func(c *Case)
		key  string
	}{
		{"huge heat flow", func(c *Case) { c.Surfaces["board"] = SurfaceSpec{HeatFlow: ptr(1e308)} }, "surfaces.board.heat_flow"},
		{"infinite flux", func(c *Case) { c.Defaults.HeatFlux = ptr(math.Inf(1)) }, "defaults.heat_flux"},
		{"NaN flux", func(c *Case) { c.Surfaces["lid"] = SurfaceSpec{HeatFlux: ptr(math.NaN())} }, "surfaces.lid.heat_flux"},
		{"1e100 K", func(c *Case) { c.Surfaces["lid"] = SurfaceSpec{Temperature: ptr(1e100)} }, "surfaces.lid.temperature"},
		{"infinite ambient", func(c *Case) { c.Ambient.Temperature = ptr(math.Inf(1)) }, "ambient.temperature"},
		{"emissivity 0", func(c *Case) { c.Defaults.Emissivity = ptr(0.0) }, "defaults.emissivity"},
		{"NaN confidence", func(c *Case) { c.Rays.Confidence = math.NaN() }, "rays.confidence"},
		{"one replicate", func(c *Case) { c.Rays.Replicates = 1 }, "rays.replicates"},
		{"two conditions", func(c *Case) { c.Surfaces["lid"] = SurfaceSpec{Temperature: ptr(300.0), Adiabatic: ptr(true)} }, "surfaces.lid"},
		{"no files", func(c *Case) { c.Model.Files = nil }, "model.files"},
	}
	for _, tc := range tests {
		c := base()
		tc.edit(c)
		var ke *KeyError
		if err := c.Validate(); !errors.As(err, &ke) || strings.Join(ke.Key, ".") != tc.key {
			t.Errorf("%s: %v, want an error at %s", tc.name, err, tc.key)
		}
	}
	if err := base().Validate(); err != nil {
		t.Errorf("a plain case: %v", err)
	}
}

// The echo before tracing states the size in metres and the unit read, so
// a forgotten units = "mm" shows; a two-sided back silently taking the
// default emissivity is noted.
func TestDescribeAndNotes(t *testing.T) {
	c := &Case{Dir: "../../testdata", Model: ModelSpec{Files: []string{"cabinet_multi.stl"}, Units: "mm"},
		Defaults: SurfaceSpec{Emissivity: ptr(0.9)},
		Surfaces: map[string]SurfaceSpec{"floor": {TwoSided: ptr(true), Emissivity: ptr(0.3)}}}
	in, err := Open(c)
	if err != nil {
		t.Fatal(err)
	}
	if d := in.Describe(); !strings.Contains(d, "2 surfaces") || !strings.Contains(d, "read in mm") {
		t.Errorf("Describe: %s", d)
	}
	if n := in.Notes(); len(n) != 1 || !strings.Contains(n[0], `"floor.back"`) {
		t.Errorf("Notes: %v", n)
	}
}
