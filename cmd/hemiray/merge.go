package main

import (
	"context"
	"flag"
	"fmt"
	"io"
	"os"
	"path/filepath"

	"github.com/hemiray/hemiray/raytrace/analysis"
)

func mergeCommand() *command {
	c := &command{
		Name:      "merge",
		UsageLine: "merge -o DIR PART...",
		Short:     "add up shard tallies exactly and write every output",
		Long: `Merge reads the tallies.bin of every shard folder (from trace or run with
--shard I/N), checks that they are the shards 0 … N−1 of one run — same mesh
files, case and settings, none missing, none twice — adds them up and writes
every output of trace, and of run when the case gives every surface an
emissivity and a condition. The outputs are byte-identical to a single
process's (summary.json differs only in timings).

With --halfwidth, shards trace one round at a time. If another round is
needed, merge writes DIR/plan.json and says so: run the same shards again
with --plan DIR/plan.json --resume, then merge again.`,
		Flags: flag.NewFlagSet("merge", flag.ContinueOnError),
	}
	out := c.Flags.String("o", "", "output folder (required)")
	c.Run = func(ctx context.Context, args []string, stdout, stderr io.Writer) error {
		parts, err := parseArgs(c.Flags, args)
		if err != nil {
			return err
		}
		if *out == "" || len(parts) == 0 {
			return usagef("give -o DIR and the shard folders")
		}
		return merge(*out, parts, stdout, stderr)
	}
	return c
}

func merge(dir string, names []string, stdout, stderr io.Writer) error {
	unlock, err := analysis.LockDir(dir)
	if err != nil {
		return err
	}
	defer unlock()
	var parts []analysis.Part
	outAbs, _ := filepath.Abs(dir)
	for _, p := range names {
		if abs, _ := filepath.Abs(p); abs == outAbs || abs == filepath.Join(outAbs, analysis.TallyFile) {
			return fmt.Errorf("the output folder %s is also a shard to merge: give merge a folder of its own", dir)
		}
		ck, rec, err := analysis.ReadTallies(p)
		if err != nil {
			return err
		}
		parts = append(parts, analysis.Part{Name: p, Checkpoint: ck, Record: rec})
	}
	merged, rec, err := analysis.MergeShards(parts)
	if err != nil {
		return err
	}
	j := &job{run: analysis.Run{Dir: dir}, pictures: true}
	if rec.Case != "" {
		j.in, err = openCase(rec.Case)
	} else {
		var files []string
		for _, f := range rec.Inputs {
			files = append(files, f.Path)
		}
		j.in, err = analysis.OpenMeshes(files, rec.Settings)
	}
	if err != nil {
		return err
	}
	j.in.Settings = rec.Settings // the shards' settings, flags included
	t, err := j.in.FromTallies(merged, rec)
	if err != nil {
		return fmt.Errorf("the inputs changed since the shards were traced: %w", err)
	}
	if err := analysis.WriteTallies(dir, merged, t.Record); err != nil {
		return err
	}
	if p, more := analysis.NextPlan(t.Result); more {
		if err := analysis.WritePlan(dir, p); err != nil {
			return err
		}
		planPath := filepath.Join(dir, analysis.PlanFile)
		fmt.Fprintf(stdout, "round %d of the --halfwidth run merged; some intervals are still wider than %g.\nwrote %s: run the same %d shards again with --plan %s --resume (each in its own folder), then merge again.\n",
			p.Round-1, j.in.Settings.HalfWidth, planPath, len(parts), planPath)
		return nil
	}
	os.Remove(filepath.Join(dir, analysis.PlanFile))
	if j.in.Case != nil && j.in.Preflight() == nil {
		return finishRun(j, t, stdout, stderr)
	}
	return finish(j, j.outputs(t, nil), stdout, stderr)
}
