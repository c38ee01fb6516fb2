package raytrace

import (
	"fmt"
	"strings"
	"unicode"

	"github.com/hemiray/hemiray/mesh"
)

// Node is one radiation node: a surface side, or a facet side in facet mode.
type Node struct {
	Name    string
	Surface int     // index into the mesh's surfaces
	Back    bool    // the node is the back side of a two-sided surface
	Facets  []int32 // the facets that emit for this node
	Area    float64 // m²
}

// NodeID is the index of a radiation node: a row of a tally and a column
// of its hits. SurfaceID is the index of a mesh surface: a column of the
// back-face hits. Facet ids stay the mesh's plain int32.
type (
	NodeID    int32
	SurfaceID int32
)

// nodeMap says which node each side of each facet belongs to.
type nodeMap struct {
	nodes []Node
	front []NodeID // node of each facet's front
	back  []NodeID // node of each facet's back, −1 for one-sided surfaces
}

// buildNodes makes the nodes of m. twoSided names the two-sided surfaces.
// Facets of zero area cannot emit (and no ray can hit them), so they belong
// to no node's emitters; in facet mode they are no node at all.
func buildNodes(m *mesh.Mesh, twoSided map[string]bool, facetNodes bool, area []float64, split map[string]string, nodeOf []string) (*nodeMap, error) {
	for name := range twoSided {
		if m.SurfaceIndex(name) < 0 {
			return nil, fmt.Errorf("two-sided surface %q is not in the model", name)
		}
	}
	for name := range split {
		if m.SurfaceIndex(name) < 0 {
			return nil, fmt.Errorf("surface %q to split is not in the model", name)
		}
	}
	if nodeOf != nil && len(nodeOf) != len(m.Facets) {
		return nil, fmt.Errorf("the facet → node map has %d entries for %d facets", len(nodeOf), len(m.Facets))
	}
	if facetNodes && (len(split) > 0 || nodeOf != nil) {
		return nil, fmt.Errorf("facet nodes and a split or node map exclude each other: every facet is already a node")
	}
	nm := &nodeMap{front: make([]NodeID, len(m.Facets)), back: make([]NodeID, len(m.Facets))}
	add := func(name string, s int, back bool, facets []int32) NodeID {
		a := 0.0
		for _, f := range facets {
			a += area[f]
		}
		nm.nodes = append(nm.nodes, Node{Name: name, Surface: s, Back: back, Facets: facets, Area: a})
		return NodeID(len(nm.nodes) - 1)
	}
	for s, surf := range m.Surfaces {
		two := twoSided[surf.Name]
		var emitting []int32
		for _, f := range surf.Facets {
			if area[f] > 0 {
				emitting = append(emitting, f)
			}
		}
		if len(emitting) == 0 {
			return nil, fmt.Errorf("surface %q has zero area (hemiray inspect lists its degenerate facets)", surf.Name)
		}
		names, err := groups(m, s, split[surf.Name], nodeOf)
		if err != nil {
			return nil, err
		}
		if names != nil {
			addGroups(nm, &m.Surfaces[s], s, two, names, area, add)
			continue
		}
		if !facetNodes {
			fi := add(surf.Name, s, false, emitting)
			bi := NodeID(-1)
			if two {
				bi = add(surf.Name+".back", s, true, emitting)
			}
			for _, f := range surf.Facets {
				nm.front[f], nm.back[f] = fi, bi
			}
			continue
		}
		for k, f := range surf.Facets {
			nm.front[f], nm.back[f] = -1, -1
			if area[f] == 0 {
				continue
			}
			one := surf.Facets[k : k+1 : k+1]
			name := fmt.Sprintf("%s#%d", surf.Name, k)
			nm.front[f], nm.back[f] = add(name, s, false, one), -1
			if two {
				nm.back[f] = add(name+".back", s, true, one)
			}
		}
	}
	return nm, checkNames(nm.nodes, m)
}

// addGroups makes one node (and its back) per distinct name, in the order
// of first appearance, from the facets of surf named so.
func addGroups(nm *nodeMap, surf *mesh.Surface, s int, two bool, names []string, area []float64, add func(string, int, bool, []int32) NodeID) {
	index := map[string]int{}
	var order []string
	var members [][]int32
	for k, f := range surf.Facets {
		g, ok := index[names[k]]
		if !ok {
			g = len(order)
			index[names[k]] = g
			order = append(order, names[k])
			members = append(members, nil)
		}
		members[g] = append(members[g], f)
	}
	for g, name := range order {
		var emitting []int32
		for _, f := range members[g] {
			if area[f] > 0 {
				emitting = append(emitting, f)
			}
		}
		fi, bi := NodeID(-1), NodeID(-1)
		if len(emitting) > 0 {
			fi = add(name, s, false, emitting)
			if two {
				bi = add(name+".back", s, true, emitting)
			}
		}
		for _, f := range members[g] {
			nm.front[f], nm.back[f] = fi, bi
		}
	}
}

// checkNames refuses node names that would be ambiguous in the outputs:
// names holding control characters, "ambient" (the surroundings' column) and any name two nodes share — a
// surface called X.back beside a two-sided X, or a surface called P#3
// beside the facet nodes of P.
func checkNames(nodes []Node, m *mesh.Mesh) error {
	seen := make(map[string]int, len(nodes))
	for i, n := range nodes {
		if strings.IndexFunc(n.Name, unicode.IsControl) >= 0 {
			return fmt.Errorf("node name %q holds a control character (a line break or tab): rename the surface", n.Name)
		}
		if n.Name == "ambient" {
			return fmt.Errorf("a surface is called %q, the name of the surroundings' column: rename it in the mesh file (OBJ g/o line, STL solid name)", n.Name)
		}
		if k, dup := seen[n.Name]; dup {
			a, b := m.Surfaces[nodes[k].Surface].Name, m.Surfaces[n.Surface].Name
			return fmt.Errorf("two nodes would both be called %q (from surfaces %q and %q): rename one of the surfaces in its mesh file", n.Name, a, b)
		}
		seen[n.Name] = i
	}
	return nil
}
