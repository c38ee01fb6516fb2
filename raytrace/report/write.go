package report

import (
	"fmt"
	"io"
	"path/filepath"
	"runtime"
	"strings"

	"golang.org/x/sync/errgroup"

	"github.com/hemiray/hemiray/mesh"
	"github.com/hemiray/hemiray/raytrace"
	"github.com/hemiray/hemiray/raytrace/analysis"
	"github.com/hemiray/hemiray/raytrace/internal/atomicfile"
)

// Outputs are the results of a run to write.
type Outputs struct {
	Input *analysis.Input
	// Traced is the trace (nil when the view factors were given).
	Traced *analysis.Traced
	// Analysis is the exchange solve (nil for a trace alone).
	Analysis *analysis.Result
	// Pictures writes the PNG pictures and model.vtp too.
	Pictures bool
	// Compact leaves out the per-pair CSV files (viewfactors_pairs.csv,
	// viewfactors_smoothed_pairs.csv, conductances.csv) and tallies.csv,
	// which run to gigabytes for facet-level models; the Matrix Market
	// files carry the same matrices, tallies.bin the counts.
	Compact bool
}

// Warnings returns what the user must be told about the results: back-face
// hits, an incomplete trace, notes of the trace and of the analysis.
func (o *Outputs) Warnings() []string {
	var w []string
	if t := o.Traced; t != nil {
		w = append(w, t.Result.Warnings(analysis.SurfaceNames(o.Input.Mesh))...)
		w = append(w, t.Notes...)
		if !t.Complete {
			w = append(w, "INCOMPLETE: not every planned ray was traced, so the intervals are wider than planned (summary.json: complete = false); continue the trace with --resume")
		}
		if m := t.Result.MissedHalfWidth(); len(m) > 0 {
			res := t.Result
			var worst []string
			for _, x := range m[:min(len(m), 5)] {
				worst = append(worst, fmt.Sprintf("%s %.3g with %d rays", res.Nodes[x.Node].Name, x.HalfWidth, x.Rays))
			}
			w = append(w, fmt.Sprintf("%d of %d rows did not reach the half-width target %g within %d rays per node (--max-rays); widest: %s (summary.json: halfwidth_missed)",
				len(m), len(res.Nodes), res.Options.HalfWidth, res.Options.MaxRays, strings.Join(worst, "; ")))
		}
	}
	if o.Analysis != nil {
		w = append(w, o.Analysis.Notes...)
	}
	return w
}

// Write writes every output file of o into dir and returns their names.
// The matrix files are written side by side (on up to GOMAXPROCS
// threads): each is formatting-bound, and at 10⁴ nodes each can hold 10⁷
// entries; the names come back in a fixed order whatever finishes first.
func Write(dir string, o Outputs) ([]string, error) {
	nodes := o.nodes()
	var tasks []func() ([]string, error)
	one := func(name string, err error) ([]string, error) { return []string{name}, err }
	if t := o.Traced; t != nil {
		tasks = append(tasks,
			func() ([]string, error) { return writeViewFactors(dir, t.Result, !o.Compact) },
			func() ([]string, error) { return one(writeRawMTX(dir, t.Result)) })
		if len(nodes) <= SquareLimit && !o.Compact {
			tasks = append(tasks, func() ([]string, error) {
				return one(TalliesCSV, writeTallies(dir, t.Result, analysis.SurfaceNames(o.Input.Mesh)))
			})
		}
		tasks = append(tasks, func() ([]string, error) { return []string{analysis.TallyFile}, nil })
	}
	if a := o.Analysis; a != nil {
		tasks = append(tasks,
			func() ([]string, error) { return writeSmoothed(dir, a, !o.Compact) },
			func() ([]string, error) { return one("surfaces.csv", writeSurfaces(dir, a)) },
			func() ([]string, error) { return writeSolar(dir, a) },
			func() ([]string, error) { return writeAnalysisMTX(dir, a) })
		if a.Conductors != nil && !o.Compact {
			tasks = append(tasks, func() ([]string, error) { return one("conductances.csv", writeConductances(dir, a)) })
		}
	}
	names := make([][]string, len(tasks))
	var g errgroup.Group
	g.SetLimit(runtime.GOMAXPROCS(0))
	for k, task := range tasks {
		g.Go(func() error {
			var err error
			names[k], err = task()
			return err
		})
	}
	if err := g.Wait(); err != nil {
		return nil, err
	}
	var written []string
	for _, n := range names {
		written = append(written, n...)
	}
	sum, err := newSummary(o.Input, o.Traced, o.Analysis, o.Warnings())
	if err != nil {
		return nil, err
	}
	dropped := o.Analysis != nil && o.Analysis.Conductors != nil && o.Analysis.Conductors.Threshold > 0
	if err := writeNodes(dir, sum.Nodes, o.Traced != nil, dropped); err != nil {
		return nil, err
	}
	written = append(written, "nodes.csv")
	if len(sum.Nodes) > SquareLimit {
		sum.Nodes = nil // summary.json keeps run-level figures; nodes.csv has every node's
	}
	if len(o.Input.Settings.Split) > 0 || o.Input.NodeOf != nil {
		if err := writeFacets(dir, o.Input.Mesh, nodes); err != nil {
			return nil, err
		}
		written = append(written, "facets.csv")
	}
	if err := writeJSON(filepath.Join(dir, "summary.json"), sum); err != nil {
		return nil, err
	}
	written = append(written, "summary.json")
	if o.Analysis != nil && o.Pictures {
		var res *raytrace.Result
		if o.Traced != nil {
			res = o.Traced.Result
		}
		pics, err := writePictures(dir, o.Input, nodes, res, o.Analysis)
		if err != nil {
			return nil, err
		}
		written = append(written, pics...)
	}
	if len(nodes) > SquareLimit {
		written = append(written, fmt.Sprintf("(square matrices skipped: %d nodes > %d; the .mtx files have every non-zero factor)", len(nodes), SquareLimit))
	}
	return written, nil
}

func (o *Outputs) nodes() []raytrace.Node {
	if o.Traced != nil {
		return o.Traced.Result.Nodes
	}
	return o.Analysis.Nodes
}

// writeFacets writes facets.csv: for each facet (0-based, in load order,
// as model.vtp numbers its cells) its surface and the nodes of its front
// and back, so results of a split or mapped model go back onto the mesh.
func writeFacets(dir string, m *mesh.Mesh, nodes []raytrace.Node) error {
	front, back := facetNodes(m, nodes)
	return atomicfile.Write(filepath.Join(dir, "facets.csv"), func(w io.Writer) error {
		lw := newLineWriter(w)
		lw.buf = append(lw.buf, "facet,surface,node,back_node\n"...)
		name := func(i int32) string {
			if i < 0 {
				return ""
			}
			return nodes[i].Name
		}
		for f := range m.Facets {
			lw.int(int64(f))
			lw.name(m.Surfaces[m.SurfaceOf[f]].Name)
			lw.name(name(front[f]))
			lw.name(name(back[f]))
			if err := lw.end(); err != nil {
				return err
			}
		}
		return lw.flush()
	})
}
