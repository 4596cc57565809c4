// Command dlsbatch turns folders of dynamic light scattering correlogram
// exports into hydrodynamic sizes. See README.md and `dlsbatch --help`.
package main

import (
	"context"
	"embed"
	"errors"
	"fmt"
	"io"
	"os"
	"os/signal"
	"syscall"

	"github.com/spf13/pflag"
	"golang.org/x/term"

	"dlsbatch/io/heapbudget"
	"dlsbatch/io/report"
)

// Exit codes. Keep this list and usageText in step.
const (
	exitOK          = 0   // every measurement ok or warn
	exitFatal       = 1   // nothing usable
	exitUsage       = 2   // usage error
	exitSomeFailed  = 3   // some measurements could not be analysed; the rest are written
	exitSpecFailed  = 4   // some samples failed their specification
	exitInvalid     = 5   // batch invalid: system suitability failed or not shown
	exitInterrupted = 130 // interrupted (SIGINT/SIGTERM)
)

// env is what a subcommand may touch of the outside world; tests pass
// buffers.
type env struct {
	stdin  io.Reader
	stdout io.Writer
	stderr io.Writer
	// stderrIsTerminal enables the progress bar.
	stderrIsTerminal bool
}

//go:embed help
var helpFiles embed.FS

// help returns the help text help/NAME.txt (usage texts and exit codes of
// the subcommands, kept as plain text beside the code).
func help(name string) string {
	b, err := helpFiles.ReadFile("help/" + name + ".txt")
	if err != nil {
		panic("dlsbatch: missing help text " + name) // a build without its help files
	}
	return string(b)
}

// subcommand is one verb of the command line.
type subcommand struct {
	name    string
	summary string
	run     func(ctx context.Context, e env, args []string) int
}

func subcommands() []subcommand {
	return []subcommand{
		{"run", "analyse correlogram files and folders into results", runRun},
		{"simulate", "write synthetic correlograms of a stated population", runSimulate},
		{"solvents", "list the solvent table with valid ranges and sources", runSolvents},
		{"flags", "list the quality-control flags with their meaning and threshold", runFlags},
		{"formats", "describe the input, sample-sheet and specification files", runFormats},
		{"verify", "check a result folder against its manifest", runVerify},
		{"merge", "merge the result sets of a batch's shards into one", runMerge},
		{"diff", "compare two result sets within tolerances (for CI)", runDiff},
		{"watch", "keep a result set up to date while an instrument writes files", runWatch},
	}
}

func main() {
	// The first SIGINT or SIGTERM cancels the run, which stops within about
	// a second and says what it leaves; a second one ends the process at
	// once (an unfinished output folder is then left as it was).
	ctx, cancel := context.WithCancel(context.Background())
	sig := make(chan os.Signal, 2)
	signal.Notify(sig, os.Interrupt, syscall.SIGTERM)
	go func() {
		<-sig
		cancel()
		<-sig
		os.Exit(exitInterrupted)
	}()
	e := env{stdin: os.Stdin, stdout: os.Stdout, stderr: os.Stderr, stderrIsTerminal: term.IsTerminal(int(os.Stderr.Fd()))}
	heapbudget.Start(heapbudget.Floor) // the collector's budget (DEVELOPERS.md, "Memory of a whole run")
	os.Exit(run(ctx, os.Args[1:], e))
}

// run dispatches to a subcommand and returns the exit code.
func run(ctx context.Context, args []string, e env) int {
	if len(args) == 0 {
		fmt.Fprint(e.stderr, usageText())
		return exitUsage
	}
	switch args[0] {
	case "-h", "--help", "help":
		fmt.Fprint(e.stdout, usageText())
		return exitOK
	case "--version", "version":
		fmt.Fprintln(e.stdout, "dlsbatch", report.Version())
		return exitOK
	}
	for _, sc := range subcommands() {
		if sc.name == args[0] {
			return sc.run(ctx, e, args[1:])
		}
	}
	fmt.Fprintf(e.stderr, "dlsbatch: unknown command %q\n\n%s", args[0], usageText())
	return exitUsage
}

func usageText() string {
	s := "dlsbatch: dynamic light scattering correlograms to hydrodynamic sizes\n\n" +
		"Usage:\n  dlsbatch <command> [flags]\n\nCommands:\n"
	for _, sc := range subcommands() {
		s += fmt.Sprintf("  %-10s %s\n", sc.name, sc.summary)
	}
	s += "\nRun 'dlsbatch <command> --help' for the flags and exit codes of a command.\n"
	return s
}

// parseFlags parses args into fs for the subcommand name. For --help it
// prints usage (its text, the flags and the command's own exit codes) to
// stdout and returns exitOK with done set; on a bad flag it reports the
// error and a hint on stderr and returns exitUsage with done set.
func parseFlags(fs *pflag.FlagSet, e env, name, usage, exits string, args []string) (code int, done bool) {
	fs.SetOutput(e.stderr)
	fs.Usage = func() {} // pflag calls it on --help and on errors; printed here instead
	err := fs.Parse(args)
	switch {
	case err == nil:
		return 0, false
	case errors.Is(err, pflag.ErrHelp):
		fmt.Fprint(e.stdout, usage)
		fs.SetOutput(e.stdout)
		fs.PrintDefaults()
		fs.SetOutput(e.stderr)
		fmt.Fprint(e.stdout, "\nExit codes:\n"+exits)
		return exitOK, true
	}
	fmt.Fprintf(e.stderr, "dlsbatch %s: %v\nrun 'dlsbatch %s --help' for the flags\n", name, err, name)
	return exitUsage, true
}

// listCommand runs a command that takes no arguments and writes a listing.
func listCommand(e env, name, usage string, args []string, write func(io.Writer) error) int {
	fs := pflag.NewFlagSet(name, pflag.ContinueOnError)
	if code, done := parseFlags(fs, e, name, usage, help(name+".exits"), args); done {
		return code
	}
	if fs.NArg() > 0 {
		return usageError(e, name, "takes no arguments")
	}
	if write(e.stdout) != nil {
		return exitFatal
	}
	return exitOK
}

// usageError reports a usage error of the subcommand name on stderr.
func usageError(e env, name string, msg any) int {
	fmt.Fprintln(e.stderr, "dlsbatch "+name+":", msg)
	return exitUsage
}
