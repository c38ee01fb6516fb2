package analysis

import (
	"context"
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"time"

	"github.com/hemiray/hemiray/raytrace"
)

// Run is how one process traces an input: where its tally file goes and
// the runtime knobs that cannot change a tally.
type Run struct {
	Dir     string // output folder for tallies.bin; "" writes no tally file
	Threads int    // default GOMAXPROCS
	// Shard of Shards traces only that share of the work; Targets are the
	// rays per node of a planned round (a Plan), nil for the first.
	Shard, Shards int
	Targets       []int64
	// Resume continues from Dir/tallies.bin if there is one.
	Resume          bool
	CheckpointEvery time.Duration // default one minute
	TimeLimit       time.Duration // stop cleanly after this long; 0: none
	MemoryLimit     int64         // bytes a facet-mode run may plan; 0: the memory available now, −1: no check
	Progress        func(raytrace.Progress)
}

// Traced is a finished (or time-limited) trace.
type Traced struct {
	Result *raytrace.Result
	Record *Record
	// Complete is true when every planned ray was traced.
	Complete bool
	// Notes are things the user should know (a fresh start on --resume,
	// a time limit reached).
	Notes []string
}

// ErrInterrupted is returned, wrapped, when ctx was cancelled: the
// checkpoint was written and the same run with Resume continues.
var ErrInterrupted = errors.New("interrupted")

// Trace runs the estimator on in, writing the checkpoint Dir/tallies.bin
// every CheckpointEvery, at the end, and on cancellation.
func (in *Input) Trace(ctx context.Context, run Run) (*Traced, error) {
	if run.MemoryLimit == 0 {
		run.MemoryLimit = availableMemory()
	}
	opts := raytrace.Options{Settings: in.Settings, NodeOf: in.NodeOf, Threads: run.Threads, Shard: run.Shard, Shards: run.Shards,
		Targets: run.Targets, CheckpointEvery: run.CheckpointEvery, MemoryLimit: run.MemoryLimit, Progress: run.Progress}
	nodes, err := raytrace.Nodes(in.Mesh, opts)
	if err != nil {
		return nil, err
	}
	rec, err := in.Record(run.Shard, run.Shards, len(nodes))
	if err != nil {
		return nil, err
	}
	out := &Traced{Record: rec}
	path := filepath.Join(run.Dir, TallyFile)
	if _, err := os.Stat(path); run.Resume && errors.Is(err, os.ErrNotExist) {
		// Killed before the first checkpoint, or a scheduler's first attempt.
		out.Notes = append(out.Notes, fmt.Sprintf("no checkpoint in %s yet; starting from the beginning", run.Dir))
	} else if run.Resume && run.Dir != "" {
		ck, old, err := ReadTallies(path)
		if err != nil {
			return nil, fmt.Errorf("resume: %w", err)
		}
		d := rec.Differences(old)
		if old.Shard != rec.Shard || old.Shards != rec.Shards {
			d = append(d, fmt.Sprintf("shard %d/%d was %d/%d", rec.Shard, rec.Shards, old.Shard, old.Shards))
		}
		if len(d) > 0 {
			return nil, fmt.Errorf("resume refused: the checkpoint in %s is of another run: %s", run.Dir, strings.Join(d, "; "))
		}
		opts.Resume = ck
	}
	if run.Dir != "" {
		opts.OnCheckpoint = func(ck *raytrace.Checkpoint) error { return WriteTallies(run.Dir, ck, rec) }
	}
	tctx := ctx
	if run.TimeLimit > 0 {
		var cancel context.CancelFunc
		tctx, cancel = context.WithTimeout(ctx, run.TimeLimit)
		defer cancel()
	}
	res, err := raytrace.Estimate(tctx, in.Mesh, opts)
	if res == nil {
		return nil, err
	}
	if run.Dir != "" {
		ck := res.Checkpoint()
		if werr := WriteTallies(run.Dir, &ck, rec); werr != nil {
			return nil, werr
		}
	}
	out.Result = res
	switch {
	case err == nil:
		out.Complete = true
	case errors.Is(err, context.DeadlineExceeded) && ctx.Err() == nil:
		out.Notes = append(out.Notes, fmt.Sprintf("the time limit of %v stopped the trace early", run.TimeLimit))
	case errors.Is(err, context.Canceled):
		return nil, fmt.Errorf("%w: checkpoint written to %s; continue with the same command and --resume", ErrInterrupted, path)
	default:
		return nil, err
	}
	return out, nil
}

// FromTallies rebuilds the result of a finished or interrupted trace of
// in from a tally file's checkpoint and record, refusing tallies of
// another model or other settings. Complete is taken from the plan: every
// unit done and, for a HalfWidth run, no further round needed.
func (in *Input) FromTallies(ck *raytrace.Checkpoint, old *Record) (*Traced, error) {
	if old.Shards > 1 {
		return nil, fmt.Errorf("the tallies hold shard %d/%d only: merge the shards first", old.Shard, old.Shards)
	}
	in.Settings.Replicates = old.Settings.Replicates // replicates come with the tallies
	nodes, err := in.Nodes()
	if err != nil {
		return nil, err
	}
	rec, err := in.Record(0, 1, len(nodes))
	if err != nil {
		return nil, err
	}
	if d := rec.Differences(old); len(d) > 0 {
		return nil, &MismatchError{Differences: d}
	}
	if err := ck.Check(len(nodes), len(in.Mesh.Surfaces), in.Options()); err != nil {
		return nil, err
	}
	res, err := raytrace.NewResult(nodes, ck.Tally, ck.Replicas, in.Options())
	if err != nil {
		return nil, err
	}
	res.Targets = ck.Targets
	_, more := res.NextTargets()
	return &Traced{Result: res, Record: rec, Complete: ck.Complete(in.Options()) && !more}, nil
}

// MismatchError says how saved tallies differ from the input they are
// read for.
type MismatchError struct{ Differences []string }

func (e *MismatchError) Error() string {
	return "the tallies were traced from other mesh files or ray settings: " + strings.Join(e.Differences, "; ")
}

// availableMemory reads MemAvailable from /proc/meminfo (Linux); 0, no
// check, where it cannot.
func availableMemory() int64 {
	b, err := os.ReadFile("/proc/meminfo")
	if err != nil {
		return 0
	}
	for _, l := range strings.Split(string(b), "\n") {
		var kb int64
		if n, _ := fmt.Sscanf(l, "MemAvailable: %d kB", &kb); n == 1 {
			return kb * 1024
		}
	}
	return 0
}
