package raytrace

import (
	"context"
	"errors"
	"fmt"
	"math"
	"sync"
	"sync/atomic"

	"golang.org/x/sync/errgroup"

	"github.com/hemiray/hemiray/geometry"
	"github.com/hemiray/hemiray/mesh"
	"github.com/hemiray/hemiray/raytrace/bvh"
	"github.com/hemiray/hemiray/raytrace/sample"
)

// Beam is light from far away. A parallel beam (the sun) travels along
// Direction with Irradiance watts per square metre on a plane normal to
// it. A diffuse one (a uniform sky) comes alike from every direction, with
// Irradiance on one side of a plate that sees nothing but it; Direction is
// not used. Rays rays sample it.
type Beam struct {
	Name       string
	Direction  geometry.Vec3 // the way the light travels; any length
	Irradiance float64       // W/m²
	Rays       int64
	Diffuse    bool
}

// Irradiation is what the nodes absorb of each beam, with intervals.
type Irradiation struct {
	Beams []Beam
	// LaunchArea is each beam's launch area in m²: for a parallel beam
	// the model's outline seen along it, boxed; for a diffuse one a sphere
	// round the model. Each of its rays carries Irradiance·LaunchArea/Rays
	// watts.
	LaunchArea []float64
	// Back is, per beam, the share of its rays that ended on the back of a
	// one-sided surface (inside a solid, or a surface whose normals point
	// the wrong way): power no node absorbs.
	Back []float64
	res  *Result // a row per beam; its columns are the nodes
}

// beamSalt separates the beams' streams from the nodes'.
const beamSalt = 0xBB67AE8584CAA73B

// Absorbed returns the power node j absorbs from beam b, in W, and the
// half-width of its interval (Student-t over the replicates under RQMC,
// else Wilson's on the share of the rays).
func (ir *Irradiation) Absorbed(b, j int) (watts, halfwidth float64) {
	f := ir.res.Factor(b, j)
	w := ir.Beams[b].Irradiance * ir.LaunchArea[b]
	return w * f.F, w * f.HalfWidth
}

// Escaped returns the power of beam b that left the model, in W: the
// beam's rays that missed it or were reflected out.
func (ir *Irradiation) Escaped(b int) float64 {
	return ir.Beams[b].Irradiance * ir.LaunchArea[b] * ir.res.Factor(b, ir.res.Ambient()).F
}

// Replicate returns the power each node absorbs from beam b in replicate
// q alone (nil without replicates), for intervals on derived results.
func (ir *Irradiation) Replicate(q, b int) []float64 {
	if q >= len(ir.res.Replicas) {
		return nil
	}
	t := &ir.res.Replicas[q]
	out := make([]float64, len(ir.res.Nodes))
	if t.Rays[b] == 0 {
		return out
	}
	w := ir.Beams[b].Irradiance * ir.LaunchArea[b] / float64(t.Rays[b])
	for k, j := range t.Hits[b].Col {
		out[j] = w * float64(t.Hits[b].Val[k])
	}
	return out
}

// Replicates is the number of replicate tallies (0 without).
func (ir *Irradiation) Replicates() int { return len(ir.res.Replicas) }

// launch is where a beam's rays start: for a parallel beam the plane at
// corner o spanned by u and v, upstream of the whole model, rays along d;
// for a diffuse one the sphere of centre o and radius r round the model.
type launch struct {
	o, u, v, d geometry.Vec3
	r          float64
	sphere     bool
}

// launchSphere is a sphere round the model. Light of radiance L alike from
// every direction enters it as if its inside emitted diffusely, πL per
// unit area (a uniform diffuse field; common practice): a ray starts at a
// uniform point and leaves along a cosine-weighted direction about the
// inward normal.
func launchSphere(bounds geometry.Box) (launch, float64) {
	r := 0.5*bounds.Diagonal().Len()*1.01 + 1e-9
	return launch{o: bounds.Center(), r: r, sphere: true}, 4 * math.Pi * r * r
}

// launchPlane boxes the model's outline seen along unit direction d on a
// plane upstream of it.
func launchPlane(bounds geometry.Box, d geometry.Vec3) (launch, float64) {
	f := geometry.NewFrame(d)
	e1, e2 := f.ToWorld(1, 0, 0), f.ToWorld(0, 1, 0)
	lo, hi := [2]float64{math.Inf(1), math.Inf(1)}, [2]float64{math.Inf(-1), math.Inf(-1)}
	back := math.Inf(1)
	for k := range 8 {
		p := bounds.Min
		if k&1 != 0 {
			p.X = bounds.Max.X
		}
		if k&2 != 0 {
			p.Y = bounds.Max.Y
		}
		if k&4 != 0 {
			p.Z = bounds.Max.Z
		}
		for a, e := range []geometry.Vec3{e1, e2} {
			lo[a], hi[a] = min(lo[a], p.Dot(e)), max(hi[a], p.Dot(e))
		}
		back = min(back, p.Dot(d))
	}
	// Start a little upstream of the nearest corner, and widen the
	// rectangle by a hair so that the outline's own edges are inside.
	size := bounds.Diagonal().Len()
	pad := 1e-9 * size
	lo[0], lo[1], hi[0], hi[1] = lo[0]-pad, lo[1]-pad, hi[0]+pad, hi[1]+pad
	o := e1.Scale(lo[0]).Add(e2.Scale(lo[1])).Add(d.Scale(back - 0.01*size - pad))
	l := launch{o: o, u: e1.Scale(hi[0] - lo[0]), v: e2.Scale(hi[1] - lo[1]), d: d}
	return l, (hi[0] - lo[0]) * (hi[1] - lo[1])
}

// Irradiate traces the beams onto m's nodes (opts gives the nodes, the
// seed, the sampling and the replicates; its Rays are not used) and follows
// every ray through reflections and transmissions with the given optics,
// those of the band the beams carry (the solar band for the sun), until it
// is absorbed or leaves: the Monte Carlo ray trace of a directional source
// (Howell, "Application of Monte Carlo to heat transfer problems", 1968;
// Mahan, Radiation Heat Transfer: A Statistical Approach, 2002). A beam's
// rays start uniformly over its launch rectangle, upstream of the model;
// with RQMC ray r takes point r/R of replicate r mod R's scrambled Sobol'
// sequence, so, as for the nodes, the numbers depend only on the seed, the
// beam and r, never on the threads.
func Irradiate(ctx context.Context, m *mesh.Mesh, opts Options, beams []Beam, optics map[string]Optics) (*Irradiation, error) {
	if err := opts.defaults(); err != nil {
		return nil, err
	}
	if len(m.Facets) == 0 {
		return nil, errors.New("the model has no facets")
	}
	for _, b := range beams {
		switch {
		case !b.Diffuse && (!b.Direction.IsFinite() || !(b.Direction.Len() > 0)):
			return nil, fmt.Errorf("beam %s: direction %v", b.Name, b.Direction)
		case !(b.Irradiance >= 0 && b.Irradiance < 1e15):
			return nil, fmt.Errorf("beam %s: irradiance %v W/m²", b.Name, b.Irradiance)
		case b.Rays <= 0 || b.Rays > maxRaysPerNode:
			return nil, fmt.Errorf("beam %s: %d rays: give a positive number up to 2^50", b.Name, b.Rays)
		}
	}
	em, area := emitters(m)
	nm, err := nodeMapFor(m, opts, area)
	if err != nil {
		return nil, err
	}
	if err := checkOpticsKeys(m, optics); err != nil {
		return nil, err
	}
	fs, err := fates(m, nm.nodes, optics)
	if err != nil {
		return nil, err
	}
	tree := bvh.Build(m.Vertices, m.Facets, bvh.Options{Threads: opts.Threads})
	e := &engine{m: m, tree: tree, em: em, nm: nm, opts: &opts, fates: fs}
	ir := &Irradiation{Beams: beams, LaunchArea: make([]float64, len(beams)), Back: make([]float64, len(beams))}
	planes := make([]launch, len(beams))
	for b := range beams {
		if beams[b].Diffuse {
			planes[b], ir.LaunchArea[b] = launchSphere(m.Bounds())
		} else {
			planes[b], ir.LaunchArea[b] = launchPlane(m.Bounds(), beams[b].Direction.Normalize())
		}
	}
	reps := max(1, opts.Replicates)
	// A work item is one batch of one beam's rays.
	type item struct {
		beam   int
		lo, hi int64
	}
	var items []item
	for b, bm := range beams {
		for lo := int64(0); lo < bm.Rays; lo += opts.BatchSize {
			items = append(items, item{b, lo, min(lo+opts.BatchSize, bm.Rays)})
		}
	}
	// counts[q][b] holds replicate q's tally of beam b: per node, then
	// escaped, then back.
	n := len(nm.nodes)
	counts := make([][][]int64, reps)
	for q := range counts {
		counts[q] = make([][]int64, len(beams))
		for b := range beams {
			counts[q][b] = make([]int64, n+2)
		}
	}
	var mu sync.Mutex
	next := atomic.Int64{}
	g, gctx := errgroup.WithContext(ctx)
	for range opts.Threads {
		g.Go(func() error {
			local := make([][]int64, reps)
			for q := range local {
				local[q] = make([]int64, n+2)
			}
			var bt bvh.Batch
			for {
				k := next.Add(1) - 1
				if k >= int64(len(items)) {
					return nil
				}
				it := items[k]
				if err := e.beamRays(gctx, it.beam, &planes[it.beam], it.lo, it.hi, &bt, local); err != nil {
					return err
				}
				mu.Lock()
				for q := range local {
					for j, c := range local[q] {
						counts[q][it.beam][j] += c
						local[q][j] = 0
					}
				}
				mu.Unlock()
			}
		})
	}
	if err := g.Wait(); err != nil {
		return nil, err
	}
	ir.res = beamResult(nm.nodes, counts, opts)
	for b := range beams {
		ir.Back[b] = float64(ir.res.Back[b].Sum()) / float64(beams[b].Rays)
	}
	return ir, nil
}

// beamRays traces rays [lo, hi) of beam b and adds them to counts[q]
// (per node, then escaped, then back) of their replicates q.
func (e *engine) beamRays(ctx context.Context, b int, pl *launch, lo, hi int64, bt *bvh.Batch, counts [][]int64) error {
	reps := int64(len(counts))
	n := len(e.nm.nodes)
	id := NodeID(-1 - b)
	var sobol []sample.Sobol
	var st sample.Stream
	if e.opts.Sampling == SamplingRQMC {
		sobol = make([]sample.Sobol, reps)
		for q := range sobol {
			sobol[q] = sample.NewSobol(e.opts.Seed^beamSalt, int64(id), q)
		}
	} else {
		st = sample.NewStream(e.opts.Seed^beamSalt, int64(id), lo/e.opts.BatchSize)
		st.Skip(uint64(lo%e.opts.BatchSize) * 4)
	}
	var qs [chunk]bvh.Query
	var hs [chunk]bvh.Hit
	var u [sample.SobolDims]float64
	for c := lo; c < hi; c += chunk {
		if err := ctx.Err(); err != nil {
			return err
		}
		k := int(min(chunk, hi-c))
		for i := range k {
			r := c + int64(i)
			if sobol != nil {
				sobol[r%reps].Point(uint64(r/reps), &u)
			} else {
				u[0], u[1], u[2], u[3] = st.Float64(), st.Float64(), st.Float64(), st.Float64()
			}
			if pl.sphere {
				x, y, z := sample.UniformSphere(u[0], u[1])
				n := geometry.Vec3{X: -x, Y: -y, Z: -z} // inward
				dx, dy, dz := sample.CosineHemisphere(u[2], u[3])
				qs[i] = bvh.Query{O: pl.o.Sub(n.Scale(pl.r)), D: geometry.NewFrame(n).ToWorld(dx, dy, dz), TMax: math.Inf(1), Skip: -1}
				continue
			}
			o := pl.o.Add(pl.u.Scale(u[0])).Add(pl.v.Scale(u[1]))
			qs[i] = bvh.Query{O: o, D: pl.d, TMax: math.Inf(1), Skip: -1}
		}
		e.tree.IntersectBatch(bt, qs[:k], hs[:k])
		for i := range k {
			r := c + int64(i)
			s := followStream(e.opts.Seed, id, r)
			end, j := e.follow(qs[i].D, hs[i], &s)
			col := n + 1 // back
			switch end {
			case endAbsorbed:
				col = int(j)
			case endEscaped:
				col = n
			}
			counts[r%reps][col]++
		}
	}
	return nil
}

// beamResult turns the counts into a Result with a row per beam (columns:
// the nodes, the ambient), for its intervals.
func beamResult(nodes []Node, counts [][][]int64, opts Options) *Result {
	n := len(nodes)
	beams := len(counts[0])
	tally := func(c [][]int64) Tally {
		t := *newTally(beams)
		for b := range beams {
			for j := range n {
				if c[b][j] > 0 {
					t.Hits[b].Append(int32(j), c[b][j])
				}
				t.Rays[b] += c[b][j]
			}
			t.Escaped[b] = c[b][n]
			if c[b][n+1] > 0 {
				t.Back[b].Append(0, c[b][n+1])
			}
			t.Rays[b] += c[b][n] + c[b][n+1]
		}
		return t
	}
	r := &Result{Nodes: nodes, Options: opts, z: zScore(opts.Confidence), t: tScore(opts)}
	for q := range counts {
		r.Replicas = append(r.Replicas, tally(counts[q]))
	}
	pooled := make([][]int64, beams)
	for b := range beams {
		pooled[b] = make([]int64, n+2)
		for q := range counts {
			for j, c := range counts[q][b] {
				pooled[b][j] += c
			}
		}
	}
	r.Tally = tally(pooled)
	if opts.Replicates < 2 {
		r.Replicas = nil
	}
	return r
}
