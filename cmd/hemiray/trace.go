package main

import (
	"context"
	"crypto/sha256"
	"encoding/hex"
	"encoding/json"
	"flag"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"runtime"
	"sort"
	"strings"
	"text/tabwriter"
	"time"

	"github.com/hemiray/hemiray/mesh"
	"github.com/hemiray/hemiray/raytrace"
)

// version is hemiray's version, written into every summary.json.
const version = "0.1.0"

// squareLimit is the node count above which the square matrix files are
// not written (the pairs file carries the result).
const squareLimit = 2000

// traceFlags are the flags trace, run and merge share.
type traceFlags struct {
	units      string
	byMaterial bool
	rays       int64
	halfWidth  float64
	maxRays    int64
	confidence float64
	seed       uint64
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
}

func (tf *traceFlags) register(fs *flag.FlagSet) {
	fs.StringVar(&tf.units, "units", "m", "length unit of mesh files given directly: m, cm, mm, in or ft")
	fs.BoolVar(&tf.byMaterial, "by-material", false, "OBJ given directly: one surface per usemtl material")
	fs.Int64Var(&tf.rays, "rays", 100000, "rays per emitting node (the first round with --halfwidth)")
	fs.Float64Var(&tf.halfWidth, "halfwidth", 0, "trace in rounds until every view factor's interval half-width is at most this")
	fs.Int64Var(&tf.maxRays, "max-rays", 0, "most rays per node with --halfwidth (default 64 × --rays)")
	fs.Float64Var(&tf.confidence, "confidence", 0.95, "confidence level of the intervals")
	fs.Uint64Var(&tf.seed, "seed", 1, "random seed: the same seed gives the same numbers")
	fs.IntVar(&tf.threads, "threads", runtime.GOMAXPROCS(0), "worker threads (results do not depend on it)")
	fs.BoolVar(&tf.facets, "facets", false, "make every facet its own node")
	fs.StringVar(&tf.twoSided, "two-sided", "", "comma-separated surfaces whose back is a node NAME.back (meshes given directly)")
	fs.StringVar(&tf.out, "o", "", "output folder (default: the case's output.dir, else hemiray-out)")
	fs.BoolVar(&tf.quiet, "quiet", false, "no progress output")
	fs.DurationVar(&tf.checkpointEvery, "checkpoint-every", time.Minute, "write the checkpoint DIR/tallies.bin this often (and on Ctrl-C or SIGTERM)")
	fs.BoolVar(&tf.resume, "resume", false, "continue from the checkpoint in the output folder")
	fs.DurationVar(&tf.timeLimit, "time-limit", 0, "stop cleanly after this long and write the precision reached (e.g. 7h30m)")
	fs.StringVar(&tf.shard, "shard", "", "trace only share I of N (I/N, from 0) and write only DIR/tallies.bin; combine with merge")
	fs.StringVar(&tf.plan, "plan", "", "with --shard: the next --halfwidth round's plan.json written by merge")
	fs.BoolVar(&tf.noPictures, "no-pictures", false, "run, demo: do not write the PNG pictures and model.vtp")
}

// input is a model to trace with its settings, from a case file or meshes.
type input struct {
	lc       *loadedCase // nil for meshes given directly
	mesh     *mesh.Mesh
	files    []string
	opts     raytrace.Options
	outDir   string
	settings map[string]any // what determines the result, for the input hash
	units    string         // length unit of mesh files given directly
	// byMaterial: OBJ surfaces by material, for mesh files given directly.
	byMaterial bool
	pictures   bool // write PNGs and model.vtp with the results
}

// loadInput reads the positional arguments (one .toml case or mesh files)
// and applies flags that were set on top of the case's values.
func loadInput(fs *flag.FlagSet, tf *traceFlags, args []string) (*input, error) {
	if len(args) == 0 {
		return nil, usagef("give a case file (.toml) or mesh files")
	}
	set := map[string]bool{}
	fs.Visit(func(f *flag.Flag) { set[f.Name] = true })
	in := &input{outDir: "hemiray-out"}
	opts := &in.opts
	var err error
	if len(args) == 1 && strings.EqualFold(filepath.Ext(args[0]), ".toml") {
		lc, err := readCase(args[0])
		if err != nil {
			return nil, err
		}
		in.units, in.byMaterial = lc.c.Model.Units, lc.c.Model.GroupBy == "material"
		for _, f := range []string{"units", "by-material", "two-sided"} {
			if set[f] {
				return nil, usagef("--%s applies to mesh files given directly; the case file sets it", f)
			}
		}
		in.lc, in.mesh = lc, lc.mesh
		for _, s := range lc.mesh.Sources {
			in.files = append(in.files, s.Path)
		}
		r := lc.c.Rays
		opts.Rays, opts.HalfWidth, opts.MaxRays, opts.Seed, opts.Confidence, opts.FacetNodes, opts.Replicates =
			r.PerNode, r.HalfWidth, r.MaxPerNode, r.Seed, r.Confidence, r.Facets, r.Replicates
		opts.TwoSided = lc.twoSidedSurfaces()
		if lc.c.Output.Dir != "" {
			in.outDir = lc.c.Output.Dir
			if !filepath.IsAbs(in.outDir) {
				in.outDir = filepath.Join(lc.dir, in.outDir)
			}
		}
	} else {
		for _, a := range args {
			if strings.EqualFold(filepath.Ext(a), ".toml") {
				return nil, usagef("give one case file, or mesh files, not both")
			}
		}
		unit, err := mesh.ParseUnit(tf.units)
		if err != nil {
			return nil, usageError{err.Error()}
		}
		in.mesh, err = mesh.Load(args, mesh.LoadOptions{Unit: unit, GroupByMaterial: tf.byMaterial})
		if err != nil {
			return nil, err
		}
		in.files = args
		in.units, in.byMaterial = string(unit), tf.byMaterial
		if tf.twoSided != "" {
			opts.TwoSided = strings.Split(tf.twoSided, ",")
		}
		opts.Rays, opts.Seed, opts.Confidence = tf.rays, tf.seed, tf.confidence
	}
	if set["rays"] || opts.Rays == 0 {
		opts.Rays = tf.rays
	}
	if set["halfwidth"] {
		opts.HalfWidth = tf.halfWidth
	}
	if set["max-rays"] {
		opts.MaxRays = tf.maxRays
	}
	if set["confidence"] || opts.Confidence == 0 {
		opts.Confidence = tf.confidence
	}
	if set["seed"] || (in.lc != nil && in.lc.c.Rays.Seed == 0 && !set["seed"] && opts.Seed == 0) {
		opts.Seed = tf.seed
	}
	if set["facets"] {
		opts.FacetNodes = tf.facets
	}
	if set["o"] {
		in.outDir = tf.out
	}
	opts.Threads = tf.threads
	in.pictures = !tf.noPictures
	if opts.Rays <= 0 || opts.Threads <= 0 || !(opts.Confidence > 0 && opts.Confidence < 1) {
		return nil, usagef("--rays and --threads must be positive and --confidence in (0, 1)")
	}
	if opts.HalfWidth < 0 || opts.HalfWidth >= 0.5 {
		return nil, usagef("--halfwidth must be in (0, 0.5)")
	}
	opts.MemoryLimit = availableMemory()
	if tf.shard != "" {
		if opts.Shard, opts.Shards, err = parseShard(tf.shard); err != nil {
			return nil, err
		}
	}
	if tf.plan != "" {
		if tf.shard == "" {
			return nil, usagef("--plan goes with --shard")
		}
		if opts.Targets, err = readPlan(tf.plan); err != nil {
			return nil, err
		}
	}
	two := append([]string(nil), opts.TwoSided...)
	sort.Strings(two)
	var flipped []string
	if in.lc != nil {
		for _, s := range in.mesh.Surfaces {
			if in.lc.spec(s.Name).flip() {
				flipped = append(flipped, s.Name)
			}
		}
	}
	in.settings = map[string]any{
		"rays": opts.Rays, "halfwidth": opts.HalfWidth, "max_rays": opts.MaxRays, "seed": opts.Seed,
		"facets": opts.FacetNodes, "two_sided": two, "flipped": flipped, "batch": raytrace.DefaultBatchSize,
		"units": in.units, "by_material": in.byMaterial,
	}
	return in, nil
}

// hash returns the SHA-256 of everything that determines the tallies: the
// mesh files' bytes and the settings.
func (in *input) hash() (string, error) {
	h := sha256.New()
	for _, f := range in.files {
		b, err := os.ReadFile(f)
		if err != nil {
			return "", err
		}
		fmt.Fprintf(h, "%s %d\n", filepath.Base(f), len(b))
		h.Write(b)
	}
	s, _ := json.Marshal(in.settings)
	h.Write(s)
	return hex.EncodeToString(h.Sum(nil)), nil
}

// availableMemory reads MemAvailable from /proc/meminfo; 0 if unknown.
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

func traceCommand() *command {
	c := &command{
		Name:      "trace",
		UsageLine: "trace (CASE.toml | MESH...) [--rays N | --halfwidth H] [--seed S] [--threads T] [--facets] [-o DIR]",
		Short:     "estimate view factors with confidence intervals",
		Long: `Trace estimates the view factor between every pair of radiation nodes by
Monte Carlo ray tracing and writes, in the output folder:

  viewfactors.csv            square matrix, one row per emitting node
  viewfactors_halfwidth.csv  the same shape: confidence-interval half-widths
  viewfactors_pairs.csv      from,to,F,stderr,halfwidth,hits,rays per non-zero pair
  summary.json               settings, input hash, rays, timings, row sums, warnings

A node is a surface (or each facet with --facets); a two-sided surface adds
NAME.back; rays that leave the model go to the column "ambient". Intervals
are Wilson score intervals at --confidence. The same seed gives the same
numbers whatever --threads is.

Input is a case file (see README.md) or mesh files with --units. Flags set
on the command line override the case file.`,
		Flags: flag.NewFlagSet("trace", flag.ContinueOnError),
	}
	var tf traceFlags
	tf.register(c.Flags)
	c.Run = func(ctx context.Context, args []string, stdout, stderr io.Writer) error {
		files, err := parseArgs(c.Flags, args)
		if err != nil {
			return err
		}
		in, err := loadInput(c.Flags, &tf, files)
		if err != nil {
			return err
		}
		res, st, err := executeTrace(ctx, in, &tf, stderr)
		if err != nil {
			return err
		}
		if in.opts.Shards > 1 {
			return finishShard(in, res, stdout)
		}
		return finishTrace(in, res, st, stdout, stderr)
	}
	return c
}

// finishShard reports a shard's share; only tallies.bin is written.
func finishShard(in *input, res *raytrace.Result, stdout io.Writer) error {
	fmt.Fprintf(stdout, "shard %d/%d: %d rays traced; wrote %s (combine the shards with: hemiray merge -o DIR PART...)\n",
		in.opts.Shard, in.opts.Shards, res.RaysTraced(), filepath.Join(in.outDir, checkpointFile))
	return nil
}

// finishTrace writes the view-factor files and prints a summary.
func finishTrace(in *input, res *raytrace.Result, st traceState, stdout, stderr io.Writer) error {
	return finish(in, res, st, nil, stdout, stderr)
}

// finish writes the outputs of a trace — and, with an analysis a, those of
// run — and prints what was done. trace, run, solve, merge and demo end here.
func finish(in *input, res *raytrace.Result, st traceState, a *analysis, stdout, stderr io.Writer) error {
	names := surfaceNames(in.mesh)
	warnings := res.Warnings(names)
	if st.timeLimit {
		warnings = append(warnings, "the time limit stopped the trace early: the intervals are wider than planned (summary.json: complete = false)")
	}
	if a != nil {
		warnings = append(warnings, a.notes...)
	}
	for _, w := range warnings {
		fmt.Fprintf(stderr, "hemiray: warning: %s\n", w)
	}
	written, err := writeViewFactors(in.outDir, res)
	if err != nil {
		return err
	}
	if len(res.Nodes) <= squareLimit {
		if err := writeTallies(in.outDir, res, names); err != nil {
			return err
		}
		written = append(written, tallyFile)
	}
	written = append(written, checkpointFile)
	if a != nil {
		more, err := writeAnalysis(in.outDir, res, a)
		if err != nil {
			return err
		}
		written = append(written, more...)
	}
	sum, err := newSummary(in, res, warnings)
	if err != nil {
		return err
	}
	sum.Complete = st.complete
	if a != nil {
		sum.Extra = analysisSummary(a)
	}
	if err := writeJSON(filepath.Join(in.outDir, "summary.json"), sum); err != nil {
		return err
	}
	written = append(written, "summary.json")
	if a != nil && in.pictures {
		pics, err := writePictures(in.outDir, in, res, a)
		if err != nil {
			return err
		}
		written = append(written, pics...)
	}
	if a != nil {
		printAnalysis(stdout, res, a)
	} else {
		printNodes(stdout, res)
	}
	if res.TraceSeconds > 0 {
		fmt.Fprintf(stdout, "\n%d rays in %.2f s (%.3g Mrays/s on %d threads); BVH built in %.2f s\n",
			res.RaysTraced(), res.TraceSeconds, float64(res.RaysTraced())/res.TraceSeconds/1e6, res.Threads, res.BuildSeconds)
	} else {
		fmt.Fprintf(stdout, "\n%d rays, from saved tallies\n", res.RaysTraced())
	}
	fmt.Fprintf(stdout, "wrote %s: %s\n", in.outDir, strings.Join(written, ", "))
	if a != nil {
		fmt.Fprintln(stdout, "caution: these are estimates for engineering judgement; the applicable codes and licensed professional practice govern.")
	}
	return nil
}

func surfaceNames(m *mesh.Mesh) []string {
	out := make([]string, len(m.Surfaces))
	for i, s := range m.Surfaces {
		out[i] = s.Name
	}
	return out
}

// printNodes prints one line per node: area, rays, row sum, escape fraction
// and the widest interval of its row.
func printNodes(w io.Writer, res *raytrace.Result) {
	if len(res.Nodes) > 50 {
		fmt.Fprintf(w, "%d nodes; per-node figures are in summary.json\n", len(res.Nodes))
		return
	}
	tw := tabwriter.NewWriter(w, 0, 4, 2, ' ', 0)
	fmt.Fprintln(tw, "node\tarea_m2\trays\tto_ambient\tmax_halfwidth\trow_sum\t")
	for i, n := range res.Nodes {
		amb := "-"
		if res.HasAmbient() {
			amb = fmt.Sprintf("%.4f", res.Factor(i, res.Ambient()).F)
		}
		fmt.Fprintf(tw, "%s\t%.6g\t%d\t%s\t%.2g\t%.6f\t\n", n.Name, n.Area, res.Rays[i], amb, res.RowHalfWidth(i), res.RowSum(i))
	}
	tw.Flush()
}

// columns returns the column names of the square files.
func columns(res *raytrace.Result) []string {
	var cols []string
	for _, n := range res.Nodes {
		cols = append(cols, n.Name)
	}
	if res.HasAmbient() {
		cols = append(cols, "ambient")
	}
	return cols
}

// writeViewFactors writes the raw view factors, their half-widths and the
// pairs file; it returns the names written.
func writeViewFactors(dir string, res *raytrace.Result) ([]string, error) {
	var written []string
	cols := columns(res)
	if len(res.Nodes) <= squareLimit {
		for _, f := range []struct {
			name  string
			value func(raytrace.Factor) float64
		}{
			{"viewfactors.csv", func(f raytrace.Factor) float64 { return f.F }},
			{"viewfactors_halfwidth.csv", func(f raytrace.Factor) float64 { return f.HalfWidth }},
		} {
			err := writeCSV(filepath.Join(dir, f.name), func(emit func(...string)) error {
				emit(append([]string{"from"}, cols...)...)
				for i, n := range res.Nodes {
					rec := []string{n.Name}
					for j := range cols {
						rec = append(rec, num(f.value(res.Factor(i, j))))
					}
					emit(rec...)
				}
				return nil
			})
			if err != nil {
				return nil, err
			}
			written = append(written, f.name)
		}
	}
	err := writeAtomic(filepath.Join(dir, "viewfactors_pairs.csv"), func(w io.Writer) error {
		lw := newLineWriter(w)
		lw.buf = append(lw.buf, "from,to,F,stderr,halfwidth,hits,rays\n"...)
		var werr error
		for i, n := range res.Nodes {
			res.Row(i, func(j int, f raytrace.Factor) {
				lw.name(n.Name)
				lw.name(cols[j])
				lw.float(f.F)
				lw.float(f.StdErr)
				lw.float(f.HalfWidth)
				lw.int(f.Hits)
				lw.int(f.Rays)
				if err := lw.end(); err != nil && werr == nil {
					werr = err
				}
			})
		}
		if werr != nil {
			return werr
		}
		return lw.flush()
	})
	if err != nil {
		return nil, err
	}
	written = append(written, "viewfactors_pairs.csv")
	if len(res.Nodes) > squareLimit {
		written = append(written, fmt.Sprintf("(square matrices skipped: %d nodes > %d; the pairs file has every non-zero factor)", len(res.Nodes), squareLimit))
	}
	return written, nil
}
