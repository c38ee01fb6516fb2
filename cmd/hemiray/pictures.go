package main

import (
	"context"
	"encoding/csv"
	"flag"
	"fmt"
	"image"
	"image/color"
	"image/png"
	"io"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"

	"github.com/hemiray/hemiray/geometry"
	"github.com/hemiray/hemiray/mesh"
	"github.com/hemiray/hemiray/raytrace"
	"github.com/hemiray/hemiray/raytrace/bvh"
	"github.com/hemiray/hemiray/raytrace/render"
)

// facetNodes maps each facet to its front and back node (−1: none).
func facetNodes(m *mesh.Mesh, nodes []raytrace.Node) (front, back []int32) {
	front, back = make([]int32, len(m.Facets)), make([]int32, len(m.Facets))
	for f := range front {
		front[f], back[f] = -1, -1
	}
	for i, n := range nodes {
		for _, f := range n.Facets {
			if n.Back {
				back[f] = int32(i)
			} else {
				front[f] = int32(i)
			}
		}
	}
	return front, back
}

// picture renders m with the given colouring into an image. Back sides
// that are no radiation node are see-through (an enclosure seen from
// outside shows its inside), except in side mode.
type picture struct {
	m       *mesh.Mesh
	tree    *bvh.Tree
	normal  []geometry.Vec3
	hasBack []bool // facets whose back is a node (two-sided surfaces)
}

func newPicture(m *mesh.Mesh, twoSided []string) *picture {
	p := &picture{m: m, normal: make([]geometry.Vec3, len(m.Facets)), hasBack: make([]bool, len(m.Facets))}
	for _, name := range twoSided {
		if s := m.SurfaceIndex(name); s >= 0 {
			for _, f := range m.Surfaces[s].Facets {
				p.hasBack[f] = true
			}
		}
	}
	for f := range m.Facets {
		p.normal[f] = m.Triangle(f).Normal()
	}
	p.tree = bvh.Build(m.Vertices, m.Facets, bvh.Options{})
	return p
}

func (p *picture) draw(view render.View, w, h int, colour func(int32, bool) color.RGBA, allSides bool) *image.RGBA {
	cam := render.Frame(p.m.Bounds(), view, w, h)
	sc := render.Scene{Tree: p.tree, Normal: p.normal, Color: colour}
	if !allSides {
		sc.Visible = func(f int32, front bool) bool { return front || p.hasBack[f] }
	}
	return render.Render(sc, cam, 0)
}

// bySurface colours facets by surface, with a legend.
func (p *picture) bySurface(view render.View, w, h int) *image.RGBA {
	img := p.draw(view, w, h, func(f int32, _ bool) color.RGBA { return render.SurfaceColor(int(p.m.SurfaceOf[f])) }, false)
	var names []string
	var cols []color.RGBA
	for i, s := range p.m.Surfaces {
		names, cols = append(names, s.Name), append(cols, render.SurfaceColor(i))
	}
	render.Legend(img, "surfaces", names, cols)
	render.Caption(img, "hemiray: surfaces; the backs of one-sided surfaces are see-through, so enclosures show their inside")
	return img
}

// bySide colours fronts and backs, to spot flipped normals.
func (p *picture) bySide(view render.View, w, h int) *image.RGBA {
	img := p.draw(view, w, h, func(_ int32, front bool) color.RGBA {
		if front {
			return render.Front
		}
		return render.Back
	}, true)
	render.Legend(img, "facet sides", []string{"front (radiating side)", "back"}, []color.RGBA{render.Front, render.Back})
	render.Caption(img, "hemiray: facet sides; a back seen where a front is expected means flipped normals")
	return img
}

// byField colours each node side by a value, with a colour bar; sides
// without a value are grey.
func (p *picture) byField(view render.View, w, h int, nodes []raytrace.Node, value map[string]float64, label string) *image.RGBA {
	front, back := facetNodes(p.m, nodes)
	lo, hi := math.Inf(1), math.Inf(-1)
	for _, v := range value {
		lo, hi = math.Min(lo, v), math.Max(hi, v)
	}
	if !(hi > lo) {
		lo, hi = lo-0.5, lo+0.5
	}
	of := func(node int32) (color.RGBA, bool) {
		if node < 0 {
			return render.NoData, false
		}
		v, ok := value[nodes[node].Name]
		if !ok {
			return render.NoData, false
		}
		return render.Viridis((v - lo) / (hi - lo)), true
	}
	img := p.draw(view, w, h, func(f int32, isFront bool) color.RGBA {
		n := back[f]
		if isFront {
			n = front[f]
		}
		c, _ := of(n)
		return c
	}, false)
	render.ColorBar(img, label, lo, hi, false)
	what := map[string]string{"q [W/m²]": "net radiative heat flux leaving each surface (negative: absorbed)", "T [K]": "temperature"}[label]
	if what == "" {
		what = label
	}
	render.Caption(img, "hemiray: "+what+"; grey: no value; backs of one-sided surfaces are see-through")
	return img
}

func writePNG(path string, img image.Image) error {
	return writeAtomic(path, func(w io.Writer) error { return png.Encode(w, img) })
}

// readNodeColumn reads column col of a CSV keyed by its first column.
func readNodeColumn(path, col string) (map[string]float64, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, err
	}
	defer f.Close()
	recs, err := csv.NewReader(f).ReadAll()
	if err != nil {
		return nil, fmt.Errorf("%s: %w", path, err)
	}
	if len(recs) == 0 {
		return nil, fmt.Errorf("%s: empty", path)
	}
	k := -1
	for i, h := range recs[0] {
		if h == col {
			k = i
		}
	}
	if k < 0 {
		return nil, fmt.Errorf("%s has no column %q (columns: %s)", path, col, strings.Join(recs[0][1:], ", "))
	}
	out := map[string]float64{}
	for _, r := range recs[1:] {
		if v, err := strconv.ParseFloat(r[k], 64); err == nil {
			out[r[0]] = v
		}
	}
	return out, nil
}

// fieldFor reads the values and label of a colouring from a results folder:
// temperature, heat-flux, ambient or vf:NODE.
func fieldFor(dir, colorBy string) (map[string]float64, string, error) {
	matrix := filepath.Join(dir, "viewfactors_smoothed.csv")
	if _, err := os.Stat(matrix); err != nil {
		matrix = filepath.Join(dir, "viewfactors.csv")
	}
	switch {
	case colorBy == "temperature":
		v, err := readNodeColumn(filepath.Join(dir, "surfaces.csv"), "T_K")
		return v, "T [K]", err
	case colorBy == "heat-flux":
		v, err := readNodeColumn(filepath.Join(dir, "surfaces.csv"), "q_W_per_m2")
		return v, "q [W/m²]", err
	case colorBy == "ambient":
		v, err := readNodeColumn(matrix, "ambient")
		return v, "F to ambient", err
	case strings.HasPrefix(colorBy, "vf:"):
		node := strings.TrimPrefix(colorBy, "vf:")
		v, err := readNodeColumn(matrix, node)
		return v, "F to " + node, err
	}
	return nil, "", usagef("--color %q: use surface, side, temperature, heat-flux, ambient or vf:NODE", colorBy)
}

// writePictures writes the pictures and the VTK file of a finished run into
// dir: model_surfaces.png, model_heatflux.png (with an analysis),
// viewfactors_heatmap.png and _log.png, and model.vtp.
func writePictures(dir string, in *input, res *raytrace.Result, a *analysis) ([]string, error) {
	p := newPicture(in.mesh, in.opts.TwoSided)
	view := render.View{Azimuth: 35, Elevation: 25}
	written := []string{"model_surfaces.png"}
	if err := writePNG(filepath.Join(dir, "model_surfaces.png"), p.bySurface(view, 1024, 768)); err != nil {
		return nil, err
	}
	if a != nil {
		q := map[string]float64{}
		for i, n := range res.Nodes {
			q[n.Name] = a.sol.Flux(i)
		}
		if err := writePNG(filepath.Join(dir, "model_heatflux.png"), p.byField(view, 1024, 768, res.Nodes, q, "q [W/m²]")); err != nil {
			return nil, err
		}
		written = append(written, "model_heatflux.png")
	}
	if len(res.Nodes) <= squareLimit {
		cols := columns(res)
		var rows []string
		F := make([][]float64, len(res.Nodes))
		for i, n := range res.Nodes {
			rows = append(rows, n.Name)
			F[i] = make([]float64, len(cols))
			for j := range cols {
				F[i][j] = res.Factor(i, j).F
			}
			if a != nil {
				for j := range F[i] {
					F[i][j] = 0
				}
				for _, e := range a.sm.F[i] {
					F[i][e.J] = e.F
				}
				if res.HasAmbient() {
					F[i][len(cols)-1] = a.sm.Ambient[i]
				}
			}
		}
		for _, log := range []bool{false, true} {
			name := "viewfactors_heatmap.png"
			if log {
				name = "viewfactors_heatmap_log.png"
			}
			if err := writePNG(filepath.Join(dir, name), render.HeatMap(rows, cols, F, log)); err != nil {
				return nil, err
			}
			written = append(written, name)
		}
	}
	if err := writeVTP(filepath.Join(dir, "model.vtp"), in.mesh, res, a); err != nil {
		return nil, err
	}
	return append(written, "model.vtp"), nil
}

// writeVTP writes the facets with their node, surface, area and results.
func writeVTP(path string, m *mesh.Mesh, res *raytrace.Result, a *analysis) error {
	front, back := facetNodes(m, res.Nodes)
	n := len(m.Facets)
	surf, node, backNode := make([]int32, n), make([]int32, n), make([]int32, n)
	area, toAmb, backHits := make([]float64, n), make([]float64, n), make([]float64, n)
	var T, q, Q []float64
	if a != nil {
		T, q, Q = make([]float64, n), make([]float64, n), make([]float64, n)
	}
	nan := math.NaN()
	for f := range n {
		surf[f], node[f], backNode[f], area[f] = m.SurfaceOf[f], front[f], back[f], m.FacetArea(f)
		i := front[f]
		if i < 0 {
			toAmb[f], backHits[f] = nan, nan
			if a != nil {
				T[f], q[f], Q[f] = nan, nan, nan
			}
			continue
		}
		if res.HasAmbient() {
			toAmb[f] = res.Factor(int(i), res.Ambient()).F
		}
		backHits[f] = float64(res.Back[i].Sum())
		if a != nil {
			T[f], q[f], Q[f] = a.sol.T[i], a.sol.Flux(int(i)), a.sol.Q[i]
		}
	}
	cells := []mesh.CellArray{
		{Name: "surface", Int: surf}, {Name: "node", Int: node}, {Name: "back_node", Int: backNode},
		{Name: "area_m2", Float: area}, {Name: "F_to_ambient", Float: toAmb}, {Name: "backface_hits", Float: backHits},
	}
	if a != nil {
		cells = append(cells, mesh.CellArray{Name: "T_K", Float: T}, mesh.CellArray{Name: "q_W_per_m2", Float: q}, mesh.CellArray{Name: "Q_W_of_node", Float: Q})
	}
	var names []string
	for i, s := range m.Surfaces {
		names = append(names, fmt.Sprintf("%d=%s", i, s.Name))
	}
	var nodeNames []string
	for i, nd := range res.Nodes {
		if i < 200 {
			nodeNames = append(nodeNames, fmt.Sprintf("%d=%s", i, nd.Name))
		}
	}
	comment := "hemiray: surface " + strings.Join(names, " ") + "; node " + strings.Join(nodeNames, " ")
	return writeAtomic(path, func(w io.Writer) error { return mesh.WriteVTP(w, m, cells, comment) })
}

func renderCommand() *command {
	c := &command{
		Name:      "render",
		UsageLine: "render (CASE.toml | MESH...) [--color C] [--results DIR] [--view V] [--size WxH] [-o FILE.png]",
		Short:     "draw the model as a PNG: by surface, by side, or by a result",
		Long: `Render draws a perspective picture of the model with hemiray's own ray
tracer, framed automatically, shaded by the angle between each facet and the
view. --color chooses the colouring:

  surface      one colour per surface, with a legend (default)
  side         fronts blue, backs orange: flipped normals stand out
  temperature  node temperatures from DIR/surfaces.csv (needs --results)
  heat-flux    net heat flux q from DIR/surfaces.csv
  ambient      view factor to the ambient
  vf:NODE      view factor to NODE

Results are read from --results DIR (the output folder of run); the colour
map is viridis (perceptually uniform, colour-blind safe) with a labelled
colour bar. --view is +x, -x, +y, -y, +z, -z (look from that side) or
AZIMUTH,ELEVATION in degrees (default 35,25).`,
		Flags: flag.NewFlagSet("render", flag.ContinueOnError),
	}
	var tf traceFlags
	tf.register(c.Flags)
	colorBy := c.Flags.String("color", "surface", "surface, side, temperature, heat-flux, ambient or vf:NODE")
	results := c.Flags.String("results", "", "results folder for field colourings (default: the case's output.dir, else hemiray-out)")
	viewFlag := c.Flags.String("view", "35,25", "+x … -z, or AZIMUTH,ELEVATION in degrees")
	size := c.Flags.String("size", "1024x768", "picture size in pixels, WxH")
	c.Run = func(ctx context.Context, args []string, stdout, stderr io.Writer) error {
		pos, err := parseArgs(c.Flags, args)
		if err != nil {
			return err
		}
		var w, h int
		if _, err := fmt.Sscanf(*size, "%dx%d", &w, &h); err != nil || w < 64 || h < 64 || w*h > 64e6 {
			return usagef("--size %q: give WxH, each at least 64, at most 64 megapixels", *size)
		}
		view, err := render.ParseView(*viewFlag)
		if err != nil {
			return usageError{err.Error()}
		}
		in, err := loadInput(c.Flags, &tf, pos)
		if err != nil {
			return err
		}
		out := tf.out
		if out == "" {
			out = "model_" + strings.ReplaceAll(*colorBy, ":", "_") + ".png"
		}
		p := newPicture(in.mesh, in.opts.TwoSided)
		var img *image.RGBA
		switch *colorBy {
		case "surface":
			img = p.bySurface(view, w, h)
		case "side":
			img = p.bySide(view, w, h)
		default:
			dir := *results
			if dir == "" {
				dir = "hemiray-out"
				if in.lc != nil && in.lc.c.Output.Dir != "" {
					dir = in.lc.c.Output.Dir
					if !filepath.IsAbs(dir) {
						dir = filepath.Join(in.lc.dir, dir)
					}
				}
			}
			values, label, err := fieldFor(dir, *colorBy)
			if err != nil {
				return err
			}
			nodes, err := raytrace.Nodes(in.mesh, in.opts)
			if err != nil {
				return err
			}
			img = p.byField(view, w, h, nodes, values, label)
		}
		if err := writePNG(out, img); err != nil {
			return err
		}
		fmt.Fprintf(stdout, "wrote %s (%d×%d)\n", out, w, h)
		return nil
	}
	return c
}
