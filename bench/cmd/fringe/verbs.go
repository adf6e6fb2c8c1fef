package main

import (
	"context"
	"errors"
	"flag"
	"fmt"
	"io"
	"os"
	"runtime"
	"runtime/pprof"
	"strings"
	"time"

	"fringe/bench/modelkit"
	"fringe/bench/runner"
	"fringe/bench/spec"
	"fringe/datasets"
	"fringe/qkernel/device"
)

// newFlags makes a verb's flag set; -h prints the verb's usage to stdout.
func newFlags(c *command, stdout io.Writer) *flag.FlagSet {
	fs := flag.NewFlagSet("fringe "+c.name, flag.ContinueOnError)
	fs.SetOutput(stdout)
	fs.Usage = func() {
		fmt.Fprintf(fs.Output(), "usage: fringe %s %s\n\n%s\n", c.name, c.args, c.short)
		var any bool
		fs.VisitAll(func(*flag.Flag) { any = true })
		if any {
			fmt.Fprintln(fs.Output(), "\nflags:")
			fs.PrintDefaults()
		}
	}
	return fs
}

// parsing, when set (by tests), sees every verb's complete flag set.
var parsing func(*flag.FlagSet)

// parse parses flags that may come before or after positional arguments
// and returns the positional ones. -h gives flag.ErrHelp.
func parse(fs *flag.FlagSet, args []string, stderr io.Writer) ([]string, error) {
	if parsing != nil {
		parsing(fs)
	}
	var pos []string
	for {
		out := fs.Output()
		var buf strings.Builder
		fs.SetOutput(&buf)
		err := fs.Parse(args)
		fs.SetOutput(out)
		if errors.Is(err, flag.ErrHelp) {
			fs.Usage()
			return nil, flag.ErrHelp
		}
		if err != nil {
			return nil, flagError(fs, err)
		}
		args = fs.Args()
		if len(args) == 0 {
			return pos, nil
		}
		pos = append(pos, args[0])
		args = args[1:]
	}
}

type runFlags struct {
	out     string
	workers int
	quiet   bool
	shard   string
	fresh   bool
	figures bool
	grace   time.Duration
	memory  float64 // GiB
	maxEst  time.Duration
	yes     bool
	spec    string // the spec file of fringe run, for the hint to fringe plan
	profile string // -cpuprofile FILE
}

func addRunFlags(fs *flag.FlagSet) *runFlags {
	rf := &runFlags{}
	fs.StringVar(&rf.out, "out", "", "output run directory (default fringe-out/<spec name>; with -shard, fringe-out/<spec name>.shards/shard-I-of-N)")
	fs.IntVar(&rf.workers, "workers", runtime.NumCPU(), "concurrent tasks")
	fs.BoolVar(&rf.quiet, "quiet", false, "print only where the run went, and errors and warnings (no estimate, progress or summary)")
	fs.StringVar(&rf.shard, "shard", "", "run only shard `i/n`, the i-th of n deterministic slices of the tasks, and write a partial run directory for 'fringe merge'")
	fs.BoolVar(&rf.fresh, "fresh", false, "discard the unfinished run kept in the partial run directory instead of resuming it")
	fs.BoolVar(&rf.figures, "figures", true, "write the figures (SVG, PDF, PNG); -figures=false keeps only tables and CSV files")
	fs.Float64Var(&rf.memory, "memory", 8, "memory limit in GiB for the tasks that run at once: a plan whose estimate (the largest task's model and prepared data on the largest training part, times -workers, plus the loaded datasets) exceeds it is refused before it starts, naming the key to change")
	fs.DurationVar(&rf.maxEst, "max-estimate", DefaultMaxEstimate, "a run started from a terminal whose estimated wall-clock time (see 'fringe plan') is above this is refused unless -yes is given, with the spec keys that make it faster; without a terminal (scripts, CI, cluster jobs) that is printed as a warning and the run starts; 0: no limit")
	fs.BoolVar(&rf.yes, "yes", false, "start even when the estimate is above -max-estimate")
	fs.StringVar(&rf.profile, "cpuprofile", "", "write a CPU profile of the whole run (planning, tasks, files and figures) to `FILE`, for go tool pprof")
	fs.DurationVar(&rf.grace, "grace", runner.DefaultGrace, "after an interrupt (SIGINT, SIGTERM), how long the tasks in flight may still finish before they are abandoned (a second interrupt abandons them at once; finished tasks are always kept)")
	return rf
}

func runDemo(ctx context.Context, c *command, args []string, stdout, stderr io.Writer) error {
	fs := newFlags(c, stdout)
	rf := addRunFlags(fs)
	pos, err := parse(fs, args, stderr)
	if err != nil {
		return helpOK(err)
	}
	if len(pos) > 0 {
		return usagef("demo takes no arguments, got %q", pos[0])
	}
	stop, err := startProfile(rf.profile)
	if err != nil {
		return err
	}
	defer stop()
	s, err := spec.Demo()
	if err != nil {
		return err
	}
	if !rf.quiet {
		fmt.Fprint(stdout, spec.DemoStory+"\n")
	}
	return execute(ctx, s, rf, append([]string{"fringe", "demo"}, args...), stdout, stderr)
}

func runSpec(ctx context.Context, c *command, args []string, stdout, stderr io.Writer) error {
	fs := newFlags(c, stdout)
	rf := addRunFlags(fs)
	pos, err := parse(fs, args, stderr)
	if err != nil {
		return helpOK(err)
	}
	if len(pos) != 1 {
		return usagef("run takes exactly one spec file (see 'fringe run -h')")
	}
	stop, err := startProfile(rf.profile)
	if err != nil {
		return err
	}
	defer stop()
	s, err := loadSpec(pos[0], stderr)
	if err != nil {
		return err
	}
	rf.spec = pos[0]
	return execute(ctx, s, rf, append([]string{"fringe", "run"}, args...), stdout, stderr)
}

// loadSpec reads and validates a spec file. Its warnings (old spellings,
// no pipelines) are printed by printWarnings once the verb has checked
// the spec further, so that bad input stays a one-line message.
func loadSpec(path string, stderr io.Writer) (*spec.Spec, error) {
	return spec.Load(path)
}

// printWarnings prints the spec's warnings on stderr, one line each.
func printWarnings(s *spec.Spec, stderr io.Writer) {
	for _, w := range s.Warnings {
		fmt.Fprintln(stderr, "fringe: warning:", w)
	}
}

// startProfile starts a CPU profile written to path (-cpuprofile) and
// returns the function that stops it and closes the file; with path ""
// it does nothing. A file that cannot be created is bad usage.
func startProfile(path string) (stop func(), err error) {
	if path == "" {
		return func() {}, nil
	}
	f, err := os.Create(path)
	if err != nil {
		return nil, usagef("-cpuprofile: %v", err)
	}
	if err := pprof.StartCPUProfile(f); err != nil {
		f.Close()
		return nil, usagef("-cpuprofile: %v", err)
	}
	return func() {
		pprof.StopCPUProfile()
		f.Close()
	}, nil
}

func helpOK(err error) error {
	if errors.Is(err, flag.ErrHelp) {
		return nil
	}
	return err
}

func runList(ctx context.Context, c *command, args []string, stdout, stderr io.Writer) error {
	fs := newFlags(c, stdout)
	pos, err := parse(fs, args, stderr)
	if err != nil {
		return helpOK(err)
	}
	if len(pos) > 0 {
		return usagef("list takes no arguments")
	}
	w := &listWriter{w: stdout}
	w.head("DATASETS (embedded; `datasets = [...]` in a spec)")
	for _, p := range datasets.Provenances() {
		d, err := datasets.Load(p.Name)
		if err != nil {
			return err
		}
		kind := "open data"
		if p.Synthetic {
			kind = "synthetic, invented"
		}
		w.item(p.Name, fmt.Sprintf("%d rows x %d features, %d classes (%s); %s", d.Len(), d.Dim(), len(d.Classes), strings.Join(d.Classes, ", "), kind))
		w.more("title: " + p.Title)
		w.more("citation: " + p.Citation)
		w.more("origin: " + p.Origin)
		w.more("licence: " + p.Licence)
		file := p.File
		if file == "" {
			file = "generated"
		}
		w.more(fmt.Sprintf("sha256: %s (%s)", p.SHA256, file))
		if p.Note != "" {
			w.more("note: " + p.Note)
		}
	}
	w.item("PATH.csv", "your own CSV: header row, label column by name (default last), delimiter detected")
	w.head("PIPELINE STEPS (join with '+'; 'raw' = no steps; every step is fitted on training parts only)")
	for _, st := range datasets.StepInfos() {
		w.item(st.Syntax, st.Description)
	}
	w.head("MODELS ([[model]] kind = ...)")
	for _, m := range modelkit.Infos() {
		w.item(m.Kind, m.Description)
		w.more("keys: " + orNone(m.Keys))
	}
	w.head("NOISE (interference models with mode = \"noisy\": noise = { ... })")
	for _, n := range modelkit.NoiseKeys {
		w.item(n.Key, n.Meaning)
	}
	w.head("DEVICES (embedded; device = NAME in an interference or counts model, -device NAME for circuit and assess)")
	for _, name := range device.Names() {
		d, err := device.Load(name)
		if err != nil {
			return err
		}
		w.item(d.Name, fmt.Sprintf("%d qubits, native %s", d.N(), d.Family))
		w.more(d.Note)
	}
	w.item("PATH.toml", "your own device file: coupling, native gates, T1/T2, readout and gate errors, durations (see the README)")
	return w.err
}

// listWriter prints `fringe list`: headings, items with a name column and
// wrapped continuation lines.
type listWriter struct {
	w   io.Writer
	n   int
	err error
}

func (l *listWriter) printf(format string, args ...any) {
	if l.err == nil {
		_, l.err = fmt.Fprintf(l.w, format, args...)
	}
}

func (l *listWriter) head(s string) {
	if l.n > 0 {
		l.printf("\n")
	}
	l.n++
	l.printf("%s\n", s)
}

func (l *listWriter) item(name, text string) {
	if len(name) > 16 {
		l.printf("  %s\n", name)
		l.more(text)
		return
	}
	l.printf("  %-16s %s\n", name, text)
}

func (l *listWriter) more(text string) { l.printf("  %-16s %s\n", "", text) }

func orNone(s string) string {
	if s == "" {
		return "(none)"
	}
	return s
}

var _ = os.Stdout
