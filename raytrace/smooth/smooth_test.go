package smooth

import (
	"fmt"
	"math"
	"math/rand/v2"
	"slices"
	"testing"

	"github.com/hemiray/hemiray/geometry"
)

// cube returns the exact view-factor matrix of the six faces of a unit cube
// from the closed forms: opposite faces F = C-11(1,1,1), adjacent faces
// C-14(1,1,1) (Howell's catalogue). Every row must sum to 1 (closed).
func cube() (area []float64, F [][]float64) {
	fo, fa := geometry.FParallelRectangles(1, 1, 1), geometry.FPerpendicularRectangles(1, 1, 1)
	F = make([][]float64, 6)
	for i := range 6 {
		area = append(area, 1)
		F[i] = make([]float64, 6)
		for j := range 6 {
			switch {
			case i == j:
			case i/2 == j/2:
				F[i][j] = fo
			default:
				F[i][j] = fa
			}
		}
	}
	return area, F
}

// sampleCounts draws multinomial counts of n rays per row.
func sampleCounts(rng *rand.Rand, area []float64, F [][]float64, amb []float64, n int64) Counts {
	c := Counts{Area: area, Rays: make([]int64, len(F)), Hits: make([]CountRow, len(F))}
	if amb != nil {
		c.Ambient = make([]int64, len(F))
	}
	for i := range F {
		c.Rays[i] = n
		k := make([]int64, len(F)+1)
		for range n {
			u := rng.Float64()
			j := 0
			for ; j < len(F) && u >= F[i][j]; j++ {
				u -= F[i][j]
			}
			k[j]++
		}
		for j := range F {
			if k[j] > 0 {
				c.Hits[i].Append(int32(j), k[j])
			}
		}
		if amb != nil {
			c.Ambient[i] = k[len(F)]
		}
	}
	return c
}

func dense(r *Result, n int) [][]float64 {
	F := make([][]float64, n)
	for i := range F {
		F[i] = make([]float64, n)
		for k, j := range r.F[i].Col {
			F[i][j] = r.F[i].Val[k]
		}
	}
	return F
}

func TestCubeCatalogueIsClosed(t *testing.T) {
	// Summation for a closed cube with published closed forms: to round-off.
	_, F := cube()
	s := 0.0
	for _, f := range F[0] {
		s += f
	}
	if math.Abs(s-1) > 1e-12 {
		t.Errorf("cube row sums to %.15f, want 1", s)
	}
}

// Counts exactly proportional to a consistent matrix are its own smoothing.
func TestExactMatrixUnchanged(t *testing.T) {
	// Concentric spheres r1 = 1, r2 = 2 (areas 4π, 16π): F12 = 1, F21 = 1/4,
	// F22 = 3/4 (textbook two-surface enclosure).
	in := Counts{
		Area: []float64{4 * math.Pi, 16 * math.Pi},
		Rays: []int64{1000, 4000},
		Hits: []CountRow{{Col: []int32{1}, Val: []int64{1000}}, {Col: []int32{0, 1}, Val: []int64{1000, 3000}}},
	}
	r, err := Smooth(in)
	if err != nil {
		t.Fatal(err)
	}
	want := [][]float64{{0, 1}, {0.25, 0.75}}
	got := dense(r, 2)
	for i := range want {
		for j := range want[i] {
			if math.Abs(got[i][j]-want[i][j]) > 1e-12 {
				t.Errorf("F[%d][%d] = %v, want %v", i, j, got[i][j], want[i][j])
			}
		}
	}
	if r.MaxMoved > 1e-9 {
		t.Errorf("an exact matrix moved by %v standard errors", r.MaxMoved)
	}
}

// After smoothing reciprocity and summation hold to 1e-12 and F ≥ 0, open
// or closed; and on average over seeds the smoothed matrix is nearer the
// truth than the raw one.
func TestSmoothingProperties(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 7))
	area, F := cube()
	// An open variant: scale every row by 0.8 and send 0.2 to the ambient.
	openF := make([][]float64, 6)
	amb := make([]float64, 6)
	for i := range F {
		openF[i] = make([]float64, 6)
		for j := range F[i] {
			openF[i][j] = 0.8 * F[i][j]
		}
		amb[i] = 0.2
	}
	for _, tc := range []struct {
		name string
		F    [][]float64
		amb  []float64
	}{{"closed", F, nil}, {"open", openF, amb}} {
		var rawErr, smErr float64
		const seeds = 40
		for range seeds {
			c := sampleCounts(rng, area, tc.F, tc.amb, 2000)
			r, err := Smooth(c)
			if err != nil {
				t.Fatal(err)
			}
			if r.ReciprocityAfter > 1e-12 || r.SummationAfter > 1e-12 {
				t.Fatalf("%s: reciprocity %g, summation %g after smoothing", tc.name, r.ReciprocityAfter, r.SummationAfter)
			}
			S := dense(r, 6)
			for i := range S {
				for j := range S[i] {
					if S[i][j] < 0 {
						t.Fatalf("negative factor %v", S[i][j])
					}
					rawF := float64(c.Hits[i].At(int32(j))) / float64(c.Rays[i])
					rawErr += (rawF - tc.F[i][j]) * (rawF - tc.F[i][j])
					smErr += (S[i][j] - tc.F[i][j]) * (S[i][j] - tc.F[i][j])
				}
			}
		}
		if smErr >= rawErr {
			t.Errorf("%s: smoothed squared error %.3g is not below the raw %.3g", tc.name, smErr, rawErr)
		}
		t.Logf("%s: mean squared error raw %.3g, smoothed %.3g", tc.name, rawErr/seeds/36, smErr/seeds/36)
	}
}

func TestSmoothIdempotentAndZeroPairs(t *testing.T) {
	// Two plates that never see each other stay at zero; smoothing a
	// smoothed matrix (fed back as large counts) changes nothing.
	in := Counts{
		Area:    []float64{1, 2, 3},
		Rays:    []int64{1000, 1000, 1000},
		Hits:    []CountRow{{Col: []int32{2}, Val: []int64{300}}, {Col: []int32{2}, Val: []int64{500}}, {Col: []int32{0, 1}, Val: []int64{90, 340}}},
		Ambient: []int64{700, 500, 570},
	}
	r, err := Smooth(in)
	if err != nil {
		t.Fatal(err)
	}
	F := dense(r, 3)
	if F[0][1] != 0 || F[1][0] != 0 {
		t.Errorf("unseen pair became %v, %v", F[0][1], F[1][0])
	}
	const big = 1e12
	again := Counts{Area: in.Area, Rays: []int64{big, big, big}, Ambient: make([]int64, 3), Hits: make([]CountRow, 3)}
	for i := range F {
		for j, f := range F[i] {
			if f > 0 {
				again.Hits[i].Append(int32(j), int64(math.Round(f*big)))
			}
		}
		again.Ambient[i] = int64(math.Round(r.Ambient[i] * big))
	}
	r2, err := Smooth(again)
	if err != nil {
		t.Fatal(err)
	}
	G := dense(r2, 3)
	for i := range F {
		for j := range F[i] {
			if math.Abs(F[i][j]-G[i][j]) > 1e-9 {
				t.Errorf("not idempotent at [%d][%d]: %v → %v", i, j, F[i][j], G[i][j])
			}
		}
	}
}

// The same counts give the same bits every time (no map-order dependence).
func TestSmoothDeterministic(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 9))
	area, F := cube()
	c := sampleCounts(rng, area, F, nil, 5000)
	first, err := Smooth(c)
	if err != nil {
		t.Fatal(err)
	}
	for range 20 {
		again, _ := Smooth(c)
		for i := range first.F {
			for k := range first.F[i].Val {
				if again.F[i].Val[k] != first.F[i].Val[k] || again.F[i].Col[k] != first.F[i].Col[k] {
					t.Fatalf("row %d entry %d: %v then %v", i, k, first.F[i].Val[k], again.F[i].Val[k])
				}
			}
		}
	}
}

// BenchmarkSmooth smooths a facet-level matrix: 2,000 nodes, each seeing 50
// others (a banded sparse pattern), 10⁵ rays per node.
func BenchmarkSmooth(b *testing.B) {
	const n, band = 2000, 25
	c := Counts{Area: make([]float64, n), Rays: make([]int64, n), Hits: make([]CountRow, n), Ambient: make([]int64, n)}
	rng := rand.New(rand.NewPCG(1, 1))
	for i := range n {
		c.Area[i] = 1 + rng.Float64()
		c.Rays[i] = 100000
		left := int64(100000)
		row := make([]int64, n)
		for d := -band; d <= band; d++ {
			if d != 0 {
				k := int64(1500 + rng.IntN(500))
				row[(i+d+n)%n] = k
				left -= k
			}
		}
		for j, k := range row {
			if k > 0 {
				c.Hits[i].Append(int32(j), k)
			}
		}
		c.Ambient[i] = left
	}
	b.ReportAllocs()
	for b.Loop() {
		if _, err := Smooth(c); err != nil {
			b.Fatal(err)
		}
	}
}

// A large node whose rays land only on two smaller ones, each of which
// also loses rays to the ambient: node 0 (area 1.9) sees nodes 1 and 2
// (area 1 each). Reciprocity and summation alone fix the answer here:
// by symmetry A_0F_01 = A_0F_02 = 1.9/2 = 0.95, so F_01 = 0.5, F_10 = 0.95
// and F_1,amb = 0.05, whatever the counts (hand calculation from the
// constraints). The optimum has a negative multiplier for node 0
// (λ_0 = 140/0.95 − 200), which a solver held to λ > 0 cannot reach.
func TestSmoothLargeNodeOnSmallOnes(t *testing.T) {
	c := Counts{
		Area:    []float64{1.9, 1, 1},
		Rays:    []int64{100, 100, 100},
		Hits:    []CountRow{{Col: []int32{1, 2}, Val: []int64{50, 50}}, {Col: []int32{0}, Val: []int64{90}}, {Col: []int32{0}, Val: []int64{90}}},
		Ambient: []int64{0, 10, 10},
	}
	r, err := Smooth(c)
	if err != nil {
		t.Fatal(err)
	}
	for _, x := range []struct {
		name      string
		got, want float64
	}{
		{"F01", r.F[0].At(1), 0.5}, {"F02", r.F[0].At(2), 0.5},
		{"F10", r.F[1].At(0), 0.95}, {"F1amb", r.Ambient[1], 0.05}, {"F0amb", r.Ambient[0], 0},
	} {
		if math.Abs(x.got-x.want) > 1e-12 {
			t.Errorf("%s = %v, want %v", x.name, x.got, x.want)
		}
	}
}

// The diagnostics of a Result, recomputed from its matrix and the counts
// by their definitions, on nodes of unequal area (so that A_i and A_j
// cannot stand in for each other): 1.9, 1 and 1, with the matrix of
// TestSmoothLargeNodeOnSmallOnes, counts drawn over several seeds.
func TestDiagnosticsRecomputed(t *testing.T) {
	area := []float64{1.9, 1, 1}
	F := [][]float64{{0, 0.5, 0.5}, {0.95, 0, 0}, {0.95, 0, 0}}
	rng := rand.New(rand.NewPCG(5, 5))
	for seed := range 5 {
		c := sampleCounts(rng, area, F, []float64{0, 0.05, 0.05}, 400)
		r, err := Smooth(c)
		if err != nil {
			t.Fatal(err)
		}
		S, n := dense(r, 3), 3
		raw := func(i, j int) float64 { return float64(c.Hits[i].At(int32(j))) / float64(c.Rays[i]) }
		var maxRaw, maxNew, recBefore, recAfter, sumBefore, sumAfter, moved float64
		for i := range n {
			for j := range n {
				maxRaw, maxNew = max(maxRaw, area[i]*raw(i, j)), max(maxNew, area[i]*S[i][j])
			}
		}
		for i := range n {
			rs := float64(c.Ambient[i]) / float64(c.Rays[i])
			ss := r.Ambient[i]
			for j := range n {
				recBefore = max(recBefore, math.Abs(area[i]*raw(i, j)-area[j]*raw(j, i))/maxRaw)
				recAfter = max(recAfter, math.Abs(area[i]*S[i][j]-area[j]*S[j][i])/maxNew)
				rs += raw(i, j)
				ss += S[i][j]
			}
			sumBefore, sumAfter = max(sumBefore, math.Abs(1-rs)), max(sumAfter, math.Abs(1-ss))
			for k, j := range r.F[i].Col {
				rf := raw(i, int(j))
				se := math.Sqrt(rf * (1 - rf) / float64(c.Rays[i]))
				if want := (r.F[i].Val[k] - rf) / se; math.Abs(r.Moved(i, k)-want) > 1e-12*math.Abs(want) {
					t.Errorf("seed %d: moved[%d][%d] = %v, want %v", seed, i, j, r.Moved(i, k), want)
				}
				moved = max(moved, math.Abs(r.Moved(i, k)))
			}
			moved = max(moved, math.Abs(r.MovedAmbient[i]))
		}
		for _, d := range []struct {
			name      string
			got, want float64
		}{
			{"ReciprocityBefore", r.ReciprocityBefore, recBefore}, {"ReciprocityAfter", r.ReciprocityAfter, recAfter},
			{"SummationBefore", r.SummationBefore, sumBefore}, {"SummationAfter", r.SummationAfter, sumAfter},
			{"MaxMoved", r.MaxMoved, moved},
		} {
			if math.Abs(d.got-d.want) > 1e-14+1e-12*d.want {
				t.Errorf("seed %d: %s = %v, recomputed %v", seed, d.name, d.got, d.want)
			}
		}
	}
}

// BenchmarkSmoothClosed smooths the counts of a closed enclosure of 10⁴
// equal nodes that all see each other (F_ij = 1/N: the inside of a sphere),
// 1,000 rays a node: about 10⁷ entries, the shape of the scale benchmark's
// pooled tally.
func BenchmarkSmoothClosed(b *testing.B) {
	const n, rays = 10000, 1000
	c := Counts{Area: make([]float64, n), Rays: make([]int64, n), Hits: make([]CountRow, n)}
	rng := rand.New(rand.NewPCG(3, 3))
	hit := make([]int32, rays)
	for i := range n {
		c.Area[i], c.Rays[i] = 1, rays
		for r := range hit {
			hit[r] = int32(rng.IntN(n))
		}
		slices.Sort(hit)
		for r, j := range hit {
			if r > 0 && hit[r-1] == j {
				c.Hits[i].Val[c.Hits[i].Len()-1]++
				continue
			}
			c.Hits[i].Append(j, 1)
		}
	}
	b.ReportAllocs()
	for b.Loop() {
		if _, err := Smooth(c); err != nil {
			b.Fatal(err)
		}
	}
}

// assemble, for any λ, writes every entry of the union of the counts'
// pattern and its transpose by the definition of the smoothed matrix,
// F_ij = (k_ij + k_ji)/((λ_i + λ_j)A_i) and F_ii = k_ii/(λ_iA_i), to the
// bit, with rows increasing; on random sparse counts whose patterns are
// far from symmetric, with self-counts on some nodes and none on others.
func TestAssembleByDefinition(t *testing.T) {
	rng := rand.New(rand.NewPCG(9, 9))
	for _, n := range []int{1, 2, 7, 60} {
		c := Counts{Area: make([]float64, n), Rays: make([]int64, n), Hits: make([]CountRow, n), Ambient: make([]int64, n)}
		k := make([][]int64, n)
		for i := range n {
			c.Area[i], c.Rays[i], c.Ambient[i] = 0.3+rng.Float64(), 1000+int64(rng.IntN(500)), int64(rng.IntN(3))
			k[i] = make([]int64, n)
			for j := range n {
				if rng.IntN(3) == 0 && (i != j || i%2 == 0) {
					k[i][j] = 1 + int64(rng.IntN(40))
					c.Hits[i].Append(int32(j), k[i][j])
				}
			}
		}
		lam := make([]float64, n)
		for i := range lam {
			lam[i] = 0.5 + 2*rng.Float64()
		}
		offd, _ := poolPairs(c, nil)
		r := assemble(c, &offd, lam, 0, nil)
		for i := range n {
			var want FactorRow
			for j := range n {
				switch {
				case j == i && k[i][i] > 0:
					want.Append(int32(j), float64(k[i][i])/lam[i]/c.Area[i])
				case j != i && k[i][j]+k[j][i] > 0:
					want.Append(int32(j), float64(k[i][j]+k[j][i])/(lam[i]+lam[j])/c.Area[i])
				}
			}
			if !slices.Equal(r.F[i].Col, want.Col) || !slices.Equal(r.F[i].Val, want.Val) {
				t.Fatalf("%d nodes, row %d:\n got %v %v\nwant %v %v", n, i, r.F[i].Col, r.F[i].Val, want.Col, want.Val)
			}
		}
	}
}

// A workspace lends arrays that hold whatever the last smoothing left (here
// poisoned with NaN and −1): a smoothing with them equals one with new
// arrays to the bit, matrix and diagnostics.
func TestWorkspaceReuse(t *testing.T) {
	area := []float64{1.9, 1, 1}
	F := [][]float64{{0, 0.5, 0.5}, {0.95, 0, 0}, {0.95, 0, 0}}
	rng := rand.New(rand.NewPCG(3, 3))
	var w Workspace
	for size := 1; size < 5000; size *= 3 { // spares of every size, poisoned below
		w.giveInts(make([]int32, size))
		w.giveFloats(make([]float64, size))
		w.giveFloats(make([]float64, size))
	}
	for seed := range 4 {
		c := sampleCounts(rng, area, F, []float64{0, 0.05, 0.05}, int64(300+100*seed))
		want, err := Smooth(c)
		if err != nil {
			t.Fatal(err)
		}
		got, err := w.Smooth(c)
		if err != nil {
			t.Fatal(err)
		}
		sameSmoothing(t, fmt.Sprintf("seed %d, the workspace's arrays", seed), got, want)
		for _, s := range w.floats {
			for k := range s[:cap(s)] {
				s[:cap(s)][k] = math.NaN()
			}
		}
		for _, s := range w.ints {
			for k := range s[:cap(s)] {
				s[:cap(s)][k] = -1
			}
		}
		got, err = w.Smooth(c)
		if err != nil {
			t.Fatal(err)
		}
		sameSmoothing(t, fmt.Sprintf("seed %d, poisoned arrays", seed), got, want)
		w.Recycle(got)
	}
}

// sameSmoothing fails the test unless got and want hold the same matrix
// and diagnostics to the bit.
func sameSmoothing(t *testing.T, what string, got, want *Result) {
	t.Helper()
	for i := range want.F {
		if !slices.Equal(got.F[i].Col, want.F[i].Col) || !slices.Equal(got.F[i].Val, want.F[i].Val) {
			t.Fatalf("%s: row %d is %v %v, want %v %v", what, i, got.F[i].Col, got.F[i].Val, want.F[i].Col, want.F[i].Val)
		}
	}
	if !slices.Equal(got.Ambient, want.Ambient) || got.MaxMoved != want.MaxMoved || got.SummationAfter != want.SummationAfter || got.ReciprocityBefore != want.ReciprocityBefore {
		t.Fatalf("%s: the diagnostics differ", what)
	}
}
