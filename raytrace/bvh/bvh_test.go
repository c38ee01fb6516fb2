package bvh

import (
	"math"
	"math/rand/v2"
	"slices"
	"testing"
	"unsafe"

	"github.com/hemiray/hemiray/geometry"
	"github.com/hemiray/hemiray/mesh"
	"github.com/hemiray/hemiray/raytrace/sample"
)

func TestNodeSize(t *testing.T) {
	if s := unsafe.Sizeof(treeNode{}); s != 32 {
		t.Errorf("treeNode is %d bytes, want 32", s)
	}
	if s := unsafe.Sizeof(leafTri{}); s != 40 {
		t.Errorf("leafTri is %d bytes, want 40", s)
	}
	// fetchChild (assembly) and step assume these sizes.
	if s := unsafe.Sizeof(wideNode{}); s != wideSize || wideSize != 128 {
		t.Errorf("wideNode is %d bytes, wideSize %d; fetchChild assumes 128", s, wideSize)
	}
	if p := unsafe.Sizeof(wideNode{}.Bounds[0]); p != 16 {
		t.Errorf("a plane of wideNode bounds is %d bytes, want 16 (four float32)", p)
	}
}

// randomSoup returns n random triangles of size about s in the unit cube,
// plus some flat axis-aligned ones and a few degenerate ones.
func randomSoup(rng *rand.Rand, n int, s float64) ([]geometry.Vec3, [][3]int32) {
	var v []geometry.Vec3
	var f [][3]int32
	for i := range n {
		c := geometry.Vec3{X: rng.Float64(), Y: rng.Float64(), Z: rng.Float64()}
		p := func() geometry.Vec3 {
			return c.Add(geometry.Vec3{X: rng.Float64() - 0.5, Y: rng.Float64() - 0.5, Z: rng.Float64() - 0.5}.Scale(s))
		}
		a, b, d := p(), p(), p()
		switch i % 10 {
		case 0: // flat in z, like a CAD face
			b.Z, d.Z = a.Z, a.Z
		case 1: // degenerate: collinear
			d = a.Add(b.Sub(a).Scale(0.5))
		}
		k := int32(len(v))
		v = append(v, a, b, d)
		f = append(f, [3]int32{k, k + 1, k + 2})
	}
	return v, f
}

// sameHit fails the test unless the tree's closest hit of the ray is
// brute force's: the same facet, or, where two facets share the hit point
// (an edge, or a plate's edge on a wall), a distance equal up to rounding.
// It returns brute force's hit.
func sameHit(t *testing.T, tree *Tree, v []geometry.Vec3, f [][3]int32, o, d geometry.Vec3, tMax float64, skip int32) Hit {
	t.Helper()
	got := tree.Intersect(o, d, tMax, skip)
	want := bruteForce(v, f, o, d, tMax, skip)
	if got.Facet != want.Facet && math.Abs(got.T-want.T) > 1e-15*want.T {
		t.Fatalf("Intersect(%v, %v, %v, %d) = %+v, brute force %+v", o, d, tMax, skip, got, want)
	}
	return want
}

func bruteForce(v []geometry.Vec3, f [][3]int32, o, d geometry.Vec3, tMax float64, skip int32) Hit {
	best := Miss
	sh := geometry.NewShear(o, d)
	for i, t := range f {
		if int32(i) == skip {
			continue
		}
		a, b, c := v[t[0]].Array(), v[t[1]].Array(), v[t[2]].Array()
		if th, b1, b2, front, ok := sh.Triangle(&a, &b, &c, tMax); ok {
			tMax = th
			best = Hit{T: th, B1: b1, B2: b2, Facet: int32(i), Front: front}
		}
	}
	return best
}

func TestAgainstBruteForce(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	for _, n := range []int{1, 2, 7, 100, 3000} {
		v, f := randomSoup(rng, n, 0.2)
		roundAll(v)
		tree := Build(v, f, Options{Threads: 2})
		for range 3000 {
			o := geometry.Vec3{X: rng.Float64()*1.4 - 0.2, Y: rng.Float64()*1.4 - 0.2, Z: rng.Float64()*1.4 - 0.2}
			d := geometry.Vec3{X: rng.NormFloat64(), Y: rng.NormFloat64(), Z: rng.NormFloat64()}
			if rng.IntN(8) == 0 { // axis-parallel rays hit the flat boxes edge-on
				d = geometry.Vec3{Z: 1}
			}
			skip := int32(rng.IntN(n+1) - 1)
			tMax := math.Inf(1)
			if rng.IntN(4) == 0 {
				tMax = rng.Float64()
			}
			got := tree.Intersect(o, d, tMax, skip)
			want := bruteForce(v, f, o, d, tMax, skip)
			// Equal distances can come from two triangles (a shared point); then
			// either facet is right.
			if got.Facet != want.Facet && got.T != want.T ||
				math.Abs(got.T-want.T) > 1e-12*math.Abs(want.T) && !math.IsInf(want.T, 1) {
				t.Fatalf("n=%d: Intersect(%v, %v) = %+v, brute force %+v", n, o, d, got, want)
			}
			if occ := tree.Occluded(o, d, tMax, skip); occ != (want.Facet >= 0) {
				t.Fatalf("n=%d: Occluded = %v, brute force hit %+v", n, occ, want)
			}
		}
		if n > 1 && tree.Stats.MaxLeaf > maxLeafSize {
			t.Errorf("n=%d: leaf of %d triangles", n, tree.Stats.MaxLeaf)
		}
	}
}

func TestEmptyAndDegenerate(t *testing.T) {
	tree := Build(nil, nil, Options{})
	if h := tree.Intersect(geometry.Vec3{}, geometry.Vec3{Z: 1}, math.Inf(1), -1); h.Facet != -1 {
		t.Errorf("empty tree hit %+v", h)
	}
	// Only degenerate and NaN triangles: nothing to hit, nothing to crash.
	v := []geometry.Vec3{{}, {X: 1}, {X: 2}, {X: math.NaN()}}
	f := [][3]int32{{0, 1, 2}, {0, 1, 3}, {0, 0, 0}}
	tree = Build(v, f, Options{})
	for _, d := range []geometry.Vec3{{Z: 1}, {X: 1}, {Y: -1}} {
		if h := tree.Intersect(geometry.Vec3{X: 0.5, Z: -1}, d, math.Inf(1), -1); h.Facet != -1 {
			t.Errorf("degenerate triangles hit by %v: %+v", d, h)
		}
	}
	// A vertex that is not finite as a float32 (NaN in y, or beyond the
	// float32 range in z) leaves its facets out; the others stay.
	v = []geometry.Vec3{{}, {X: 1}, {Y: 1}, {X: 1, Y: math.NaN()}, {Y: 1, Z: 1e39}}
	f = [][3]int32{{0, 1, 2}, {0, 3, 2}, {0, 1, 4}}
	if tree = Build(v, f, Options{}); tree.Stats.Triangles != 1 {
		t.Errorf("%d triangles kept, want the 1 finite one", tree.Stats.Triangles)
	}
	// Many identical triangles (all centroids equal) still make small leaves.
	v = []geometry.Vec3{{}, {X: 1}, {Y: 1}}
	f = make([][3]int32, 1000)
	for i := range f {
		f[i] = [3]int32{0, 1, 2}
	}
	tree = Build(v, f, Options{})
	if h := tree.Intersect(geometry.Vec3{X: 0.2, Y: 0.2, Z: 1}, geometry.Vec3{Z: -1}, math.Inf(1), -1); h.Facet < 0 || h.T != 1 {
		t.Errorf("stacked triangles: %+v", h)
	}
}

// roundAll rounds vertices as the tree stores them, so that brute force and
// emission see exactly the tree's triangles.
func roundAll(v []geometry.Vec3) {
	for i := range v {
		v[i] = RoundVertex(v[i])
	}
}

// emit returns a ray leaving facet f of m like the estimator's rays: a
// uniform point, a cosine-weighted direction about the front normal, the
// origin offset off the facet's plane.
func emit(m *mesh.Mesh, f int, s *sample.Stream) (o, d geometry.Vec3) {
	tr := m.Triangle(f)
	b1, b2 := sample.UniformTriangle(s.Float64(), s.Float64())
	p := tr.Point(b1, b2)
	n := tr.Normal()
	x, y, z := sample.CosineHemisphere(s.Float64(), s.Float64())
	d = geometry.NewFrame(n).ToWorld(x, y, z)
	return geometry.OffsetOrigin(p, tr.V0, tr.V1, tr.V2, 1-b1-b2, b1, b2, n), d
}

// Rays from inside closed, inward-facing shapes must hit the front of some
// other facet: no escape through an edge or vertex, no self-hit, no back hit.
// Half the rays are aimed exactly at vertices (shared by several facets);
// such a ray leaves the surface at that vertex, where every facet sharing it
// is hit at the same distance, so a back hit counts only elsewhere.
func TestWatertightClosedShapes(t *testing.T) {
	n := 1000000
	if testing.Short() {
		n = 100000
	}
	shapes := map[string]*mesh.Mesh{
		"box":    mesh.Box("", geometry.Box{Min: geometry.Vec3{X: -0.3, Y: 0.1, Z: 2}, Max: geometry.Vec3{X: 1.7, Y: 0.6, Z: 3.5}}, 5, true),
		"sphere": mesh.Sphere("s", geometry.Vec3{X: 0.25, Y: -3, Z: 1}, 2, 8, true),
		// walls of 128 facets: plane grids (grid.go)
		"gridded box": mesh.Box("", geometry.Box{Min: geometry.Vec3{X: -0.3, Y: 0.1, Z: 2}, Max: geometry.Vec3{X: 1.7, Y: 0.6, Z: 3.5}}, 8, true),
	}
	for name, m := range shapes {
		t.Run(name, func(t *testing.T) {
			roundAll(m.Vertices)
			tree := Build(m.Vertices, m.Facets, Options{})
			s := sample.NewStream(11, 0, 0)
			escapes, selfHits, backHits := 0, 0, 0
			for k := range n / len(shapes) {
				f := int(s.Uint64() % uint64(len(m.Facets)))
				o, d := emit(m, f, &s)
				target := int32(-1)
				if k%2 == 0 { // aim exactly at a vertex of the mesh
					target = int32(s.Uint64() % uint64(len(m.Vertices)))
					d = m.Vertices[target].Sub(o)
					if d.Dot(m.Triangle(f).Normal()) <= 0 {
						continue
					}
				}
				h := tree.Intersect(o, d, math.Inf(1), int32(f))
				switch {
				case h.Facet < 0:
					escapes++
				case h.Facet == int32(f):
					selfHits++
				case !h.Front && !slices.Contains(m.Facets[h.Facet][:], target):
					backHits++
				}
			}
			if escapes+selfHits+backHits > 0 {
				t.Errorf("%d escapes, %d self-hits, %d back hits", escapes, selfHits, backHits)
			}
		})
	}
}

// A model at millimetre scale and one at ten-kilometre scale give the same
// hits for the same relative rays: nothing depends on an absolute epsilon.
func TestScaleInvariance(t *testing.T) {
	var hits [2][]int32
	for i, scale := range []float64{1e-3, 1e4} {
		m := mesh.Box("", geometry.Box{Min: geometry.Vec3{X: 1, Y: 2, Z: 3}.Scale(scale), Max: geometry.Vec3{X: 2, Y: 4, Z: 3.5}.Scale(scale)}, 4, true)
		roundAll(m.Vertices)
		tree := Build(m.Vertices, m.Facets, Options{})
		s := sample.NewStream(3, 0, 0)
		for range 20000 {
			f := int(s.Uint64() % uint64(len(m.Facets)))
			o, d := emit(m, f, &s)
			hits[i] = append(hits[i], tree.Intersect(o, d, math.Inf(1), int32(f)).Facet)
		}
	}
	diff := 0
	for k := range hits[0] {
		if hits[0][k] != hits[1][k] || hits[0][k] < 0 {
			diff++
		}
	}
	// Only rays within rounding of a shared edge may pick the other neighbour.
	if diff > 2 {
		t.Errorf("%d of %d rays differ or escape between scales", diff, len(hits[0]))
	}
}

func TestNoAllocations(t *testing.T) {
	m := mesh.Sphere("s", geometry.Vec3{}, 1, 6, true)
	roundAll(m.Vertices)
	tree := Build(m.Vertices, m.Facets, Options{})
	s := sample.NewStream(1, 0, 0)
	o, d := emit(m, 3, &s)
	if a := testing.AllocsPerRun(1000, func() {
		tree.Intersect(o, d, math.Inf(1), 3)
		tree.Occluded(o, d, math.Inf(1), 3)
	}); a != 0 {
		t.Errorf("%v allocations per ray, want 0", a)
	}
}

func TestParallelBuildMatchesSerial(t *testing.T) {
	same := &mesh.Mesh{Vertices: []geometry.Vec3{{}, {X: 1}, {Y: 1}}} // one centroid: halved by count
	for range 2*parallelSplit + 100 {
		same.Facets = append(same.Facets, [3]int32{0, 1, 2})
	}
	for _, m := range []*mesh.Mesh{
		mesh.Sphere("s", geometry.Vec3{}, 1, 92, false), // 101,568 facets: clusters, > parallelSplit a side
		same,
	} {
		a := Build(m.Vertices, m.Facets, Options{Threads: 1})
		b := Build(m.Vertices, m.Facets, Options{Threads: 4})
		if len(a.nodes) != len(b.nodes) {
			t.Fatalf("serial %d nodes, parallel %d", len(a.nodes), len(b.nodes))
		}
		for i := range a.nodes {
			if a.nodes[i] != b.nodes[i] {
				t.Fatalf("node %d differs: %+v vs %+v", i, a.nodes[i], b.nodes[i])
			}
		}
	}
}

// IntersectBatch must return exactly what Intersect returns, ray by ray.
func TestBatchMatchesSingle(t *testing.T) {
	m := mesh.Box("", geometry.Box{Max: geometry.Vec3{X: 2, Y: 1, Z: 1}}, 6, true)
	if err := m.Append(mesh.Sphere("ball", geometry.Vec3{X: 1, Y: 0.5, Z: 0.5}, 0.3, 5, false)); err != nil {
		t.Fatal(err)
	}
	roundAll(m.Vertices)
	tree := Build(m.Vertices, m.Facets, Options{})
	s := sample.NewStream(5, 0, 0)
	qs := make([]Query, 1001) // not a multiple of the lane count
	for i := range qs {
		f := int(s.Uint64() % uint64(len(m.Facets)))
		o, d := emit(m, f, &s)
		qs[i] = Query{O: o, D: d, TMax: math.Inf(1), Skip: int32(f)}
		if i%7 == 0 {
			qs[i].TMax = 0.1
		}
	}
	hits := make([]Hit, len(qs))
	var b Batch
	tree.IntersectBatch(&b, qs, hits)
	for i, q := range qs {
		if want := tree.Intersect(q.O, q.D, q.TMax, q.Skip); hits[i] != want {
			t.Fatalf("ray %d: batch %+v, single %+v", i, hits[i], want)
		}
	}
	if a := testing.AllocsPerRun(10, func() { tree.IntersectBatch(&b, qs, hits) }); a != 0 {
		t.Errorf("IntersectBatch: %v allocations, want 0", a)
	}
}

// A zero-thickness box (a flat face) is entered by a ray crossing it, and
// not by a ray that ends before it: the slab test is conservative, never
// so exact that it drops a box the ray touches (Ize, "Robust BVH ray
// traversal", JCGT 2(2), 2013). The box of a one-facet tree's leaf is such a box,
// a child of the root like every other box.
func TestSlabFlatBox(t *testing.T) {
	v := []geometry.Vec3{{X: 0, Y: 0, Z: 1}, {X: 1, Y: 0, Z: 1}, {X: 0, Y: 1, Z: 1}}
	tree := Build(v, [][3]int32{{0, 1, 2}}, Options{})
	o, d := geometry.Vec3{X: 0.25, Y: 0.25}, geometry.Vec3{Z: 1}
	if h := tree.Intersect(o, d, 10, -1); h.Facet != 0 || h.T != 1 {
		t.Errorf("an axis-parallel ray crossing a flat facet: %+v", h)
	}
	if h := tree.Intersect(o, d, 0.5, -1); h.Facet >= 0 {
		t.Errorf("a ray ending before the facet hits it: %+v", h)
	}
	if h := tree.Intersect(o, geometry.Vec3{Z: -1}, 10, -1); h.Facet >= 0 {
		t.Errorf("a ray going away hits: %+v", h)
	}
}
