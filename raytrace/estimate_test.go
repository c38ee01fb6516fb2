package raytrace

import (
	"context"
	"math"
	"reflect"
	"strings"
	"testing"

	"github.com/hemiray/hemiray/geometry"
	"github.com/hemiray/hemiray/mesh"
)

// Every catalogue configuration against its closed form:
// |F̂ − F| ≤ 4·stderr + the case's stated tessellation bound.
func TestReferenceCases(t *testing.T) {
	rays := int64(1000000)
	if testing.Short() {
		rays = 50000
	}
	for _, c := range ReferenceCases() {
		t.Run(c.Name, func(t *testing.T) {
			res, err := c.Check(context.Background(), Options{Settings: Settings{Rays: rays, Seed: 1}})
			if err != nil {
				t.Fatal(err)
			}
			if !res.Pass {
				t.Errorf("F(%s→%s) = %.5f ± %.5f (1σ), reference %.5f (%s), bound %.2g: %.1fσ beyond the bound",
					c.From, c.To, res.Estimate.F, res.Estimate.StdErr, c.Reference, c.Source, c.Bound, res.Score)
			}
			// A bound of a percent or more would let a wrong estimator pass.
			if c.Bound >= 0.01*c.Reference {
				t.Errorf("tessellation bound %.3g is too loose to test anything", c.Bound)
			}
		})
	}
}

// Plain Monte Carlo: over many seeds, 95 % Wilson intervals must contain the exact value in
// about 95 % of runs (92–98 % accepted: ±2.7 binomial standard deviations at
// 400 runs). Flat squares: the exact value is the closed form (Howell C-11).
func TestIntervalCoverage(t *testing.T) {
	m := ReferenceCases()[0].Mesh
	exact := geometry.FParallelRectangles(1, 1, 1)
	const runs = 400
	covered := 0
	for seed := range uint64(runs) {
		r, err := Estimate(context.Background(), m, Options{Settings: Settings{Rays: 2000, Seed: seed + 1000, Sampling: SamplingMC}})
		if err != nil {
			t.Fatal(err)
		}
		f := r.Factor(r.NodeIndex("bottom"), r.NodeIndex("top"))
		if f.Lo <= exact && exact <= f.Hi {
			covered++
		}
	}
	if c := float64(covered) / runs; c < 0.92 || c > 0.98 {
		t.Errorf("coverage %.3f over %d seeds, want 0.92–0.98", c, runs)
	}
}

// In a closed box every ray lands on a face: rows sum to exactly 1, there is
// no ambient column, and A_i·F_ij = A_j·F_ji within the combined error
// (reciprocity, any radiation textbook).
func TestClosedEnclosure(t *testing.T) {
	m := mesh.Box("", geometry.Box{Max: geometry.Vec3{X: 2, Y: 1, Z: 0.5}}, 3, true)
	r, err := Estimate(context.Background(), m, Options{Settings: Settings{Rays: 100000, Seed: 3}})
	if err != nil {
		t.Fatal(err)
	}
	if r.HasAmbient() {
		t.Error("closed box has an ambient column")
	}
	for i := range r.Nodes {
		if s := r.RowSum(i); s != 1 {
			t.Errorf("row %s sums to %v, want 1", r.Nodes[i].Name, s)
		}
		for j := range r.Nodes {
			fij, fji := r.Factor(i, j), r.Factor(j, i)
			ai, aj := r.Nodes[i].Area, r.Nodes[j].Area
			se := math.Hypot(ai*fij.StdErr, aj*fji.StdErr)
			if d := math.Abs(ai*fij.F - aj*fji.F); d > 4*se+1e-12 {
				t.Errorf("A·F %s↔%s differ by %.3g > 4σ = %.3g", r.Nodes[i].Name, r.Nodes[j].Name, d, 4*se)
			}
		}
	}
}

// The same seed gives the same tallies with 1 and with 3 threads and with
// another batch split of the work.
func TestDeterminism(t *testing.T) {
	m := ReferenceCases()[1].Mesh
	for _, sampling := range []string{SamplingMC, SamplingRQMC, "followed"} {
		var got []*Result
		for _, th := range []int{1, 3} {
			s := Settings{Rays: 30000, Seed: 9, BatchSize: 4096, Sampling: sampling}
			if sampling == "followed" {
				s.Sampling, s.Optics = SamplingRQMC, halfMirrors(m)
			}
			r, err := Estimate(context.Background(), m, Options{Settings: s, Threads: th})
			if err != nil {
				t.Fatal(err)
			}
			got = append(got, r)
		}
		if !reflect.DeepEqual(got[0].Tally, got[1].Tally) || !reflect.DeepEqual(got[0].Replicas, got[1].Replicas) {
			t.Errorf("%s: tallies differ between 1 and 3 threads:\n%+v\n%+v", sampling, got[0].Tally, got[1].Tally)
		}
	}
}

// halfMirrors gives every surface of m emissivity 0.4 and half of its
// reflection mirror-like, so that rays are followed through reflections.
func halfMirrors(m *mesh.Mesh) map[string]Optics {
	o := map[string]Optics{}
	for _, s := range m.Surfaces {
		o[s.Name] = Optics{Emissivity: 0.4, Specular: 0.5}
	}
	return o
}

// A box with one face flipped: rays from the others hit its back, which is
// counted per surface and never enters a view factor.
func TestBackFaceHits(t *testing.T) {
	m := mesh.Box("", geometry.Box{Max: geometry.Vec3{X: 1, Y: 1, Z: 1}}, 2, true)
	top := m.SurfaceIndex("zmax")
	for _, f := range m.Surfaces[top].Facets {
		v := &m.Facets[f]
		v[1], v[2] = v[2], v[1]
	}
	r, err := Estimate(context.Background(), m, Options{Settings: Settings{Rays: 20000, Seed: 4}})
	if err != nil {
		t.Fatal(err)
	}
	names := make([]string, len(m.Surfaces))
	for i, s := range m.Surfaces {
		names[i] = s.Name
	}
	bf := r.BackFaces(names)
	if len(bf) == 0 || bf[0].Surface != "zmax" {
		t.Fatalf("back faces = %+v, want zmax", bf)
	}
	// Opposite unit squares see each other with F = 0.19982 (Howell C-11).
	floor := r.NodeIndex("zmin")
	if f := float64(r.Back[floor].At(int32(top))) / float64(r.Rays[floor]); math.Abs(f-0.19982) > 4*math.Sqrt(0.2*0.8/20000) {
		t.Errorf("back-hit fraction from the floor = %v, want ≈ 0.1998", f)
	}
	if r.Factor(floor, int(r.NodeIndex("zmax"))).Hits != 0 {
		t.Error("back-face hits entered the view factor")
	}
	if len(r.Warnings(names)) == 0 {
		t.Error("no warning for 20 % back-face hits")
	}
}

func TestTwoSidedAndFacetNodes(t *testing.T) {
	// A plate between two opposed squares; two-sided, its back sees the lower square.
	v := func(x, y, z float64) geometry.Vec3 { return geometry.Vec3{X: x, Y: y, Z: z} }
	m, err := join(mesh.Rectangle("low", v(0, 0, 0), v(1, 0, 0), v(0, 1, 0), 2, 2),
		mesh.Rectangle("plate", v(0, 0, 1), v(1, 0, 0), v(0, 1, 0), 2, 2),
		mesh.Rectangle("high", v(0, 0, 2), v(0, 1, 0), v(1, 0, 0), 2, 2))
	if err != nil {
		t.Fatal(err)
	}
	r, err := Estimate(context.Background(), m, Options{Settings: Settings{Rays: 50000, Seed: 2, TwoSided: []string{"plate"}}})
	if err != nil {
		t.Fatal(err)
	}
	exact := geometry.FParallelRectangles(1, 1, 1) // Howell C-11
	for _, p := range [][2]string{{"low", "plate.back"}, {"plate", "high"}, {"plate.back", "low"}} {
		f := r.Factor(r.NodeIndex(p[0]), r.NodeIndex(p[1]))
		if math.Abs(f.F-exact) > 4*f.StdErr {
			t.Errorf("F(%s→%s) = %v ± %v, want %v", p[0], p[1], f.F, f.StdErr, exact)
		}
	}
	// Facet nodes: 12 facets + 4 back sides; rows still sum to 1 with the ambient.
	r, err = Estimate(context.Background(), m, Options{Settings: Settings{Rays: 2000, Seed: 2, TwoSided: []string{"plate"}, FacetNodes: true}})
	if err != nil {
		t.Fatal(err)
	}
	if len(r.Nodes) != 32 || r.Nodes[8].Name != "plate#0" || r.Nodes[9].Name != "plate#0.back" {
		t.Fatalf("facet nodes: %d, %s %s", len(r.Nodes), r.Nodes[8].Name, r.Nodes[9].Name)
	}
	for i := range r.Nodes {
		if s := r.RowSum(i); s != 1 {
			t.Errorf("row %s sums to %v", r.Nodes[i].Name, s)
		}
	}
}

// HalfWidth rounds double a node's rays until its row's half-width meets
// the target: with plain Monte Carlo at the binomial law's count, with RQMC
// (replicate intervals) no later and, on flat squares, at least one
// doubling sooner.
func TestHalfWidthRounds(t *testing.T) {
	m := ReferenceCases()[0].Mesh
	q, err := Estimate(context.Background(), m, Options{Settings: Settings{Rays: 1000, HalfWidth: 0.01, Seed: 5, Sampling: SamplingRQMC}})
	if err != nil {
		t.Fatal(err)
	}
	r, err := Estimate(context.Background(), m, Options{Settings: Settings{Rays: 1000, HalfWidth: 0.01, Seed: 5, Sampling: SamplingMC}})
	if err != nil {
		t.Fatal(err)
	}
	for i := range q.Nodes {
		if w := q.RowHalfWidth(i); w > 0.01 || q.Rays[i] >= r.Rays[i] {
			t.Errorf("RQMC node %s: half-width %v after %d rays (plain Monte Carlo: %d)", q.Nodes[i].Name, w, q.Rays[i], r.Rays[i])
		}
	}
	for i := range r.Nodes {
		if w := r.RowHalfWidth(i); w > 0.01 {
			t.Errorf("node %s: half-width %v > 0.01 after %d rays", r.Nodes[i].Name, w, r.Rays[i])
		}
		// a3: n ≥ z²F(1−F)/H² ≈ 6,100 for F≈0.2, fewer than 64,000 when doubling from 1000.
		if r.Rays[i] != 8000 && r.Rays[i] != 16000 {
			t.Errorf("node %s: %d rays, want the first doubling above 6,100 (8,000) or the next", r.Nodes[i].Name, r.Rays[i])
		}
	}
}

func TestCancel(t *testing.T) {
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	_, err := Estimate(ctx, ReferenceCases()[0].Mesh, Options{Settings: Settings{Rays: 1e6}})
	if err == nil {
		t.Error("cancelled Estimate returned no error")
	}
}

func TestWilson(t *testing.T) {
	// k = 0: [0, z²/(n + z²)] (Wilson 1927; Brown, Cai & DasGupta, "Interval estimation for a binomial proportion", Statistical Science 16(2), 2001; from memory).
	lo, hi := Wilson(0, 100, 1.96)
	if lo != 0 || math.Abs(hi-1.96*1.96/(100+1.96*1.96)) > 1e-15 {
		t.Errorf("Wilson(0,100) = [%v, %v]", lo, hi)
	}
	// k = 5, n = 10 at 95 %: [0.2366, 0.7634] (Wilson interval tables, e.g.
	// Newcombe, Statistics in Medicine 17, 1998, table I; from memory).
	lo, hi = Wilson(5, 10, zScore(0.95))
	if math.Abs(lo-0.2366) > 1e-4 || math.Abs(hi-0.7634) > 1e-4 {
		t.Errorf("Wilson(5,10) = [%.4f, %.4f], want [0.2366, 0.7634]", lo, hi)
	}
	if z := zScore(0.95); math.Abs(z-1.959964) > 1e-6 {
		t.Errorf("z(0.95) = %v", z)
	}
}

func TestReplicatesAddUp(t *testing.T) {
	m := ReferenceCases()[1].Mesh
	r, err := Estimate(context.Background(), m, Options{Settings: Settings{Rays: 10001, Seed: 3, Replicates: 4, Sampling: SamplingMC}})
	if err != nil {
		t.Fatal(err)
	}
	sum := *newTally(len(r.Nodes))
	for _, rep := range r.Replicas {
		for i := range r.Nodes {
			sum.Rays[i] += rep.Rays[i]
			sum.Escaped[i] += rep.Escaped[i]
			sum.Hits[i] = sum.Hits[i].Add(rep.Hits[i])
			sum.Back[i] = sum.Back[i].Add(rep.Back[i])
		}
	}
	if !reflect.DeepEqual(sum, r.Tally) {
		t.Errorf("replicates do not add up to the pooled tally")
	}
	if r.Replicas[0].Rays[0] != 2501 || r.Replicas[3].Rays[0] != 2500 {
		t.Errorf("replicate rays %d, %d; want 2501, 2500", r.Replicas[0].Rays[0], r.Replicas[3].Rays[0])
	}
	// With plain Monte Carlo, replicates do not change the pooled numbers
	// (with RQMC they do: each replicate is its own point set).
	r2, err := Estimate(context.Background(), m, Options{Settings: Settings{Rays: 10001, Seed: 3, Sampling: SamplingMC}})
	if err != nil {
		t.Fatal(err)
	}
	if !reflect.DeepEqual(r2.Tally, r.Tally) {
		t.Error("pooled tally depends on the replicate count")
	}
}

// Names that would be ambiguous in the outputs are refused: a surface
// called ambient, a surface X.back beside a two-sided X. (Facet nodes,
// NAME#k and NAME#k.back, cannot clash: every one ends in its facet.)
func TestNodeNamesUnambiguous(t *testing.T) {
	v := func(x, y, z float64) geometry.Vec3 { return geometry.Vec3{X: x, Y: y, Z: z} }
	rect := func(name string, z float64) *mesh.Mesh {
		return mesh.Rectangle(name, v(0, 0, z), v(1, 0, 0), v(0, 1, 0), 1, 1)
	}
	join := func(ms ...*mesh.Mesh) *mesh.Mesh {
		out := &mesh.Mesh{}
		for _, m := range ms {
			if err := out.Append(m); err != nil {
				t.Fatal(err)
			}
		}
		return out
	}
	tests := []struct {
		m    *mesh.Mesh
		s    Settings
		want string
	}{
		{join(rect("ambient", 0), rect("b", 1)), Settings{}, `called "ambient"`},
		{join(rect("x", 0), rect("x.back", 1)), Settings{TwoSided: []string{"x"}}, `"x.back"`},
		{join(rect("a", 0), rect("b\r\nc", 1)), Settings{}, "control character"}, // as a rename in the case could give
	}
	for _, tc := range tests {
		if _, err := Nodes(tc.m, Options{Settings: tc.s}); err == nil || !strings.Contains(err.Error(), tc.want) {
			t.Errorf("%v: error %v, want one naming %s", tc.s, err, tc.want)
		}
	}
	if _, err := Nodes(join(rect("x", 0), rect("x.back", 1)), Options{}); err != nil {
		t.Errorf("x.back is a fine name when x is one-sided: %v", err)
	}
}

// A count typed into a flag cannot claim memory: 10¹³ rays per node are
// refused before anything is planned, with the arithmetic in the message.
func TestHugeRayCountRefused(t *testing.T) {
	_, err := Estimate(context.Background(), ReferenceCases()[0].Mesh, Options{Settings: Settings{Rays: 1e13, Seed: 1}})
	if err == nil || !strings.Contains(err.Error(), "work units") {
		t.Errorf("10¹³ rays per node: %v", err)
	}
}

// In facet mode, back-face warnings come one per emitting surface and
// target surface, not one per facet: a plate facing the back of another
// (flipped) plate gives one line naming its worst facets.
func TestBackFaceWarningsSummarized(t *testing.T) {
	v := func(x, y, z float64) geometry.Vec3 { return geometry.Vec3{X: x, Y: y, Z: z} }
	m := &mesh.Mesh{}
	for _, p := range []*mesh.Mesh{
		mesh.Rectangle("low", v(0, 0, 0), v(1, 0, 0), v(0, 1, 0), 4, 4),
		mesh.Rectangle("high", v(0, 0, 0.2), v(1, 0, 0), v(0, 1, 0), 1, 1), // faces up: its back faces low
	} {
		if err := m.Append(p); err != nil {
			t.Fatal(err)
		}
	}
	r, err := Estimate(context.Background(), m, Options{Settings: Settings{Rays: 2000, Seed: 1, FacetNodes: true}})
	if err != nil {
		t.Fatal(err)
	}
	w := r.Warnings([]string{"low", "high"})
	if len(w) != 1 || !strings.Contains(w[0], "32 nodes of low") || !strings.Contains(w[0], "worst: low#") {
		t.Errorf("warnings: %q", w)
	}
}

// With a half-width target the progress reports the widest row half-width
// (the one the rounds chase) and a time to the target from the 1/√N law.
func TestProgressReportsWorstHalfWidth(t *testing.T) {
	var last Progress
	o := Options{Settings: Settings{Rays: 2000, HalfWidth: 0.001, MaxRays: 8000, Seed: 1}, Progress: func(p Progress) { last = p }}
	r, err := Estimate(context.Background(), ReferenceCases()[0].Mesh, o)
	if err != nil {
		t.Fatal(err)
	}
	if w := r.worst(); last.WorstHalfWidth != w || w <= 0.001 || last.ToTarget <= 0 {
		t.Errorf("last progress %+v; the result's widest half-width %v", last, w)
	}
}

// With RQMC sampling the intervals come from the replicates (Student-t):
// over 400 seeds, 95 % intervals must contain the exact value 92–98 % of
// the time (±2.7 binomial standard deviations), for a moderate factor and for small ones (closed forms:
// Howell's catalogue C-11, parallel opposed rectangles, and C-14,
// perpendicular rectangles with a common edge; flat squares meshed
// exactly).
func TestRQMCIntervalCoverage(t *testing.T) {
	v := func(x, y, z float64) geometry.Vec3 { return geometry.Vec3{X: x, Y: y, Z: z} }
	opposed := func(h float64) *mesh.Mesh {
		m := mesh.Rectangle("bottom", v(0, 0, 0), v(1, 0, 0), v(0, 1, 0), 1, 1)
		if err := m.Append(mesh.Rectangle("top", v(0, 0, h), v(0, 1, 0), v(1, 0, 0), 1, 1)); err != nil {
			t.Fatal(err)
		}
		return m
	}
	perpendicular := mesh.Rectangle("bottom", v(0, 0, 0), v(1, 0, 0), v(0, 1, 0), 1, 1)
	if err := perpendicular.Append(mesh.Rectangle("top", v(0, 0, 0), v(0, 1, 0), v(0, 0, 1), 1, 1)); err != nil {
		t.Fatal(err)
	}
	cases := []struct {
		name  string
		m     *mesh.Mesh
		exact float64
		rays  int64
	}{
		{"opposed squares, unit distance", opposed(1), geometry.FParallelRectangles(1, 1, 1), 4000},
		{"perpendicular squares", perpendicular, geometry.FPerpendicularRectangles(1, 1, 1), 4000},
		{"opposed squares, distance 4 (F ≈ 0.018)", opposed(4), geometry.FParallelRectangles(1, 1, 4), 4000},
		{"opposed squares, distance 10 (F ≈ 0.003)", opposed(10), geometry.FParallelRectangles(1, 1, 10), 16000},
	}
	const runs = 400
	for _, c := range cases {
		covered := 0
		for seed := range uint64(runs) {
			r, err := Estimate(context.Background(), c.m, Options{Settings: Settings{Rays: c.rays, Seed: seed + 7000, Sampling: SamplingRQMC}})
			if err != nil {
				t.Fatal(err)
			}
			f := r.Factor(r.NodeIndex("bottom"), r.NodeIndex("top"))
			if f.Lo <= c.exact && c.exact <= f.Hi {
				covered++
			}
		}
		if cov := float64(covered) / runs; cov < 0.92 || cov > 0.98 {
			t.Errorf("%s: coverage %.3f over %d seeds, want 0.92–0.98", c.name, cov, runs)
		} else {
			t.Logf("%s: coverage %.3f", c.name, cov)
		}
	}
}

// Row walks the replicates' rows beside the pooled one; each entry it gives
// must be the entry Factor looks up on its own (binary search per
// replicate), on a facet-node model with so few rays that the replicates'
// rows miss columns the pool has.
func TestRowMatchesFactor(t *testing.T) {
	m := mesh.Box("box", geometry.Box{Max: geometry.Vec3{X: 1, Y: 1, Z: 1}}, 4, true)
	r, err := Estimate(context.Background(), m, Options{Settings: Settings{Rays: 60, Seed: 4, Replicates: 4, FacetNodes: true}})
	if err != nil {
		t.Fatal(err)
	}
	partial := 0
	for i := range r.Nodes {
		seen, w := 0, 0.0
		r.Row(i, func(j int, f Factor) {
			if want := r.Factor(i, j); f != want {
				t.Fatalf("Row(%d) at %d = %+v, Factor = %+v", i, j, f, want)
			}
			for q := range r.Replicas {
				if j < len(r.Nodes) && r.Replicas[q].Hits[i].At(int32(j)) == 0 {
					partial++
				}
			}
			seen++
			w = max(w, f.HalfWidth)
		})
		if seen != r.Hits[i].Len()+min(1, int(r.Escaped[i])) {
			t.Fatalf("Row(%d) gave %d entries, want %d", i, seen, r.Hits[i].Len())
		}
	}
	if partial == 0 {
		t.Fatal("every replicate saw every column: the test does not exercise the walk")
	}
}
