package main

import (
	"bytes"
	"context"
	"crypto/sha256"
	"encoding/hex"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"reflect"
	"sort"
	"strings"

	"github.com/hemiray/hemiray/raytrace"
)

// checkpointFile is the tally file in an output folder: the checkpoint of
// a running trace, the final tallies of a finished one, a shard's share.
const checkpointFile = "tallies.bin"

// fileHash is one input file and its SHA-256.
type fileHash struct {
	Path   string `json:"path"`
	SHA256 string `json:"sha256"`
}

// storedOptions are the settings that determine the tallies.
type storedOptions struct {
	Rays       int64    `json:"rays"`
	HalfWidth  float64  `json:"halfwidth"`
	MaxRays    int64    `json:"max_rays"`
	Seed       uint64   `json:"seed"`
	Confidence float64  `json:"confidence"`
	Facets     bool     `json:"facets"`
	TwoSided   []string `json:"two_sided"`
	Flipped    []string `json:"flipped"`
	Replicates int      `json:"replicates"`
	BatchSize  int64    `json:"batch_size"`
	Units      string   `json:"units"`
	ByMaterial bool     `json:"by_material"`
}

// tallyMeta is the metadata block of a tally file (JSON).
type tallyMeta struct {
	Format    string        `json:"format"`
	Version   string        `json:"hemiray_version"`
	InputHash string        `json:"input_hash"`
	Case      string        `json:"case,omitempty"` // absolute path of the case file
	Inputs    []fileHash    `json:"inputs"`
	Options   storedOptions `json:"options"`
	Shard     int           `json:"shard"`
	Shards    int           `json:"shards"`
	Nodes     int           `json:"nodes"`
}

// meta describes the run of in.
func (in *input) meta(nodes int) (*tallyMeta, error) {
	h, err := in.hash()
	if err != nil {
		return nil, err
	}
	m := &tallyMeta{Format: "hemiray tallies", Version: version, InputHash: h, Shard: in.opts.Shard, Shards: max(1, in.opts.Shards), Nodes: nodes}
	for _, f := range in.files {
		b, err := os.ReadFile(f)
		if err != nil {
			return nil, err
		}
		sum := sha256.Sum256(b)
		abs, _ := filepath.Abs(f)
		m.Inputs = append(m.Inputs, fileHash{abs, hex.EncodeToString(sum[:])})
	}
	if in.lc != nil {
		m.Case, _ = filepath.Abs(in.lc.path)
	}
	o := in.opts
	m.Options = storedOptions{Rays: o.Rays, HalfWidth: o.HalfWidth, MaxRays: o.MaxRays, Seed: o.Seed, Confidence: o.Confidence,
		Facets: o.FacetNodes, TwoSided: in.settings["two_sided"].([]string), Flipped: in.settings["flipped"].([]string),
		Replicates: o.Replicates, BatchSize: raytrace.DefaultBatchSize, Units: in.units, ByMaterial: in.byMaterial}
	return m, nil
}

// differences lists, in words, how another run's metadata differs.
func (m *tallyMeta) differences(o *tallyMeta) []string {
	var d []string
	old := map[string]string{}
	for _, f := range o.Inputs {
		old[f.Path] = f.SHA256
	}
	for _, f := range m.Inputs {
		switch h, ok := old[f.Path]; {
		case !ok:
			d = append(d, "mesh file "+f.Path+" was not an input before")
		case h != f.SHA256:
			d = append(d, "mesh file "+f.Path+" has changed")
		}
		delete(old, f.Path)
	}
	for p := range old {
		d = append(d, "mesh file "+p+" is no longer an input")
	}
	a, b := reflect.ValueOf(m.Options), reflect.ValueOf(o.Options)
	for i := range a.NumField() {
		if !reflect.DeepEqual(a.Field(i).Interface(), b.Field(i).Interface()) {
			name := reflect.TypeOf(m.Options).Field(i).Tag.Get("json")
			d = append(d, fmt.Sprintf("%s changed from %v to %v", name, b.Field(i).Interface(), a.Field(i).Interface()))
		}
	}
	if m.Case != o.Case {
		d = append(d, fmt.Sprintf("the case file changed from %q to %q", o.Case, m.Case))
	}
	if len(d) == 0 && m.InputHash != o.InputHash {
		d = append(d, "the case's geometry settings changed")
	}
	sort.Strings(d)
	return d
}

// writeCheckpoint writes ck with meta into dir/tallies.bin atomically.
func writeCheckpoint(dir string, ck *raytrace.Checkpoint, meta *tallyMeta) error {
	mb, err := json.Marshal(meta)
	if err != nil {
		return err
	}
	return writeAtomic(filepath.Join(dir, checkpointFile), func(w io.Writer) error {
		return raytrace.WriteTallyFile(w, ck, mb)
	})
}

// readCheckpoint reads a tally file (a folder holding tallies.bin, or the file).
func readCheckpoint(path string) (*raytrace.Checkpoint, *tallyMeta, error) {
	if st, err := os.Stat(path); err == nil && st.IsDir() {
		path = filepath.Join(path, checkpointFile)
	}
	data, err := os.ReadFile(path)
	if err != nil {
		return nil, nil, err
	}
	ck, mb, err := raytrace.ReadTallyFile(data)
	if err != nil {
		return nil, nil, fmt.Errorf("%s: %w", path, err)
	}
	var m tallyMeta
	dec := json.NewDecoder(bytes.NewReader(mb))
	if err := dec.Decode(&m); err != nil || m.Format != "hemiray tallies" {
		return nil, nil, fmt.Errorf("%s: %w: unreadable metadata", path, raytrace.ErrTallyFile)
	}
	return ck, &m, nil
}

// traceState is how a trace ended.
type traceState struct {
	complete  bool // every planned ray traced
	timeLimit bool // stopped at --time-limit
}

// executeTrace runs the estimator with checkpoints every --checkpoint-every,
// --resume, --shard and --time-limit. On an interrupt it writes the
// checkpoint and returns an error saying how to resume.
func executeTrace(ctx context.Context, in *input, tf *traceFlags, stderr io.Writer) (*raytrace.Result, traceState, error) {
	var st traceState
	nodes, err := raytrace.Nodes(in.mesh, in.opts)
	if err != nil {
		return nil, st, err
	}
	meta, err := in.meta(len(nodes))
	if err != nil {
		return nil, st, err
	}
	if _, err := os.Stat(filepath.Join(in.outDir, checkpointFile)); tf.resume && errors.Is(err, os.ErrNotExist) {
		// Nothing to resume yet (killed before the first checkpoint, or a
		// scheduler's first attempt): start from the beginning.
		fmt.Fprintf(stderr, "hemiray: no checkpoint in %s yet; starting from the beginning\n", in.outDir)
	} else if tf.resume {
		ck, old, err := readCheckpoint(in.outDir)
		if err != nil {
			return nil, st, fmt.Errorf("--resume: %w", err)
		}
		if d := meta.differences(old); len(d) > 0 || old.Shard != meta.Shard || old.Shards != meta.Shards {
			if old.Shard != meta.Shard || old.Shards != meta.Shards {
				d = append(d, fmt.Sprintf("shard %d/%d was %d/%d", meta.Shard, meta.Shards, old.Shard, old.Shards))
			}
			return nil, st, fmt.Errorf("--resume refused: the checkpoint in %s is of another run: %s", in.outDir, strings.Join(d, "; "))
		}
		in.opts.Resume = ck
	}
	in.opts.CheckpointEvery = tf.checkpointEvery
	in.opts.OnCheckpoint = func(ck *raytrace.Checkpoint) error { return writeCheckpoint(in.outDir, ck, meta) }
	tctx := ctx
	if tf.timeLimit > 0 {
		var cancel context.CancelFunc
		tctx, cancel = context.WithTimeout(ctx, tf.timeLimit)
		defer cancel()
	}
	progress, done := progressReporter(stderr, tf.quiet)
	in.opts.Progress = progress
	res, err := raytrace.Estimate(tctx, in.mesh, in.opts)
	done()
	if res == nil {
		return nil, st, err
	}
	ck := res.Checkpoint()
	if werr := writeCheckpoint(in.outDir, &ck, meta); werr != nil {
		return nil, st, werr
	}
	switch {
	case err == nil:
		st.complete = true
	case errors.Is(err, context.DeadlineExceeded) && ctx.Err() == nil:
		st.timeLimit = true
		fmt.Fprintf(stderr, "hemiray: time limit %v reached: writing the precision reached so far; continue with --resume\n", tf.timeLimit)
	case errors.Is(err, context.Canceled):
		return nil, st, fmt.Errorf("interrupted: checkpoint written to %s; continue with the same command and --resume", filepath.Join(in.outDir, checkpointFile))
	default:
		return nil, st, err
	}
	return res, st, nil
}

// parseShard reads "I/N".
func parseShard(s string) (i, n int, err error) {
	if _, err := fmt.Sscanf(s, "%d/%d", &i, &n); err != nil || n < 1 || i < 0 || i >= n {
		return 0, 0, usagef("--shard %q: give I/N with 0 ≤ I < N", s)
	}
	return i, n, nil
}
