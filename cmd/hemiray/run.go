package main

import (
	"context"
	"flag"
	"fmt"
	"io"
	"path/filepath"
	"strings"

	"github.com/hemiray/hemiray/raytrace"
)

// defaultReplicates is the replicate count for heat-flow intervals when the
// case does not set rays.replicates.
const defaultReplicates = 8

func runCommand() *command {
	c := &command{
		Name:      "run",
		UsageLine: "run CASE.toml [--rays N | --halfwidth H] [--replicates R] [--seed S] [--threads T] [-o DIR]",
		Short:     "trace, smooth and solve a case: heat flows and temperatures",
		Long: `Run traces the case's view factors, smooths them for reciprocity and
summation, solves the gray-enclosure exchange with the case's boundary
conditions, and writes, besides the files of trace:

  viewfactors_smoothed.csv        the smoothed matrix
  viewfactors_smoothed_pairs.csv  raw and smoothed factors, and how far each moved
  surfaces.csv                    per node: area, emissivity, condition, T, J, q, Q (± intervals)
  conductances.csv                total exchange factors and radiative conductances σ·A_i·ℱ_ij
  tallies.csv                     raw ray counts, from which solve can redo the analysis

Intervals on T and Q come from --replicates independent sub-samples of the
rays, each smoothed and solved (a Student-t interval at the case's
confidence). The README documents the case file.`,
		Flags: flag.NewFlagSet("run", flag.ContinueOnError),
	}
	var tf traceFlags
	tf.register(c.Flags)
	replicates := c.Flags.Int("replicates", 0, fmt.Sprintf("independent replicates for heat-flow intervals (default: the case's rays.replicates, else %d)", defaultReplicates))
	c.Run = func(ctx context.Context, args []string, stdout, stderr io.Writer) error {
		pos, err := parseArgs(c.Flags, args)
		if err != nil {
			return err
		}
		if len(pos) != 1 || !strings.EqualFold(filepath.Ext(pos[0]), ".toml") {
			return usagef("run takes one case file (.toml)")
		}
		in, err := loadInput(c.Flags, &tf, pos)
		if err != nil {
			return err
		}
		in.opts.Replicates = in.lc.c.Rays.Replicates
		if *replicates != 0 {
			in.opts.Replicates = *replicates
		}
		if in.opts.Replicates == 0 {
			in.opts.Replicates = defaultReplicates
		}
		if in.opts.Replicates < 2 {
			return usagef("--replicates must be at least 2")
		}
		if err := preflight(in); err != nil {
			return err
		}
		res, st, err := executeTrace(ctx, in, &tf, stderr)
		if err != nil {
			return err
		}
		if in.opts.Shards > 1 {
			return finishShard(in, res, stdout)
		}
		return finishRun(in, res, st, stdout, stderr)
	}
	return c
}

// preflight checks that every node has an emissivity and a condition
// before any ray is traced.
func preflight(in *input) error {
	nodes, err := raytrace.Nodes(in.mesh, in.opts)
	if err != nil {
		return err
	}
	for _, n := range nodes {
		surf := in.mesh.Surfaces[n.Surface].Name
		side := in.lc.spec(surf)
		if n.Back {
			side = in.lc.spec(surf + ".back")
		}
		if side.Emissivity == nil {
			return fmt.Errorf("%s: no emissivity for %s: set it in [surfaces.%q] or [defaults]", in.lc.path, n.Name, surf)
		}
		if _, err := condition(in.lc.spec(surf), 1); err != nil {
			return fmt.Errorf("%s: surface %s: %w", in.lc.path, surf, err)
		}
	}
	return nil
}

// finishRun smooths and solves, then writes everything and prints the
// heat balance.
func finishRun(in *input, res *raytrace.Result, st traceState, stdout, stderr io.Writer) error {
	a, err := analyse(in.lc, res)
	if err != nil {
		return err
	}
	return finish(in, res, st, a, stdout, stderr)
}

func solveCommand() *command {
	c := &command{
		Name:      "solve",
		UsageLine: "solve CASE.toml [-o DIR]",
		Short:     "smooth and solve again from saved tallies (new conditions, no tracing)",
		Long: `Solve reads the tallies a previous run or trace of the same case left in
the output folder (tallies.bin), smooths them and solves the exchange with
the case's current emissivities and boundary conditions, writing the files
of run. Change emissivities, temperatures or heat loads and solve again in
a second instead of tracing again; a change to the geometry, the nodes or
the ray settings is refused, naming what changed.`,
		Flags: flag.NewFlagSet("solve", flag.ContinueOnError),
	}
	var tf traceFlags
	tf.register(c.Flags)
	c.Run = func(ctx context.Context, args []string, stdout, stderr io.Writer) error {
		pos, err := parseArgs(c.Flags, args)
		if err != nil {
			return err
		}
		if len(pos) != 1 || !strings.EqualFold(filepath.Ext(pos[0]), ".toml") {
			return usagef("solve takes one case file (.toml)")
		}
		in, err := loadInput(c.Flags, &tf, pos)
		if err != nil {
			return err
		}
		ck, old, err := readCheckpoint(in.outDir)
		if err != nil {
			return fmt.Errorf("%w (run trace or run first)", err)
		}
		if old.Shards > 1 {
			return fmt.Errorf("%s holds shard %d/%d only: merge the shards first", in.outDir, old.Shard, old.Shards)
		}
		nodes, err := raytrace.Nodes(in.mesh, in.opts)
		if err != nil {
			return err
		}
		// Replicates come with the tallies; anything else that differs means
		// the tallies belong to another geometry or other ray settings.
		in.opts.Replicates = old.Options.Replicates
		meta, err := in.meta(len(nodes))
		if err != nil {
			return err
		}
		if d := meta.differences(old); len(d) > 0 {
			return fmt.Errorf("the tallies in %s were traced from other mesh files or ray settings: %s; run the case again", in.outDir, strings.Join(d, "; "))
		}
		res, err := raytrace.NewResult(nodes, ck.Tally, ck.Replicas, in.opts)
		if err != nil {
			return err
		}
		res.Targets = ck.Targets
		return finishRun(in, res, traceState{complete: len(ck.Done) > 0}, stdout, stderr)
	}
	return c
}
