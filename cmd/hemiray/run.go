package main

import (
	"context"
	"errors"
	"flag"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strings"

	"github.com/hemiray/hemiray/raytrace/analysis"
)

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
  *.mtx                           smoothed matrix and conductances in Matrix Market format
  tallies.csv                     raw ray counts, from which solve can redo the analysis

Intervals on T and Q come from --replicates independent sub-samples of the
rays, each smoothed and solved (a Student-t interval at the case's
confidence). The README documents the case file.`,
		Flags: flag.NewFlagSet("run", flag.ContinueOnError),
	}
	tf := newTraceFlags()
	tf.register(c.Flags, rayFlags|runFlags|writeFlags)
	replicates := c.Flags.Int("replicates", 0, fmt.Sprintf("independent replicates for heat-flow intervals (default: the case's rays.replicates, else %d)", analysis.DefaultReplicates))
	c.Run = func(ctx context.Context, args []string, stdout, stderr io.Writer) error {
		pos, err := parseArgs(c.Flags, args)
		if err != nil {
			return err
		}
		if len(pos) != 1 || !strings.EqualFold(filepath.Ext(pos[0]), ".toml") {
			return usagef("run takes one case file (.toml)")
		}
		j, err := loadInput(c.Flags, tf, pos)
		if err != nil {
			return err
		}
		unlock, err := j.lock()
		if err != nil {
			return err
		}
		defer unlock()
		s := &j.in.Settings
		if *replicates != 0 {
			s.Replicates = *replicates
		}
		if s.Replicates == 0 {
			s.Replicates = analysis.DefaultReplicates
		}
		if s.Replicates < 2 || s.Replicates > 1024 {
			return usagef("--replicates must be 2 to 1024")
		}
		if err := j.in.Preflight(); err != nil {
			return err
		}
		if n := j.in.MemoryNote(); n != "" {
			fmt.Fprintf(stderr, "hemiray: note: %s\n", n)
		}
		t, err := j.trace(ctx, stderr)
		if err != nil {
			return err
		}
		if j.run.Shards > 1 {
			return finishShard(j, t, stdout)
		}
		return finishRun(j, t, stdout, stderr)
	}
	return c
}

// finishRun smooths and solves, then writes everything and prints the
// heat balance.
func finishRun(j *job, t *analysis.Traced, stdout, stderr io.Writer) error {
	a, err := j.in.Analyse(t.Result)
	if err != nil {
		return err
	}
	return finish(j, j.outputs(t, a), stdout, stderr)
}

func solveCommand() *command {
	c := &command{
		Name:      "solve",
		UsageLine: "solve CASE.toml [--viewfactors FILE.csv] [-o DIR]",
		Short:     "smooth and solve from saved tallies or given view factors (no tracing but of suns)",
		Long: `Solve reads the tallies a previous run or trace of the same case left in
the output folder (tallies.bin), smooths them and solves the exchange with
the case's current emissivities and boundary conditions, writing the files
of run. Change emissivities, temperatures or heat loads and solve again in
a second instead of tracing again; a change to the geometry, the nodes or
the ray settings is refused, naming what changed. Where rays are followed
through reflections (a specular or transmitting surface), the infrared
optics are part of the tallies: changing an emissivity is refused too. The
case's suns take no tallies and are traced anew (seeded: the same loads).

With --viewfactors FILE.csv the factors come from that file instead — from
a handbook, a hand calculation or another code — in either layout hemiray
writes: a square matrix (from,NODE,…[,ambient]) or pairs (from,to,F). Every
node of the case's model needs a row; a column or pair "ambient" makes the
model open. They are smoothed and solved like traced ones, without
intervals (the file carries none).`,
		Flags: flag.NewFlagSet("solve", flag.ContinueOnError),
	}
	tf := newTraceFlags()
	tf.register(c.Flags, rayFlags|writeFlags)
	given := c.Flags.String("viewfactors", "", "solve with the view factors of this CSV (square or pairs layout, node names as headers) instead of saved tallies")
	c.Run = func(ctx context.Context, args []string, stdout, stderr io.Writer) error {
		pos, err := parseArgs(c.Flags, args)
		if err != nil {
			return err
		}
		if len(pos) != 1 || !strings.EqualFold(filepath.Ext(pos[0]), ".toml") {
			return usagef("solve takes one case file (.toml)")
		}
		j, err := loadInput(c.Flags, tf, pos)
		if err != nil {
			return err
		}
		unlock, err := j.lock()
		if err != nil {
			return err
		}
		defer unlock()
		if *given != "" {
			return solveGiven(j, *given, stdout, stderr)
		}
		ck, old, err := analysis.ReadTallies(j.run.Dir)
		if err != nil {
			return fmt.Errorf("%w (run trace or run first)", err)
		}
		t, err := j.in.FromTallies(ck, old)
		var me *analysis.MismatchError
		if errors.As(err, &me) {
			return fmt.Errorf("the tallies in %s were traced from other mesh files or ray settings: %s; change the case back, or give the same flags as the run that traced them (--rays, --seed, --halfwidth, --max-rays, --confidence, --facets), or trace again",
				j.run.Dir, strings.Join(me.Differences, "; "))
		}
		if err != nil {
			return err
		}
		return finishRun(j, t, stdout, stderr)
	}
	return c
}

// solveGiven smooths and solves with view factors read from a CSV file.
func solveGiven(j *job, path string, stdout, stderr io.Writer) error {
	f, err := openRegular(path)
	if err != nil {
		return err
	}
	defer f.Close()
	g, err := analysis.ReadViewFactors(f, path)
	if err != nil {
		return err
	}
	a, err := j.in.AnalyseFactors(g)
	if err != nil {
		return err
	}
	return finish(j, j.outputs(nil, a), stdout, stderr)
}

// openRegular opens a regular file for reading; a FIFO or a device would
// block or never end.
func openRegular(path string) (*os.File, error) {
	st, err := os.Stat(path)
	if err != nil {
		return nil, err
	}
	if !st.Mode().IsRegular() {
		return nil, fmt.Errorf("%s is not a regular file", path)
	}
	return os.Open(path)
}
