package main

import (
	"context"
	"encoding/json"
	"flag"
	"io"
	"path/filepath"
	"strings"

	"github.com/hemiray/hemiray/mesh"
	"github.com/hemiray/hemiray/raytrace/analysis"
	"github.com/hemiray/hemiray/raytrace/report"
)

func inspectCommand() *command {
	c := &command{
		Name:      "inspect",
		UsageLine: "inspect [--units U] [--by-material] [--json] (FILE... | CASE.toml)",
		Short:     "report the surfaces of mesh files and check them for defects",
		Long: `Inspect reads STL (binary or ASCII) and OBJ files into one model and
prints a table of its surfaces (facets, area in m², open edges, whether the
winding is consistent) and a summary with warnings: NaN or infinite
coordinates, degenerate and duplicate facets, open (boundary) edges,
non-manifold edges, neighbours with inconsistent winding, and surfaces of zero
area, each with the first few offending facets (file and line for OBJ).

A surface is an OBJ group (g/o), an ASCII STL solid block, or a whole binary
STL file. Warnings do not change the exit status (0); an unreadable file
exits 1.`,
		Flags: flag.NewFlagSet("inspect", flag.ContinueOnError),
	}
	units := c.Flags.String("units", "m", "length unit of the files: m, cm, mm, in or ft")
	byMaterial := c.Flags.Bool("by-material", false, "OBJ: one surface per usemtl material instead of per group")
	asJSON := c.Flags.Bool("json", false, "print the report as JSON")
	c.Run = func(ctx context.Context, args []string, stdout, stderr io.Writer) error {
		files, err := parseArgs(c.Flags, args)
		if err != nil {
			return err
		}
		if len(files) == 0 {
			return usagef("no mesh files given")
		}
		unit, err := mesh.ParseUnit(*units)
		if err != nil {
			return usageError{err.Error()}
		}
		var m *mesh.Mesh
		if len(files) == 1 && strings.EqualFold(filepath.Ext(files[0]), ".toml") {
			var in *analysis.Input // a case: its meshes with its units, names and flips
			if in, err = openCase(files[0]); err == nil {
				m = in.Mesh
			}
		} else {
			m, err = mesh.Load(files, mesh.LoadOptions{Unit: unit, GroupByMaterial: *byMaterial})
		}
		if err != nil && *asJSON {
			json.NewEncoder(stdout).Encode(map[string]string{"error": err.Error()})
			return exitError{err}
		}
		if err != nil {
			return err
		}
		r := mesh.Check(m)
		if *asJSON {
			out := struct {
				Files []report.FileReport `json:"files"`
				mesh.Report
			}{report.FileReports(m), r}
			enc := json.NewEncoder(stdout)
			enc.SetIndent("", "  ")
			return enc.Encode(out)
		}
		report.InspectTable(stdout, m, r)
		return nil
	}
	return c
}
