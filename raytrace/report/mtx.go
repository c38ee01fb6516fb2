package report

import (
	"fmt"
	"io"
	"math"
	"path/filepath"
	"runtime"
	"strconv"
	"sync"
	"sync/atomic"

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

func writeMTX(path, symmetry, comment string, rows, cols, entries, groups int, group func(g int, put func(i, j int, v float64))) error {
	return atomicfile.WriteLarge(path, func(w io.Writer) error {
		head := fmt.Appendf(nil, "%%%%MatrixMarket matrix coordinate real %s\n%% %s\n%d %d %d\n", symmetry, comment, rows, cols, entries)
		if _, err := w.Write(head); err != nil {
			return err
		}
		return formatInOrder(w, groups, func(g int, buf []byte) []byte {
			var memo floatMemo
			var prefix []byte // "i " of the row being written
			last := -1
			group(g, func(i, j int, v float64) {
				if i != last {
					prefix = append(strconv.AppendInt(prefix[:0], int64(i+1), 10), ' ')
					last = i
				}
				buf = append(buf, prefix...)
				buf = strconv.AppendInt(buf, int64(j+1), 10)
				buf = append(buf, ' ')
				buf = memo.append(buf, v)
				buf = append(buf, '\n')
			})
			return buf
		})
	})
}

// floatMemo remembers the text of recently formatted numbers: a row of raw
// factors k/N repeats a few values (k = 1, 2, 3 … of a node's N rays)
// thousands of times, and copying their text is far cheaper than
// formatting it again. The text is strconv's shortest round-trip form
// either way.
type floatMemo struct {
	slot [64]struct {
		bits uint64
		n    uint8
		text [24]byte // the longest shortest form of a float64 is 24 bytes
	}
}

func (m *floatMemo) append(buf []byte, v float64) []byte {
	bits := math.Float64bits(v)
	e := &m.slot[(bits*0x9e3779b97f4a7c15)>>58]
	if e.n > 0 && e.bits == bits {
		return append(buf, e.text[:e.n]...)
	}
	at := len(buf)
	buf = strconv.AppendFloat(buf, v, 'g', -1, 64)
	e.bits, e.n = bits, uint8(copy(e.text[:], buf[at:]))
	return buf
}

// formatInOrder writes the text of groups 0 … n−1 to w in that order,
// formatting them on every core: number formatting (about 100 ns a
// number) is most of the writing of a large matrix. Groups are formatted a
// window at a time, and one window is written while the next is
// formatted (a direct write waits for the disk), so memory stays at two
// windows of text whatever the file's size; the bytes do not depend on
// the cores.
func formatInOrder(w io.Writer, n int, format func(g int, buf []byte) []byte) error {
	// 64 rows a chunk and at most 8 chunks a window: a dense row of 10⁴
	// entries is about 200 kB of text, so a window stays near 100 MB on any
	// number of cores.
	const perChunk = 64
	workers := runtime.GOMAXPROCS(0)
	chunks := (n + perChunk - 1) / perChunk
	perWindow := min(2*workers, 8)
	var sets [2][][]byte
	written := make(chan error, 1)
	written <- nil
	for lo, set := 0, 0; lo < chunks; lo, set = lo+perWindow, 1-set {
		hi := min(lo+perWindow, chunks)
		bufs := sets[set]
		if bufs == nil {
			bufs = make([][]byte, perWindow)
			sets[set] = bufs
		}
		var wg sync.WaitGroup
		next := atomic.Int64{}
		next.Store(int64(lo))
		for range min(workers, hi-lo) {
			wg.Go(func() {
				for c := int(next.Add(1) - 1); c < hi; c = int(next.Add(1) - 1) {
					buf := bufs[c-lo][:0]
					for g := c * perChunk; g < min(n, (c+1)*perChunk); g++ {
						buf = format(g, buf)
					}
					bufs[c-lo] = buf
				}
			})
		}
		wg.Wait()
		// The previous window is written by now or soon; this one follows
		// it while the next is formatted into the other set.
		if err := <-written; err != nil {
			return err
		}
		go func() {
			for _, b := range bufs[:hi-lo] {
				if _, err := w.Write(b); err != nil {
					written <- err
					return
				}
			}
			written <- nil
		}()
	}
	return <-written
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
		"hemiray raw "+nm.words+" "+nm.symbol+"(row -> column); index N+1 is the ambient; names in nodes.csv", n, n+1, nnz, n,
		func(i int, put func(i, j int, v float64)) {
			row := &res.Hits[i]
			for k, j := range row.Col {
				put(i, int(j), float64(row.Val[k])/float64(res.Rays[i]))
			}
			if res.Escaped[i] > 0 {
				put(i, n, float64(res.Escaped[i])/float64(res.Rays[i]))
			}
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
		"hemiray smoothed "+nm.words+" "+nm.symbol+"(row -> column); index N+1 is the ambient; names in nodes.csv", n, n+1, nnz, n,
		func(i int, put func(i, j int, v float64)) {
			row := &a.Smoothed.F[i]
			for k, j := range row.Col {
				put(i, int(j), row.Val[k])
			}
			if f := a.Smoothed.Ambient[i]; f > 0 {
				put(i, n, f)
			}
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
		"hemiray radiative conductances sigma*A_i*(script F)_ij in W/K^4; index N+1 is the ambient; names in nodes.csv", n+1, n+1, nnz, n+1,
		func(i int, put func(i, j int, v float64)) {
			if i < n {
				for k, j := range c.Lower[i].Col {
					put(i, int(j), exchange.Sigma*c.Lower[i].Val[k])
				}
				return
			}
			for j := range n { // the ambient's row, last
				if c.ToAmbient != nil && c.ToAmbient[j] > 0 {
					put(n, j, exchange.Sigma*c.ToAmbient[j])
				}
			}
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
