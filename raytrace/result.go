package raytrace

import (
	"fmt"
	"math"
	"runtime"
	"sort"
	"strings"
	"sync"
	"sync/atomic"

	"github.com/hemiray/hemiray/mesh"
)

// Result is the outcome of Estimate: the nodes, the raw tallies and what is
// needed to turn them into view factors with intervals.
type Result struct {
	Nodes []Node
	Tally
	// Replicas are the tallies of the Options.Replicates sub-samples; they
	// add up to Tally.
	Replicas []Tally
	// Targets are the planned rays per node of the last round.
	Targets      []int64
	Options      Options
	BuildSeconds float64
	TraceSeconds float64
	Threads      int
	z            float64
	t            float64  // Student's t quantile for replicate intervals (RQMC)
	done         []UnitID // finished work units
}

// Factor is one view-factor estimate.
type Factor struct {
	F         float64 // hits / rays
	StdErr    float64 // √(F(1−F)/rays); with RQMC, s/√R of the replicates
	Lo, Hi    float64 // Wilson interval; with RQMC, F ∓ HalfWidth within [0, 1]
	HalfWidth float64 // (Hi − Lo)/2; with RQMC, t·s/√R
	Hits      int64
	Rays      int64
}

// Z returns the standard-normal quantile of the result's confidence.
func (r *Result) Z() float64 { return r.z }

// Ambient is the column index of the ambient node: len(Nodes).
func (r *Result) Ambient() int { return len(r.Nodes) }

// HasAmbient reports whether any ray left the model (an open model). It
// decides the physics (an ambient temperature is needed) but not the
// columns of the outputs, which always include the ambient so that they
// never depend on the random draw.
func (r *Result) HasAmbient() bool {
	for _, e := range r.Escaped {
		if e > 0 {
			return true
		}
	}
	return false
}

// RaysTraced returns the total number of rays.
func (r *Result) RaysTraced() int64 {
	var n int64
	for _, x := range r.Rays {
		n += x
	}
	return n
}

func (r *Result) factor(k, n int64) Factor {
	f := Factor{Hits: k, Rays: n}
	if n == 0 {
		return Factor{Lo: 0, Hi: 1, HalfWidth: 0.5}
	}
	f.F = float64(k) / float64(n)
	f.StdErr = math.Sqrt(f.F * (1 - f.F) / float64(n))
	f.Lo, f.Hi = Wilson(k, n, r.z)
	f.HalfWidth = (f.Hi - f.Lo) / 2
	return f
}

// Factor returns the estimate of F from node i to node j; j = Ambient()
// gives the fraction of i's rays that left the model.
func (r *Result) Factor(i, j int) Factor {
	if j == r.Ambient() {
		return r.replicated(i, j, r.factor(r.Escaped[i], r.Rays[i]))
	}
	return r.replicated(i, j, r.factor(r.Hits[i].At(int32(j)), r.Rays[i]))
}

// Row calls fn for every non-zero entry of row i, ambient last. The
// replicates' rows are walked beside the pooled one (their columns are a
// subset of its columns), O(entries × replicates) with no search.
func (r *Result) Row(i int, fn func(j int, f Factor)) {
	row := &r.Hits[i]
	var ks []int64
	var pos []int
	if r.spreadApplies(i) {
		ks, pos = make([]int64, len(r.Replicas)), make([]int, len(r.Replicas))
	}
	for k, c := range row.Col {
		f := r.factor(row.Val[k], r.Rays[i])
		if ks != nil && f.Hits > 0 {
			for q := range r.Replicas {
				rq := &r.Replicas[q].Hits[i]
				p := pos[q]
				for p < len(rq.Col) && rq.Col[p] < c {
					p++
				}
				ks[q] = 0
				if p < len(rq.Col) && rq.Col[p] == c {
					ks[q] = rq.Val[p]
				}
				pos[q] = p
			}
			f = r.spread(i, f, ks)
		}
		fn(int(c), f)
	}
	if r.Escaped[i] > 0 {
		fn(r.Ambient(), r.replicated(i, r.Ambient(), r.factor(r.Escaped[i], r.Rays[i])))
	}
}

// replicated replaces the binomial interval of f (F_ij) by the Student-t
// interval of the replicates' estimates when the rays were RQMC points:
// the points of one randomization are correlated, so the binomial law
// does not hold, but independent randomizations give independent,
// unbiased estimates F^(q) = k^(q)/N^(q), and
//
//	half-width = t_{R−1}·s/√R,  s² = Σ_q (F^(q) − F̄)²/(R − 1)
//
// (Owen, "Monte Carlo theory, methods and examples", 2013, the chapter on
// randomized QMC; L'Ecuyer & Lemieux 2002; from memory). An entry no
// replicate hit keeps its Wilson interval [0, z²/(N+z²)]: the spread of
// zeros is no evidence of precision.
func (r *Result) replicated(i, j int, f Factor) Factor {
	if !r.spreadApplies(i) || f.Hits == 0 {
		return f
	}
	var small [16]int64 // no allocation per lookup for up to 16 replicates
	ks := small[:0]
	if len(r.Replicas) > len(small) {
		ks = make([]int64, 0, len(r.Replicas))
	}
	ks = ks[:len(r.Replicas)]
	for q := range r.Replicas {
		t := &r.Replicas[q]
		ks[q] = t.Escaped[i]
		if j != r.Ambient() {
			ks[q] = t.Hits[i].At(int32(j))
		}
	}
	return r.spread(i, f, ks)
}

// spreadApplies reports whether row i's intervals come from the replicates:
// RQMC sampling, at least two replicates, and rays in every one of them.
func (r *Result) spreadApplies(i int) bool {
	if r.Options.Sampling != SamplingRQMC || len(r.Replicas) < 2 {
		return false
	}
	for q := range r.Replicas {
		if r.Replicas[q].Rays[i] == 0 {
			return false // too few rays yet for every replicate
		}
	}
	return true
}

// spread gives f the Student-t interval of the replicates' estimates
// k_q/N_q of row i (see replicated).
func (r *Result) spread(i int, f Factor, ks []int64) Factor {
	R := len(r.Replicas)
	var sum, sum2 float64
	for q, k := range ks {
		x := float64(k) / float64(r.Replicas[q].Rays[i])
		sum, sum2 = sum+x, sum2+x*x
	}
	mean := sum / float64(R)
	s2 := max(0, (sum2-float64(R)*mean*mean)/float64(R-1))
	f.StdErr = math.Sqrt(s2 / float64(R))
	f.HalfWidth = r.t * f.StdErr
	f.Lo, f.Hi = max(0, f.F-f.HalfWidth), min(1, f.F+f.HalfWidth)
	return f
}

// RowHalfWidth returns the largest interval half-width in row i, zero
// entries included (their Wilson interval is [0, z²/(n+z²)]), the ambient
// column too. O(entries of the row).
func (r *Result) RowHalfWidth(i int) float64 {
	cols := len(r.Nodes) + 1
	w, nonzero := 0.0, 0
	r.Row(i, func(_ int, f Factor) {
		w = math.Max(w, f.HalfWidth)
		nonzero++
	})
	if nonzero < cols {
		w = math.Max(w, r.factor(0, r.Rays[i]).HalfWidth)
	}
	return w
}

// RowHalfWidths returns RowHalfWidth of every row, the rows shared among
// the cores (at 10⁴ nodes a row-by-row pass over every entry and
// replicate takes seconds).
func (r *Result) RowHalfWidths() []float64 {
	w := make([]float64, len(r.Nodes))
	var next atomic.Int64
	var wg sync.WaitGroup
	for range runtime.GOMAXPROCS(0) {
		wg.Add(1)
		go func() {
			defer wg.Done()
			const rows = 64
			for lo := int(next.Add(rows)) - rows; lo < len(w); lo = int(next.Add(rows)) - rows {
				for i := lo; i < min(lo+rows, len(w)); i++ {
					w[i] = r.RowHalfWidth(i)
				}
			}
		}()
	}
	wg.Wait()
	return w
}

// RowSum returns Σ_j F_ij over all nodes and the ambient. It is 1 but for
// the rays lost to back-face hits.
func (r *Result) RowSum(i int) float64 {
	if r.Rays[i] == 0 {
		return 0
	}
	return float64(r.Hits[i].Sum()+r.Escaped[i]) / float64(r.Rays[i])
}

// BackFaceNote describes one emitter's back-face hits on one surface.
type BackFaceNote struct {
	Emitter  string  `json:"emitter"`
	Surface  string  `json:"surface"`
	Hits     int64   `json:"hits"`
	Fraction float64 `json:"fraction_of_rays"`
}

// BackFaces lists every (emitter, surface) pair with back-face hits,
// largest fraction first. surfaces are the mesh's surface names.
func (r *Result) BackFaces(surfaces []string) []BackFaceNote {
	var out []BackFaceNote
	for i, row := range r.Back {
		for k, s := range row.Col {
			out = append(out, BackFaceNote{r.Nodes[i].Name, surfaces[s], row.Val[k], float64(row.Val[k]) / float64(r.Rays[i])})
		}
	}
	sort.SliceStable(out, func(a, b int) bool { return out[a].Fraction > out[b].Fraction })
	return out
}

// BackFaceThreshold is the fraction of an emitter's rays hitting backs above
// which Warnings speaks up.
const BackFaceThreshold = 0.001

// Warnings returns the messages a user should see: back-face hits above
// BackFaceThreshold of an emitter's rays, with the likely fixes — one line
// per emitting surface and target surface, however many facet nodes the
// emitting surface has (the worst three named).
func (r *Result) Warnings(surfaces []string) []string {
	type pair struct {
		from int
		to   string
	}
	groups := map[pair][]BackFaceNote{}
	var order []pair
	nodeOf := make(map[string]int, len(r.Nodes))
	for i, n := range r.Nodes {
		nodeOf[n.Name] = i
	}
	for _, b := range r.BackFaces(surfaces) { // largest fraction first
		if b.Fraction <= BackFaceThreshold {
			break
		}
		k := pair{r.Nodes[nodeOf[b.Emitter]].Surface, b.Surface}
		if _, seen := groups[k]; !seen {
			order = append(order, k)
		}
		groups[k] = append(groups[k], b)
	}
	const fixes = "its normals may be flipped (flip it), it may need a second side (declare it two-sided), or rays leak through a gap into the inside of a part"
	var w []string
	for _, k := range order {
		g := groups[k]
		if len(g) == 1 {
			w = append(w, fmt.Sprintf("%.3g%% of the rays from %s hit the back of one-sided surface %s: %s", 100*g[0].Fraction, g[0].Emitter, g[0].Surface, fixes))
			continue
		}
		var worst []string
		for _, b := range g[:min(3, len(g))] {
			worst = append(worst, fmt.Sprintf("%s %.3g%%", b.Emitter, 100*b.Fraction))
		}
		w = append(w, fmt.Sprintf("%d nodes of %s send more than %.3g%% of their rays to the back of one-sided surface %s (worst: %s; summary.json lists all): %s",
			len(g), surfaces[k.from], 100*BackFaceThreshold, k.to, strings.Join(worst, ", "), fixes))
	}
	return w
}

// NodeIndex returns the index of the node called name, or −1.
func (r *Result) NodeIndex(name string) int {
	for i, n := range r.Nodes {
		if n.Name == name {
			return i
		}
	}
	return -1
}

// Nodes returns the radiation nodes Estimate would use for m with opts,
// without tracing (to read saved tallies back).
func Nodes(m *mesh.Mesh, opts Options) ([]Node, error) {
	_, area := emitters(m)
	nm, err := nodeMapFor(m, opts, area)
	if err != nil {
		return nil, err
	}
	return nm.nodes, nil
}

// nodeMapFor builds the nodes and reports each node's area as the mesh
// gives it; the rounded areas (within 1e-7) only weight the choice of
// emitting facet.
func nodeMapFor(m *mesh.Mesh, opts Options, area []float64) (*nodeMap, error) {
	two := map[string]bool{}
	for _, s := range opts.TwoSided {
		two[s] = true
	}
	nm, err := buildNodes(m, two, opts.FacetNodes, area, opts.Split, opts.NodeOf)
	if err != nil {
		return nil, err
	}
	for i := range nm.nodes {
		nm.nodes[i].Area = m.AreaOf(nm.nodes[i].Facets)
	}
	return nm, nil
}

// NewResult wraps saved tallies as a Result (no timings).
func NewResult(nodes []Node, t Tally, replicas []Tally, opts Options) (*Result, error) {
	if err := opts.defaults(); err != nil {
		return nil, err
	}
	return &Result{Nodes: nodes, Tally: t, Replicas: replicas, Options: opts, Threads: opts.Threads, z: zScore(opts.Confidence), t: tScore(opts)}, nil
}

// Missed is a node whose row did not reach the HalfWidth target.
type Missed struct {
	Node      int
	HalfWidth float64 // the row's widest interval half-width
	Rays      int64
}

// MissedHalfWidth lists, widest first, the nodes whose row still has an
// interval half-width above Options.HalfWidth (nil without a target): the
// rows that stopped at MaxRays, or whose run was cut short.
func (r *Result) MissedHalfWidth() []Missed {
	if r.Options.HalfWidth == 0 {
		return nil
	}
	var out []Missed
	for i, w := range r.RowHalfWidths() {
		if w > r.Options.HalfWidth {
			out = append(out, Missed{Node: i, HalfWidth: w, Rays: r.Rays[i]})
		}
	}
	sort.SliceStable(out, func(a, b int) bool { return out[a].HalfWidth > out[b].HalfWidth })
	return out
}
