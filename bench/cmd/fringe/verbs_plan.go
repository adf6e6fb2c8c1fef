package main

import (
	"context"
	"fmt"
	"io"
	"os"
	"runtime"
	"slices"
	"strings"
	"time"
	"unicode/utf8"

	"golang.org/x/term"

	"fringe/bench/plan"
	"fringe/bench/spec"
	"fringe/qkernel"
	"fringe/qkernel/sim"
)

// calibrate measures the simulators' cost model (sim.Calibrate); tests
// replace it with a fixed model so that estimates are reproducible.
var calibrate = sim.Calibrate

// interactive reports whether a person is at the terminal: standard
// input and the error stream (where the question goes) are terminals.
// Only then does a run above -max-estimate wait for -yes; tests replace
// it.
var interactive = func(stderr io.Writer) bool {
	return isTerminal(stderr) && term.IsTerminal(int(os.Stdin.Fd()))
}

// DefaultMaxEstimate is the default of -max-estimate.
const DefaultMaxEstimate = 30 * time.Minute

// costModelOf calibrates the cost model and says how long that took.
func costModelOf(ctx context.Context) (*sim.CostModel, time.Duration, error) {
	start := time.Now()
	cm, err := calibrate(ctx)
	return cm, time.Since(start), err
}

// runPlan is `fringe plan SPEC.toml`: the tasks of a spec and their
// estimated cost, without running anything.
func runPlan(ctx context.Context, c *command, args []string, stdout, stderr io.Writer) error {
	fs := newFlags(c, stdout)
	workers := fs.Int("workers", runtime.NumCPU(), "concurrent tasks the wall-clock estimate assumes (as fringe run -workers)")
	shard := fs.String("shard", "", "estimate only shard `i/n` of the tasks (as fringe run -shard)")
	cells := fs.Bool("cells", false, "also list every (dataset, pipeline, model) cell")
	maxEst := fs.Duration("max-estimate", DefaultMaxEstimate, "say how to make the run faster when its wall-clock estimate is above this (where fringe run on a terminal asks for -yes)")
	pos, err := parse(fs, args, stderr)
	if err != nil {
		return helpOK(err)
	}
	if len(pos) != 1 {
		return usagef("plan takes exactly one spec file (see 'fringe plan -h')")
	}
	if *workers < 1 {
		return usagef("-workers must be at least 1, got %d", *workers)
	}
	s, err := spec.Load(pos[0])
	if err != nil {
		return err
	}
	pl, err := plan.New(s)
	if err != nil {
		return err
	}
	var sh plan.Shard
	if *shard != "" {
		if sh, err = plan.ParseShard(*shard); err != nil {
			return err
		}
	}
	tasks, err := pl.ShardTasks(sh)
	if err != nil {
		return err
	}
	cm, took, err := costModelOf(ctx)
	if err != nil {
		return err
	}
	est, err := pl.Estimate(cm, tasks)
	if err != nil {
		return err
	}
	for _, w := range s.Warnings {
		fmt.Fprintln(stderr, "fringe: warning:", w)
	}
	return writePlan(stdout, pl, est, planInfo{spec: pos[0], shard: *shard, workers: *workers, calibration: took, cells: *cells, maxEst: *maxEst, cm: cm, tasks: tasks})
}

type planInfo struct {
	spec, shard string
	workers     int
	calibration time.Duration
	cells       bool
	maxEst      time.Duration // hints above this wall-clock estimate (0: always)
	cm          *sim.CostModel
	tasks       []int // the tasks estimated
}

// writePlan prints the plan table: structure fixed, times this machine's.
func writePlan(w io.Writer, pl *plan.Plan, est *plan.Estimate, in planInfo) error {
	s := pl.Spec
	of := ""
	if in.shard != "" {
		of = fmt.Sprintf(" (shard %s of the run's %d)", in.shard, len(pl.Tasks))
	}
	fmt.Fprintf(w, "spec %s (%s): %s, %s, %s; cross-validation %s\n", s.Name, in.spec,
		count(len(pl.Datasets), "dataset"), count(len(s.Pipelines), "pipeline"), count(len(s.Models), "model"), cvText(s.CV))
	fmt.Fprintf(w, "%s%s, %s\n", count(est.Tasks, "task"), of, count(est.Fits, "model fit"))
	fmt.Fprintf(w, "cost model: calibrated on this machine in %s; times are CPU time of one thread, good to a small factor\n\n", fmtDuration(in.calibration))
	cols := []string{"tasks", "fits", "qubits", "CNOT", "1-qubit", "simulator", "estimate", "longest task"}
	right := []bool{false, false, true, true, true, true, true, false, true, true}
	cells := func(c plan.Cost) []string {
		q, cx, one := "–", "–", "–"
		if c.Circuit {
			q, cx, one = fmt.Sprint(c.Qubits), fmt.Sprint(c.CNOT), fmt.Sprint(c.SingleQubit)
		}
		simName := c.Simulator
		if simName == "" {
			simName = "–"
		}
		t, longest := "not estimated", "–"
		if c.Estimated {
			t, longest = fmtDuration(c.CPU), fmtDuration(c.Longest)
		}
		return []string{fmt.Sprint(c.Tasks), fmt.Sprint(c.Fits), q, cx, one, simName, t, longest}
	}
	rows := [][]string{append([]string{"model", "kind"}, cols...)}
	for _, m := range est.Models {
		rows = append(rows, append([]string{m.Name, m.Kind}, cells(m.Cost)...))
	}
	total := est.Cost
	total.Circuit, total.Simulator = false, ""
	rows = append(rows, append([]string{"total", ""}, cells(total)...))
	if err := writeTable(w, rows, right); err != nil {
		return err
	}
	if in.cells {
		fmt.Fprintf(w, "\nby cell:\n")
		rows = [][]string{append([]string{"dataset", "pipeline", "model"}, cols...)}
		for _, c := range est.Cells {
			rows = append(rows, append([]string{pl.Datasets[c.Dataset].Name, s.Pipelines[c.Pipeline], s.Models[c.Model].Name}, cells(c.Cost)...))
		}
		if err := writeTable(w, rows, append([]bool{false}, right...)); err != nil {
			return err
		}
	}
	fmt.Fprintln(w)
	fmt.Fprintln(w, estimateLine(est, in.workers, false))
	if len(est.NotEstimated) > 0 {
		var reasons []string
		names := map[string][]string{}
		for _, m := range est.Models {
			if !m.Estimated {
				if names[m.Why] == nil {
					reasons = append(reasons, m.Why)
				}
				names[m.Why] = append(names[m.Why], m.Name)
			}
		}
		var why []string
		for _, r := range reasons {
			why = append(why, fmt.Sprintf("%s (%s)", strings.Join(names[r], ", "), r))
		}
		fmt.Fprintf(w, "not estimated: %s\n", strings.Join(why, "; "))
	}
	if hints := fasterHints(in.cm, pl, in.tasks, est); len(hints) > 0 && est.Wall(in.workers) > in.maxEst {
		fmt.Fprintf(w, "above -max-estimate %s; to make it faster:\n", in.maxEst)
		for _, h := range hints {
			fmt.Fprintf(w, "  %s\n", h)
		}
	}
	_, err := fmt.Fprintln(w, "qubits and gates: the largest circuit of each model, counted as published (an upper bound on every test row's compiled circuit)")
	return err
}

// writeTable prints rows as columns two spaces apart, each padded to its
// widest cell (in runes), right-aligned where right says so; the first
// row is the header.
func writeTable(w io.Writer, rows [][]string, right []bool) error {
	width := make([]int, len(rows[0]))
	for _, r := range rows {
		for i, c := range r {
			width[i] = max(width[i], utf8.RuneCountInString(c))
		}
	}
	var b strings.Builder
	for _, r := range rows {
		line := ""
		for i, c := range r {
			pad := strings.Repeat(" ", width[i]-utf8.RuneCountInString(c))
			if i > 0 {
				line += "  "
			}
			if right[i] {
				line += pad + c
			} else {
				line += c + pad
			}
		}
		b.WriteString(strings.TrimRight(line, " ") + "\n")
	}
	_, err := io.WriteString(w, b.String())
	return err
}

// estimateLine sums an estimate up in one line (plan and run print it),
// naming the models without an estimate when names is set.
func estimateLine(est *plan.Estimate, workers int, names bool) string {
	what := fmt.Sprintf("%s (%s)", count(est.Tasks, "task"), count(est.Fits, "model fit"))
	if !est.Estimated {
		return fmt.Sprintf("estimate: %s; no model has a cost estimate", what)
	}
	time := fmt.Sprintf("about %s with %s (%s of CPU time)", fmtDuration(est.Wall(workers)), count(workers, "worker"), fmtDuration(est.CPU))
	if len(est.NotEstimated) == 0 {
		return fmt.Sprintf("estimate: %s, %s", what, time)
	}
	n := 0
	for _, m := range est.Models {
		if m.Estimated {
			n += m.Tasks
		}
	}
	line := fmt.Sprintf("estimate: %s; the %s of estimated models take %s", what, count(n, "task"), time)
	if names {
		line += "; not estimated: " + strings.Join(est.NotEstimated, ", ")
	}
	return line
}

// fasterHints says, for the models that dominate an estimate (at least a
// tenth of its CPU time, simulated gate by gate), which spec keys make
// them cheaper, each with the estimate of the model's tasks after that
// change alone (cm and tasks as given to Plan.Estimate); a change is
// named when it at least halves the model's estimate. Tuned models get
// the keys without estimates.
func fasterHints(cm *sim.CostModel, pl *plan.Plan, tasks []int, est *plan.Estimate) []string {
	var out []string
	for _, m := range est.Models {
		if !m.Estimated || est.CPU <= 0 || m.CPU*10 < est.CPU || m.Kind != "interference" || !simulated(m.Simulator) {
			continue
		}
		mm := pl.Spec.Models[m.Model]
		var ways []string
		for _, alt := range alternatives(pl, mm.Interference, m) {
			if mm.Grid != nil {
				ways = append(ways, alt.what)
				continue
			}
			t, err := estimateWith(cm, pl, m.Model, tasks, alt.change)
			if err != nil || t*2 > m.CPU {
				continue
			}
			ways = append(ways, fmt.Sprintf("%s: %s", alt.what, about(t)))
		}
		if len(ways) == 0 {
			continue
		}
		where := fmt.Sprintf("model[%d]", m.Model+1)
		if line := pl.Spec.LineOf(where); line > 0 {
			where = fmt.Sprintf("%s:%d %s", pl.Spec.File, line, where)
		}
		out = append(out, fmt.Sprintf("%s %s (%s of CPU time, %s): %s", where, m.Name, fmtDuration(m.CPU), m.Simulator, strings.Join(ways, "; or ")))
	}
	if len(out) > 0 {
		out = append(out, "or fewer datasets, [cv] folds or repeats, or more -workers")
	}
	return out
}

// alternative is one change of an interference model's keys.
type alternative struct {
	what   string
	change func(q *qkernel.Classifier)
}

// alternatives lists the changes that can make a gate-level interference
// model cheaper: closed-form channels, the other simulator, fewer
// trajectories, a smaller train_subset, the closed form of a noiseless
// circuit.
func alternatives(pl *plan.Plan, q *qkernel.Classifier, m plan.ModelCost) []alternative {
	var out []alternative
	if q.Mode == qkernel.ModeCircuit {
		out = append(out, alternative{`mode = "exact" (the same probabilities in closed form)`, func(q *qkernel.Classifier) { q.Mode, q.Method = qkernel.ModeExact, sim.Auto }})
	}
	if !q.Noise.IsZero() {
		out = append(out, alternative{`closed-form channels instead of gate-level noise (noise = { global_depolarizing = p, ancilla_dephasing = lambda, readout = [p01, p10] }, without depolarizing, amplitude_damping, phase_damping or simulator)`,
			func(q *qkernel.Classifier) { q.Noise, q.Method, q.Trajectories = sim.NoiseModel{}, sim.Auto, 0 }})
	}
	if strings.Contains(m.Simulator, "density matrix") && !q.Noise.IsZero() {
		out = append(out, alternative{fmt.Sprintf(`simulator = "trajectories" (%d trajectories unless trajectories = T is set)`, sim.DefaultTrajectories), func(q *qkernel.Classifier) { q.Method = sim.Trajectories }})
	}
	if strings.Contains(m.Simulator, "trajectories") {
		t := q.Trajectories
		if t == 0 {
			t = sim.DefaultTrajectories
		}
		if t >= 40 {
			out = append(out, alternative{fmt.Sprintf("trajectories = %d (now %d; the sampling error of a probability grows as 1/sqrt(T))", t/4, t), func(q *qkernel.Classifier) { q.Trajectories = t / 4 }})
		}
		if m.Qubits <= sim.MaxDensityQubits {
			out = append(out, alternative{`simulator = "density-matrix" (the exact noisy state; 4^n entries)`, func(q *qkernel.Classifier) { q.Method, q.Trajectories = sim.DensityMatrix, 0 }})
		}
	}
	classes := 2
	for _, d := range pl.Datasets {
		classes = max(classes, len(d.Data.Classes))
	}
	switch k := q.TrainSubset; {
	case k > 0 && k/2 >= classes:
		out = append(out, alternative{fmt.Sprintf("train_subset = %d (now %d; one index qubit fewer)", k/2, k), func(q *qkernel.Classifier) { q.TrainSubset = k / 2 }})
	case k == 0:
		n := max(8, 1<<bitsFor(classes))
		out = append(out, alternative{fmt.Sprintf("train_subset = %d (class-balanced subsets of %d training vectors per test row instead of the whole training part)", n, n), func(q *qkernel.Classifier) { q.TrainSubset = n }})
	}
	return out
}

// about writes an estimate in words: "about 3.2 s", "under 1 ms".
func about(d time.Duration) string {
	if d < time.Millisecond {
		return "under 1 ms"
	}
	return "about " + fmtDuration(d)
}

// bitsFor is ceil(log2 n) for n >= 1.
func bitsFor(n int) int {
	b := 0
	for 1<<b < n {
		b++
	}
	return b
}

// estimateWith is the estimated CPU time of model mi's tasks among tasks
// with its interference configuration changed by change.
func estimateWith(cm *sim.CostModel, pl *plan.Plan, mi int, tasks []int, change func(*qkernel.Classifier)) (time.Duration, error) {
	s := *pl.Spec
	s.Models = slices.Clone(s.Models)
	q := *s.Models[mi].Interference
	change(&q)
	if err := q.Validate(); err != nil {
		return 0, err
	}
	s.Models[mi].Interference = &q
	alt := *pl
	alt.Spec = &s
	var mine []int
	for _, ti := range tasks {
		if pl.Tasks[ti].Model == mi {
			mine = append(mine, ti)
		}
	}
	e, err := alt.Estimate(cm, mine)
	if err != nil {
		return 0, err
	}
	return e.CPU, nil
}

// simulated reports whether a Cost.Simulator names a gate-level simulator.
func simulated(s string) bool {
	return strings.Contains(s, "state vector") || strings.Contains(s, "density matrix") || strings.Contains(s, "trajectories")
}

// count writes "1 task", "3 tasks".
func count(n int, noun string) string {
	if n == 1 {
		return "1 " + noun
	}
	return fmt.Sprintf("%d %ss", n, noun)
}

func cvText(cv spec.CV) string {
	switch cv.Method {
	case spec.CVLeaveOneOut:
		return "leave-one-out"
	case spec.CVHoldout:
		return fmt.Sprintf("holdout (test fraction %g), %s", cv.TestFraction, count(cv.Repeats, "repeat"))
	}
	return fmt.Sprintf("stratified %d-fold, %s", cv.Folds, count(cv.Repeats, "repeat"))
}

// fmtDuration writes a duration for people: "<1 ms", "12 ms", "4.2 s",
// "3 min 05 s", "2 h 14 min".
func fmtDuration(d time.Duration) string {
	switch {
	case d < time.Millisecond:
		return "<1 ms"
	case d < time.Second:
		return fmt.Sprintf("%d ms", d.Milliseconds())
	case d < time.Minute:
		return fmt.Sprintf("%.1f s", d.Seconds())
	case d < time.Hour:
		s := int(d.Round(time.Second).Seconds())
		return fmt.Sprintf("%d min %02d s", s/60, s%60)
	}
	m := int(d.Round(time.Minute).Minutes())
	return fmt.Sprintf("%d h %02d min", m/60, m%60)
}
