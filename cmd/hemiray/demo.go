package main

import (
	"context"
	"flag"
	"fmt"
	"io"
	"time"

	"github.com/hemiray/hemiray/raytrace/analysis"
)

func demoCommand() *command {
	c := &command{
		Name:      "demo",
		UsageLine: "demo [--scenario enclosure|instrument] [-o DIR] [--threads T]",
		Short:     "write a demo scenario and run it",
		Long: `Demo writes a small scenario of its own — an electronics enclosure with a
vented lid, a 15 W circuit board and a 6 W power module — as mesh files
(OBJ and binary STL, in millimetres) and a case file into DIR, then runs it
as "hemiray run DIR/case.toml" would: view factors with intervals,
smoothing, the exchange solve, heat flows with intervals. Results go to
DIR/results. The case file is a commented starting point for your own.

--scenario instrument writes and runs the second scenario instead: an
instrument housing with a window and a 2 W detector beside a polished sun
shield on a spacecraft deck, under the sun at two positions — mirror-like
and transmitting surfaces, rays followed through reflections, absorbed
sunlight and one steady state per sun.`,
		Flags: flag.NewFlagSet("demo", flag.ContinueOnError),
	}
	out := c.Flags.String("o", "hemiray-demo", "folder for the scenario and its results")
	scenario := c.Flags.String("scenario", "enclosure", "which scenario: enclosure, or instrument (sun, shield, window)")
	tf := newTraceFlags()
	c.Flags.IntVar(&tf.threads, "threads", tf.threads, "worker threads")
	c.Flags.BoolVar(&tf.quiet, "quiet", false, "no progress output")
	c.Flags.BoolVar(&tf.noPictures, "no-pictures", false, "do not write the PNG pictures and model.vtp")
	c.Run = func(ctx context.Context, args []string, stdout, stderr io.Writer) error {
		pos, err := parseArgs(c.Flags, args)
		if err != nil {
			return err
		}
		if len(pos) > 0 {
			return usagef("demo takes no arguments")
		}
		var casePath string
		switch *scenario {
		case "enclosure":
			if casePath, err = analysis.WriteDemo(*out); err != nil {
				return err
			}
			fmt.Fprintf(stdout, "demo scenario written to %s (case.toml, enclosure.obj, board.stl, module.stl)\n\n", *out)
		case "instrument":
			if casePath, err = analysis.WriteInstrumentDemo(*out); err != nil {
				return err
			}
			fmt.Fprintf(stdout, "demo scenario written to %s (case.toml, instrument.obj)\n\n", *out)
		default:
			return usagef("--scenario %q: use enclosure or instrument", *scenario)
		}
		tf.checkpointEvery = time.Minute
		j, err := loadInput(flag.NewFlagSet("demo-run", flag.ContinueOnError), tf, []string{casePath})
		if err != nil {
			return err
		}
		unlock, err := j.lock()
		if err != nil {
			return err
		}
		defer unlock()
		if err := j.in.Preflight(); err != nil {
			return err
		}
		t, err := j.trace(ctx, stderr)
		if err != nil {
			return err
		}
		return finishRun(j, t, stdout, stderr)
	}
	return c
}
