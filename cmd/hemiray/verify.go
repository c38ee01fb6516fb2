package main

import (
	"context"
	"flag"
	"fmt"
	"io"
	"path/filepath"
	"runtime"
	"time"

	"github.com/hemiray/hemiray/raytrace"
	"github.com/hemiray/hemiray/raytrace/report"
)

func verifyCommand() *command {
	c := &command{
		Name:      "verify",
		UsageLine: "verify [--rays N] [--seed S] [--threads T] [-o DIR]",
		Short:     "trace published reference configurations and compare",
		Long: `Verify builds configurations whose view factors are published in closed
form (parallel and perpendicular rectangles, coaxial disks, concentric
spheres and cylinders, a sphere and a disk, hinged plates; flat ones also
meshed coarsely, two facets a face, where the closed form holds exactly), traces each with
the same engine as trace, and prints a table: the case, the pair, the
reference value and its source, the estimate and its interval half-width,
the allowance for the tessellated shapes, and the deviation in standard
errors beyond that allowance. A case passes when the deviation is at most 4.

The table is also written to DIR/verify.csv. The exit status is 1 if any
case fails.`,
		Flags: flag.NewFlagSet("verify", flag.ContinueOnError),
	}
	rays := c.Flags.Int64("rays", 1000000, "rays per emitting node")
	seed := c.Flags.Uint64("seed", 1, "random seed")
	threads := c.Flags.Int("threads", runtime.GOMAXPROCS(0), "worker threads")
	out := c.Flags.String("o", "hemiray-verify", "output folder for verify.csv")
	c.Run = func(ctx context.Context, args []string, stdout, stderr io.Writer) error {
		pos, err := parseArgs(c.Flags, args)
		if err != nil {
			return err
		}
		if len(pos) > 0 {
			return usagef("verify takes no arguments")
		}
		if *rays <= 0 || *threads <= 0 {
			return usagef("--rays and --threads must be positive")
		}
		start := time.Now()
		var checks []raytrace.ReferenceCheck
		for _, rc := range raytrace.ReferenceCases() {
			ch, err := rc.Check(ctx, raytrace.Options{Settings: raytrace.Settings{Rays: *rays, Seed: *seed}, Threads: *threads})
			if err != nil {
				return fmt.Errorf("%s: %w", rc.Name, err)
			}
			checks = append(checks, ch)
		}
		failed := report.VerifyTable(stdout, checks)
		if err := report.WriteVerify(*out, checks); err != nil {
			return err
		}
		fmt.Fprintf(stdout, "\n%d of %d cases pass (|F̂ − F| ≤ 4σ + tessellation bound), %d rays per node, seed %d, %.1f s; wrote %s\n",
			len(checks)-failed, len(checks), *rays, *seed, time.Since(start).Seconds(), filepath.Join(*out, "verify.csv"))
		if failed > 0 {
			return fmt.Errorf("%d reference case(s) failed", failed)
		}
		return nil
	}
	return c
}
