package main

import (
	"context"
	"errors"
	"fmt"
	"io"
	"os"
	"os/signal"
	"strings"
	"syscall"

	"github.com/spf13/pflag"

	"github.com/falloff-kinetics/falloff/internal/demo"
	"github.com/falloff-kinetics/falloff/pkg/collision"
	"github.com/falloff-kinetics/falloff/pkg/export"
	"github.com/falloff-kinetics/falloff/pkg/input"
	"github.com/falloff-kinetics/falloff/pkg/job"
)

// Exit codes (documented in README.md and `falloff help`).
const (
	exitOK        = 0
	exitInput     = 1 // bad input file or value
	exitUsage     = 2 // bad command line
	exitNumerical = 3 // a computation failed or produced a non-finite number
)

// internalWord starts the message of a panic caught by runContext.
const internalWord = "internal error"

// exitInternal is the exit code of a defect of the program (a panic turned
// into one line): distinct from the usage code 2 that Go gives a crash.
const exitInternal = 4

// exitInterrupted is the exit code after SIGINT or SIGTERM (128 + SIGINT,
// as shells report a program stopped by Ctrl-C).
const exitInterrupted = 130

// streams carries the standard streams and the run's context into a verb,
// so tests run verbs in-process with buffers and can cancel them.
type streams struct {
	in       io.Reader
	out, err io.Writer
	ctx      context.Context // cancelled on SIGINT or SIGTERM
}

// usageError is a mistake on the command line.
type usageError struct{ msg string }

func (e *usageError) Error() string { return e.msg }

func usagef(format string, a ...any) error { return &usageError{fmt.Sprintf(format, a...)} }

type verb struct {
	name, summary string
	run           func(args []string, s streams) error
	writes        bool // may write files: stops cleanly on SIGINT
}

func verbs() []verb {
	return []verb{
		{"check", "validate an input file and summarise what it describes", runCheckCmd, false},
		{"states", "partition functions, sums and densities of states", runStatesCmd, false},
		{"micro", "RRKM k(E) and its thermal average beside canonical k∞(T)", runMicroCmd, false},
		{"rates", "master-equation k(T,P) on the temperature and pressure grid", runRatesCmd, true},
		{"compare", "the grid under strong-collider and exponential-down models side by side", runCompareCmd, true},
		{"uncertainty", "Monte Carlo bands, uncertainty factors f(T) and sensitivities of k(T,P)", runUncertaintyCmd, true},
		{"fit", "fit Arrhenius, falloff, PLOG and Chebyshev forms to a k(T,P) table (CSV)", runFitCmd, true},
		{"thermo", "species thermochemistry (Cp, S, H) and NASA polynomials from the partition functions", runThermoCmd, false},
		{"batch", "many reactions from a manifest: worker pool, resume, slices for a cluster scheduler, merged mechanism", runBatchCmd, true},
		{"import", "read frequency calculations (Molden, QCSchema, xtb, Psi4, NWChem) into the molecules of an input file", runImportCmd, true},
		{"example", "print the built-in demo input (edit it to make your own)", runExampleCmd, false},
	}
}

// run runs the command line args. For a verb that writes files the first
// SIGINT or SIGTERM cancels the work, which stops at the next temperature or
// pressure and writes no further file; a second one ends the process at
// once. Other verbs write only to stdout and keep the default action.
func run(args []string, stdin io.Reader, stdout, stderr io.Writer) int {
	ctx := context.Background()
	if len(args) > 0 && writesFiles(args[0]) {
		var stop context.CancelFunc
		ctx, stop = signal.NotifyContext(ctx, os.Interrupt, syscall.SIGTERM)
		defer stop()
		go func() {
			<-ctx.Done()
			stop() // restore the default action for a second signal
		}()
	}
	return runContext(ctx, args, stdin, stdout, stderr)
}

// writesFiles reports whether a verb may write files (and so stops cleanly
// on a signal rather than at once).
func writesFiles(name string) bool {
	for _, v := range verbs() {
		if v.name == name {
			return v.writes
		}
	}
	return false
}

// runContext is run under a context of the caller's. A panic is reported
// on one line as an internal error, with its own exit code.
func runContext(ctx context.Context, args []string, stdin io.Reader, stdout, stderr io.Writer) (code int) {
	defer func() {
		if p := recover(); p != nil {
			fmt.Fprintf(stderr, "falloff: %s: %v (hint: this is a defect of falloff; please report it with the input file and the command)\n", internalWord, p)
			code = exitInternal
		}
	}()
	s := streams{in: stdin, out: stdout, err: stderr, ctx: ctx}
	if len(args) == 0 || args[0] == "help" || args[0] == "-h" || args[0] == "--help" {
		if len(args) > 1 {
			return runContext(ctx, []string{args[1], "--help"}, stdin, stdout, stderr)
		}
		printUsage(stdout)
		return exitOK
	}
	if args[0] == "version" || args[0] == "--version" {
		fmt.Fprintln(stdout, "falloff", job.Version)
		return exitOK
	}
	for _, v := range verbs() {
		if v.name == args[0] {
			return exitCode(v.run(args[1:], s), stderr)
		}
	}
	fmt.Fprintf(stderr, "falloff: unknown command %q (hint: run `falloff help` for the list)\n", args[0])
	return exitUsage
}

// exitCode prints err on one line and maps it to an exit code.
func exitCode(err error, stderr io.Writer) int {
	if err == nil || errors.Is(err, pflag.ErrHelp) {
		return exitOK
	}
	var ie *export.InterruptedError
	if errors.As(err, &ie) || errors.Is(err, context.Canceled) {
		if ie == nil {
			ie = &export.InterruptedError{} // stopped before any file was due
		}
		fmt.Fprintln(stderr, "falloff:", ie)
		return exitInterrupted
	}
	fmt.Fprintln(stderr, "falloff:", strings.ReplaceAll(err.Error(), "\n", " "))
	if errors.Is(err, collision.ErrInternal) {
		return exitInternal
	}
	var ue *usageError
	var oe *job.OptionError
	var ne *job.NumericalError
	switch {
	case errors.As(err, &ue), errors.As(err, &oe):
		return exitUsage
	case errors.As(err, &ne):
		return exitNumerical
	}
	return exitInput // *input.FieldError, *units.UnitError, *fit.CSVError, a file that cannot be read
}

func printUsage(w io.Writer) {
	fmt.Fprintf(w, `falloff %s: RRKM and master-equation rate coefficients for unimolecular reactions

Usage: falloff <command> [flags] [FILE]

Commands:
`, job.Version)
	for _, v := range verbs() {
		fmt.Fprintf(w, "  %-12s %s\n", v.name, v.summary)
	}
	fmt.Fprint(w, `
With no FILE, states, micro, thermo, rates and compare run the built-in demo (an invented molecule).
Run 'falloff <command> --help' for its flags and a worked example.

Exit codes: 0 ok, 1 bad input, 2 usage, 3 numerical failure, 4 internal error
(a defect of falloff: please report it), 130 interrupted
(Ctrl-C or SIGTERM: no file is left part-written; the message lists any written).

Computed rate coefficients are model estimates. Validate them against
experiment before using them in safety, hazard or design decisions, which
remain subject to local codes and qualified review.
`)
}

// newFlags returns a flag set for a verb whose --help prints the usage line,
// the flags and a worked example.
func newFlags(name, usage, example string, s streams) *pflag.FlagSet {
	fs := pflag.NewFlagSet(name, pflag.ContinueOnError)
	fs.SetOutput(io.Discard)
	fs.SortFlags = false
	fs.Usage = func() {
		fmt.Fprintf(s.out, "Usage: falloff %s\n\nFlags:\n%s\nExample:\n%s\n", usage, fs.FlagUsages(), example)
	}
	return fs
}

// parseVerb parses a verb's flags and validates the remaining arguments, so
// that every verb reads parse → validate → run.
func parseVerb(fs *pflag.FlagSet, args []string, validate func([]string) error) ([]string, error) {
	if err := fs.Parse(args); err != nil {
		if errors.Is(err, pflag.ErrHelp) {
			return nil, err // pflag has printed the usage (fs.Usage)
		}
		return nil, usagef("%s: %v (hint: falloff %s --help)", fs.Name(), err, fs.Name())
	}
	if err := validate(fs.Args()); err != nil {
		return nil, err
	}
	return fs.Args(), nil
}

// parseAndLoad parses a verb's flags, validates its arguments and loads the
// network of the file they name (the built-in demo when none), quietly if
// quiet, asked after the flags are parsed, says so.
func parseAndLoad(fs *pflag.FlagSet, args []string, validate func([]string) error, quiet func() bool, s streams) (*job.Network, error) {
	args, err := parseVerb(fs, args, validate)
	if err != nil {
		return nil, err
	}
	return loadNetwork(args, quiet(), s)
}

// loadNetwork reads the file named in args, or the built-in demo when there
// is none (and says so on stderr unless quiet), prints its warnings to
// stderr unless quiet, and builds its network (job.New), which refuses what
// any calculation would refuse of the file.
func loadNetwork(args []string, quiet bool, s streams) (*job.Network, error) {
	m, err := loadModel(args, quiet, s)
	if err != nil {
		return nil, err
	}
	return job.New(m)
}

// loadModel reads the file named in args, or the built-in demo, and prints
// its warnings to stderr unless quiet (see loadNetwork).
func loadModel(args []string, quiet bool, s streams) (*input.Model, error) {
	var m *input.Model
	var err error
	switch len(args) {
	case 0:
		if !quiet {
			fmt.Fprintln(s.err, "falloff: no input file given; running the built-in demo (an invented molecule; see `falloff example`)")
		}
		m, err = input.Parse(demo.Name, demo.Text)
	case 1:
		m, err = input.ReadFile(args[0])
	default:
		return nil, usagef("expected one input file, got %d arguments", len(args))
	}
	if err != nil {
		return nil, err
	}
	if !quiet {
		for _, w := range m.Warnings {
			fmt.Fprintln(s.err, "warning:", w)
		}
	}
	return m, nil
}
