package report

import (
	"fmt"
	"io"
	"path/filepath"

	"github.com/hemiray/hemiray/raytrace/analysis"
)

// writeSolar writes solar.csv: per node its area and, for every sun, the
// power it absorbs (W), the interval half-width and the absorbed flux
// (W/m² of the node's area); and surfaces_NAME.csv, the steady state of
// each sun. It returns the names written.
func writeSolar(dir string, a *analysis.Result) ([]string, error) {
	if len(a.Suns) == 0 {
		return nil, nil
	}
	err := writeCSV(filepath.Join(dir, "solar.csv"), func(emit func(...string)) error {
		head := []string{"node", "area_m2"}
		for _, s := range a.Suns {
			head = append(head, s.Name+"_W", s.Name+"_halfwidth_W", s.Name+"_W_per_m2")
		}
		emit(head...)
		for i, n := range a.Nodes {
			rec := []string{n.Name, num(n.Area)}
			for _, s := range a.Suns {
				rec = append(rec, num(s.Load[i]), num(s.LoadHalf[i]), num(s.Load[i]/n.Area))
			}
			emit(rec...)
		}
		return nil
	})
	if err != nil {
		return nil, err
	}
	written := []string{"solar.csv"}
	for k := range a.Suns {
		name := fmt.Sprintf("surfaces_%s.csv", a.Suns[k].Name)
		if err := writeSurfacesFile(filepath.Join(dir, name), a, &a.Suns[k]); err != nil {
			return nil, err
		}
		written = append(written, name)
	}
	return written, nil
}

// sunLines prints a line per sun: its power over the model's outline, what
// the nodes absorb of it and what leaves.
func sunLines(w io.Writer, a *analysis.Result) {
	for _, s := range a.Suns {
		total := 0.0
		for _, l := range s.Load {
			total += l
		}
		fmt.Fprintf(w, "sun %s: the nodes absorb %.6g W, %.6g W leaves the model (solar.csv, surfaces_%s.csv)\n", s.Name, total, s.Escaped, s.Name)
	}
	if len(a.Suns) > 1 {
		fmt.Fprintf(w, "the table above and surfaces.csv are the steady state under sun %s\n", a.Suns[0].Name)
	}
}
