package runner

import (
	"context"
	"encoding/csv"
	"errors"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
	"time"

	"gonum.org/v1/gonum/floats/scalar"

	"fringe/bench/input"
	"fringe/bench/internal/benchtest"
	"fringe/bench/modelkit"
	"fringe/bench/outdir"
	"fringe/bench/plan"
	"fringe/bench/spec"
	"fringe/datasets"
)

// TestExternalHelper is not a test of its own: run as a child process
// with arguments after "--" (see helperRun), the test binary plays an
// external classifier, so that the command kind can be tested without any
// interpreter. In an ordinary test run it skips.
func TestExternalHelper(t *testing.T) {
	var args []string
	for i, a := range os.Args {
		if a == "--" {
			args = os.Args[i+1:]
			break
		}
	}
	if len(args) < 4 {
		t.Skip("helper process for the command-model tests; runs only as a child")
	}
	os.Exit(helperMain(args[0], args[1:len(args)-3], args[len(args)-3], args[len(args)-2], args[len(args)-1]))
}

// helperRun is the run array of a model played by the test binary in the
// given mode with extra arguments.
func helperRun(mode string, extra ...string) string {
	parts := []string{strconv.Quote(os.Args[0]), `"-test.run=^TestExternalHelper$"`, `"--"`, strconv.Quote(mode)}
	for _, e := range extra {
		parts = append(parts, strconv.Quote(e))
	}
	return "[" + strings.Join(parts, ", ") + "]"
}

// helperMain is the external classifier played by the test binary: a
// 1-nearest-neighbour rule (the first of equally near training rows wins,
// as in baselines.KNN) whose output the mode spoils in one way or another.
func helperMain(mode string, extra []string, train, test, out string) int {
	readCSV := func(path string) [][]string {
		f, err := os.Open(path)
		if err != nil {
			fmt.Fprintln(os.Stderr, err)
			os.Exit(5)
		}
		defer f.Close()
		recs, err := csv.NewReader(f).ReadAll()
		if err != nil {
			fmt.Fprintln(os.Stderr, err)
			os.Exit(5)
		}
		return recs
	}
	switch mode {
	case "crash":
		for i := 1; i <= 12; i++ {
			fmt.Fprintf(os.Stderr, "diagnostic line %d\n", i)
		}
		return 3
	case "hang":
		time.Sleep(time.Minute)
		return 0
	case "noout":
		return 0
	case "garbage":
		os.WriteFile(out, []byte("hello world\nthis is not a table\n"), 0o644)
		return 0
	case "record":
		// Keep what the program was given, for the test to inspect.
		key := outdir.SafeName(os.Getenv("FRINGE_TASK"))
		dir := extra[0]
		os.WriteFile(filepath.Join(dir, key+".seed"), []byte(os.Getenv("FRINGE_SEED")), 0o644)
		for _, p := range [][2]string{{train, ".train.csv"}, {test, ".test.csv"}} {
			b, _ := os.ReadFile(p[0])
			os.WriteFile(filepath.Join(dir, key+p[1]), b, 0o644)
		}
	}
	tr, te := readCSV(train), readCSV(test)
	var classes []string
	for _, r := range tr[1:] {
		found := false
		for _, c := range classes {
			found = found || c == r[1]
		}
		if !found {
			classes = append(classes, r[1])
		}
	}
	num := func(s []string) []float64 {
		v := make([]float64, len(s))
		for i, x := range s {
			v[i], _ = strconv.ParseFloat(x, 64)
		}
		return v
	}
	f, err := os.Create(out)
	if err != nil {
		fmt.Fprintln(os.Stderr, err)
		return 5
	}
	defer f.Close()
	w := csv.NewWriter(f)
	head := []string{"row", "predicted"}
	for _, c := range classes {
		head = append(head, "prob_"+c)
	}
	if mode == "badheader" {
		head[1] = "prediction"
	}
	w.Write(head)
	rows := te[1:]
	switch mode {
	case "missing":
		rows = rows[:len(rows)-1]
	case "repeat":
		rows = append(rows, rows[0])
	}
	for _, r := range rows {
		x := num(r[1:])
		best, bestD := -1, 0.0
		for i, t := range tr[1:] {
			xt := num(t[2:])
			d := 0.0
			for j := range x {
				d += (x[j] - xt[j]) * (x[j] - xt[j])
			}
			if best < 0 || d < bestD {
				best, bestD = i, d
			}
		}
		pred := tr[1+best][1]
		if mode == "unknown" {
			pred = "tulip"
		}
		rec := []string{r[0], pred}
		for _, c := range classes {
			p := "0"
			if c == pred {
				p = "1"
			}
			if mode == "badprob" {
				p = "1.7"
			}
			rec = append(rec, p)
		}
		w.Write(rec)
	}
	w.Flush()
	return 0
}

const commandSpec = `
name = "command-check"
seed = 3
pipelines = ["std"]
datasets = ["iris"]
[cv]
folds = 5
[[model]]
kind = "knn"
k = 1
[[model]]
kind = "command"
name = "helper"
run = %s
%s
`

func commandPlan(t *testing.T, run, extra string) *plan.Plan {
	t.Helper()
	return benchtest.Plan(t, "t.toml", fmt.Sprintf(commandSpec, run, extra))
}

// TestCommandMatchesKNN runs a 1-nearest-neighbour program through the
// command kind and checks its predictions against the knn model with k = 1
// on the same folds (the same rule: every prediction must agree), and its
// probability columns in the records.
func TestCommandMatchesKNN(t *testing.T) {
	t.Setenv("TMPDIR", t.TempDir())
	p := commandPlan(t, helperRun("1nn"), "timeout = 60")
	res, err := Execute(context.Background(), p, Options{Workers: 2})
	if err != nil {
		t.Fatal(err)
	}
	preds, _, _ := Records(p, res)
	byModel := map[string]map[string]string{}
	for _, pr := range preds {
		if byModel[pr.Model] == nil {
			byModel[pr.Model] = map[string]string{}
		}
		byModel[pr.Model][fmt.Sprintf("%d/%d/%d", pr.Repeat, pr.Fold, pr.Row)] = pr.Predicted
		if pr.Model == "helper" {
			if len(pr.Probs) != 3 || !math.IsNaN(pr.PAcc) || pr.Shots != 0 || pr.Exact != "" {
				t.Fatalf("helper record %+v: want 3 probabilities, no p_acc, shots or exact decision", pr)
			}
			for k, v := range pr.Probs {
				want := 0.0
				if p.Datasets[0].Data.Classes[k] == pr.Predicted {
					want = 1
				}
				// The program writes the literals 0 and 1.
				if !scalar.EqualWithinAbsOrRel(v, want, 0, 0) {
					t.Fatalf("helper record row %d: probs %v for prediction %s", pr.Row, pr.Probs, pr.Predicted)
				}
			}
		}
	}
	knn, ext := byModel["knn-k1"], byModel["helper"]
	if len(knn) != 150 || len(ext) != 150 {
		t.Fatalf("%d knn and %d command predictions, want 150 each", len(knn), len(ext))
	}
	for k, v := range knn {
		if ext[k] != v {
			t.Errorf("repeat/fold/row %s: command predicts %s, knn k=1 %s", k, ext[k], v)
		}
	}
	if left, _ := filepath.Glob(filepath.Join(os.Getenv("TMPDIR"), "fringe-task-*")); len(left) > 0 {
		t.Errorf("temporary folders left after a successful run: %v", left)
	}
}

// TestCommandInputs checks what the program is given: FRINGE_SEED is the
// task's model seed, TRAIN and TEST carry the task's rows with the feature
// names after the pipeline, and their values read back to exactly the
// transformed matrices.
func TestCommandInputs(t *testing.T) {
	t.Setenv("TMPDIR", t.TempDir())
	rec := t.TempDir()
	p := benchtest.Plan(t, "t.toml", fmt.Sprintf(`
name = "inputs"
seed = 8
pipelines = ["std+lift(1)"]
[[dataset]]
name = "wine"
classes = ["class_0", "class_2"]
[cv]
folds = 3
[[model]]
kind = "command"
name = "rec"
run = %s
`, helperRun("record", rec)))
	if _, err := Execute(context.Background(), p, Options{Workers: 2}); err != nil {
		t.Fatal(err)
	}
	d := p.Datasets[0]
	pipe, err := datasets.ParsePipeline(p.Spec.Pipelines[0])
	if err != nil {
		t.Fatal(err)
	}
	names := pipe.FeatureNames(d.Data.Features)
	if names[len(names)-1] != "lift" || len(names) != 14 {
		t.Fatalf("feature names after std+lift(1): %v", names)
	}
	for _, task := range p.Tasks {
		key := outdir.SafeName(p.Key(task))
		seed, err := os.ReadFile(filepath.Join(rec, key+".seed"))
		if err != nil {
			t.Fatal(err)
		}
		if string(seed) != strconv.FormatUint(p.ModelSeed(task), 10) {
			t.Errorf("task %s: FRINGE_SEED %s, want %d", p.Key(task), seed, p.ModelSeed(task))
		}
		sp := d.Splits[task.Split]
		Xtr, ytr, rowsTr := plan.Gather(d.Data, sp.Train)
		Xte, _, rowsTe := plan.Gather(d.Data, sp.Test)
		Ztr, err := pipe.FitTransform(Xtr, rowsTr)
		if err != nil {
			t.Fatal(err)
		}
		Zte, err := pipe.Transform(Xte, rowsTe)
		if err != nil {
			t.Fatal(err)
		}
		for _, part := range []struct {
			suffix string
			head   []string
			rows   []int
			labels []int
			Z      interface{ RawRowView(int) []float64 }
		}{
			{".train.csv", append([]string{"row", "label"}, names...), rowsTr, ytr, Ztr},
			{".test.csv", append([]string{"row"}, names...), rowsTe, nil, Zte},
		} {
			f, err := os.Open(filepath.Join(rec, key+part.suffix))
			if err != nil {
				t.Fatal(err)
			}
			recs, err := csv.NewReader(f).ReadAll()
			f.Close()
			if err != nil {
				t.Fatal(err)
			}
			if strings.Join(recs[0], ",") != strings.Join(part.head, ",") {
				t.Fatalf("%s%s header %v, want %v", key, part.suffix, recs[0], part.head)
			}
			if len(recs)-1 != len(part.rows) {
				t.Fatalf("%s%s: %d rows, want %d", key, part.suffix, len(recs)-1, len(part.rows))
			}
			skip := 1
			if part.labels != nil {
				skip = 2
			}
			for i, r := range recs[1:] {
				if r[0] != strconv.Itoa(part.rows[i]) {
					t.Fatalf("%s%s line %d: row %s, want %d", key, part.suffix, i+2, r[0], part.rows[i])
				}
				if part.labels != nil && r[1] != d.Data.Classes[part.labels[i]] {
					t.Fatalf("%s%s line %d: label %s, want %s", key, part.suffix, i+2, r[1], d.Data.Classes[part.labels[i]])
				}
				for j, s := range r[skip:] {
					v, err := strconv.ParseFloat(s, 64)
					// Shortest round-trip formatting must read back to
					// the very same float64: no tolerance.
					if err != nil || !scalar.EqualWithinAbsOrRel(v, part.Z.RawRowView(i)[j], 0, 0) {
						t.Fatalf("%s%s line %d column %d: %q, want %v", key, part.suffix, i+2, j+skip, s, part.Z.RawRowView(i)[j])
					}
				}
			}
		}
	}
}

// TestCommandFailures checks that a program that crashes, hangs past its
// timeout, writes nothing or writes garbage fails the run with an error
// that is not an input error and names the model, the task and what went
// wrong (with the last lines of stderr), and that the temporary folder of
// the failed task is kept and named.
func TestCommandFailures(t *testing.T) {
	cases := []struct {
		mode    string
		timeout string
		want    []string
		not     []string
	}{
		{"crash", "", []string{"exited with status 3", "diagnostic line 12", "diagnostic line 3 |"}, []string{"diagnostic line 2 |"}},
		{"hang", "timeout = 0.3", []string{"did not finish within its timeout of 0.3 s"}, nil},
		{"noout", "", []string{"wrote no output file"}, nil},
		{"garbage", "", []string{"out.csv:1", `unexpected column "hello world"`}, nil},
		{"badheader", "", []string{"out.csv:1", `unexpected column "prediction"`}, nil},
		{"missing", "", []string{"lacks 1 of the 30 test rows"}, nil},
		{"repeat", "", []string{"appears twice"}, nil},
		{"unknown", "", []string{`predicted class "tulip" is unknown`, "setosa, versicolor, virginica"}, nil},
		{"badprob", "", []string{`prob_setosa = "1.7" is not a probability`}, nil},
	}
	for _, c := range cases {
		t.Run("mode="+c.mode, func(t *testing.T) {
			tmp := t.TempDir()
			t.Setenv("TMPDIR", tmp)
			p := commandPlan(t, helperRun(c.mode), c.timeout)
			start := time.Now()
			_, err := Execute(context.Background(), p, Options{Workers: 1})
			if err == nil {
				t.Fatal("run succeeded")
			}
			if time.Since(start) > 20*time.Second {
				t.Errorf("failure took %v", time.Since(start))
			}
			if errors.Is(err, input.ErrBad) {
				t.Errorf("a failing program is a failed run, not bad input: %v", err)
			}
			var ce *modelkit.CommandError
			if !errors.As(err, &ce) {
				t.Fatalf("error %v is not a *modelkit.CommandError", err)
			}
			msg := err.Error()
			want := append([]string{"model helper", "task iris/std/helper/0/"}, c.want...)
			for _, w := range want {
				if !strings.Contains(msg, w) {
					t.Errorf("message lacks %q:\n%s", w, msg)
				}
			}
			for _, w := range c.not {
				if strings.Contains(msg, w) {
					t.Errorf("message holds %q:\n%s", w, msg)
				}
			}
			if strings.Contains(msg, "\n") {
				t.Errorf("message spans several lines:\n%s", msg)
			}
			if !strings.HasPrefix(ce.Dir, tmp) || !strings.Contains(msg, ce.Dir) {
				t.Errorf("kept folder %q not under TMPDIR %s or not named", ce.Dir, tmp)
			}
			for _, f := range []string{"train.csv", "test.csv"} {
				if _, err := os.Stat(filepath.Join(ce.Dir, f)); err != nil {
					t.Errorf("kept folder lacks %s: %v", f, err)
				}
			}
		})
	}
}

// TestCommandCancel checks that stopping the run stops a running program
// at once and removes its temporary folder.
func TestCommandCancel(t *testing.T) {
	tmp := t.TempDir()
	t.Setenv("TMPDIR", tmp)
	p := commandPlan(t, helperRun("hang"), "")
	ctx, cancel := context.WithCancel(context.Background())
	time.AfterFunc(300*time.Millisecond, cancel)
	start := time.Now()
	// A grace period of 1 s: the hanging programs are killed when it ends.
	_, err := Execute(ctx, p, Options{Workers: 2, Grace: time.Second})
	if !errors.Is(err, context.Canceled) {
		t.Fatalf("error %v, want context.Canceled", err)
	}
	var ie *InterruptedError
	if !errors.As(err, &ie) || ie.Abandoned != 2 {
		t.Errorf("error %v, want an InterruptedError with the 2 hanging tasks abandoned", err)
	}
	if d := time.Since(start); d > 15*time.Second {
		t.Errorf("cancelled run took %v", d)
	}
	if left, _ := filepath.Glob(filepath.Join(tmp, "fringe-task-*")); len(left) > 0 {
		t.Errorf("temporary folders left after cancellation: %v", left)
	}
}

// TestExternalSpecErrors checks the spec keys of the two kinds.
func TestExternalSpecErrors(t *testing.T) {
	for _, c := range []struct {
		model, want string
	}{
		{`kind = "command"`, "model[1].run"},
		{`kind = "command"` + "\nrun = []", "model[1].run"},
		{`kind = "command"` + "\nrun = [\"x\", 3]", "model[1].run"},
		{`kind = "command"` + "\nrun = \"python3 x.py\"", "model[1].run"},
		{`kind = "command"` + "\nrun = [\"x\"]\ntimeout = -1", "model[1].timeout"},
		{`kind = "command"` + "\nrun = [\"x\"]\nfile = \"y\"", "model[1].file"},
		{`kind = "counts"`, "model[1].file"},
		{`kind = "counts"` + "\nfile = \"m.csv\"\ntrain_subset = 0", "model[1].train_subset"},
		{`kind = "counts"` + "\nfile = \"m.csv\"\nshots = 10", "model[1].shots"},
	} {
		src := "name = \"e\"\nseed = 1\ndatasets = [\"iris\"]\n[[model]]\n" + c.model + "\n"
		_, err := spec.Parse("e.toml", []byte(src))
		if err == nil || !errors.Is(err, input.ErrBad) || !strings.Contains(err.Error(), c.want) {
			t.Errorf("model %q: error %v, want an input error naming %s", c.model, err, c.want)
		}
	}
	s, err := spec.Parse("ok.toml", []byte(`name = "ok"
seed = 1
datasets = ["iris"]
[[model]]
kind = "command"
run = ["python3", "tools/my classifier.py"]
[[model]]
kind = "counts"
file = "runs/measured.csv"
balance = true
train_subset = 8
`))
	if err != nil {
		t.Fatal(err)
	}
	if s.Models[0].Name != "command-my_classifier" || s.Models[1].Name != "counts-measured-k8-balanced" {
		t.Errorf("default labels %q, %q", s.Models[0].Name, s.Models[1].Name)
	}
}

// TestShutdownBounded: a run of slow gate-level noisy tasks (the density
// matrix of 11 qubits) that is stopped returns promptly, whatever the
// grace: at once with a negative grace, and as soon as Abandon is closed
// with a long one; the tasks in flight are reported abandoned. Before, a
// stopped run waited for every task in flight to finish.
func TestShutdownBounded(t *testing.T) {
	p := benchtest.Plan(t, "slow.toml", `
name = "slow"
seed = 1
datasets = ["wine"]
pipelines = ["std+l2"]
[cv]
folds = 3
[[model]]
kind = "interference"
mode = "noisy"
train_subset = 16
simulator = "density-matrix"
noise = { depolarizing = [0.001, 0.01] }
`)
	for _, c := range []struct {
		name    string
		grace   time.Duration
		abandon bool
	}{{"no grace", -1, false}, {"second interrupt", time.Hour, true}} {
		t.Run(c.name, func(t *testing.T) {
			ctx, cancel := context.WithCancel(context.Background())
			ab := make(chan struct{})
			time.AfterFunc(200*time.Millisecond, func() {
				cancel()
				if c.abandon {
					time.AfterFunc(100*time.Millisecond, func() { close(ab) })
				}
			})
			start := time.Now()
			_, err := Execute(ctx, p, Options{Workers: 2, Grace: c.grace, Abandon: ab})
			var ie *InterruptedError
			if !errors.As(err, &ie) || !errors.Is(err, context.Canceled) || ie.Abandoned == 0 {
				t.Fatalf("error %v, want an InterruptedError with tasks abandoned", err)
			}
			// A watchdog, not a speed claim: one task takes minutes here.
			if d := time.Since(start); d > 30*time.Second {
				t.Errorf("stopped run took %v", d)
			}
		})
	}
}
