package main

import (
	"flag"
	"fmt"
	"path/filepath"
	"runtime"
	"strings"
	"time"

	"github.com/hemiray/hemiray/raytrace"
	"github.com/hemiray/hemiray/raytrace/analysis"
	"github.com/hemiray/hemiray/raytrace/report"
)

// traceFlags are the flags trace, run, solve and render share.
type traceFlags struct {
	units      string
	byMaterial bool
	rays       int64
	halfWidth  float64
	maxRays    int64
	confidence float64
	seed       uint64
	sampling   string
	threads    int
	facets     bool
	twoSided   string
	out        string
	quiet      bool

	checkpointEvery time.Duration
	resume          bool
	timeLimit       time.Duration
	shard           string
	plan            string
	noPictures      bool
	csv             string
	dropConductors  float64
	noConductances  bool
}

// newTraceFlags returns the flags with their defaults, registered or not.
func newTraceFlags() *traceFlags {
	return &traceFlags{units: "m", rays: 100000, confidence: 0.95, seed: 1, threads: runtime.GOMAXPROCS(0), checkpointEvery: time.Minute}
}

// The flag groups; each command registers the ones it takes, so that its
// help lists only those.
const (
	meshFlags  = 1 << iota // --units, --by-material, --two-sided: mesh files given directly
	rayFlags               // what fixes the tallies: --rays, --halfwidth, …
	runFlags               // how this process traces: --threads, --resume, --shard, …
	writeFlags             // -o DIR, --quiet, --no-pictures
)

func (tf *traceFlags) register(fs *flag.FlagSet, groups int) {
	if groups&meshFlags != 0 {
		fs.StringVar(&tf.units, "units", tf.units, "length unit of mesh files given directly: m, cm, mm, in or ft")
		fs.BoolVar(&tf.byMaterial, "by-material", false, "OBJ given directly: one surface per usemtl material")
		fs.StringVar(&tf.twoSided, "two-sided", "", "comma-separated surfaces whose back is a node NAME.back (meshes given directly)")
	}
	if groups&rayFlags != 0 {
		fs.Int64Var(&tf.rays, "rays", tf.rays, "rays per emitting node (the first round with --halfwidth)")
		fs.Float64Var(&tf.halfWidth, "halfwidth", 0, "trace in rounds until every view factor's interval half-width is at most this")
		fs.Int64Var(&tf.maxRays, "max-rays", 0, "most rays per node with --halfwidth (default 64 × --rays)")
		fs.Float64Var(&tf.confidence, "confidence", tf.confidence, "confidence level of the intervals")
		fs.Uint64Var(&tf.seed, "seed", tf.seed, "random seed: the same seed gives the same numbers")
		fs.BoolVar(&tf.facets, "facets", false, "make every facet its own node")
		fs.StringVar(&tf.sampling, "sampling", "", "rqmc: scrambled Sobol' points per replicate, intervals from the replicates; mc: independent random numbers, binomial intervals (default: the case's rays.sampling, else rqmc)")
	}
	if groups&runFlags != 0 {
		fs.IntVar(&tf.threads, "threads", tf.threads, "worker threads (results do not depend on it)")
		fs.DurationVar(&tf.checkpointEvery, "checkpoint-every", tf.checkpointEvery, "write the checkpoint DIR/tallies.bin this often (and on Ctrl-C or SIGTERM)")
		fs.BoolVar(&tf.resume, "resume", false, "continue from the checkpoint in the output folder")
		fs.DurationVar(&tf.timeLimit, "time-limit", 0, "stop cleanly after this long and write the precision reached (e.g. 7h30m)")
		fs.StringVar(&tf.shard, "shard", "", "trace only share I of N (I/N, from 0) and write only DIR/tallies.bin; combine with merge")
		fs.StringVar(&tf.plan, "plan", "", "with --shard: the next --halfwidth round's plan.json written by merge")
	}
	if groups&writeFlags != 0 {
		fs.StringVar(&tf.out, "o", "", "output folder (default: the case's output.dir, else hemiray-out)")
		fs.BoolVar(&tf.quiet, "quiet", false, "no progress output")
		fs.BoolVar(&tf.noPictures, "no-pictures", false, "do not write the PNG pictures and model.vtp")
		fs.StringVar(&tf.csv, "csv", "", "all, or compact: no per-pair CSVs and no tallies.csv, the .mtx files carry the matrices (default: the case's output.csv, else all)")
		fs.BoolVar(&tf.noConductances, "no-conductances", false, "(run, solve) skip the conductances: their cost grows as nodes × view-factor entries (default: the case's output.conductances, else written)")
		fs.Float64Var(&tf.dropConductors, "drop-conductors", 0, "leave out conductors below this share of both nodes' emission, e.g. 1e-6 (default: the case's output.drop_conductors, else 0: keep all)")
	}
}

// job is an input with how this process runs it and where results go.
type job struct {
	in       *analysis.Input
	run      analysis.Run
	pictures bool
	quiet    bool
	compact  bool // no per-pair CSVs (--csv compact)
}

// outputs are the results of j to write: t nil when the view factors were
// given, a nil for a trace alone.
func (j *job) outputs(t *analysis.Traced, a *analysis.Result) report.Outputs {
	return report.Outputs{Input: j.in, Traced: t, Analysis: a, Pictures: j.pictures && a != nil, Compact: j.compact}
}

// loadInput reads the positional arguments (one .toml case or mesh files)
// and applies the flags set on the command line over the case's values.
func loadInput(fs *flag.FlagSet, tf *traceFlags, args []string) (*job, error) {
	if len(args) == 0 {
		return nil, usagef("give a case file (.toml) or mesh files")
	}
	set := map[string]bool{}
	fs.Visit(func(f *flag.Flag) { set[f.Name] = true })
	j := &job{run: analysis.Run{Dir: "hemiray-out"}}
	var err error
	if len(args) == 1 && strings.EqualFold(filepath.Ext(args[0]), ".toml") {
		for _, f := range []string{"units", "by-material", "two-sided"} {
			if set[f] {
				return nil, usagef("--%s applies to mesh files given directly; the case file sets it", f)
			}
		}
		if j.in, err = openCase(args[0]); err != nil {
			return nil, err
		}
		if d := j.in.Case.OutputDir(); d != "" {
			j.run.Dir = d
		}
	} else {
		for _, a := range args {
			if strings.EqualFold(filepath.Ext(a), ".toml") {
				return nil, usagef("give one case file, or mesh files, not both")
			}
		}
		s := raytrace.Settings{Units: tf.units, GroupByMaterial: tf.byMaterial, Rays: tf.rays, Seed: tf.seed, Confidence: tf.confidence}
		if tf.twoSided != "" {
			s.TwoSided = strings.Split(tf.twoSided, ",")
		}
		if j.in, err = analysis.OpenMeshes(args, s); err != nil {
			return nil, err
		}
	}
	s := &j.in.Settings
	for name, apply := range map[string]func(){
		"rays": func() { s.Rays = tf.rays }, "halfwidth": func() { s.HalfWidth = tf.halfWidth },
		"max-rays": func() { s.MaxRays = tf.maxRays }, "confidence": func() { s.Confidence = tf.confidence },
		"seed": func() { s.Seed = tf.seed }, "facets": func() { s.FacetNodes = tf.facets }, "sampling": func() { s.Sampling = tf.sampling }, "o": func() { j.run.Dir = tf.out },
	} {
		if set[name] {
			apply()
		}
	}
	if tf.threads <= 0 || tf.checkpointEvery <= 0 || tf.timeLimit < 0 {
		return nil, usagef("--threads and --checkpoint-every must be positive, --time-limit not negative")
	}
	if err := s.WithDefaults().Check(); err != nil {
		return nil, usagef("%v (check --rays, --max-rays, --halfwidth, --confidence, --sampling)", err)
	}
	j.run.Threads, j.run.Resume, j.run.CheckpointEvery, j.run.TimeLimit = tf.threads, tf.resume, tf.checkpointEvery, tf.timeLimit
	j.pictures, j.quiet = !tf.noPictures, tf.quiet
	csv := tf.csv
	if csv == "" && j.in.Case != nil {
		csv = j.in.Case.Output.CSV
	}
	if csv != "" && csv != "all" && csv != "compact" {
		return nil, usagef("--csv %q: give all or compact", csv)
	}
	j.compact = csv == "compact"
	if tf.noConductances && j.in.Case != nil {
		no := false
		j.in.Case.Output.Conductances = &no
	}
	if set["drop-conductors"] {
		if !(tf.dropConductors >= 0 && tf.dropConductors < 1) {
			return nil, usagef("--drop-conductors %v: give a share in [0, 1)", tf.dropConductors)
		}
		if j.in.Case != nil {
			j.in.Case.Output.DropConductors = tf.dropConductors
		}
	}
	if tf.shard != "" {
		if j.run.Shard, j.run.Shards, err = parseShard(tf.shard); err != nil {
			return nil, err
		}
	}
	if tf.plan != "" {
		if tf.shard == "" {
			return nil, usagef("--plan goes with --shard")
		}
		p, err := analysis.ReadPlan(tf.plan)
		if err != nil {
			return nil, err
		}
		j.run.Targets = p.Targets
	}
	return j, nil
}

// parseShard reads "I/N".
func parseShard(s string) (i, n int, err error) {
	var rest string
	if k, _ := fmt.Sscanf(s, "%d/%d%s", &i, &n, &rest); k != 2 || n < 1 || n > 1<<20 || i < 0 || i >= n {
		return 0, 0, usagef("--shard %q: give I/N with 0 ≤ I < N", s)
	}
	return i, n, nil
}

// lock takes the job's output folder for this process.
func (j *job) lock() (unlock func(), err error) { return analysis.LockDir(j.run.Dir) }
