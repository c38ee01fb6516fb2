package raytrace

import (
	"bytes"
	"context"
	"crypto/sha256"
	"errors"
	"reflect"
	"strings"
	"testing"
	"time"
)

func baseOpts() Options {
	return Options{Settings: Settings{Rays: 20000, Seed: 21, BatchSize: 4096, Replicates: 3}}
}

// Shards 1/1 … 7/7 merged give exactly the single run's tallies.
func TestShardsMergeExactly(t *testing.T) {
	for _, sampling := range []string{SamplingMC, SamplingRQMC} {
		t.Run(sampling, func(t *testing.T) {
			base := baseOpts
			baseOpts := func() Options { o := base(); o.Sampling = sampling; return o }
			shardsMergeExactly(t, baseOpts)
		})
	}
	t.Run("followed", func(t *testing.T) {
		shardsMergeExactly(t, func() Options {
			o := baseOpts()
			o.Optics = halfMirrors(ReferenceCases()[1].Mesh)
			return o
		})
	})
}

func shardsMergeExactly(t *testing.T, baseOpts func() Options) {
	m := ReferenceCases()[1].Mesh
	single, err := Estimate(context.Background(), m, baseOpts())
	if err != nil {
		t.Fatal(err)
	}
	want := single.Checkpoint()
	for n := 1; n <= 7; n++ {
		var parts []*Checkpoint
		for i := range n {
			o := baseOpts()
			o.Shard, o.Shards = i, n
			r, err := Estimate(context.Background(), m, o)
			if err != nil {
				t.Fatal(err)
			}
			ck := r.Checkpoint()
			parts = append(parts, &ck)
		}
		got, err := Merge(parts, baseOpts())
		if err != nil {
			t.Fatalf("%d shards: %v", n, err)
		}
		if !reflect.DeepEqual(got.Tally, want.Tally) || !reflect.DeepEqual(got.Replicas, want.Replicas) || !reflect.DeepEqual(got.Done, want.Done) {
			t.Errorf("%d shards merged differ from the single run", n)
		}
		if n == 3 {
			if _, err := Merge(parts[:2], baseOpts()); err == nil || !strings.Contains(err.Error(), "missing") {
				t.Errorf("missing shard: %v", err)
			}
			if _, err := Merge(append(parts, parts[1]), baseOpts()); err == nil || !strings.Contains(err.Error(), "more than one part") {
				t.Errorf("repeated shard: %v", err)
			}
		}
	}
}

// A run cancelled part way and resumed from its checkpoint gives the
// uninterrupted run's tallies, also across a HalfWidth round. Plain Monte
// Carlo, whose wider intervals need more rounds and so more units, leaves
// room to stop after 20 units (RQMC would reach the target within about
// 24); the resume logic is the same for both samplings.
func TestResumeAfterCancel(t *testing.T) {
	m := ReferenceCases()[0].Mesh
	opts := Options{Settings: Settings{Rays: 3000, HalfWidth: 0.006, Seed: 8, BatchSize: 512, Sampling: SamplingMC}}
	whole, err := Estimate(context.Background(), m, opts)
	if err != nil {
		t.Fatal(err)
	}
	want := whole.Checkpoint()
	for _, stopAfter := range []int{1, 5, 20} {
		ctx, cancel := context.WithCancel(context.Background())
		o := opts
		o.Threads = 1
		var last *Checkpoint
		o.CheckpointEvery = time.Millisecond
		o.OnCheckpoint = func(ck *Checkpoint) error {
			last = ck
			if len(ck.Done) >= stopAfter {
				cancel()
			}
			return nil
		}
		r, err := Estimate(ctx, m, o)
		if err == nil {
			t.Fatalf("stop after %d units: the run was not interrupted", stopAfter)
		}
		ck := r.Checkpoint()
		if last == nil || len(ck.Done) < len(last.Done) {
			t.Fatalf("final checkpoint has fewer units than the periodic one")
		}
		o = opts
		o.Resume = &ck
		r, err = Estimate(context.Background(), m, o)
		if err != nil {
			t.Fatal(err)
		}
		got := r.Checkpoint()
		if !reflect.DeepEqual(got.Tally, want.Tally) || !reflect.DeepEqual(got.Targets, want.Targets) {
			t.Errorf("stop after %d units: resumed run differs from the uninterrupted one", stopAfter)
		}
	}
}

func TestTallyFileRoundTripAndCorruption(t *testing.T) {
	r, err := Estimate(context.Background(), ReferenceCases()[1].Mesh, baseOpts())
	if err != nil {
		t.Fatal(err)
	}
	ck := r.Checkpoint()
	var b bytes.Buffer
	if err := WriteTallyFile(&b, &ck, []byte(`{"x":1}`)); err != nil {
		t.Fatal(err)
	}
	got, meta, err := ReadTallyFile(b.Bytes())
	if err != nil || string(meta) != `{"x":1}` || !reflect.DeepEqual(*got, ck) {
		t.Fatalf("round trip: %v, meta %q, equal %v", err, meta, reflect.DeepEqual(*got, ck))
	}
	data := b.Bytes()
	bad := map[string][]byte{
		"truncated": data[:len(data)-100],
		"empty":     nil,
		"foreign":   []byte("solid x\nendsolid x\n" + strings.Repeat(" ", 64)),
		"bit flip":  append(append([]byte{}, data[:60]...), append([]byte{data[60] ^ 1}, data[61:]...)...),
	}
	for name, d := range bad {
		if _, _, err := ReadTallyFile(d); !errors.Is(err, ErrTallyFile) {
			t.Errorf("%s: %v, want ErrTallyFile", name, err)
		}
	}
}

func FuzzReadTallyFile(f *testing.F) {
	r, _ := Estimate(context.Background(), ReferenceCases()[0].Mesh, Options{Settings: Settings{Rays: 500, BatchSize: 128, Replicates: 2}})
	ck := r.Checkpoint()
	var b bytes.Buffer
	WriteTallyFile(&b, &ck, []byte("{}"))
	f.Add(b.Bytes())
	f.Fuzz(func(t *testing.T, data []byte) {
		// Fix up the checksum half the time so the parser itself is exercised.
		if len(data) > 40 && data[0]&1 == 0 {
			sum := sha256.Sum256(data[:len(data)-32])
			copy(data[len(data)-32:], sum[:])
		}
		ck, meta, err := ReadTallyFile(data)
		if err != nil {
			return
		}
		// What reads must write back to the same bytes.
		var again bytes.Buffer
		if err := WriteTallyFile(&again, ck, meta); err != nil {
			t.Fatalf("writing back: %v", err)
		}
		if !bytes.Equal(again.Bytes(), data) {
			t.Fatalf("read %d bytes, wrote back %d different ones", len(data), again.Len())
		}
		ck.Check(len(ck.Targets), 8, Options{Settings: Settings{Rays: 500, BatchSize: 128, Replicates: len(ck.Replicas)}}) // must not panic
	})
}

// Tally files edited by hand (and given a fresh checksum) are refused by
// Check, never double counted, never a crash: each forgery below passes the
// file format and fails the cross-checks.
func TestCheckRefusesForgedTallies(t *testing.T) {
	m := ReferenceCases()[1].Mesh
	o := baseOpts()
	r, err := Estimate(context.Background(), m, o)
	if err != nil {
		t.Fatal(err)
	}
	good := r.Checkpoint()
	nodes, surfaces := len(r.Nodes), len(m.Surfaces)
	if err := good.Check(nodes, surfaces, o); err != nil {
		t.Fatalf("a genuine checkpoint: %v", err)
	}
	forge := func(edit func(ck *Checkpoint)) *Checkpoint {
		var b bytes.Buffer
		WriteTallyFile(&b, &good, nil)
		ck, _, err := ReadTallyFile(b.Bytes())
		if err != nil {
			t.Fatal(err)
		}
		edit(ck)
		return ck
	}
	tests := map[string]func(ck *Checkpoint){
		"more rays than done units":   func(ck *Checkpoint) { ck.Tally.Rays[0] += 10; ck.Tally.Escaped[0] += 10 },
		"a unit done twice":           func(ck *Checkpoint) { ck.Done = append(ck.Done, ck.Done[len(ck.Done)-1]) },
		"a unit not in the plan":      func(ck *Checkpoint) { ck.Done[0].Hi++ },
		"a back-face surface too far": func(ck *Checkpoint) { ck.Tally.Back[0].Append(int32(surfaces+5), 0) },
		"hits beyond the nodes":       func(ck *Checkpoint) { ck.Tally.Hits[0].Append(int32(nodes), 0) },
		"a count that does not add":   func(ck *Checkpoint) { ck.Tally.Hits[1].Val[0]++ },
		"replicates off the pool":     func(ck *Checkpoint) { ck.Replicas[0].Hits[0].Val[0]++; ck.Replicas[0].Escaped[0]-- },
		"a node missing":              func(ck *Checkpoint) { ck.Targets = ck.Targets[:1] },
		"a target past the maximum":   func(ck *Checkpoint) { ck.Targets[0] = o.WithDefaults().MaxRays + 1 },
	}
	for name, edit := range tests {
		if err := forge(edit).Check(nodes, surfaces, o); !errors.Is(err, ErrTallyFile) {
			t.Errorf("%s: Check says %v", name, err)
		}
	}
}

// A checkpoint waits, after the last one ended, checkpointGap times as
// long as that one took: writing stays near 1/20 of a run however large
// the tally file grows.
func TestCheckpointDue(t *testing.T) {
	t0 := time.Date(2026, 1, 1, 0, 0, 0, 0, time.UTC)
	for _, tc := range []struct {
		name  string
		since time.Duration // from the end of the last write to the tick
		took  time.Duration
		due   bool
	}{
		{"first checkpoint", time.Minute, 0, true},
		{"a quick write, a minute ago", time.Minute, 100 * time.Millisecond, true},
		{"a 10 s write, a minute ago", time.Minute, 10 * time.Second, false},
		{"a 10 s write, 189 s ago", 189 * time.Second, 10 * time.Second, false},
		{"a 10 s write, 190 s ago", 190 * time.Second, 10 * time.Second, true},
	} {
		if got := checkpointDue(t0.Add(tc.since), t0, tc.took); got != tc.due {
			t.Errorf("%s: due %v, want %v", tc.name, got, tc.due)
		}
	}
}
