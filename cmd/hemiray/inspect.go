package main

import (
	"context"
	"encoding/json"
	"flag"
	"fmt"
	"io"
	"sort"
	"strings"
	"text/tabwriter"

	"github.com/hemiray/hemiray/mesh"
)

func inspectCommand() *command {
	c := &command{
		Name:      "inspect",
		UsageLine: "inspect [--units U] [--by-material] [--json] FILE...",
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
		m, err := mesh.Load(files, mesh.LoadOptions{Unit: unit, GroupByMaterial: *byMaterial})
		if err != nil {
			return err
		}
		r := mesh.Check(m)
		if *asJSON {
			out := struct {
				Files []fileReport `json:"files"`
				mesh.Report
			}{fileReports(m), r}
			enc := json.NewEncoder(stdout)
			enc.SetIndent("", "  ")
			return enc.Encode(out)
		}
		printInspect(stdout, m, r)
		return nil
	}
	return c
}

type fileReport struct {
	Path    string         `json:"path"`
	Format  string         `json:"format"`
	Unit    string         `json:"unit"`
	Facets  int            `json:"facets"`
	Ignored map[string]int `json:"ignored_lines,omitempty"`
}

func fileReports(m *mesh.Mesh) []fileReport {
	var out []fileReport
	for _, s := range m.Sources {
		out = append(out, fileReport{s.Path, s.Format, string(s.Unit), s.Facets, s.Ignored})
	}
	return out
}

func printInspect(w io.Writer, m *mesh.Mesh, r mesh.Report) {
	for _, s := range m.Sources {
		fmt.Fprintf(w, "%s: %s, %d facets, unit %s", s.Path, s.Format, s.Facets, s.Unit)
		if len(s.Ignored) > 0 {
			var keys []string
			for k, n := range s.Ignored {
				keys = append(keys, fmt.Sprintf("%d %s", n, k))
			}
			sort.Strings(keys)
			fmt.Fprintf(w, "; ignored lines: %s", strings.Join(keys, ", "))
		}
		fmt.Fprintln(w)
	}
	fmt.Fprintln(w)
	tw := tabwriter.NewWriter(w, 0, 4, 2, ' ', 0)
	fmt.Fprintln(tw, "surface\tfacets\tarea_m2\tboundary_edges\twinding\t")
	for _, s := range r.Surfaces {
		wind := "consistent"
		if !s.Winding {
			wind = "INCONSISTENT"
		}
		fmt.Fprintf(tw, "%s\t%d\t%.6g\t%d\t%s\t\n", s.Name, s.Facets, s.AreaM2, s.Open, wind)
	}
	tw.Flush()
	d := [3]float64{r.BoundsMax[0] - r.BoundsMin[0], r.BoundsMax[1] - r.BoundsMin[1], r.BoundsMax[2] - r.BoundsMin[2]}
	fmt.Fprintf(w, "\nmodel: %d surfaces, %d facets, %d vertices, total area %.6g m²\n", len(r.Surfaces), r.Facets, r.Vertices, r.AreaM2)
	fmt.Fprintf(w, "bounds: [%.6g, %.6g, %.6g] to [%.6g, %.6g, %.6g] m (size %.6g × %.6g × %.6g m)\n",
		r.BoundsMin[0], r.BoundsMin[1], r.BoundsMin[2], r.BoundsMax[0], r.BoundsMax[1], r.BoundsMax[2], d[0], d[1], d[2])
	if r.Closed {
		fmt.Fprintln(w, "closed: yes (every edge joins exactly two consistently wound facets)")
	} else {
		fmt.Fprintln(w, "closed: no (rays can leave through open edges; they will count toward ambient)")
	}
	if len(r.Findings) == 0 {
		fmt.Fprintln(w, "warnings: none")
		return
	}
	fmt.Fprintln(w, "warnings:")
	for _, f := range r.Findings {
		fmt.Fprintf(w, "  - %s\n", f.Message)
		if len(f.Examples) > 0 {
			more := ""
			if f.Count > len(f.Examples) {
				more = ", …"
			}
			fmt.Fprintf(w, "    first at: %s%s\n", strings.Join(f.Examples, "; "), more)
		}
	}
}
