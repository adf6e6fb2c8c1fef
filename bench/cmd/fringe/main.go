// Command fringe benchmarks the interference quantum classifier against
// classical baselines. See the README for the verbs and the spec format.
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

	"fringe/bench/input"
)

func main() {
	// The first SIGINT or SIGTERM stops a run: no task starts any more,
	// the tasks in flight get the grace period (-grace) and everything
	// finished is kept. The second abandons the tasks in flight at once.
	// The third exits at once.
	ctx, cancel := context.WithCancel(context.Background())
	abandon := make(chan struct{})
	sigs := make(chan os.Signal, 3)
	signal.Notify(sigs, os.Interrupt, syscall.SIGTERM)
	go func() {
		n := 0
		for range sigs {
			n++
			switch n {
			case 1:
				cancel()
			case 2:
				close(abandon)
			default:
				fmt.Fprintln(os.Stderr, "fringe: stopped at once (third interrupt); tasks saved before are kept, those of the last second may not be")
				os.Exit(130)
			}
		}
	}()
	err := run(withAbandon(ctx, abandon), os.Args[1:], os.Stdout, os.Stderr)
	signal.Stop(sigs)
	cancel()
	if err != nil {
		if !errors.Is(err, errSilent) {
			fmt.Fprintln(os.Stderr, "fringe:", err)
		}
		os.Exit(exitCode(err))
	}
}

type abandonKey struct{}

// withAbandon attaches the channel a second interrupt closes.
func withAbandon(ctx context.Context, ch <-chan struct{}) context.Context {
	return context.WithValue(ctx, abandonKey{}, ch)
}

// abandonOf returns the channel of withAbandon, or nil.
func abandonOf(ctx context.Context) <-chan struct{} {
	ch, _ := ctx.Value(abandonKey{}).(<-chan struct{})
	return ch
}

// errUsage marks bad command-line usage (exit status 2).
var errUsage = errors.New("usage")

// errSilent marks an error already reported (e.g. by the flag package).
var errSilent = errors.New("reported")

// usageError is bad usage with a message.
type usageError struct{ msg string }

func (e *usageError) Error() string { return e.msg }
func (e *usageError) Unwrap() error { return errUsage }

func usagef(format string, args ...any) error { return &usageError{fmt.Sprintf(format, args...)} }

// exitCode maps an error to the exit status: 2 for bad usage or bad input,
// 1 for anything else.
func exitCode(err error) int {
	switch {
	case err == nil:
		return 0
	case errors.Is(err, errUsage), errors.Is(err, input.ErrBad):
		return 2
	}
	return 1
}

// command is one verb.
type command struct {
	name, args, short string
	run               func(ctx context.Context, c *command, args []string, stdout, stderr io.Writer) error
}

func commands() []*command {
	return []*command{
		{name: "demo", args: "[-out DIR] [-workers N] [-shard i/n] [-fresh] [-quiet] [-figures=false] [-memory GiB] [-max-estimate D] [-yes] [-grace D] [-cpuprofile FILE]", short: "run the built-in demo experiment on embedded data", run: runDemo},
		{name: "run", args: "SPEC.toml [-out DIR] [-workers N] [-shard i/n] [-fresh] [-quiet] [-figures=false] [-memory GiB] [-max-estimate D] [-yes] [-grace D] [-cpuprofile FILE]", short: "run an experiment spec (an interrupted run continues where it stopped)", run: runSpec},
		{name: "plan", args: "SPEC.toml [-workers N] [-shard i/n] [-cells] [-max-estimate D]", short: "show a spec's tasks and their estimated cost (qubits, gates, simulator, time per model) without running anything", run: runPlan},
		{name: "list", args: "", short: "list embedded datasets, pipeline steps and models", run: runList},
		{name: "rank", args: "SCORES.csv [-alpha A] [-json] [-plot FILE]", short: "rank models across datasets from a dataset,model,score CSV (Friedman, Iman-Davenport, Nemenyi CD)", run: runRank},
		{name: "compare", args: "BASELINE_DIR NEW_DIR [-tol T] [-alpha A] [-metric M] [-models M] [-correction holm|none] [-json] [-json-file FILE]", short: "compare a new run directory with a baseline run; exit status 1 on a significant regression", run: runCompare},
		{name: "verify", args: "RUN_DIR [-spec-dir DIR]", short: "check a run directory: its manifest seal and file digests, and its predictions, folds, summary and comparisons recomputed from predictions.csv and the spec; exit status 1 when it does not verify", run: runVerify},
		{name: "merge", args: "[-out DIR] [-quiet] PARTIAL_DIR...", short: "merge the partial run directories of all shards of a run (fringe run -shard i/n) into one run directory", run: runMerge},
		{name: "slurm", args: "SPEC.toml -shards N [-out DIR] [-fringe PATH] [-cpus C] [-mem M] [-time T] [-partition P] [-account A] [-script FILE]", short: "write a Slurm job: an array with one shard per array task and a merge job that waits for it", run: runSlurm},
		{name: "circuit", args: "[DATASET | -dataset NAME] [-classes a,b] [-features f,g] [-pipeline P] [-train N] [-balance] [-row R] [-seed S] [-device NAME|FILE] [-qasm] [-qasm2] | -export DIR [-model NAME] [-workers N] [-device NAME|FILE] [-qasm2] SPEC.toml", short: "show the compiled circuit's resources or OpenQASM text for one test instance (on a device: routed to its native gates), or export every test instance's circuit of a spec", run: runCircuit},
		{name: "assess", args: "[DATASET... | -datasets a,b | SPEC.toml] [-pipelines p,q] [-subsets 8,16,32] [-margin M] [-out DIR] [-seed S] [-folds K] [-repeats R] [-weights balanced|uniform] [-ratio R] [-device NAME|FILE] [-device-instances N] [-workers N] [-quiet]", short: "report which datasets and pipelines suit the classifier: qubits, gates, noise budget, shots, norm loss, kernel alignment, accuracy against the baselines", run: runAssess},
		{name: "version", args: "", short: "print fringe's version, the build's module and version-control information and the Go version", run: runVersion},
	}
}

func mainUsage(w io.Writer) {
	fmt.Fprintln(w, "usage: fringe VERB [flags] [args]\n       fringe -version")
	fmt.Fprintln(w, "\nfringe benchmarks the interference quantum classifier against classical baselines.\n\nverbs:")
	for _, c := range commands() {
		fmt.Fprintf(w, "  %-8s %s\n", c.name, c.short)
	}
	fmt.Fprintln(w, "\nRun 'fringe VERB -h' for a verb's flags.")
}

// run is the whole program; main only adds signals and the exit status.
func run(ctx context.Context, args []string, stdout, stderr io.Writer) error {
	if len(args) == 0 {
		mainUsage(stderr)
		return usagef("missing verb")
	}
	switch args[0] {
	case "-h", "-help", "--help", "help":
		mainUsage(stdout)
		return nil
	case "-version", "--version":
		return writeVersion(stdout)
	}
	for _, c := range commands() {
		if c.name == args[0] {
			return c.run(ctx, c, args[1:], stdout, stderr)
		}
	}
	mainUsage(stderr)
	if strings.HasPrefix(args[0], "-") {
		return usagef("%s is not a verb; flags follow the verb: fringe VERB [flags]", args[0])
	}
	return usagef("unknown verb %q", args[0])
}
