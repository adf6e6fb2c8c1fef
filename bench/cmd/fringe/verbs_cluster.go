package main

import (
	"bytes"
	"context"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strings"
	"time"

	"golang.org/x/term"

	"fringe/bench/cluster"
	"fringe/bench/input"
	"fringe/bench/plan"
	"fringe/bench/runner"
	"fringe/bench/spec"
	"fringe/qkernel/sim"
	"fringe/results"
)

// saveEvery is how long a finished task waits at most before it is
// persisted (runner.DefaultSaveEvery; tests shorten it).
var saveEvery = runner.DefaultSaveEvery

// execute plans, runs and writes a spec, keeping finished tasks in a
// partial run directory as they complete: OUT.partial for a whole run
// (removed once OUT is written), OUT itself for a shard (-shard i/n), which
// `fringe merge` joins with the other shards. Started again with the same
// command, a run that was stopped continues from its partial directory.
func execute(ctx context.Context, s *spec.Spec, rf *runFlags, cmdline []string, stdout, stderr io.Writer) error {
	if rf.workers < 1 {
		return usagef("-workers must be at least 1, got %d", rf.workers)
	}
	var shard plan.Shard
	sharded := rf.shard != ""
	if sharded {
		var err error
		if shard, err = plan.ParseShard(rf.shard); err != nil {
			return err
		}
	}
	out := rf.out
	if out == "" {
		out = filepath.Join("fringe-out", s.Name)
		if sharded {
			out = filepath.Join("fringe-out", s.Name+".shards", fmt.Sprintf("shard-%d-of-%d", shard.I, shard.N))
		}
	}
	partialDir := out + ".partial"
	if sharded {
		partialDir = out
	}
	start := time.Now()
	if rf.figures && !sharded {
		// Built once per process, beside planning and the tasks, so
		// that the figures do not wait for it.
		go results.WarmFigureFonts()
	}
	pl, err := plan.New(s)
	if err != nil {
		return err
	}
	if !(rf.memory > 0) {
		return usagef("-memory must be a positive number of GiB, got %v", rf.memory)
	}
	limit := int64(rf.memory * (1 << 30))
	if err := pl.CheckMemory(rf.workers, limit); err != nil {
		return err
	}
	defer runner.SetGC(pl.MemoryNeed(rf.workers), limit)()
	if rf.maxEst < 0 {
		return usagef("-max-estimate must not be negative, got %v", rf.maxEst)
	}
	note := func(format string, args ...any) {
		if !rf.quiet {
			fmt.Fprintf(stderr, "fringe: "+format+"\n", args...)
		}
	}
	// The cost of the tasks to run is known before anything is written:
	// with -fresh every task of the shard, else those the partial run
	// directory does not hold (opening it writes nothing).
	estimate := func(tasks []int) error {
		if len(tasks) == 0 {
			return nil
		}
		cm, _, err := costModelOf(ctx)
		if err != nil {
			return err
		}
		est, err := pl.Estimate(cm, tasks)
		if err != nil {
			return err
		}
		// Like the progress report: on a terminal always, in a log only
		// for a run long enough to get progress lines.
		if interactive(stderr) || est.Wall(rf.workers) >= estimateLogAbove {
			note("%s", estimateLine(est, rf.workers, true))
		}
		return checkEstimate(cm, pl, tasks, est, rf, stderr)
	}
	if rf.fresh {
		all, err := pl.ShardTasks(shard)
		if err != nil {
			return err
		}
		if err := estimate(all); err != nil {
			return err
		}
	}
	pr, err := runner.OpenPartial(partialDir, pl, shard, runner.PartialOptions{Fresh: rf.fresh, Workers: rf.workers, Start: start})
	if err != nil {
		return err
	}
	defer pr.Close()
	todo := pr.Missing()
	if !rf.fresh {
		if err := estimate(todo); err != nil {
			return err
		}
	}
	printWarnings(s, stderr)
	for _, w := range pr.Warnings() {
		fmt.Fprintln(stderr, "fringe: warning:", w)
	}
	switch {
	case pr.Loaded() > 0 && len(todo) == 0:
		note("%s: all %d tasks were finished before; nothing to run", partialDir, pr.Total())
	case pr.Loaded() > 0:
		note("resuming from %s: %d of %d tasks were finished before; running the other %d", partialDir, pr.Loaded(), pr.Total(), len(todo))
	}
	if len(todo) > 0 {
		grace := rf.grace
		if grace == 0 {
			grace = -1 // -grace 0: abandon at once
		}
		opt := runner.Options{Workers: rf.workers, Tasks: todo, Save: pr.Save, SaveEvery: saveEvery, Grace: grace, Abandon: abandonOf(ctx)}
		if !sharded {
			// The run directory is written as soon as the tasks are
			// done: the tasks still pending then need no task file.
			opt.Keep = pr.Hold
		}
		var prog *runner.Progress
		if !rf.quiet {
			all, err := pl.ShardTasks(shard)
			if err != nil {
				return err
			}
			total, left := pl.FitsOf(all), pl.FitsOf(todo)
			prog = runner.NewProgress(stderr, isTerminal(stderr), total-left, total)
			if total != len(all) {
				prog.Unit = "model fits"
			}
			opt.Progress = prog.Update
		}
		stopWatch := watchInterrupt(ctx, stderr, prog, rf.quiet)
		_, err := runner.Execute(ctx, pl, opt)
		stopWatch()
		if prog != nil {
			if err == nil {
				prog.Finish()
			} else {
				prog.Clear()
			}
		}
		if err != nil {
			switch {
			case ctx.Err() != nil:
				lost := ""
				var ie *runner.InterruptedError
				if errors.As(err, &ie) && ie.Abandoned > 0 {
					lost = fmt.Sprintf(" (%d in flight abandoned)", ie.Abandoned)
				}
				if !pr.Exists() {
					return fmt.Errorf("interrupted before any task finished%s; nothing was kept", lost)
				}
				return fmt.Errorf("interrupted: %d of %d tasks are finished and kept in %s%s; run the same command again to resume", pr.Finished(), pr.Total(), partialDir, lost)
			case errors.Is(err, input.ErrBad):
				// The run cannot complete with this input: its partial
				// directory would only be refused or mixed up later.
				if rerr := pr.Remove(); rerr != nil {
					fmt.Fprintln(stderr, "fringe: warning:", rerr)
				}
				return err
			case pr.Exists():
				return fmt.Errorf("%w (the %d finished tasks are kept in %s; run the same command again to resume)", err, pr.Finished(), partialDir)
			}
			return err
		}
	}
	res, err := pr.Results()
	if err != nil {
		return err
	}
	end := time.Now()
	if sharded {
		if !rf.quiet {
			fmt.Fprintf(stdout, "shard %s: %d of the run's %d tasks finished in %.1f s; partial run directory: %s\n", shard, len(res), len(pl.Tasks), end.Sub(start).Seconds(), out)
			fmt.Fprintf(stdout, "join the shards with: fringe merge -out DIR SHARD_DIR...\n")
		} else {
			fmt.Fprintf(stdout, "partial run directory: %s\n", out)
		}
		return nil
	}
	info := runner.RunInfo{Command: cmdline, Workers: rf.workers, Start: pr.Started(), End: end, NoFigures: !rf.figures}
	if err := runner.Write(pl, out, res, info, nil); err != nil {
		return err
	}
	if err := pr.Remove(); err != nil {
		fmt.Fprintln(stderr, "fringe: warning: remove the partial run directory:", err)
	}
	if !rf.quiet {
		if err := results.WriteSummaryText(stdout, runner.Summarise(pl, res)); err != nil {
			return err
		}
		resumed := ""
		if pr.Loaded() > 0 {
			resumed = fmt.Sprintf(" (%d finished before, %d now)", pr.Loaded(), len(pl.Tasks)-pr.Loaded())
		}
		fmt.Fprintf(stdout, "\n%d tasks%s in %.1f s with %d workers; run directory: %s\n", len(pl.Tasks), resumed, end.Sub(start).Seconds(), rf.workers, out)
	} else {
		fmt.Fprintf(stdout, "run directory: %s\n", out)
	}
	return nil
}

// estimateLogAbove is the estimated wall-clock time from which the
// estimate line is written when no terminal is attached (as the progress
// report, runner.Progress.LogEvery, keeps the logs of short runs empty).
const estimateLogAbove = 10 * time.Second

// checkEstimate refuses, on a terminal and without -yes, a run whose
// estimated wall-clock time is above -max-estimate, saying how to make it
// faster; without a terminal it prints the same as a warning and lets the
// run start, so that scripts, CI and cluster jobs never wait for an answer
// nobody can give.
func checkEstimate(cm *sim.CostModel, pl *plan.Plan, tasks []int, est *plan.Estimate, rf *runFlags, stderr io.Writer) error {
	if rf.maxEst == 0 || rf.yes || !est.Estimated {
		return nil
	}
	wall := est.Wall(rf.workers)
	if wall <= rf.maxEst {
		return nil
	}
	msg := fmt.Sprintf("the estimate, about %s with %s, is above -max-estimate %s", fmtDuration(wall), count(rf.workers, "worker"), rf.maxEst)
	how := ""
	if hints := fasterHints(cm, pl, tasks, est); len(hints) > 0 {
		how = "; to make it faster: " + strings.Join(hints, "; ")
	}
	table := ""
	if rf.spec != "" {
		table = fmt.Sprintf(" (the whole table: fringe plan %s)", rf.spec)
	}
	if interactive(stderr) {
		return usagef("%s; add -yes to start it anyway%s%s", msg, how, table)
	}
	fmt.Fprintf(stderr, "fringe: warning: %s; starting anyway, as no terminal is attached (-yes is asked for on a terminal only)%s%s\n", msg, how, table)
	return nil
}

// watchInterrupt tells the user, when ctx is cancelled (Ctrl-C, SIGTERM),
// what happens next. The returned function stops watching.
func watchInterrupt(ctx context.Context, stderr io.Writer, prog *runner.Progress, quiet bool) func() {
	stop := make(chan struct{})
	done := make(chan struct{})
	go func() {
		defer close(done)
		select {
		case <-ctx.Done():
			if quiet {
				return
			}
			if prog != nil {
				prog.Clear()
			}
			fmt.Fprintln(stderr, "fringe: stopping: the tasks in flight may finish within the grace period, then are abandoned; every finished task is kept (interrupt again to abandon them at once)")
		case <-stop:
		}
	}()
	return func() {
		close(stop)
		<-done
	}
}

// isTerminal reports whether w is a terminal (for the progress bar).
func isTerminal(w io.Writer) bool {
	f, ok := w.(*os.File)
	return ok && term.IsTerminal(int(f.Fd()))
}

// runMerge is `fringe merge -out DIR PARTIAL_DIR...`.
func runMerge(ctx context.Context, c *command, args []string, stdout, stderr io.Writer) error {
	fs := newFlags(c, stdout)
	out := fs.String("out", "", "directory of the merged run (default fringe-out/<spec name>)")
	quiet := fs.Bool("quiet", false, "print only where the merged run went, and errors")
	pos, err := parse(fs, args, stderr)
	if err != nil {
		return helpOK(err)
	}
	if len(pos) == 0 {
		return usagef("merge takes the partial run directories of every shard (see 'fringe merge -h')")
	}
	start := time.Now()
	m, err := runner.Merge(pos)
	if err != nil {
		return err
	}
	dir := *out
	if dir == "" {
		dir = filepath.Join("fringe-out", m.Plan.Spec.Name)
	}
	for _, p := range pos {
		if sameDir(p, dir) {
			return usagef("-out %s is one of the partial run directories being merged; choose another", dir)
		}
	}
	info := runner.RunInfo{Command: append([]string{"fringe", "merge"}, args...), Workers: m.Workers, Start: m.Start, End: time.Now()}
	if info.Start.IsZero() {
		info.Start = start
	}
	if err := runner.Write(m.Plan, dir, m.Results, info, nil); err != nil {
		return err
	}
	if !*quiet {
		if err := results.WriteSummaryText(stdout, runner.Summarise(m.Plan, m.Results)); err != nil {
			return err
		}
		fmt.Fprintf(stdout, "\nmerged %d shards (%d tasks) in %.1f s; run directory: %s\n", m.Shards, len(m.Results), time.Since(start).Seconds(), dir)
	} else {
		fmt.Fprintf(stdout, "run directory: %s\n", dir)
	}
	return nil
}

// sameDir reports whether two paths name the same place.
func sameDir(a, b string) bool {
	aa, err1 := filepath.Abs(a)
	bb, err2 := filepath.Abs(b)
	if err1 == nil && err2 == nil && aa == bb {
		return true
	}
	sa, err1 := os.Stat(a)
	sb, err2 := os.Stat(b)
	return err1 == nil && err2 == nil && os.SameFile(sa, sb)
}

// runSlurm is `fringe slurm SPEC -shards N`: it writes the cluster job.
func runSlurm(ctx context.Context, c *command, args []string, stdout, stderr io.Writer) error {
	fs := newFlags(c, stdout)
	o := cluster.SlurmOptions{}
	fs.IntVar(&o.Shards, "shards", 0, "number of shards = array tasks (required; at most the plan's units of work)")
	out := fs.String("out", "", "directory of the merged run (default fringe-out/<spec name>); shards go to DIR.shards/")
	fs.StringVar(&o.Fringe, "fringe", "fringe", "the fringe binary on the cluster's nodes: a path, or a name looked up on PATH")
	fs.IntVar(&o.CPUs, "cpus", 4, "CPUs per array task (--cpus-per-task; also fringe's -workers)")
	fs.StringVar(&o.Mem, "mem", "4G", "memory per array task (--mem)")
	fs.StringVar(&o.Time, "time", "04:00:00", "time limit per array task and for the merge job (--time)")
	fs.StringVar(&o.Partition, "partition", "", "partition (--partition; default: the cluster's default)")
	fs.StringVar(&o.Account, "account", "", "account to charge (--account)")
	script := fs.String("script", "", "write the script to this file (default: standard output)")
	pos, err := parse(fs, args, stderr)
	if err != nil {
		return helpOK(err)
	}
	if len(pos) != 1 {
		return usagef("slurm takes exactly one spec file (see 'fringe slurm -h')")
	}
	if o.Shards == 0 {
		return usagef("slurm needs -shards N (see 'fringe slurm -h')")
	}
	s, err := loadSpec(pos[0], stderr)
	if err != nil {
		return err
	}
	pl, err := plan.New(s)
	if err != nil {
		return err
	}
	printWarnings(s, stderr)
	if o.Shards >= 1 && o.Shards <= plan.MaxShards {
		if _, err := pl.ShardTasks(plan.Shard{I: 1, N: o.Shards}); err != nil {
			return err
		}
	}
	o.Spec, o.JobName, o.Tasks = pos[0], "fringe-"+s.Name, len(pl.Tasks)
	o.Out = *out
	if o.Out == "" {
		o.Out = filepath.Join("fringe-out", s.Name)
	}
	var b bytes.Buffer
	if err := cluster.WriteSlurmScript(&b, o); err != nil {
		return err
	}
	if *script == "" {
		_, err := stdout.Write(b.Bytes())
		return err
	}
	if err := os.WriteFile(*script, b.Bytes(), 0o755); err != nil {
		return fmt.Errorf("write %s: %w", *script, err)
	}
	fmt.Fprintf(stdout, "wrote %s (%d tasks in %d shards); submit it with: bash %s\n", *script, len(pl.Tasks), o.Shards, *script)
	return nil
}
