package raytrace

import (
	"cmp"
	"fmt"
	"math"
	"slices"
)

// Checkpoint is the finished part of a run: the planned rays per node of
// the current round, the work units done, and their tallies. A run resumed
// from it (Options.Resume) gives exactly the result it would have given
// uninterrupted; checkpoints of disjoint shards add up (Merge).
type Checkpoint struct {
	Targets  []int64
	Done     []UnitID // sorted by node, then Lo
	Tally    Tally
	Replicas []Tally
}

// add records a finished unit.
func (r *Result) add(u *unitResult) {
	add := func(t *Tally, k int) {
		i := u.u.Node
		t.Rays[i] += u.rays[k]
		t.Escaped[i] += u.escaped[k]
		t.Hits[i] = t.Hits[i].Add(u.hits[k])
		t.Back[i] = t.Back[i].Add(u.backHit[k])
	}
	for k := range u.rays {
		add(&r.Tally, k)
		if len(r.Replicas) > 0 {
			add(&r.Replicas[k], k)
		}
	}
	r.done = append(r.done, u.u)
}

// copyTally returns a copy that later adds to t do not change. Rows are
// never modified in place (Row.Add makes new ones), so they are shared.
func copyTally(t *Tally) Tally {
	return Tally{
		Rays: slices.Clone(t.Rays), Escaped: slices.Clone(t.Escaped),
		Hits: slices.Clone(t.Hits), Back: slices.Clone(t.Back),
	}
}

// Checkpoint returns a snapshot of the finished work.
func (r *Result) Checkpoint() Checkpoint {
	ck := Checkpoint{Targets: slices.Clone(r.Targets), Done: slices.Clone(r.done), Tally: copyTally(&r.Tally)}
	for k := range r.Replicas {
		ck.Replicas = append(ck.Replicas, copyTally(&r.Replicas[k]))
	}
	slices.SortFunc(ck.Done, compareUnits)
	return ck
}

func compareUnits(a, b UnitID) int {
	if a.Node != b.Node {
		return int(a.Node - b.Node)
	}
	switch {
	case a.Lo < b.Lo:
		return -1
	case a.Lo > b.Lo:
		return 1
	}
	return 0
}

// resume starts r from a checkpoint of the same nodes and settings.
func (r *Result) resume(ck *Checkpoint, surfaces int) error {
	n := len(r.Nodes)
	if len(ck.Targets) != n || len(ck.Tally.Rays) != n || len(ck.Replicas) != len(r.Replicas) {
		return fmt.Errorf("the checkpoint has %d nodes and %d replicates; this run has %d and %d", len(ck.Targets), len(ck.Replicas), n, len(r.Replicas))
	}
	if err := ck.Check(n, surfaces, r.Options); err != nil {
		return err
	}
	r.Targets = slices.Clone(ck.Targets)
	r.done = slices.Clone(ck.Done)
	r.Tally = copyTally(&ck.Tally)
	for k := range ck.Replicas {
		r.Replicas[k] = copyTally(&ck.Replicas[k])
	}
	return nil
}

// pending returns the units of the current targets that are neither done
// nor another shard's.
func (r *Result) pending() []unit {
	done := make(map[UnitID]bool, len(r.done))
	for _, u := range r.done {
		done[u] = true
	}
	var out []unit
	for _, u := range planUnits(r.Targets, &r.Options) {
		if done[u] || (r.Options.Shards > 1 && shardOf(u, r.Options.BatchSize, r.Options.Shards) != r.Options.Shard) {
			continue
		}
		out = append(out, u)
	}
	// Every node progresses together: first each node's first batch, then
	// each node's second, … so that a run stopped early (a time limit) has
	// rays for every node. The order cannot change a tally.
	slices.SortStableFunc(out, func(a, b unit) int {
		if a.Lo != b.Lo {
			return cmp.Compare(a.Lo, b.Lo)
		}
		return cmp.Compare(a.Node, b.Node)
	})
	return out
}

// Merge adds the checkpoints of the shards of one run. It refuses shards
// whose targets differ, and units traced twice or not at all.
func Merge(parts []*Checkpoint, o Options) (*Checkpoint, error) {
	if err := o.defaults(); err != nil {
		return nil, err
	}
	if len(parts) == 0 {
		return nil, fmt.Errorf("no parts to merge")
	}
	first := parts[0]
	out := &Checkpoint{Targets: slices.Clone(first.Targets), Tally: *newTally(len(first.Targets))}
	for range first.Replicas {
		out.Replicas = append(out.Replicas, *newTally(len(first.Targets)))
	}
	for k, p := range parts {
		if !slices.Equal(p.Targets, first.Targets) || len(p.Replicas) != len(first.Replicas) {
			return nil, fmt.Errorf("part %d was traced with other targets or replicates than part 0", k)
		}
		if err := p.Check(len(first.Targets), math.MaxInt32, o); err != nil {
			return nil, fmt.Errorf("part %d: %w", k, err)
		}
		out.Done = append(out.Done, p.Done...)
		addTally(&out.Tally, &p.Tally)
		for j := range p.Replicas {
			addTally(&out.Replicas[j], &p.Replicas[j])
		}
	}
	slices.SortFunc(out.Done, compareUnits)
	want := planUnits(out.Targets, &o)
	if len(want) != len(out.Done) || !slices.Equal(want, out.Done) {
		return nil, coverageError(want, out.Done)
	}
	return out, nil
}

func addTally(dst, src *Tally) {
	for i := range dst.Rays {
		dst.Rays[i] += src.Rays[i]
		dst.Escaped[i] += src.Escaped[i]
		dst.Hits[i] = dst.Hits[i].Add(src.Hits[i])
		dst.Back[i] = dst.Back[i].Add(src.Back[i])
	}
}

// coverageError explains how the merged units differ from the plan.
func coverageError(want, got []UnitID) error {
	count := map[UnitID]int{}
	for _, u := range got {
		count[u]++
	}
	missing, twice := 0, 0
	var ex UnitID
	for _, u := range want {
		switch count[u] {
		case 0:
			if missing == 0 {
				ex = u
			}
			missing++
		case 1:
		default:
			twice++
		}
		delete(count, u)
	}
	switch {
	case twice > 0:
		return fmt.Errorf("%d work units were traced by more than one part: a shard is repeated", twice)
	case missing > 0:
		return fmt.Errorf("%d work units are missing (the first: node %d, rays %d–%d): a shard is missing or unfinished", missing, ex.Node, ex.Lo, ex.Hi)
	}
	return fmt.Errorf("%d work units do not belong to this run's plan", len(count))
}

// Complete reports whether ck holds exactly the work units that its targets
// plan for shard o.Shard of o.Shards (every unit when o.Shards ≤ 1).
// Whether a run is complete comes from this plan, never from how it ended.
func (ck *Checkpoint) Complete(o Options) bool {
	if o.defaults() != nil {
		return false
	}
	var want []unit
	for _, u := range planUnits(ck.Targets, &o) {
		if o.Shards <= 1 || shardOf(u, o.BatchSize, o.Shards) == o.Shard {
			want = append(want, u)
		}
	}
	return slices.Equal(want, ck.Done)
}

// Check verifies that ck is a consistent record of a run of nodes nodes on a
// model of surfaces surfaces with settings o: sizes agree, every done unit
// belongs to the plan of ck's targets, each node's rays are exactly the
// rays of its done units, every ray is counted once (hits, escapes and
// back-face hits add up to the rays), and the replicates add up to the
// pooled tally. A tally file that passes its checksum may still have been
// edited; this is what keeps such a file from double counting or crashing
// a solve.
func (ck *Checkpoint) Check(nodes, surfaces int, o Options) error {
	if err := o.defaults(); err != nil {
		return err
	}
	bad := func(format string, args ...any) error {
		return fmt.Errorf("%w: %s", ErrTallyFile, fmt.Sprintf(format, args...))
	}
	if len(ck.Targets) != nodes {
		return bad("targets for %d nodes, the model has %d", len(ck.Targets), nodes)
	}
	if o.Replicates > 0 && len(ck.Replicas) != o.Replicates {
		return bad("%d replicates, the settings say %d", len(ck.Replicas), o.Replicates)
	}
	for i, t := range ck.Targets {
		if t < 0 || t > o.MaxRays {
			return bad("node %d has a target of %d rays, outside [0, %d]", i, t, o.MaxRays)
		}
	}
	plan := make(map[UnitID]bool)
	for _, u := range planUnits(ck.Targets, &o) {
		plan[u] = true
	}
	rays := make([]int64, nodes)
	for k, u := range ck.Done {
		if !plan[u] {
			return bad("done unit %d (node %d, rays %d–%d) is not in the plan of its targets", k, u.Node, u.Lo, u.Hi)
		}
		if k > 0 && compareUnits(ck.Done[k-1], u) >= 0 {
			return bad("done units are not in order, or repeated, at unit %d", k)
		}
		rays[u.Node] += u.Hi - u.Lo
	}
	check := func(t *Tally, what string, wantRays []int64) error {
		if len(t.Rays) != nodes || len(t.Escaped) != nodes || len(t.Hits) != nodes || len(t.Back) != nodes {
			return bad("the %s tally has rows for %d nodes, the model has %d", what, len(t.Rays), nodes)
		}
		for i := range nodes {
			if wantRays != nil && t.Rays[i] != wantRays[i] {
				return bad("node %d: the %s tally has %d rays, its done units %d", i, what, t.Rays[i], wantRays[i])
			}
			if !t.Hits[i].Increasing(nodes) || !t.Back[i].Increasing(surfaces) {
				return bad("node %d: a %s row has columns out of order or out of range", i, what)
			}
			sum := t.Escaped[i]
			for _, row := range []*Row{&t.Hits[i], &t.Back[i]} {
				for _, c := range row.Val {
					if c < 0 || sum > math.MaxInt64-c {
						return bad("node %d: a %s count is negative or overflows", i, what)
					}
					sum += c
				}
			}
			if t.Escaped[i] < 0 || sum != t.Rays[i] {
				return bad("node %d: the %s tally counts %d outcomes for %d rays", i, what, sum, t.Rays[i])
			}
		}
		return nil
	}
	if err := check(&ck.Tally, "pooled", rays); err != nil {
		return err
	}
	if len(ck.Replicas) > 0 {
		sum := Tally{Rays: make([]int64, nodes), Escaped: make([]int64, nodes), Hits: make([]Row, nodes), Back: make([]Row, nodes)}
		for k := range ck.Replicas {
			if err := check(&ck.Replicas[k], fmt.Sprintf("replicate %d", k), nil); err != nil {
				return err
			}
			addTally(&sum, &ck.Replicas[k])
		}
		for i := range nodes {
			if sum.Rays[i] != ck.Tally.Rays[i] || sum.Escaped[i] != ck.Tally.Escaped[i] ||
				!slices.Equal(sum.Hits[i].Col, ck.Tally.Hits[i].Col) || !slices.Equal(sum.Hits[i].Val, ck.Tally.Hits[i].Val) {
				return bad("node %d: the replicates do not add up to the pooled tally", i)
			}
		}
	}
	return nil
}
