package analysis

import (
	"bytes"
	"encoding/json"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"slices"

	"github.com/hemiray/hemiray/raytrace"
	"github.com/hemiray/hemiray/raytrace/internal/atomicfile"
)

// Version is hemiray's version, written into every tally file and summary.
const Version = "0.2.0"

// TallyFile is the tally file in an output folder: the checkpoint of a
// running trace, the final tallies of a finished one, a shard's share.
const TallyFile = "tallies.bin"

const recordFormat = "hemiray tallies"

// Record is the metadata stored with a tally file: what was traced, with
// which settings, and which share of the work the file holds.
type Record struct {
	Format    string                `json:"format"`
	Version   string                `json:"hemiray_version"`
	InputHash string                `json:"input_hash"`
	Case      string                `json:"case,omitempty"` // absolute path of the case file
	Inputs    []raytrace.FileDigest `json:"inputs"`
	Settings  raytrace.Settings     `json:"settings"`
	Shard     int                   `json:"shard"`
	Shards    int                   `json:"shards"`
	Nodes     int                   `json:"nodes"`
}

// Record describes a run of in on shard of shards with the given node count.
func (in *Input) Record(shard, shards, nodes int) (*Record, error) {
	d, err := in.Digests()
	if err != nil {
		return nil, err
	}
	r := &Record{Format: recordFormat, Version: Version, InputHash: in.Settings.Hash(d), Inputs: d,
		Settings: in.Settings.WithDefaults(), Shard: shard, Shards: max(1, shards), Nodes: nodes}
	if in.Case != nil && in.Case.Path != "" {
		r.Case, _ = filepath.Abs(in.Case.Path)
	}
	return r, nil
}

// Differences lists, in words, how the run of r differs from old in what
// fixes the tallies: mesh files (by name and content) and settings.
func (r *Record) Differences(old *Record) []string {
	var d []string
	oldFiles := map[string]string{}
	for _, f := range old.Inputs {
		oldFiles[filepath.Base(f.Path)] = f.SHA256
	}
	for _, f := range r.Inputs {
		b := filepath.Base(f.Path)
		switch h, ok := oldFiles[b]; {
		case !ok:
			d = append(d, "mesh file "+f.Path+" was not an input before")
		case h != f.SHA256:
			d = append(d, "mesh file "+f.Path+" has changed")
		}
		delete(oldFiles, b)
	}
	for _, p := range sortedKeys(oldFiles) {
		d = append(d, "mesh file "+p+" is no longer an input")
	}
	d = append(d, r.Settings.Diff(old.Settings)...)
	if r.Nodes != old.Nodes {
		d = append(d, fmt.Sprintf("the model has %d nodes, the tallies %d", r.Nodes, old.Nodes))
	}
	if len(d) == 0 && r.InputHash != old.InputHash {
		d = append(d, "the input hash differs")
	}
	slices.Sort(d)
	return d
}

// WriteTallies writes ck with its record into dir/tallies.bin atomically.
// Paths are stored relative to dir, so a project folder can be moved (or
// mounted elsewhere on a cluster) and still resumed and merged.
func WriteTallies(dir string, ck *raytrace.Checkpoint, r *Record) error {
	rel := *r
	rel.Case = relativeTo(dir, r.Case)
	rel.Inputs = make([]raytrace.FileDigest, len(r.Inputs))
	for k, f := range r.Inputs {
		rel.Inputs[k] = raytrace.FileDigest{Path: relativeTo(dir, f.Path), SHA256: f.SHA256}
	}
	mb, err := json.Marshal(&rel)
	if err != nil {
		return err
	}
	return atomicfile.WriteLarge(filepath.Join(dir, TallyFile), func(w io.Writer) error {
		return raytrace.WriteTallyFile(w, ck, mb)
	})
}

// ReadTallies reads a tally file (a folder holding tallies.bin, or the
// file) and checks that its record agrees with its contents.
func ReadTallies(path string) (*raytrace.Checkpoint, *Record, error) {
	if st, err := os.Stat(path); err == nil && st.IsDir() {
		path = filepath.Join(path, TallyFile)
	}
	st, err := os.Stat(path)
	if err != nil {
		return nil, nil, err
	}
	if !st.Mode().IsRegular() {
		return nil, nil, fmt.Errorf("%s is not a regular file", path)
	}
	data, err := os.ReadFile(path)
	if err != nil {
		return nil, nil, err
	}
	ck, mb, err := raytrace.ReadTallyFile(data)
	if err != nil {
		return nil, nil, fmt.Errorf("%s: %w", path, err)
	}
	var r Record
	dec := json.NewDecoder(bytes.NewReader(mb))
	if err := dec.Decode(&r); err != nil || r.Format != recordFormat {
		return nil, nil, fmt.Errorf("%s: %w: unreadable metadata", path, raytrace.ErrTallyFile)
	}
	base := filepath.Dir(path)
	if r.Case != "" && !filepath.IsAbs(r.Case) {
		r.Case = filepath.Join(base, r.Case)
	}
	for k, f := range r.Inputs {
		if !filepath.IsAbs(f.Path) {
			r.Inputs[k].Path = filepath.Join(base, f.Path)
		}
	}
	if r.Nodes != len(ck.Targets) || r.Shards < 1 || r.Shard < 0 || r.Shard >= r.Shards {
		return nil, nil, fmt.Errorf("%s: %w: the metadata (%d nodes, shard %d/%d) does not match the tallies (%d nodes)",
			path, raytrace.ErrTallyFile, r.Nodes, r.Shard, r.Shards, len(ck.Targets))
	}
	return ck, &r, nil
}

// LockDir takes the output folder dir for this process (creating it), so
// that two runs never mix their results in one folder: a second run fails
// at once naming the first, and an unwritable folder fails before any
// work. Call unlock when the results are written.
func LockDir(dir string) (unlock func(), err error) { return atomicfile.Lock(dir) }

// relativeTo returns path relative to dir when both resolve, else path.
func relativeTo(dir, path string) string {
	if path == "" {
		return ""
	}
	absDir, err1 := filepath.Abs(dir)
	abs, err2 := filepath.Abs(path)
	if err1 != nil || err2 != nil {
		return path
	}
	if rel, err := filepath.Rel(absDir, abs); err == nil {
		return filepath.ToSlash(rel)
	}
	return path
}
