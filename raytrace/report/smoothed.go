package report

import (
	"io"
	"math"
	"path/filepath"

	"github.com/hemiray/hemiray/raytrace/analysis"
	"github.com/hemiray/hemiray/raytrace/internal/atomicfile"
)

// nodeColumns returns the column names of a's square files: the nodes,
// then the ambient (always; zero for a closed model).
func nodeColumns(a *analysis.Result) []string {
	cols := make([]string, 0, len(a.Nodes)+1)
	for _, n := range a.Nodes {
		cols = append(cols, n.Name)
	}
	return append(cols, "ambient")
}

// smoothedRow fills dense with row i of the smoothed matrix, ambient
// last, and returns it.
func smoothedRow(a *analysis.Result, i int, dense []float64) []float64 {
	clear(dense)
	row := &a.Smoothed.F[i]
	for k, j := range row.Col {
		dense[j] = row.Val[k]
	}
	dense[len(a.Nodes)] = a.Smoothed.Ambient[i]
	return dense
}

// writeSmoothed writes viewfactors_smoothed.csv (up to SquareLimit nodes)
// and viewfactors_smoothed_pairs.csv (absorption_… for absorption factors);
// it returns the names written.
func writeSmoothed(dir string, a *analysis.Result, pairs bool) ([]string, error) {
	var written []string
	cols := nodeColumns(a)
	nm := namesFor(a.Absorption)
	if len(a.Nodes) <= SquareLimit {
		dense := make([]float64, len(cols))
		err := writeCSV(filepath.Join(dir, nm.stem+"_smoothed.csv"), func(emit func(...string)) error {
			emit(append([]string{"from"}, cols...)...)
			for i, n := range a.Nodes {
				rec := []string{n.Name}
				for _, f := range smoothedRow(a, i, dense) {
					rec = append(rec, num(f))
				}
				emit(rec...)
			}
			return nil
		})
		if err != nil {
			return nil, err
		}
		written = append(written, nm.stem+"_smoothed.csv")
	}
	if !pairs {
		return written, nil
	}
	err := atomicfile.WriteLarge(filepath.Join(dir, nm.stem+"_smoothed_pairs.csv"), func(w io.Writer) error {
		lw := newLineWriter(w)
		lw.buf = append(lw.buf, "from,to,"+nm.symbol+"_raw,"+nm.symbol+"_smoothed,moved_stderr\n"...)
		row := func(from, to string, raw, sm, moved float64) error {
			lw.name(from)
			lw.name(to)
			lw.float(raw)
			lw.float(sm)
			if math.IsNaN(moved) { // given factors: no standard error
				lw.sep()
			} else {
				lw.float(moved)
			}
			return lw.end()
		}
		var scratch []float64
		for i, n := range a.Nodes {
			raw, sm := a.RawRow(i, scratch), &a.Smoothed.F[i]
			scratch = raw.Val
			k := 0 // both rows have increasing columns: walk them together
			for m, j := range sm.Col {
				for k < len(raw.Col) && raw.Col[k] < j {
					k++
				}
				r := 0.0
				if k < len(raw.Col) && raw.Col[k] == j {
					r = raw.Val[k]
				}
				if err := row(n.Name, cols[j], r, sm.Val[m], a.Smoothed.Moved(i, m)); err != nil {
					return err
				}
			}
			if a.RawAmbient[i] > 0 || a.Smoothed.Ambient[i] > 0 {
				if err := row(n.Name, "ambient", a.RawAmbient[i], a.Smoothed.Ambient[i], a.Smoothed.MovedAmbient[i]); err != nil {
					return err
				}
			}
		}
		return lw.flush()
	})
	if err != nil {
		return nil, err
	}
	return append(written, nm.stem+"_smoothed_pairs.csv"), nil
}
