package main

import (
	"runtime"

	"context"
	"errors"
	"flag"
	"fmt"
	"github.com/hemiray/hemiray/raytrace"
	"github.com/hemiray/hemiray/raytrace/analysis"
	"io"
	"os"
	"os/signal"
	"strings"
	"syscall"
)

// command is one subcommand: its flags, its help text and what it runs.
type command struct {
	Name      string
	UsageLine string // after "hemiray "
	Short     string
	Long      string
	Flags     *flag.FlagSet
	Run       func(ctx context.Context, args []string, stdout, stderr io.Writer) error
}

// usageError marks a misuse of the command line (exit status 2).
type usageError struct{ msg string }

func (e usageError) Error() string { return e.msg }

func usagef(format string, args ...any) error { return usageError{fmt.Sprintf(format, args...)} }

// exitError is a failure already reported (as JSON): exit 1, print nothing.
type exitError struct{ err error }

func (e exitError) Error() string { return e.err.Error() }

func commands() []*command {
	return []*command{inspectCommand(), traceCommand(), runCommand(), mergeCommand(), solveCommand(), renderCommand(), demoCommand(), verifyCommand(), versionCommand()}
}

func main() {
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt, syscall.SIGTERM)
	code := run(ctx, os.Args[1:], os.Stdout, os.Stderr)
	stop()
	os.Exit(code)
}

// run executes one command line and returns the exit status.
func run(ctx context.Context, args []string, stdout, stderr io.Writer) int {
	cmds := commands()
	if len(args) == 0 || args[0] == "help" || args[0] == "-h" || args[0] == "--help" {
		if len(args) > 1 {
			for _, c := range cmds {
				if c.Name == args[1] {
					printHelp(stdout, c)
					return 0
				}
			}
			fmt.Fprintf(stderr, "hemiray help %s: unknown command\n", args[1])
			return 2
		}
		printUsage(stdout, cmds)
		if len(args) == 0 {
			return 2
		}
		return 0
	}
	for _, c := range cmds {
		if c.Name != args[0] {
			continue
		}
		c.Flags.SetOutput(io.Discard)
		err := c.Run(ctx, args[1:], stdout, stderr)
		var ue usageError
		var ee exitError
		switch {
		case err == nil:
			return 0
		case errors.As(err, &ee):
			return 1
		case errors.Is(err, flag.ErrHelp):
			printHelp(stdout, c)
			return 0
		case errors.As(err, &ue):
			fmt.Fprintf(stderr, "hemiray %s: %v\nusage: hemiray %s\nRun 'hemiray help %s' for details.\n", c.Name, err, c.UsageLine, c.Name)
			return 2
		default:
			fmt.Fprintf(stderr, "hemiray %s: %v\n", c.Name, err)
			return 1
		}
	}
	fmt.Fprintf(stderr, "hemiray %s: unknown command\nRun 'hemiray help' for usage.\n", args[0])
	return 2
}

func printUsage(w io.Writer, cmds []*command) {
	fmt.Fprintln(w, "hemiray: radiation view factors of CAD meshes by Monte Carlo ray tracing, with confidence intervals.")
	fmt.Fprintln(w, "\nUsage:\n\n\themiray <command> [flags] [arguments]\n\nThe commands are:")
	for _, c := range cmds {
		fmt.Fprintf(w, "\t%-9s %s\n", c.Name, c.Short)
	}
	fmt.Fprintln(w, "\nRun 'hemiray help <command>' for more about a command.")
}

func printHelp(w io.Writer, c *command) {
	fmt.Fprintf(w, "usage: hemiray %s\n\n%s\n", c.UsageLine, strings.TrimSpace(c.Long))
	fmt.Fprintln(w, "\nFlags:")
	c.Flags.SetOutput(w)
	c.Flags.PrintDefaults()
	c.Flags.SetOutput(io.Discard)
}

// parseArgs parses flags that may stand before, between or after the
// positional arguments, and returns the positional ones.
func parseArgs(fs *flag.FlagSet, args []string) ([]string, error) {
	var pos []string
	for {
		if err := fs.Parse(args); err != nil {
			if errors.Is(err, flag.ErrHelp) {
				return nil, err
			}
			return nil, usageError{err.Error()}
		}
		args = fs.Args()
		if len(args) == 0 {
			return pos, nil
		}
		if args[0] == "--" {
			return append(pos, args[1:]...), nil
		}
		pos = append(pos, args[0])
		args = args[1:]
	}
}

func versionCommand() *command {
	c := &command{Name: "version", UsageLine: "version", Short: "print hemiray's version",
		Long:  "Version prints hemiray's version, the tally-file settings version and the Go release it was built with.",
		Flags: flag.NewFlagSet("version", flag.ContinueOnError)}
	c.Run = func(ctx context.Context, args []string, stdout, stderr io.Writer) error {
		if _, err := parseArgs(c.Flags, args); err != nil {
			return err
		}
		fmt.Fprintf(stdout, "hemiray %s (tally settings version %d, %s)\n", analysis.Version, raytrace.SettingsVersion, runtime.Version())
		return nil
	}
	return c
}
