package report

import (
	"io"
	"path/filepath"

	"github.com/hemiray/hemiray/raytrace"
	"github.com/hemiray/hemiray/raytrace/internal/atomicfile"
)

// SquareLimit is the node count above which the square matrix files are
// not written (the pairs files carry every non-zero entry).
const SquareLimit = 2000

// columns returns the column names of the square files: the nodes, then
// the ambient — always, so the files' layout never depends on whether a
// ray happened to escape.
func columns(res *raytrace.Result) []string {
	cols := make([]string, 0, len(res.Nodes)+1)
	for _, n := range res.Nodes {
		cols = append(cols, n.Name)
	}
	return append(cols, "ambient")
}

// writeViewFactors writes the raw view factors, their half-widths and the
// pairs file; it returns the names written.
func writeViewFactors(dir string, res *raytrace.Result, pairs bool) ([]string, error) {
	var written []string
	cols := columns(res)
	nm := namesFor(res.Options.Optics != nil)
	if len(res.Nodes) <= SquareLimit {
		for _, f := range []struct {
			name  string
			value func(raytrace.Factor) float64
		}{
			{nm.stem + ".csv", func(f raytrace.Factor) float64 { return f.F }},
			{nm.stem + "_halfwidth.csv", func(f raytrace.Factor) float64 { return f.HalfWidth }},
		} {
			err := writeCSV(filepath.Join(dir, f.name), func(emit func(...string)) error {
				emit(append([]string{"from"}, cols...)...)
				for i, n := range res.Nodes {
					rec := []string{n.Name}
					for j := range cols {
						rec = append(rec, num(f.value(res.Factor(i, j))))
					}
					emit(rec...)
				}
				return nil
			})
			if err != nil {
				return nil, err
			}
			written = append(written, f.name)
		}
	}
	if !pairs {
		return written, nil
	}
	err := atomicfile.WriteLarge(filepath.Join(dir, nm.stem+"_pairs.csv"), func(w io.Writer) error {
		lw := newLineWriter(w)
		lw.buf = append(lw.buf, "from,to,"+nm.symbol+","+nm.symbol+"_lo,"+nm.symbol+"_hi,stderr,halfwidth,hits,rays\n"...)
		var werr error
		for i, n := range res.Nodes {
			res.Row(i, func(j int, f raytrace.Factor) {
				lw.name(n.Name)
				lw.name(cols[j])
				lw.float(f.F)
				lw.float(f.Lo) // the Wilson interval is not centred on F
				lw.float(f.Hi)
				lw.float(f.StdErr)
				lw.float(f.HalfWidth)
				lw.int(f.Hits)
				lw.int(f.Rays)
				if err := lw.end(); err != nil && werr == nil {
					werr = err
				}
			})
		}
		if werr != nil {
			return werr
		}
		return lw.flush()
	})
	if err != nil {
		return nil, err
	}
	written = append(written, nm.stem+"_pairs.csv")
	return written, nil
}
