package report

import (
	"fmt"
	"io"
	"path/filepath"
	"strconv"

	"github.com/hemiray/hemiray/raytrace"
	"github.com/hemiray/hemiray/raytrace/analysis"
	"github.com/hemiray/hemiray/raytrace/exchange"
	"github.com/hemiray/hemiray/raytrace/internal/atomicfile"
)

// The sparse matrices also go out in the Matrix Market coordinate format
// (Boisvert, Pozo & Remington, "The Matrix Market exchange formats: initial
// design", NIST IR 5935, 1996; from memory), which SciPy (scipy.io.mmread),
// MATLAB, Julia and most sparse solvers read: a banner, a size line, then
// "i j value" with 1-based indices. Index k is the node on line k of
// nodes.csv; index N+1 is the ambient. Only stored entries are written, so
// a facet-level model's file grows with the pairs seen, not with N².

func writeMTX(path, symmetry, comment string, rows, cols, entries int, body func(put func(i, j int, v float64) error) error) error {
	return atomicfile.Write(path, func(w io.Writer) error {
		lw := newLineWriter(w)
		lw.buf = fmt.Appendf(lw.buf, "%%%%MatrixMarket matrix coordinate real %s\n%% %s\n%d %d %d\n", symmetry, comment, rows, cols, entries)
		err := body(func(i, j int, v float64) error {
			lw.buf = strconv.AppendInt(lw.buf, int64(i+1), 10)
			lw.buf = append(lw.buf, ' ')
			lw.buf = strconv.AppendInt(lw.buf, int64(j+1), 10)
			lw.buf = append(lw.buf, ' ')
			lw.buf = strconv.AppendFloat(lw.buf, v, 'g', -1, 64)
			return lw.end()
		})
		if err != nil {
			return err
		}
		return lw.flush()
	})
}

// writeRawMTX writes viewfactors.mtx (absorption.mtx for absorption
// factors): the raw factors, N × (N+1); it returns the file's name.
func writeRawMTX(dir string, res *raytrace.Result) (string, error) {
	n := len(res.Nodes)
	nm := namesFor(res.Options.Optics != nil)
	nnz := 0
	for i := range n {
		nnz += res.Hits[i].Len()
		if res.Escaped[i] > 0 {
			nnz++
		}
	}
	return nm.stem + ".mtx", writeMTX(filepath.Join(dir, nm.stem+".mtx"), "general",
		"hemiray raw "+nm.words+" "+nm.symbol+"(row -> column); index N+1 is the ambient; names in nodes.csv", n, n+1, nnz,
		func(put func(i, j int, v float64) error) error {
			for i := range n {
				row := &res.Hits[i]
				for k, j := range row.Col {
					if err := put(i, int(j), float64(row.Val[k])/float64(res.Rays[i])); err != nil {
						return err
					}
				}
				if res.Escaped[i] > 0 {
					if err := put(i, n, float64(res.Escaped[i])/float64(res.Rays[i])); err != nil {
						return err
					}
				}
			}
			return nil
		})
}

// writeAnalysisMTX writes viewfactors_smoothed.mtx (absorption_smoothed.mtx
// for absorption factors; N × (N+1)) and, when
// the exchange areas were computed, conductances.mtx: σ·A_i·ℱ_ij in W/K⁴,
// symmetric, (N+1) × (N+1) with the ambient last, lower triangle stored.
func writeAnalysisMTX(dir string, a *analysis.Result) ([]string, error) {
	n := len(a.Nodes)
	nm := namesFor(a.Absorption)
	nnz := 0
	for i := range n {
		nnz += a.Smoothed.F[i].Len()
		if a.Smoothed.Ambient[i] > 0 {
			nnz++
		}
	}
	err := writeMTX(filepath.Join(dir, nm.stem+"_smoothed.mtx"), "general",
		"hemiray smoothed "+nm.words+" "+nm.symbol+"(row -> column); index N+1 is the ambient; names in nodes.csv", n, n+1, nnz,
		func(put func(i, j int, v float64) error) error {
			for i := range n {
				row := &a.Smoothed.F[i]
				for k, j := range row.Col {
					if err := put(i, int(j), row.Val[k]); err != nil {
						return err
					}
				}
				if f := a.Smoothed.Ambient[i]; f > 0 {
					if err := put(i, n, f); err != nil {
						return err
					}
				}
			}
			return nil
		})
	c := a.Conductors
	if err != nil || c == nil {
		return []string{nm.stem + "_smoothed.mtx"}, err
	}
	nnz = c.Kept()
	for i := range n {
		if c.ToAmbient != nil && c.ToAmbient[i] > 0 {
			nnz++
		}
	}
	err = writeMTX(filepath.Join(dir, "conductances.mtx"), "symmetric",
		"hemiray radiative conductances sigma*A_i*(script F)_ij in W/K^4; index N+1 is the ambient; names in nodes.csv", n+1, n+1, nnz,
		func(put func(i, j int, v float64) error) error {
			for i := range n {
				for k, j := range c.Lower[i].Col {
					if err := put(i, int(j), exchange.Sigma*c.Lower[i].Val[k]); err != nil {
						return err
					}
				}
			}
			for i := range n {
				if c.ToAmbient != nil && c.ToAmbient[i] > 0 {
					if err := put(n, i, exchange.Sigma*c.ToAmbient[i]); err != nil {
						return err
					}
				}
			}
			return nil
		})
	return []string{nm.stem + "_smoothed.mtx", "conductances.mtx"}, err
}

// writeNodes writes nodes.csv: the index of each node in the .mtx files
// (1-based), its name and area, and the per-node figures of the trace
// (empty when the view factors were given); the ambient is index N+1.
// With a conductor threshold, a last column gives each node's share of
// emission in the dropped conductors.
func writeNodes(dir string, nodes []NodeSummary, traced, dropped bool) error {
	return writeCSV(filepath.Join(dir, "nodes.csv"), func(emit func(...string)) error {
		head := []string{"index", "node", "area_m2", "rays", "row_sum", "to_ambient", "backface_hits", "max_halfwidth"}
		if dropped {
			head = append(head, "dropped_conductor_share")
		}
		emit(head...)
		line := make([]string, len(head))
		for i, n := range nodes {
			clear(line)
			line[0], line[1], line[2] = fmt.Sprint(i+1), n.Name, num(n.AreaM2)
			if traced {
				copy(line[3:], []string{fmt.Sprint(n.Rays), num(n.RowSum), num(n.ToAmbient), fmt.Sprint(n.BackFaceHits), num(n.MaxHalfWidth)})
			}
			if dropped {
				line[8] = num(n.DroppedShare)
			}
			emit(line...)
		}
		clear(line)
		line[0], line[1] = fmt.Sprint(len(nodes)+1), "ambient"
		emit(line...)
		return nil
	})
}
