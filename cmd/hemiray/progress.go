package main

import (
	"fmt"
	"io"
	"os"
	"time"

	"github.com/schollz/progressbar/v3"
	"golang.org/x/term"

	"github.com/hemiray/hemiray/raytrace"
)

// progressReporter returns the Progress callback for a trace: a bar with
// rays/s and time left on a terminal, a line about every 10 s otherwise,
// nothing when quiet.
func progressReporter(stderr io.Writer, quiet bool) (func(raytrace.Progress), func()) {
	if quiet {
		return nil, func() {}
	}
	if f, ok := stderr.(*os.File); ok && term.IsTerminal(int(f.Fd())) {
		bar := progressbar.NewOptions64(-1,
			progressbar.OptionSetWriter(stderr),
			progressbar.OptionSetDescription("tracing"),
			progressbar.OptionShowCount(),
			progressbar.OptionSetItsString("rays"),
			progressbar.OptionShowIts(),
			progressbar.OptionSetPredictTime(true),
			progressbar.OptionThrottle(200*time.Millisecond),
			progressbar.OptionClearOnFinish(),
		)
		return func(p raytrace.Progress) {
				if p.WorstHalfWidth > 0 {
					bar.Describe(fmt.Sprintf("tracing (worst half-width %.3g, about %v to the target)", p.WorstHalfWidth, p.ToTarget.Round(time.Second)))
				}
				bar.ChangeMax64(p.Planned)
				bar.Set64(p.Rays)
			}, func() {
				bar.Finish()
			}
	}
	var last time.Duration
	return func(p raytrace.Progress) {
		if p.Elapsed-last < 10*time.Second && p.Rays < p.Planned {
			return
		}
		last = p.Elapsed
		rate := float64(p.Rays) / p.Elapsed.Seconds()
		left := time.Duration(float64(p.Planned-p.Rays) / rate * float64(time.Second)).Round(time.Second)
		target := ""
		if p.WorstHalfWidth > 0 {
			target = fmt.Sprintf("; worst half-width %.3g, about %v to the target", p.WorstHalfWidth, p.ToTarget.Round(time.Second))
		}
		fmt.Fprintf(stderr, "hemiray: %d of %d rays (%.0f%%), %.3g Mrays/s, about %v left in this round%s\n",
			p.Rays, p.Planned, 100*float64(p.Rays)/float64(max(p.Planned, 1)), rate/1e6, left, target)
	}, func() {}
}
