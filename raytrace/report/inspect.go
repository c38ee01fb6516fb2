package report

import (
	"fmt"
	"io"
	"sort"
	"strings"
	"text/tabwriter"

	"github.com/hemiray/hemiray/mesh"
)

// FileReport is one mesh file in inspect's JSON.
type FileReport struct {
	Path    string         `json:"path"`
	Format  string         `json:"format"`
	Unit    string         `json:"unit"`
	Facets  int            `json:"facets"`
	Ignored map[string]int `json:"ignored_lines,omitempty"`
}

// FileReports describes the files a mesh was read from.
func FileReports(m *mesh.Mesh) []FileReport {
	var out []FileReport
	for _, s := range m.Sources {
		out = append(out, FileReport{s.Path, s.Format, string(s.Unit), s.Facets, s.Ignored})
	}
	return out
}

// InspectTable prints the files, the surface table, the model's size and
// the mesh checks' findings.
func InspectTable(w io.Writer, m *mesh.Mesh, r mesh.Report) {
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
		fmt.Fprintf(w, "closed: yes (every edge joins exactly two consistently wound facets); normals point %s", r.Normals)
		if r.Normals == "inward" {
			fmt.Fprintln(w, " (an enclosure radiating into its inside)")
		} else {
			fmt.Fprintln(w, " (a solid body radiating outwards; flip it if it is an enclosure)")
		}
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
