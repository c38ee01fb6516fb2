package raytrace

import (
	"crypto/sha256"
	"encoding/hex"
	"encoding/json"
	"fmt"
	"maps"
	"reflect"
	"slices"
	"strings"
)

// SettingsVersion is the version of the Settings layout and of the way a
// run turns them into rays. It is stored with every tally file; tallies of
// another version are refused rather than mixed.
const SettingsVersion = 3

// Sampling methods: how a node's rays draw their numbers.
const (
	// SamplingMC draws every number independently (plain Monte Carlo):
	// intervals from the binomial law of the pooled counts.
	SamplingMC = "mc"
	// SamplingRQMC takes each replicate's rays from its own scrambled
	// Sobol' sequence (randomized quasi-Monte Carlo): intervals from the
	// spread of the replicates (Student-t).
	SamplingRQMC = "rqmc"
)

// DefaultReplicates is the number of replicates when intervals come from
// them (RQMC sampling, and the run command's heat-flow intervals).
const DefaultReplicates = 8

// Settings are everything that fixes the tallies of a run besides the mesh
// files' bytes: how the mesh was read, which nodes it has, and how rays are
// drawn. Two runs with equal Settings and equal files give the same tallies
// bit for bit. They are stored in every tally file and hashed into the
// input hash; adding a field here adds it to both and to Diff.
//
// Runtime knobs that cannot change a tally (threads, shards, progress,
// checkpoints) are in Options, not here.
type Settings struct {
	// Version is SettingsVersion for settings made by this build.
	Version int `json:"format_version"`
	// Units is the length unit of mesh files given without a case.
	Units string `json:"units"`
	// GroupByMaterial reads OBJ surfaces by usemtl material.
	GroupByMaterial bool `json:"by_material"`
	// Names and Rename name the surfaces of single-surface files and
	// rename (or combine) surfaces after reading (a case's [model.names]
	// and [model.rename]).
	Names  map[string]string `json:"names,omitempty"`
	Rename map[string]string `json:"rename,omitempty"`
	// Flipped names the surfaces whose facets were flipped after reading.
	Flipped []string `json:"flipped"`
	// TwoSided names the surfaces whose back is a node of its own.
	TwoSided []string `json:"two_sided"`
	// FacetNodes makes every facet a node.
	FacetNodes bool `json:"facets"`
	// Split splits surfaces into several nodes: "grid NxM" or "patches"
	// per surface name (see groups.go). NodeMap names the facet → node map
	// file whose content Options.NodeOf holds (its bytes are hashed with
	// the mesh files).
	Split   map[string]string `json:"split,omitempty"`
	NodeMap string            `json:"node_map,omitempty"`
	// Rays is the number of rays per emitting node (the first round when
	// HalfWidth is set). Default 100,000.
	Rays int64 `json:"rays"`
	// HalfWidth > 0 traces in rounds, doubling the rays of every node some
	// entry of whose row still has a confidence half-width above it, until
	// none has or the node reaches MaxRays.
	HalfWidth float64 `json:"halfwidth"`
	// MaxRays caps the rays per node of a HalfWidth run. Default 64·Rays.
	MaxRays int64 `json:"max_rays"`
	// Seed selects the random streams.
	Seed uint64 `json:"seed"`
	// Confidence is the level of the intervals, in (0, 1). Default 0.95.
	Confidence float64 `json:"confidence"`
	// Replicates, when at least 2, also keeps the tallies of that many
	// independent sub-samples (ray r of a node belongs to replicate r mod
	// Replicates), for replicate-based intervals on derived results.
	Replicates int `json:"replicates"`
	// Sampling is SamplingMC or SamplingRQMC (the default).
	Sampling string `json:"sampling"`
	// Optics, when set, makes the run follow every ray through reflections
	// and transmissions until it is absorbed: the tallies then count where
	// rays are absorbed (absorption factors B_ij) instead of what they meet
	// first (view factors). Keyed by surface name, and NAME.back for the
	// back of a two-sided surface; every node's side needs an entry.
	Optics map[string]Optics `json:"optics,omitempty"`
	// BatchSize is the number of rays per random stream and work unit.
	// Changing it changes the numbers. Default 65,536.
	BatchSize int64 `json:"batch_size"`
}

// WithDefaults returns s with every zero field that has a default set to
// it and the name lists sorted, so that equal runs compare equal.
func (s Settings) WithDefaults() Settings {
	if s.Version == 0 {
		s.Version = SettingsVersion
	}
	if s.Rays == 0 {
		s.Rays = 100000
	}
	if s.MaxRays == 0 && s.Rays <= maxRaysPerNode/64 {
		s.MaxRays = 64 * s.Rays
	} else if s.MaxRays == 0 {
		s.MaxRays = maxRaysPerNode
	}
	if s.Confidence == 0 {
		s.Confidence = 0.95
	}
	if s.BatchSize == 0 {
		s.BatchSize = DefaultBatchSize
	}
	if s.Sampling == "" {
		s.Sampling = SamplingRQMC
	}
	if s.Sampling == SamplingRQMC && s.Replicates == 0 {
		s.Replicates = DefaultReplicates
	}
	s.TwoSided = sortedCopy(s.TwoSided)
	s.Flipped = sortedCopy(s.Flipped)
	return s
}

// maxRaysPerNode bounds the rays of one node so that counts and the
// doubling of HalfWidth rounds can never overflow an int64.
const maxRaysPerNode = 1 << 50

// Check reports the first setting outside its range, naming it as the case
// file and the tally files do.
func (s Settings) Check() error {
	switch {
	case s.Version != SettingsVersion:
		return fmt.Errorf("format_version %d: this hemiray reads version %d", s.Version, SettingsVersion)
	case s.Rays <= 0 || s.Rays > maxRaysPerNode:
		return fmt.Errorf("rays %d per node: give a positive number up to 2^50", s.Rays)
	case s.MaxRays < s.Rays || s.MaxRays > maxRaysPerNode:
		return fmt.Errorf("max_rays %d must be at least rays (%d) and at most 2^50", s.MaxRays, s.Rays)
	case !(s.Confidence > 0 && s.Confidence < 1):
		return fmt.Errorf("confidence %v is not in (0, 1)", s.Confidence)
	case !(s.HalfWidth >= 0 && s.HalfWidth < 0.5):
		return fmt.Errorf("halfwidth %v is not in [0, 0.5)", s.HalfWidth)
	case s.BatchSize < 64 || s.BatchSize > 1<<30:
		return fmt.Errorf("batch_size %d is outside [64, 2^30]", s.BatchSize)
	case s.Replicates < 0 || s.Replicates == 1 || s.Replicates > 1024:
		return fmt.Errorf("replicates %d: use 0 (none) or 2 to 1024", s.Replicates)
	case s.Sampling != SamplingMC && s.Sampling != SamplingRQMC:
		return fmt.Errorf("sampling %q: use %q or %q", s.Sampling, SamplingRQMC, SamplingMC)
	case s.Sampling == SamplingRQMC && s.Replicates < 2:
		return fmt.Errorf("sampling %q takes its intervals from replicates: give at least 2", s.Sampling)
	}
	for _, key := range slices.Sorted(maps.Keys(s.Optics)) {
		if err := s.Optics[key].Check(); err != nil {
			return fmt.Errorf("optics of %s: %w", key, err)
		}
	}
	return nil
}

func sortedCopy(s []string) []string {
	out := append([]string{}, s...)
	slices.Sort(out)
	return out
}

// FileDigest is one input file and the SHA-256 of its bytes.
type FileDigest struct {
	Path   string `json:"path"`
	SHA256 string `json:"sha256"`
}

// Hash returns the SHA-256 of the settings and the files' digests: the
// input hash stored with every result. Paths do not enter it, only each
// file's base name, so a moved project keeps its hash.
func (s Settings) Hash(files []FileDigest) string {
	h := sha256.New()
	for _, f := range files {
		fmt.Fprintf(h, "%s %s\n", baseName(f.Path), f.SHA256)
	}
	b, _ := json.Marshal(s.WithDefaults())
	h.Write(b)
	return hex.EncodeToString(h.Sum(nil))
}

func baseName(p string) string {
	for i := len(p) - 1; i >= 0; i-- {
		if p[i] == '/' || p[i] == '\\' {
			return p[i+1:]
		}
	}
	return p
}

// Diff lists, field by field, how s differs from old, in words such as
// "rays changed from 1000 to 2000" (per key for maps: "optics of wall
// changed from … to …"); nil when they are equal.
func (s Settings) Diff(old Settings) []string {
	a, b := reflect.ValueOf(s.WithDefaults()), reflect.ValueOf(old.WithDefaults())
	t := a.Type()
	var d []string
	for i := range a.NumField() {
		x, y := a.Field(i), b.Field(i)
		if reflect.DeepEqual(x.Interface(), y.Interface()) {
			continue
		}
		name, _, _ := strings.Cut(t.Field(i).Tag.Get("json"), ",")
		if x.Kind() != reflect.Map {
			d = append(d, fmt.Sprintf("%s changed from %v to %v", name, y.Interface(), x.Interface()))
			continue
		}
		keys := map[string]bool{}
		for _, k := range append(x.MapKeys(), y.MapKeys()...) {
			keys[k.String()] = true
		}
		for _, k := range slices.Sorted(maps.Keys(keys)) {
			kv := reflect.ValueOf(k)
			xv, yv := x.MapIndex(kv), y.MapIndex(kv)
			switch {
			case !yv.IsValid():
				d = append(d, fmt.Sprintf("%s of %s added: %v", name, k, xv.Interface()))
			case !xv.IsValid():
				d = append(d, fmt.Sprintf("%s of %s removed (was %v)", name, k, yv.Interface()))
			case !reflect.DeepEqual(xv.Interface(), yv.Interface()):
				d = append(d, fmt.Sprintf("%s of %s changed from %v to %v", name, k, yv.Interface(), xv.Interface()))
			}
		}
	}
	return d
}
