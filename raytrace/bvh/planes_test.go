package bvh

import (
	"math"
	"math/rand/v2"
	"testing"

	"github.com/hemiray/hemiray/geometry"
	"github.com/hemiray/hemiray/mesh"
)

// A closed box written wall by wall has six coplanar runs; a soup between
// its walls has none, and its facets form the one loose piece. Every facet
// is kept exactly once.
func TestPlaneItems(t *testing.T) {
	m := mesh.Box("", geometry.Box{Max: geometry.Vec3{X: 2, Y: 1, Z: 1}}, 8, true) // 128 facets a wall
	addSoup(m, rand.New(rand.NewPCG(3, 4)), 500, 0.1)
	b := &builder{}
	bounds := emptyBox()
	for i, f := range m.Facets {
		p := prim{b: emptyBox(), id: int32(i)}
		for _, vi := range f {
			x := [3]float32{float32(m.Vertices[vi].X), float32(m.Vertices[vi].Y), float32(m.Vertices[vi].Z)}
			p.b.add(&x)
		}
		b.prims = append(b.prims, p)
		bounds.grow(&p.b)
	}
	items := b.planeItems(m.Vertices, m.Facets, &bounds)
	if len(items) != 7 {
		t.Fatalf("%d pieces, want 6 walls and the soup", len(items))
	}
	seen := make([]bool, len(m.Facets))
	for i, it := range items {
		want := 128
		if i == 6 {
			want = 500
		}
		if it.hi-it.lo != want {
			t.Errorf("piece %d holds %d facets, want %d", i, it.hi-it.lo, want)
		}
		for _, p := range b.prims[it.lo:it.hi] {
			if seen[p.id] {
				t.Fatalf("facet %d twice", p.id)
			}
			seen[p.id] = true
		}
	}
	// A sphere has no two coplanar neighbours: built as before.
	s := mesh.Sphere("s", geometry.Vec3{}, 1, 20, false)
	tree := Build(s.Vertices, s.Facets, Options{Threads: 1})
	b = &builder{prims: make([]prim, len(tree.tris))}
	for i := range b.prims {
		b.prims[i] = prim{b: emptyBox(), id: int32(i)}
	}
	if items := b.planeItems(s.Vertices, s.Facets, &bounds); items != nil {
		t.Errorf("a sphere gave %d pieces", len(items))
	}
}

// addSoup appends n random triangles of size about s (randomSoup) to m.
func addSoup(m *mesh.Mesh, rng *rand.Rand, n int, s float64) {
	sv, sf := randomSoup(rng, n, s)
	k := int32(len(m.Vertices))
	m.Vertices = append(m.Vertices, sv...)
	for _, f := range sf {
		m.Facets = append(m.Facets, [3]int32{f[0] + k, f[1] + k, f[2] + k})
	}
}

// Closest hits in a box cluttered with a soup, whose walls become subtrees
// of their own, match brute force.
func TestPlaneRunsAgainstBruteForce(t *testing.T) {
	m := mesh.Box("", geometry.Box{Max: geometry.Vec3{X: 1, Y: 1, Z: 1}}, 12, true)
	rng := rand.New(rand.NewPCG(5, 6))
	addSoup(m, rng, 2000, 0.05)
	roundAll(m.Vertices)
	tree := Build(m.Vertices, m.Facets, Options{Threads: 2})
	for range 3000 {
		o := geometry.Vec3{X: rng.Float64(), Y: rng.Float64(), Z: rng.Float64()}
		d := geometry.Vec3{X: rng.NormFloat64(), Y: rng.NormFloat64(), Z: rng.NormFloat64()}
		sameHit(t, tree, m.Vertices, m.Facets, o, d, math.Inf(1), -1)
	}
}

// More coplanar runs than maxRuns: the longest are kept, the rest join the
// loose facets, and the tree stays shallow enough for the traversal's
// stack (see the package comment) and exact against brute force.
func TestManyPlaneRuns(t *testing.T) {
	const plates, strip = maxRuns + 4, 32 // runs of 64 triangles
	var v []geometry.Vec3
	var f [][3]int32
	for p := range plates {
		z := float64(p) / plates
		k := int32(len(v))
		for i := range strip + 1 {
			x := float64(i) / strip
			v = append(v, geometry.Vec3{X: x, Z: z}, geometry.Vec3{X: x, Y: 1, Z: z})
		}
		for i := range int32(strip) {
			a, b, c, d := k+2*i, k+2*i+2, k+2*i+3, k+2*i+1
			f = append(f, [3]int32{a, b, c}, [3]int32{a, c, d})
		}
	}
	roundAll(v)
	b := &builder{}
	bounds := emptyBox()
	for i, tri := range f {
		p := prim{b: emptyBox(), id: int32(i)}
		for _, vi := range tri {
			x := [3]float32{float32(v[vi].X), float32(v[vi].Y), float32(v[vi].Z)}
			p.b.add(&x)
		}
		b.prims = append(b.prims, p)
		bounds.grow(&p.b)
	}
	if items := b.planeItems(v, f, &bounds); len(items) != maxRuns+1 || items[maxRuns].hi-items[maxRuns].lo != 4*2*strip {
		t.Fatalf("%d pieces, want %d runs and the loose facets of 4 plates", len(items), maxRuns)
	}
	tree := Build(v, f, Options{Threads: 1})
	if tree.Stats.MaxDepth > 63 {
		t.Errorf("binary depth %d, the stack allows 63", tree.Stats.MaxDepth)
	}
	rng := rand.New(rand.NewPCG(9, 10))
	for range 100 {
		o := geometry.Vec3{X: rng.Float64(), Y: rng.Float64(), Z: rng.Float64()}
		d := geometry.Vec3{X: rng.NormFloat64(), Y: rng.NormFloat64(), Z: rng.NormFloat64()}
		sameHit(t, tree, v, f, o, d, math.Inf(1), -1)
	}
}
