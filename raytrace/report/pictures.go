package report

import (
	"image"
	"image/color"
	"image/png"
	"io"
	"math"
	"path/filepath"
	"strings"
	"sync/atomic"

	"github.com/hemiray/hemiray/geometry"
	"github.com/hemiray/hemiray/mesh"
	"github.com/hemiray/hemiray/raytrace"
	"github.com/hemiray/hemiray/raytrace/analysis"
	"github.com/hemiray/hemiray/raytrace/bvh"
	"github.com/hemiray/hemiray/raytrace/internal/atomicfile"
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

// Picture renders m with the given colouring into an image. Back sides
// that are no radiation node are see-through (an enclosure seen from
// outside shows its inside), except in side mode.
type Picture struct {
	m       *mesh.Mesh
	tree    *bvh.Tree
	normal  []geometry.Vec3
	hasBack []bool // facets whose back is a node (two-sided surfaces)
}

func NewPicture(m *mesh.Mesh, twoSided []string) *Picture {
	p := &Picture{m: m, normal: make([]geometry.Vec3, len(m.Facets)), hasBack: make([]bool, len(m.Facets))}
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

func (p *Picture) draw(view render.View, w, h int, colour func(int32, bool) color.RGBA, allSides bool) *image.RGBA {
	cam := render.Frame(p.m.Bounds(), view, w, h)
	sc := render.Scene{Tree: p.tree, Normal: p.normal, Color: colour}
	if !allSides {
		sc.Visible = func(f int32, front bool) bool { return front || p.hasBack[f] }
	}
	return render.Render(sc, cam, 0)
}

// BySurface colours facets by surface, with a legend of the surfaces the
// picture shows.
func (p *Picture) BySurface(view render.View, w, h int) *image.RGBA {
	seen := make([]atomic.Bool, len(p.m.Surfaces)) // the renderer draws rows in parallel
	img := p.draw(view, w, h, func(f int32, _ bool) color.RGBA {
		s := p.m.SurfaceOf[f]
		seen[s].Store(true)
		return render.SurfaceColor(int(s))
	}, false)
	var names []string
	var cols []color.RGBA
	for i, s := range p.m.Surfaces {
		if seen[i].Load() {
			names, cols = append(names, s.Name), append(cols, render.SurfaceColor(i))
		}
	}
	render.Legend(img, "surfaces", names, cols)
	render.Caption(img, "hemiray: surfaces; the backs of one-sided surfaces are see-through, so enclosures show their inside")
	return img
}

// BySide colours fronts and backs, to spot flipped normals.
func (p *Picture) BySide(view render.View, w, h int) *image.RGBA {
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

// ByField colours each node side by a value, with a colour bar; sides
// without a value are grey. A signed quantity (a net heat flux) takes the
// diverging map centred on zero, so what gives off heat and what takes it
// up differ in hue; other quantities take viridis.
func (p *Picture) ByField(view render.View, w, h int, nodes []raytrace.Node, value map[string]float64, label string, signed bool) *image.RGBA {
	front, back := facetNodes(p.m, nodes)
	lo, hi := math.Inf(1), math.Inf(-1)
	for _, v := range value {
		lo, hi = math.Min(lo, v), math.Max(hi, v)
	}
	scale := render.Linear
	if signed {
		scale = render.Signed
		hi = math.Max(math.Abs(lo), math.Abs(hi))
		lo = -hi
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
		return scale.Color(v, lo, hi), true
	}
	img := p.draw(view, w, h, func(f int32, isFront bool) color.RGBA {
		n := back[f]
		if isFront {
			n = front[f]
		}
		c, _ := of(n)
		return c
	}, false)
	render.ColorBar(img, label, lo, hi, scale)
	what := map[string]string{"q [W/m²]": "net radiative heat flux leaving each surface (negative: absorbed)", "T [K]": "temperature"}[label]
	if what == "" {
		what = label
	}
	key := "grey: no value"
	if signed {
		key = "red: given off, blue: taken up, light grey: near zero; mid grey: no value"
	}
	render.Caption(img, "hemiray: "+what+"; "+key+"; backs of one-sided surfaces are see-through")
	return img
}

// PictureName is the file name of a picture coloured by colorBy, the same
// for render and for the pictures run writes: model_surfaces.png,
// model_heatflux.png, model_temperature.png, model_sides.png,
// model_ambient.png, model_vf_NODE.png.
func PictureName(colorBy string) string {
	switch colorBy {
	case "surface":
		return "model_surfaces.png"
	case "side":
		return "model_sides.png"
	case "heat-flux":
		return "model_heatflux.png"
	}
	return "model_" + strings.NewReplacer(":", "_", "/", "_", string(filepath.Separator), "_").Replace(colorBy) + ".png"
}

// WritePNG writes img as a PNG file atomically.
func WritePNG(path string, img image.Image) error {
	return atomicfile.Write(path, func(w io.Writer) error { return png.Encode(w, img) })
}

// writePictures writes the pictures and the VTK file of a finished run into
// dir: model_surfaces.png, model_heatflux.png (with an analysis),
// viewfactors_heatmap.png and _log.png (absorption_… for absorption
// factors), and model.vtp. res is nil when the
// view factors were given rather than traced; a is nil for a trace alone.
func writePictures(dir string, in *analysis.Input, nodes []raytrace.Node, res *raytrace.Result, a *analysis.Result) ([]string, error) {
	p := NewPicture(in.Mesh, in.Settings.TwoSided)
	view := render.View{Azimuth: 35, Elevation: 25}
	if in.Case != nil {
		view.Up = in.Case.Output.Up
	}
	written := []string{PictureName("surface")}
	if err := WritePNG(filepath.Join(dir, PictureName("surface")), p.BySurface(view, 1024, 768)); err != nil {
		return nil, err
	}
	if a != nil {
		q := map[string]float64{}
		for i, n := range nodes {
			q[n.Name] = a.Solution.Flux(i)
		}
		if err := WritePNG(filepath.Join(dir, PictureName("heat-flux")), p.ByField(view, 1024, 768, nodes, q, "q [W/m²]", true)); err != nil {
			return nil, err
		}
		written = append(written, PictureName("heat-flux"))
		for _, s := range a.Suns {
			load := map[string]float64{}
			for i, n := range nodes {
				load[n.Name] = s.Load[i] / n.Area
			}
			name := "model_solar_" + s.Name + ".png"
			if err := WritePNG(filepath.Join(dir, name), p.ByField(view, 1024, 768, nodes, load, "sun "+s.Name+" [W/m²]", false)); err != nil {
				return nil, err
			}
			written = append(written, name)
		}
	}
	if len(nodes) <= SquareLimit {
		var rows, cols []string
		var F [][]float64
		nm := namesFor(a != nil && a.Absorption || res != nil && res.Options.Optics != nil)
		title := "raw " + nm.words + " " + nm.symbol + "(row → column)"
		if a != nil {
			title = "smoothed " + nm.words + " " + nm.symbol + "(row → column)"
			cols = nodeColumns(a)
			for i := range nodes {
				F = append(F, smoothedRow(a, i, make([]float64, len(cols))))
			}
		} else {
			cols = columns(res)
			for i := range nodes {
				F = append(F, make([]float64, len(cols)))
				for j := range cols {
					F[i][j] = res.Factor(i, j).F
				}
			}
		}
		for _, n := range nodes {
			rows = append(rows, n.Name)
		}
		for _, log := range []bool{false, true} {
			name := nm.stem + "_heatmap.png"
			if log {
				name = nm.stem + "_heatmap_log.png"
			}
			if err := WritePNG(filepath.Join(dir, name), render.HeatMap(title, rows, cols, F, log)); err != nil {
				return nil, err
			}
			written = append(written, name)
		}
	}
	if err := writeVTP(filepath.Join(dir, "model.vtp"), in.Mesh, nodes, res, a); err != nil {
		return nil, err
	}
	return append(written, "model.vtp"), nil
}

// solarCells are one sun's absorbed flux (W/m² of the node's area) on
// each facet's front and back node, and its temperature field.
func solarCells(s analysis.SunState, front, back []int32, nodes []raytrace.Node) []mesh.CellArray {
	n := len(front)
	flux, fluxBack, T := make([]float64, n), make([]float64, n), make([]float64, n)
	for f := range n {
		flux[f], fluxBack[f], T[f] = math.NaN(), math.NaN(), math.NaN()
		if i := front[f]; i >= 0 {
			flux[f], T[f] = s.Load[i]/nodes[i].Area, s.Solution.T[i]
		}
		if j := back[f]; j >= 0 {
			fluxBack[f] = s.Load[j] / nodes[j].Area
		}
	}
	return []mesh.CellArray{{Name: "solar_" + s.Name + "_W_per_m2", Float: flux},
		{Name: "solar_" + s.Name + "_back_W_per_m2", Float: fluxBack}, {Name: "T_" + s.Name + "_K", Float: T}}
}

// writeVTP writes the facets with their surface and node (ids and names),
// area and results; the back side of a two-sided sheet has its own node,
// flux and flow (NaN where a facet has no back node). F_to_ambient is the
// raw escape fraction; back-face hits are NaN when the view factors were
// given rather than traced (res nil).
func writeVTP(path string, m *mesh.Mesh, nodes []raytrace.Node, res *raytrace.Result, a *analysis.Result) error {
	front, back := facetNodes(m, nodes)
	n := len(m.Facets)
	surf, node, backNode := make([]int32, n), make([]int32, n), make([]int32, n)
	surfName, nodeName, backName := make([]string, n), make([]string, n), make([]string, n)
	area, toAmb, backHits := make([]float64, n), make([]float64, n), make([]float64, n)
	var T, q, Q, qb, Qb []float64
	if a != nil {
		T, q, Q, qb, Qb = make([]float64, n), make([]float64, n), make([]float64, n), make([]float64, n), make([]float64, n)
	}
	nan := math.NaN()
	for f := range n {
		surf[f], node[f], backNode[f], area[f] = m.SurfaceOf[f], front[f], back[f], m.FacetArea(f)
		surfName[f] = m.Surfaces[m.SurfaceOf[f]].Name
		if j := back[f]; j >= 0 {
			backName[f] = nodes[j].Name
			if a != nil {
				qb[f], Qb[f] = a.Solution.Flux(int(j)), a.Solution.Q[j]
			}
		} else if a != nil {
			qb[f], Qb[f] = nan, nan
		}
		i := front[f]
		if i < 0 {
			toAmb[f], backHits[f] = nan, nan
			if a != nil {
				T[f], q[f], Q[f] = nan, nan, nan
			}
			continue
		}
		nodeName[f] = nodes[i].Name
		switch {
		case res != nil:
			toAmb[f] = float64(res.Escaped[i]) / float64(max(res.Rays[i], 1))
			backHits[f] = float64(res.Back[i].Sum())
		default:
			toAmb[f], backHits[f] = a.RawAmbient[i], nan
		}
		if a != nil {
			T[f], q[f], Q[f] = a.Solution.T[i], a.Solution.Flux(int(i)), a.Solution.Q[i]
		}
	}
	cells := []mesh.CellArray{
		{Name: "surface", Int: surf}, {Name: "surface_name", String: surfName},
		{Name: "node", Int: node}, {Name: "node_name", String: nodeName},
		{Name: "back_node", Int: backNode}, {Name: "back_node_name", String: backName},
		{Name: "area_m2", Float: area}, {Name: "F_to_ambient", Float: toAmb}, {Name: "backface_hits", Float: backHits},
	}
	if a != nil {
		cells = append(cells, mesh.CellArray{Name: "T_K", Float: T}, mesh.CellArray{Name: "q_W_per_m2", Float: q}, mesh.CellArray{Name: "Q_W_of_node", Float: Q},
			mesh.CellArray{Name: "q_back_W_per_m2", Float: qb}, mesh.CellArray{Name: "Q_back_W_of_node", Float: Qb})
		for _, s := range a.Suns {
			cells = append(cells, solarCells(s, front, back, nodes)...)
		}
	}
	return atomicfile.Write(path, func(w io.Writer) error {
		return mesh.WriteVTP(w, m, cells, "hemiray: cell arrays surface_name, node_name and back_node_name name what the ids number")
	})
}
