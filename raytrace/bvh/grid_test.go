package bvh

import (
	"math"
	"math/rand/v2"
	"testing"

	"github.com/hemiray/hemiray/geometry"
	"github.com/hemiray/hemiray/mesh"
	"github.com/hemiray/hemiray/raytrace/sample"
)

// plate returns an n×n triangulated square in the plane z = c over
// [0,1]², its inner vertices moved in the plane by up to jitter cells (an
// irregular mesh whose edges meet no grid line), wound clockwise seen
// from +z if flip.
func plate(rng *rand.Rand, n int, c, jitter float64, flip bool) *mesh.Mesh {
	m := &mesh.Mesh{}
	for j := range n + 1 {
		for i := range n + 1 {
			x, y := float64(i)/float64(n), float64(j)/float64(n)
			if i > 0 && i < n && j > 0 && j < n {
				x += jitter * (rng.Float64() - 0.5) / float64(n)
				y += jitter * (rng.Float64() - 0.5) / float64(n)
			}
			m.Vertices = append(m.Vertices, geometry.Vec3{X: x, Y: y, Z: c})
		}
	}
	for j := range int32(n) {
		for i := range int32(n) {
			a := j*int32(n+1) + i
			b, d, e := a+1, a+int32(n+1), a+int32(n+2)
			m.Facets = append(m.Facets, [3]int32{a, b, e}, [3]int32{a, e, d})
		}
	}
	for k := range m.Facets {
		if flip {
			m.Facets[k][1], m.Facets[k][2] = m.Facets[k][2], m.Facets[k][1]
		}
	}
	return m
}

// join appends the facets of o to m.
func join(m, o *mesh.Mesh) {
	k := int32(len(m.Vertices))
	m.Vertices = append(m.Vertices, o.Vertices...)
	for _, f := range o.Facets {
		m.Facets = append(m.Facets, [3]int32{f[0] + k, f[1] + k, f[2] + k})
	}
}

// transform moves every vertex of m to s·v + shift.
func transform(m *mesh.Mesh, s float64, shift geometry.Vec3) {
	for i, v := range m.Vertices {
		m.Vertices[i] = v.Scale(s).Add(shift)
	}
}

// Closest hits and any-hit answers on models whose axis-aligned runs are
// located by plane grids match brute force: walls of a box with a soup
// inside, irregular plates of both windings, tilted runs (no grid), far
// from the origin and near it, for rays from inside, from the walls
// (offset origins, the emitter skipped), through mesh vertices (shared
// edges and corners), grazing the plates, and along the axes. One plate
// is wound each way.
func TestGridAgainstBruteForce(t *testing.T) {
	rng := rand.New(rand.NewPCG(11, 12))
	build := func(scale float64, shift geometry.Vec3) *mesh.Mesh {
		m := mesh.Box("", geometry.Box{Max: geometry.Vec3{X: 1, Y: 1, Z: 1}}, 10, true) // 200 facets a wall
		join(m, plate(rng, 12, 0.3, 0.8, false))
		join(m, plate(rng, 9, 0.7, 0, true))
		tilted := plate(rng, 8, 0, 0, false)
		for i, v := range tilted.Vertices {
			tilted.Vertices[i] = geometry.Vec3{X: v.X, Y: v.Y, Z: 0.1 + 0.2*v.X}
		}
		join(m, tilted)
		// A tilted strip whose facets all reach its low edge: every box
		// has the same lowest z, but the run is not flat.
		strip := &mesh.Mesh{}
		for i := range 41 {
			y := float64(i) / 40
			strip.Vertices = append(strip.Vertices, geometry.Vec3{X: 0.2, Y: y, Z: 0.4}, geometry.Vec3{X: 0.8, Y: y, Z: 0.6})
		}
		for i := range int32(40) {
			strip.Facets = append(strip.Facets, [3]int32{2 * i, 2*i + 2, 2*i + 3}, [3]int32{2 * i, 2*i + 3, 2*i + 1})
		}
		join(m, strip)
		addSoup(m, rng, 300, 0.05)
		transform(m, scale, shift)
		roundAll(m.Vertices)
		return m
	}
	cases := []struct {
		name  string
		scale float64
		shift geometry.Vec3
	}{
		{"unit", 1, geometry.Vec3{}},
		{"far off", 0.1, geometry.Vec3{X: 2e3, Y: -1e3, Z: 1.5e3}},
		{"kilometres", 1000, geometry.Vec3{X: -500, Y: -500, Z: -500}},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			m := build(tc.scale, tc.shift)
			tree := Build(m.Vertices, m.Facets, Options{Threads: 2})
			if len(tree.grids) != 8 { // six walls, two plates; not the tilted one
				t.Fatalf("%d plane grids, want 8", len(tree.grids))
			}
			point := func(p geometry.Vec3) geometry.Vec3 { return p.Scale(tc.scale).Add(tc.shift) }
			var qs []Query
			st := sample.NewStream(7, 0, 0)
			for r := range 4000 {
				o := point(geometry.Vec3{X: rng.Float64(), Y: rng.Float64(), Z: rng.Float64()})
				d := geometry.Vec3{X: rng.NormFloat64(), Y: rng.NormFloat64(), Z: rng.NormFloat64()}
				skip := int32(-1)
				switch r % 5 {
				case 1: // through a vertex of a plate or a wall
					v := m.Vertices[m.Facets[rng.IntN(len(m.Facets)-380)][rng.IntN(3)]]
					d = v.Sub(o)
				case 2: // from a facet, as emitted
					f := rng.IntN(len(m.Facets))
					o, d = emit(m, f, &st)
					skip = int32(f)
				case 3: // grazing the plates
					d.Z *= 1e-7
				case 4:
					d = geometry.Vec3{X: float64(r % 3), Y: float64(r / 3 % 2), Z: 1}
				}
				tMax := math.Inf(1)
				if r%7 == 0 {
					tMax = rng.Float64() * tc.scale
				}
				qs = append(qs, Query{O: o, D: d, TMax: tMax, Skip: skip})
				want := sameHit(t, tree, m.Vertices, m.Facets, o, d, tMax, skip)
				if occ := tree.Occluded(o, d, tMax, skip); occ != (want.Facet >= 0) {
					t.Fatalf("ray %d: Occluded = %v, brute force hit %+v", r, occ, want)
				}
			}
			var b Batch
			hits := make([]Hit, len(qs))
			tree.IntersectBatch(&b, qs, hits)
			for i, q := range qs {
				if h := tree.Intersect(q.O, q.D, q.TMax, q.Skip); h != hits[i] {
					t.Fatalf("ray %d: batch %+v, single %+v", i, hits[i], h)
				}
			}
		})
	}
}

// A run whose facets' boxes would fill too many cells (a fan of slivers
// across a face) keeps its subtree, and is still exact.
func TestGridRefusesSlivers(t *testing.T) {
	const n = 200
	m := &mesh.Mesh{Vertices: []geometry.Vec3{{}}}
	for i := range n + 1 {
		a := 0.5 * math.Pi * float64(i) / n
		m.Vertices = append(m.Vertices, geometry.Vec3{X: math.Cos(a), Y: math.Sin(a)})
	}
	for i := range int32(n) {
		m.Facets = append(m.Facets, [3]int32{0, i + 1, i + 2})
	}
	join(m, plate(rand.New(rand.NewPCG(1, 1)), 8, 1, 0, false)) // a second run, so runs are looked for
	roundAll(m.Vertices)
	tree := Build(m.Vertices, m.Facets, Options{Threads: 1})
	if len(tree.grids) != 1 {
		t.Fatalf("%d plane grids, want only the plate's", len(tree.grids))
	}
	rng := rand.New(rand.NewPCG(2, 2))
	for range 500 {
		o := geometry.Vec3{X: rng.Float64(), Y: rng.Float64(), Z: 0.5}
		d := geometry.Vec3{X: rng.NormFloat64(), Y: rng.NormFloat64(), Z: rng.NormFloat64()}
		sameHit(t, tree, m.Vertices, m.Facets, o, d, math.Inf(1), -1)
	}
}

// Rays between the walls of a closed box cross one wall's grid and take
// few wide steps: 2.0 measured with grids, 8.0 with a subtree per wall,
// 11.6 with SAH alone. A count, not a time, so it holds on a noisy
// machine.
func TestEnclosureSteps(t *testing.T) {
	m := mesh.Box("", geometry.Box{Max: geometry.Vec3{X: 1, Y: 1, Z: 1}}, 64, true)
	roundAll(m.Vertices)
	tree := Build(m.Vertices, m.Facets, Options{Threads: 1})
	s := sample.NewStream(5, 0, 0)
	const rays = 20000
	inner, grids := 0, 0
	for range rays {
		f := int(s.Uint64() % uint64(len(m.Facets)))
		o, d := emit(m, f, &s)
		var l lane
		tree.startLane(&l, &Query{O: o, D: d, TMax: math.Inf(1), Skip: int32(f)})
		for {
			switch l.count {
			case 0:
				inner++
			case gridCount:
				grids++
			}
			if tree.step(&l) {
				break
			}
		}
	}
	if per := float64(inner) / rays; per > 3 {
		t.Errorf("%.1f wide steps a ray, want at most 3", per)
	}
	if per := float64(grids) / rays; per < 0.99 || per > 1.2 {
		t.Errorf("%.2f grid visits a ray, want about 1", per)
	}
}
