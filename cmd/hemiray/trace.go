package main

import (
	"context"
	"flag"
	"fmt"
	"io"
	"path/filepath"
	"strings"

	"github.com/hemiray/hemiray/raytrace/analysis"
	"github.com/hemiray/hemiray/raytrace/report"
)

func traceCommand() *command {
	c := &command{
		Name:      "trace",
		UsageLine: "trace (CASE.toml | MESH...) [--rays N | --halfwidth H] [--seed S] [--threads T] [--facets] [-o DIR]",
		Short:     "estimate view factors with confidence intervals",
		Long: `Trace estimates the view factor between every pair of radiation nodes by
Monte Carlo ray tracing and writes, in the output folder:

  viewfactors.csv            square matrix, one row per emitting node
  viewfactors_halfwidth.csv  the same shape: confidence-interval half-widths
  viewfactors_pairs.csv      from,to,F,F_lo,F_hi,stderr,halfwidth,hits,rays per non-zero pair
  viewfactors.mtx            the same matrix in Matrix Market format; nodes.csv names its indices
  summary.json               settings, input hash, rays, timings, row sums, warnings

A node is a surface (or each facet with --facets); a two-sided surface adds
NAME.back; rays that leave the model go to the column "ambient". Intervals
are Wilson score intervals at --confidence. The same seed gives the same
numbers whatever --threads is.

Input is a case file (see README.md) or mesh files with --units. Flags set
on the command line override the case file.`,
		Flags: flag.NewFlagSet("trace", flag.ContinueOnError),
	}
	tf := newTraceFlags()
	tf.register(c.Flags, meshFlags|rayFlags|runFlags|writeFlags)
	c.Run = func(ctx context.Context, args []string, stdout, stderr io.Writer) error {
		files, err := parseArgs(c.Flags, args)
		if err != nil {
			return err
		}
		j, err := loadInput(c.Flags, tf, files)
		if err != nil {
			return err
		}
		unlock, err := j.lock()
		if err != nil {
			return err
		}
		defer unlock()
		t, err := j.trace(ctx, stderr)
		if err != nil {
			return err
		}
		if j.run.Shards > 1 {
			return finishShard(j, t, stdout)
		}
		return finish(j, j.outputs(t, nil), stdout, stderr)
	}
	return c
}

// trace runs the job's trace with a progress display, after saying what
// model was read.
func (j *job) trace(ctx context.Context, stderr io.Writer) (*analysis.Traced, error) {
	if !j.quiet {
		fmt.Fprintf(stderr, "hemiray: %s\n", j.in.Describe())
	}
	for _, n := range j.in.Notes() {
		fmt.Fprintf(stderr, "hemiray: note: %s\n", n)
	}
	progress, done := progressReporter(stderr, j.quiet)
	j.run.Progress = progress
	t, err := j.in.Trace(ctx, j.run)
	done()
	return t, err
}

// finishShard reports a shard's share; only tallies.bin is written.
func finishShard(j *job, t *analysis.Traced, stdout io.Writer) error {
	fmt.Fprintf(stdout, "shard %d/%d: %d rays traced; wrote %s (combine the shards with: hemiray merge -o DIR PART...)\n",
		j.run.Shard, j.run.Shards, t.Result.RaysTraced(), filepath.Join(j.run.Dir, analysis.TallyFile))
	return nil
}

// finish writes the outputs of trace, run, solve, merge and demo, and
// prints what was done.
func finish(j *job, o report.Outputs, stdout, stderr io.Writer) error {
	for _, w := range o.Warnings() {
		fmt.Fprintf(stderr, "hemiray: warning: %s\n", w)
	}
	written, err := report.Write(j.run.Dir, o)
	if err != nil {
		return err
	}
	if o.Analysis != nil {
		report.HeatBalance(stdout, o.Analysis)
	} else {
		report.NodeTable(stdout, o.Traced.Result)
	}
	switch res := o.Traced; {
	case res == nil:
		fmt.Fprintln(stdout, "\nview factors as given; no rays traced")
	case res.Result.TraceSeconds > 0:
		r := res.Result
		fmt.Fprintf(stdout, "\n%d rays in %.2f s (%.3g Mrays/s on %d threads); BVH built in %.2f s\n",
			r.RaysTraced(), r.TraceSeconds, float64(r.RaysTraced())/r.TraceSeconds/1e6, r.Threads, r.BuildSeconds)
	default:
		fmt.Fprintf(stdout, "\n%d rays, from saved tallies\n", res.Result.RaysTraced())
	}
	fmt.Fprintf(stdout, "wrote %s: %s\n", j.run.Dir, strings.Join(written, ", "))
	if o.Analysis != nil {
		fmt.Fprintln(stdout, "caution: these are estimates for engineering judgement; the applicable codes and licensed professional practice govern.")
	}
	return nil
}
