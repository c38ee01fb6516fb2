package mesh

import (
	"fmt"
	"math"
	"slices"
	"sort"

	"github.com/hemiray/hemiray/geometry"
)

// maxExamples is how many offending facets a Finding lists.
const maxExamples = 5

// Finding is one kind of defect with its count and the first few facets.
type Finding struct {
	Check    string   `json:"check"`
	Count    int      `json:"count"`
	Message  string   `json:"message"`
	Examples []string `json:"examples,omitempty"` // where, e.g. "part.obj:12"
}

// SurfaceReport summarises one surface.
type SurfaceReport struct {
	Name    string  `json:"name"`
	Source  string  `json:"source,omitempty"`
	Facets  int     `json:"facets"`
	AreaM2  float64 `json:"area_m2"`
	Open    int     `json:"boundary_edges"`     // edges of this surface used by no other facet of the model (holes, rims)
	Winding bool    `json:"winding_consistent"` // no shared edge used twice in one direction
}

// Report is what Check finds in a mesh.
type Report struct {
	Vertices  int             `json:"vertices"`
	Facets    int             `json:"facets"`
	Surfaces  []SurfaceReport `json:"surfaces"`
	BoundsMin [3]float64      `json:"bounds_min_m"`
	BoundsMax [3]float64      `json:"bounds_max_m"`
	AreaM2    float64         `json:"total_area_m2"`
	// Closed is true when every edge of the model is shared by exactly two
	// facets with opposite directions: a watertight, consistently wound model.
	Closed bool `json:"closed"`
	// Normals says where a closed model's normals point: "inward" (an
	// enclosure seen from inside, as a radiation model of a cavity wants)
	// or "outward" (a solid body); empty for an open model.
	Normals  string    `json:"normals,omitempty"`
	Findings []Finding `json:"findings"`
}

// Thresholds for near-zero facets. A facet is degenerate when its height is
// below relHeight of its longest edge (its normal is then mostly rounding
// noise) or its area is below (relSize · model diagonal)². Common practice
// in mesh repair, not a published constant.
const (
	relHeight = 1e-10
	relSize   = 1e-9
)

// Check examines m for the defects that spoil a radiation model: NaN or
// infinite coordinates, degenerate and duplicate facets, open (boundary)
// edges, non-manifold edges, inconsistent winding between neighbours, and
// surfaces of zero area. Edges are matched by vertex position, so meshes
// that repeat vertices per group are judged by their geometry.
func Check(m *Mesh) Report {
	r := Report{Vertices: len(m.Vertices), Facets: len(m.Facets), AreaM2: m.TotalArea(), Closed: true}
	b := m.Bounds()
	if !b.IsEmpty() {
		r.BoundsMin = [3]float64{b.Min.X, b.Min.Y, b.Min.Z}
		r.BoundsMax = [3]float64{b.Max.X, b.Max.Y, b.Max.Z}
	}
	add := func(check, msg string, facets []int) {
		if len(facets) == 0 {
			return
		}
		f := Finding{Check: check, Count: len(facets), Message: fmt.Sprintf(msg, len(facets))}
		for _, i := range facets {
			if len(f.Examples) == maxExamples {
				break
			}
			// Facets of one OBJ polygon share a line; list each place once.
			if w := m.Where(i); !slices.Contains(f.Examples, w) {
				f.Examples = append(f.Examples, w)
			}
		}
		r.Findings = append(r.Findings, f)
	}

	// Position-welded vertex ids.
	pos := make([]int32, len(m.Vertices))
	at := make(map[geometry.Vec3]int32, len(m.Vertices))
	for i, v := range m.Vertices {
		v = geometry.Vec3{X: v.X + 0, Y: v.Y + 0, Z: v.Z + 0}
		id, ok := at[v]
		if !ok {
			id = int32(len(at))
			at[v] = id
		}
		pos[i] = id
	}

	var nonFinite, degenerate, duplicate []int
	diag := b.Diagonal().Len()
	if math.IsNaN(diag) || math.IsInf(diag, 0) {
		diag = 0
	}
	seen := make(map[[3]int32]int32, len(m.Facets))
	for f, v := range m.Facets {
		t := m.Triangle(f)
		if !t.V0.IsFinite() || !t.V1.IsFinite() || !t.V2.IsFinite() {
			nonFinite = append(nonFinite, f)
			continue
		}
		a, e := t.Area(), longestEdge(t)
		if a <= 0.5*relHeight*e*e || a <= (relSize*diag)*(relSize*diag) {
			degenerate = append(degenerate, f)
		}
		key := [3]int32{pos[v[0]], pos[v[1]], pos[v[2]]}
		sort.Slice(key[:], func(i, j int) bool { return key[i] < key[j] })
		if _, ok := seen[key]; ok {
			duplicate = append(duplicate, f)
		} else {
			seen[key] = int32(f)
		}
	}
	add("non-finite", "%d facet(s) have NaN or infinite coordinates", nonFinite)
	add("degenerate", "%d facet(s) have zero or near-zero area (slivers collapsed to a line or point)", degenerate)
	add("duplicate", "%d facet(s) repeat another facet's corners (double-sided export or a copied part?)", duplicate)

	// Edge use, over the whole model and within each surface.
	model := edgeUse(m, pos, nil)
	var open, nonManifold, flipped []int
	for _, e := range model {
		switch {
		case e.n == 1:
			open = append(open, int(e.first))
		case e.n > 2:
			nonManifold = append(nonManifold, int(e.first))
		case e.fwd != 1:
			flipped = append(flipped, int(e.first))
		}
	}
	r.Closed = len(open) == 0 && len(nonManifold) == 0 && len(flipped) == 0 && len(m.Facets) > 0
	if r.Closed {
		// The signed volume Σ v0·(v1×v2)/6 of a closed, consistently wound
		// shell is positive when its normals point out (divergence theorem;
		// common practice in mesh processing).
		vol := 0.0
		for f := range m.Facets {
			t := m.Triangle(f)
			vol += t.V0.Dot(t.V1.Cross(t.V2)) / 6
		}
		r.Normals = "outward"
		if vol < 0 {
			r.Normals = "inward"
		}
	}
	sort.Ints(open)
	sort.Ints(nonManifold)
	sort.Ints(flipped)
	add("open-edges", "%d edge(s) belong to only one facet: the model is open (holes, gaps or an open shell)", open)
	add("non-manifold", "%d edge(s) are shared by more than two facets", nonManifold)
	add("winding", "%d edge(s) join neighbours with opposite winding (some normals are flipped)", flipped)

	var zero []int
	for s := range m.Surfaces {
		sr := SurfaceReport{Name: m.Surfaces[s].Name, Facets: len(m.Surfaces[s].Facets), AreaM2: m.Surfaces[s].Area, Winding: true}
		if src := m.Surfaces[s].Source; src >= 0 && src < len(m.Sources) {
			sr.Source = m.Sources[src].Path
		}
		for key, e := range edgeUse(m, pos, m.Surfaces[s].Facets) {
			if model[key].n == 1 { // an edge a neighbouring surface shares is no hole
				sr.Open++
			}
			if e.n == 2 && e.fwd != 1 {
				sr.Winding = false
			}
		}
		if !(sr.AreaM2 > 0) && len(m.Surfaces[s].Facets) > 0 {
			zero = append(zero, int(m.Surfaces[s].Facets[0]))
		}
		r.Surfaces = append(r.Surfaces, sr)
	}
	add("zero-area-surface", "%d surface(s) have zero total area", zero)
	return r
}

func longestEdge(t geometry.Triangle) float64 {
	return math.Max(t.V1.Sub(t.V0).Len(), math.Max(t.V2.Sub(t.V1).Len(), t.V0.Sub(t.V2).Len()))
}

// edgeStat counts the uses of an undirected edge: n in all, fwd of them in
// the direction from the lower to the higher vertex id.
type edgeStat struct {
	n, fwd int32
	first  int32 // first facet using the edge
}

// edgeUse tallies the edges of the given facets (all facets when nil).
func edgeUse(m *Mesh, pos []int32, facets []int32) map[[2]int32]*edgeStat {
	n := len(facets)
	if facets == nil {
		n = len(m.Facets)
	}
	edges := make(map[[2]int32]*edgeStat, 3*n/2)
	for k := range n {
		f := k
		if facets != nil {
			f = int(facets[k])
		}
		v := m.Facets[f]
		for i := range 3 {
			a, b := pos[v[i]], pos[v[(i+1)%3]]
			if a == b {
				continue // a collapsed edge of a degenerate facet
			}
			key, fwd := [2]int32{a, b}, int32(1)
			if a > b {
				key, fwd = [2]int32{b, a}, 0
			}
			e := edges[key]
			if e == nil {
				e = &edgeStat{first: int32(f)}
				edges[key] = e
			}
			e.n++
			e.fwd += fwd
		}
	}
	return edges
}
