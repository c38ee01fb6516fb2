package raytrace

import (
	"context"
	"errors"
	"fmt"
	"runtime"
	"sync/atomic"
	"time"

	"golang.org/x/sync/errgroup"

	"github.com/hemiray/hemiray/mesh"
	"github.com/hemiray/hemiray/raytrace/bvh"
	"github.com/hemiray/hemiray/raytrace/sample"
)

// DefaultBatchSize is the rays per random stream and work unit unless
// Options.BatchSize says otherwise.
const DefaultBatchSize = 1 << 16

// Options control Estimate: the Settings that fix the tallies, and how this
// process runs (threads, its share of the work, checkpoints, progress). The
// zero value of each field means its default.
type Options struct {
	Settings
	// Threads is the number of workers. Default GOMAXPROCS.
	Threads int
	// NodeOf, if set, names the node of each facet ("" keeps the facet in
	// its surface's node): the content of Settings.NodeMap.
	NodeOf []string
	// Shards > 1 makes this run trace only its share of the work units:
	// those with shardOf(unit) == Shard. Shards add up exactly (Merge).
	// A sharded run does one round; later HalfWidth rounds are planned from
	// the merged tallies and passed in Targets.
	Shard, Shards int
	// Targets, if set, are the planned rays per node of the current round
	// (instead of Rays for all).
	Targets []int64
	// Resume continues from a checkpoint of the same case: its finished
	// units are not traced again and its tallies are the starting point.
	Resume *Checkpoint
	// OnCheckpoint, if set, is called about every CheckpointEvery (default
	// one minute) with a consistent snapshot of the finished work, one call
	// at a time, on a goroutine of its own while tracing goes on (a tick
	// during a call is skipped, and so are ticks until checkpointGap times
	// the last call's duration has passed since it ended); Estimate returns
	// only after the last call has returned, and an error it returns is
	// Estimate's.
	OnCheckpoint    func(*Checkpoint) error
	CheckpointEvery time.Duration
	// MemoryLimit, when positive, is the memory in bytes a facet-mode run may
	// plan to use; Estimate refuses to start a larger one.
	MemoryLimit int64
	// Progress, if set, is called from one goroutine about every
	// ProgressEvery (default 1 s) while rays are traced.
	Progress      func(Progress)
	ProgressEvery time.Duration
}

// Progress reports how far a trace has come.
type Progress struct {
	Rays    int64 // traced so far
	Planned int64 // planned so far (grows with HalfWidth rounds)
	Elapsed time.Duration
	// With a HalfWidth target: the widest interval half-width of any row
	// so far, and the time to bring it to the target if half-widths keep
	// shrinking as 1/√rays (plain Monte Carlo's law; RQMC's shrink faster,
	// so for it this is an upper bound), 0 when reached.
	WorstHalfWidth float64
	ToTarget       time.Duration
}

// worst returns the widest row half-width over the nodes with rays.
func (r *Result) worst() float64 {
	w := 0.0
	for i, wi := range r.RowHalfWidths() {
		if r.Rays[i] > 0 {
			w = max(w, wi)
		}
	}
	return w
}

func (o *Options) defaults() error {
	o.Settings = o.Settings.WithDefaults()
	if o.Threads <= 0 {
		o.Threads = runtime.GOMAXPROCS(0)
	}
	if o.ProgressEvery == 0 {
		o.ProgressEvery = time.Second
	}
	if o.CheckpointEvery == 0 {
		o.CheckpointEvery = time.Minute
	}
	if o.Shards <= 0 {
		o.Shards = 1
	}
	if err := o.Settings.Check(); err != nil {
		return err
	}
	if o.Shard < 0 || o.Shard >= o.Shards {
		return fmt.Errorf("shard %d/%d: the index must be in [0, %d)", o.Shard, o.Shards, o.Shards)
	}
	return nil
}

// Estimate traces rays from every node of m and returns the tallies with
// their estimates. If ctx is cancelled it stops promptly and returns the
// work units finished so far with ctx's error.
func Estimate(ctx context.Context, m *mesh.Mesh, opts Options) (*Result, error) {
	if err := opts.defaults(); err != nil {
		return nil, err
	}
	if len(m.Facets) == 0 {
		return nil, errors.New("the model has no facets")
	}
	em, area := emitters(m)
	nm, err := nodeMapFor(m, opts, area)
	if err != nil {
		return nil, err
	}
	if u := plannedUnits(len(nm.nodes), opts); u > maxUnits {
		return nil, fmt.Errorf("%d nodes with up to %d rays each make %d work units of at most %d rays, more than the %d a run may plan: use fewer rays per node (or surface nodes instead of facets)",
			len(nm.nodes), opts.planRays(), u, opts.BatchSize, maxUnits)
	}
	if opts.FacetNodes && opts.MemoryLimit > 0 {
		if need := plannedBytes(len(m.Facets), len(nm.nodes), opts); need > opts.MemoryLimit {
			return nil, fmt.Errorf("facet mode with %d nodes needs about %.1f GiB for its tallies and tree, more than the %.1f GiB available; use fewer rays, surface nodes, or a machine with more memory",
				len(nm.nodes), float64(need)/(1<<30), float64(opts.MemoryLimit)/(1<<30))
		}
	}
	start := time.Now()
	tree := bvh.Build(m.Vertices, m.Facets, bvh.Options{Threads: opts.Threads})
	r := &Result{
		Nodes: nm.nodes, Tally: *newTally(len(nm.nodes)), Options: opts,
		Replicas:     make([]Tally, opts.Replicates),
		BuildSeconds: tree.Stats.BuildTime.Seconds(), Threads: opts.Threads,
		z: zScore(opts.Confidence), t: tScore(opts),
	}
	for k := range r.Replicas {
		r.Replicas[k] = *newTally(len(nm.nodes))
	}
	r.Targets = make([]int64, len(nm.nodes))
	for i := range r.Targets {
		r.Targets[i] = opts.Rays
	}
	if ck := opts.Resume; ck != nil {
		if err := r.resume(ck, len(m.Surfaces)); err != nil {
			return nil, err
		}
	}
	if opts.Targets != nil {
		if len(opts.Targets) != len(nm.nodes) {
			return nil, fmt.Errorf("the plan has targets for %d nodes, the model has %d", len(opts.Targets), len(nm.nodes))
		}
		for i, t := range opts.Targets {
			if t < r.Targets[i] {
				return nil, fmt.Errorf("the plan asks node %d for %d rays, fewer than the %d already planned", i, t, r.Targets[i])
			}
		}
		copy(r.Targets, opts.Targets)
	}
	e := &engine{m: m, tree: tree, em: em, nm: nm, opts: &opts, start: start}
	if opts.Optics != nil {
		if err := checkOpticsKeys(m, opts.Optics); err != nil {
			return nil, err
		}
		if e.fates, err = fates(m, nm.nodes, opts.Optics); err != nil {
			return nil, err
		}
	}
	e.nodeEm = make([]nodeEmitter, len(nm.nodes))
	for i := range nm.nodes {
		e.nodeEm[i] = newNodeEmitter(&nm.nodes[i], area)
	}
	traceStart := time.Now()
	defer func() { r.TraceSeconds = time.Since(traceStart).Seconds() }()

	for {
		units := r.pending()
		if len(units) > 0 {
			if err := e.run(ctx, units, r); err != nil {
				return r, err
			}
		}
		if opts.HalfWidth == 0 || opts.Shards > 1 {
			return r, nil
		}
		next, more := r.NextTargets()
		if !more {
			return r, nil
		}
		r.Targets = next
	}
}

// NextTargets returns the next HalfWidth round's planned rays per node:
// doubled, up to MaxRays, for every node some entry of whose row still has
// a half-width above the target; more is false when no node needs more.
func (r *Result) NextTargets() (next []int64, more bool) {
	next = append([]int64(nil), r.Targets...)
	if r.Options.HalfWidth == 0 {
		return next, false
	}
	widths := r.RowHalfWidths()
	for i := range next {
		if next[i] < r.Options.MaxRays && widths[i] > r.Options.HalfWidth {
			next[i] = min(2*next[i], r.Options.MaxRays)
			more = true
		}
	}
	return next, more
}

// planRays is the most rays a node can get: Rays, or MaxRays with a
// HalfWidth target.
func (o *Options) planRays() int64 {
	if o.HalfWidth > 0 {
		return o.MaxRays
	}
	return o.Rays
}

// maxUnits bounds the work units a run plans (24 bytes each, and as many
// map entries when resuming): memory follows the data, never a count typed
// into a flag.
const maxUnits = 1 << 23

// plannedUnits is the most work units a run of o over nodes nodes can plan:
// each node's rays in batches, every round's end a cut of its own.
func plannedUnits(nodes int, o Options) int64 {
	rays := o.planRays()
	rounds := int64(1)
	for r := o.Rays; r < rays; r *= 2 {
		rounds++
	}
	return int64(nodes) * ((rays+o.BatchSize-1)/o.BatchSize + rounds)
}

// plannedBytes estimates a facet-mode run's memory: the tree, emitter data,
// and per tally (the pooled one and each replicate's) sparse rows of at
// most min(nodes, rays) entries of 12 bytes per node, twice while rows are
// merged.
func plannedBytes(facets, nodes int, o Options) int64 {
	rays := o.planRays()
	perRow := min(int64(nodes), rays+1)
	tallies := int64(1 + o.Replicates)
	return int64(facets)*(40+32+96+16) + tallies*int64(nodes)*(perRow*12*2+64)
}

// unit is one piece of work: rays [lo, hi) of node, all in one batch.
type unit = UnitID

// UnitID identifies a work unit: rays [Lo, Hi) of node Node. Units never
// cross a batch boundary (BatchSize) nor a HalfWidth round boundary
// (Rays·2^k), so the same units arise however a run is interrupted,
// resumed or split.
type UnitID struct {
	Node   NodeID
	Lo, Hi int64
}

// planUnits lists the units of rays [0, target) of every node.
func planUnits(target []int64, o *Options) []unit {
	var us []unit
	for i, t := range target {
		for lo := int64(0); lo < t; {
			hi := min((lo/o.BatchSize+1)*o.BatchSize, t)
			// Earlier rounds ended at Rays·2^k; keep those cuts.
			for r := o.Rays; r < t; r *= 2 {
				if r > lo && r < hi {
					hi = r
				}
			}
			if o.MaxRays > lo && o.MaxRays < hi {
				hi = o.MaxRays
			}
			us = append(us, unit{NodeID(i), lo, hi})
			lo = hi
		}
	}
	return us
}

// shardOf assigns a unit to one of n shards by its node and batch only, so
// both parts of a batch that a round boundary cuts go to the same shard.
func shardOf(u unit, batch int64, n int) int {
	return int(sample.Mix(uint64(u.Node)<<40^uint64(u.Lo/batch)) % uint64(n))
}

// engine is what the workers share, read-only.
type engine struct {
	m      *mesh.Mesh
	tree   *bvh.Tree
	em     []facetEmitter
	nm     *nodeMap
	nodeEm []nodeEmitter
	opts   *Options
	start  time.Time
	traced atomic.Int64
	// fates, when set, are the nodes' interaction thresholds: rays are
	// followed through reflections and tallied where they are absorbed.
	fates []fate
}

// unitResult is the tally of one finished unit, per replicate (one when
// there are none).
type unitResult struct {
	u             unit
	rays, escaped []int64
	hits, backHit []Row
}

// reps is the number of tally sets a unit keeps.
func (e *engine) reps() int { return max(1, e.opts.Replicates) }

// run traces the units on the worker pool. A collector adds every finished
// unit to the result as it arrives, so a checkpoint can be taken at any
// time; units cut short by cancellation are dropped whole.
func (e *engine) run(ctx context.Context, units []unit, out *Result) error {
	var planned int64
	for _, u := range units {
		planned += u.Hi - u.Lo
	}
	base := e.traced.Load()
	next := atomic.Int64{}
	// Finished units go to the collector in groups of at least
	// handoffRays rays, so that facet nodes (tens of rays a unit) do not
	// pay a channel handoff per unit.
	finished := make(chan []unitResult, 4*e.opts.Threads)
	g, gctx := errgroup.WithContext(ctx)
	for range e.opts.Threads {
		g.Go(func() error {
			s := make([]*scratch, e.reps())
			for k := range s {
				s[k] = newScratch(len(e.nm.nodes), len(e.m.Surfaces))
			}
			var b bvh.Batch
			var group []unitResult
			var rays int64
			send := func() error {
				select {
				case finished <- group:
					group, rays = nil, 0
					return nil
				case <-gctx.Done():
					return gctx.Err()
				}
			}
			for {
				k := next.Add(1) - 1
				if k >= int64(len(units)) {
					if len(group) > 0 {
						return send()
					}
					return nil
				}
				res, err := e.trace(gctx, units[k], s, &b)
				if err != nil {
					return err
				}
				group = append(group, res)
				if rays += units[k].Hi - units[k].Lo; rays >= handoffRays {
					if err := send(); err != nil {
						return err
					}
				}
			}
		})
	}
	var werr error
	waited := make(chan struct{})
	go func() {
		werr = g.Wait()
		close(finished)
		close(waited)
	}()
	progress := time.NewTicker(e.opts.ProgressEvery)
	defer progress.Stop()
	checkpoint := time.NewTicker(e.opts.CheckpointEvery)
	defer checkpoint.Stop()
	report := func() {
		if e.opts.Progress == nil {
			return
		}
		p := Progress{Rays: e.traced.Load(), Planned: base + planned, Elapsed: time.Since(e.start)}
		if h := e.opts.HalfWidth; h > 0 && p.Rays > 0 {
			// The collector owns out, so reading it here is safe.
			p.WorstHalfWidth = out.worst()
			if ratio := p.WorstHalfWidth / h; ratio > 1 {
				p.ToTarget = time.Duration(float64(p.Elapsed) * (ratio*ratio - 1))
			}
		}
		e.opts.Progress(p)
	}
	// A checkpoint is written while the tracing goes on: the snapshot is
	// cheap (rows are never changed in place, so it shares them), but
	// writing gigabytes of tallies is not, and the collector must keep
	// taking results meanwhile or the workers stall. A tick that comes
	// while a write is still going is skipped.
	var cerr error
	written := make(chan error, 1)
	writing := false
	var began, ended time.Time
	var took time.Duration
	for {
		select {
		case rs, ok := <-finished:
			if !ok {
				<-waited
				if writing {
					if err := <-written; err != nil && cerr == nil {
						cerr = fmt.Errorf("checkpoint: %w", err)
					}
				}
				report()
				if cerr != nil {
					return cerr
				}
				return werr
			}
			for k := range rs {
				out.add(&rs[k])
			}
		case <-progress.C:
			report()
		case err := <-written:
			writing = false
			ended = time.Now()
			took = ended.Sub(began)
			if err != nil && cerr == nil {
				cerr = fmt.Errorf("checkpoint: %w", err)
			}
		case now := <-checkpoint.C:
			if e.opts.OnCheckpoint != nil && cerr == nil && !writing && checkpointDue(now, ended, took) {
				ck := out.Checkpoint()
				writing, began = true, time.Now()
				go func() { written <- e.opts.OnCheckpoint(&ck) }()
			}
		}
	}
}

// checkpointGap bounds the share of a run spent writing checkpoints to
// about 1/(1 + checkpointGap): the next checkpoint waits, after the last
// one ended, checkpointGap times as long as that one took. Writing
// competes with the workers for the cores (serialising, and the kernel's
// page-cache work), and by the end of a run of 10⁴ nodes × 10⁴ rays a
// tally file is about 2 GB: minute checkpoints took the trace from 164 s
// without them to 189–215 s.
const checkpointGap = 19

// checkpointDue reports whether a checkpoint tick at now may start a
// write, the last one having ended at ended after taking took (zero
// before the first).
func checkpointDue(now, ended time.Time, took time.Duration) bool {
	return now.Sub(ended) >= checkpointGap*took
}

// handoffRays is the fewest rays a worker hands to the collector at once
// (a time-limited or cancelled run loses at most this much unsaved work
// per worker, which is retraced on resume).
const handoffRays = 4096

// chunk is how many rays are generated and traced together.
const chunk = 64

// trace runs one unit. Ray r of the node is tallied in replicate
// r mod reps. With plain Monte Carlo its numbers come from stream (seed,
// node, r / batch) at offset (r mod batch)·numbersPerRay; with RQMC it is
// point r / reps of replicate r mod reps's scrambled Sobol' sequence. Either
// way any worker produces the same numbers.
func (e *engine) trace(ctx context.Context, u unit, s []*scratch, b *bvh.Batch) (unitResult, error) {
	batch := e.opts.BatchSize
	st := sample.NewStream(e.opts.Seed, int64(u.Node), u.Lo/batch)
	st.Skip(uint64(u.Lo%batch) * numbersPerRay)
	ne := &e.nodeEm[u.Node]
	var qs [chunk]bvh.Query
	var hs [chunk]bvh.Hit
	var nums numbers
	reps := int64(len(s))
	var sobol []sample.Sobol
	if e.opts.Sampling == SamplingRQMC {
		sobol = make([]sample.Sobol, reps)
		for q := range sobol {
			sobol[q] = sample.NewSobol(e.opts.Seed, int64(u.Node), q)
		}
	}
	res := unitResult{u: u, rays: make([]int64, reps), escaped: make([]int64, reps), hits: make([]Row, reps), backHit: make([]Row, reps)}
	front, back, surf := e.nm.front, e.nm.back, e.m.SurfaceOf
	for lo := u.Lo; lo < u.Hi; lo += chunk {
		if err := ctx.Err(); err != nil {
			for k := range s {
				s[k].take() // leave the scratch clean
			}
			return res, err
		}
		n := int(min(chunk, u.Hi-lo))
		if sobol != nil {
			for k := range n {
				r := lo + int64(k)
				sobol[r%reps].Point(uint64(r/reps), &nums[k])
			}
		} else {
			nums.draw(&st, n)
		}
		ne.rays(&nums, e.em, qs[:n])
		e.tree.IntersectBatch(b, qs[:n], hs[:n])
		for k := range n {
			h := &hs[k]
			rep := (lo + int64(k)) % reps
			sc := s[rep]
			res.rays[rep]++
			if e.fates != nil {
				st := followStream(e.opts.Seed, u.Node, lo+int64(k))
				switch end, id := e.follow(qs[k].D, *h, &st); end {
				case endEscaped:
					res.escaped[rep]++
				case endAbsorbed:
					sc.hit(NodeID(id))
				default:
					sc.backHit(SurfaceID(id))
				}
				continue
			}
			switch {
			case h.Facet < 0:
				res.escaped[rep]++
			case h.Front && front[h.Facet] >= 0:
				sc.hit(front[h.Facet])
			case !h.Front && back[h.Facet] >= 0:
				sc.hit(back[h.Facet])
			default:
				sc.backHit(SurfaceID(surf[h.Facet]))
			}
		}
		e.traced.Add(int64(n))
	}
	for k := range s {
		res.hits[k], res.backHit[k] = s[k].take()
	}
	return res, nil
}
