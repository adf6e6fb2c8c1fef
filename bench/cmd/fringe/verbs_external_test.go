package main

import (
	"fmt"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"

	"fringe/bench/internal/benchtest"
)

// python returns a Python 3 interpreter (python3 on PATH, else
// /usr/bin/python3) or skips the test: the example classifier needs
// nothing but the standard library.
func python(t *testing.T) string {
	t.Helper()
	if p, err := exec.LookPath("python3"); err == nil {
		if exec.Command(p, "-c", "import csv, sys").Run() == nil {
			return p
		}
	}
	if _, err := os.Stat("/usr/bin/python3"); err == nil {
		return "/usr/bin/python3"
	}
	t.Skip("no python3 on PATH or at /usr/bin/python3: the example classifier cannot run")
	return ""
}

// column returns the index of a named column.
func column(t *testing.T, head []string, name string) int {
	t.Helper()
	for i, h := range head {
		if h == name {
			return i
		}
	}
	t.Fatalf("no column %s in %v", name, head)
	return -1
}

// TestExampleClassifier runs scripts/example_classifier.py through fringe
// as a model of kind command and checks that it reproduces fringe's knn
// with k = 1 on the same folds (the script implements the same rule: every
// prediction must agree).
func TestExampleClassifier(t *testing.T) {
	py := python(t)
	script, err := filepath.Abs("../../../scripts/example_classifier.py")
	if err != nil {
		t.Fatal(err)
	}
	work := t.TempDir()
	t.Setenv("TMPDIR", t.TempDir())
	spec := filepath.Join(work, "ext.toml")
	os.WriteFile(spec, []byte(fmt.Sprintf(`
name = "ext"
seed = 17
pipelines = ["std", "minmax+l2"]
datasets = ["iris"]
[cv]
folds = 5
[[model]]
kind = "knn"
k = 1
[[model]]
kind = "command"
name = "example-1nn"
run = [%q, %q]
timeout = 120
`, py, script)), 0o644)
	out := filepath.Join(work, "out")
	code, _, stderr := runCmd(t, "", "run", spec, "-out", out, "-quiet", "-workers", "2")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	recs := benchtest.ReadCSV(t, filepath.Join(out, "predictions.csv"))
	head := recs[0]
	cm, cp, cr, cf, cpred, cprobs := column(t, head, "model"), column(t, head, "pipeline"), column(t, head, "row"), column(t, head, "fold"), column(t, head, "predicted"), column(t, head, "probs")
	knn, ext := map[string]string{}, map[string]string{}
	for _, r := range recs[1:] {
		key := r[cp] + "/" + r[cf] + "/" + r[cr]
		switch r[cm] {
		case "knn-k1":
			knn[key] = r[cpred]
		case "example-1nn":
			ext[key] = r[cpred]
			if strings.Count(r[cprobs], "1.000000") != 1 {
				t.Errorf("%s: probs %q, want one class at 1", key, r[cprobs])
			}
		}
	}
	if len(knn) != 300 || len(ext) != 300 {
		t.Fatalf("%d knn and %d example predictions, want 300 each", len(knn), len(ext))
	}
	for k, v := range knn {
		if ext[k] != v {
			t.Errorf("pipeline/fold/row %s: example predicts %s, knn k=1 %s", k, ext[k], v)
		}
	}
}

// TestExternalProgramFails checks that a program that crashes, hangs past
// its timeout or writes garbage fails the run with exit status 1 and a
// one-line message naming the model, the task and the end of its stderr;
// no run directory is written, and the finished tasks are kept for a
// resumed run.
func TestExternalProgramFails(t *testing.T) {
	py := python(t)
	cases := []struct {
		name, program, timeout string
		want                   []string
	}{
		{"crash", "import sys\nprint('reading', sys.argv[1], file=sys.stderr)\nraise ValueError('the model diverged')\n", "",
			[]string{"exited with status 1", "ValueError: the model diverged", "Traceback"}},
		{"hang", "import time\ntime.sleep(60)\n", "timeout = 0.5",
			[]string{"did not finish within its timeout of 0.5 s"}},
		{"garbage", "import sys\nopen(sys.argv[3], 'w').write('id;class\\n1;a\\n')\n", "",
			[]string{"out.csv:1", `unexpected column "id;class"`}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			work := t.TempDir()
			t.Setenv("TMPDIR", t.TempDir())
			prog := filepath.Join(work, "prog.py")
			os.WriteFile(prog, []byte(c.program), 0o644)
			spec := filepath.Join(work, "bad.toml")
			os.WriteFile(spec, []byte(fmt.Sprintf(`
name = "bad"
seed = 1
datasets = ["iris"]
pipelines = ["raw"]
[cv]
folds = 3
[[model]]
kind = "centroid"
[[model]]
kind = "command"
name = "mine"
run = [%q, "prog.py"]
%s
`, py, c.timeout)), 0o644)
			out := filepath.Join(work, "out")
			code, _, stderr := runCmd(t, "", "run", spec, "-out", out, "-quiet", "-workers", "1")
			if code != 1 {
				t.Fatalf("exit %d, want 1: %s", code, stderr)
			}
			msg := strings.TrimSpace(stderr)
			if strings.Contains(msg, "\n") {
				t.Errorf("message spans several lines:\n%s", msg)
			}
			for _, w := range append([]string{"model mine", "task iris/raw/mine/0/"}, c.want...) {
				if !strings.Contains(msg, w) {
					t.Errorf("message lacks %q:\n%s", w, msg)
				}
			}
			if _, err := os.Stat(out); err == nil {
				t.Errorf("a failed run left a run directory %s", out)
			}
			if !strings.Contains(msg, "finished tasks are kept in "+out+".partial") {
				t.Errorf("message does not say where the finished tasks are kept:\n%s", msg)
			}
		})
	}
}

// TestCountsWorkflow follows a user's steps: export the circuits of a spec,
// write outcome counts for every line of the index (here the same counts
// for every instance, so the expected records follow by hand), run the
// spec with a counts model; and checks that a counts file with missing
// rows or a wrong header is bad input that leaves nothing behind.
func TestCountsWorkflow(t *testing.T) {
	work := t.TempDir()
	spec := filepath.Join(work, "hw.toml")
	os.WriteFile(spec, []byte(`
name = "hw"
seed = 9
pipelines = ["std"]
[[dataset]]
name = "iris"
classes = ["setosa", "versicolor"]
[cv]
folds = 3
[[model]]
kind = "interference"
train_subset = 4
balance = true
[[model]]
kind = "counts"
name = "device"
file = "measured.csv"
train_subset = 4
balance = true
`), 0o644)
	circuits := filepath.Join(work, "circuits")
	code, stdout, stderr := runCmd(t, "", "circuit", "-export", circuits, spec)
	if code != 0 {
		t.Fatalf("export: exit %d: %s", code, stderr)
	}
	if !strings.Contains(stdout, "wrote 100 OpenQASM 3 programs") || !strings.Contains(stdout, "train") {
		t.Errorf("export summary:\n%s", stdout)
	}
	index := benchtest.ReadCSV(t, filepath.Join(circuits, "index.csv"))
	if len(index) != 101 {
		t.Fatalf("index has %d lines, want 101", len(index))
	}
	var good strings.Builder
	good.WriteString("dataset,repeat,fold,row,ancilla,class,count\n")
	for _, r := range index[1:] {
		if _, err := os.Stat(filepath.Join(circuits, r[0])); err != nil {
			t.Fatal(err)
		}
		// Columns file,dataset,pipeline,repeat,fold,row,...
		for _, o := range []string{"0,0,5", "0,1,3", "1,0,1", "1,1,1"} {
			fmt.Fprintf(&good, "%s,%s,%s,%s,%s\n", r[1], r[3], r[4], r[5], o)
		}
	}
	lines := strings.SplitAfter(good.String(), "\n")
	for _, c := range []struct {
		name, text string
		want       []string
	}{
		{"missing rows", strings.Join(lines[:len(lines)-5], ""), []string{"measured.csv", "no counts for dataset iris", "row " + index[len(index)-1][5]}},
		{"wrong header", "dataset,repeat,fold,row,outcome,count\n" + strings.Join(lines[1:], ""), []string{"measured.csv:1", `unexpected column "outcome"`}},
	} {
		t.Run(c.name, func(t *testing.T) {
			os.WriteFile(filepath.Join(work, "measured.csv"), []byte(c.text), 0o644)
			out := filepath.Join(work, "out")
			code, _, stderr := runCmd(t, "", "run", spec, "-out", out, "-quiet")
			if code != 2 {
				t.Fatalf("exit %d, want 2: %s", code, stderr)
			}
			msg := strings.TrimSpace(stderr)
			if strings.Contains(msg, "\n") {
				t.Errorf("message spans several lines:\n%s", msg)
			}
			for _, w := range append([]string{"model device"}, c.want...) {
				if !strings.Contains(msg, w) {
					t.Errorf("message lacks %q:\n%s", w, msg)
				}
			}
			for _, d := range []string{out, out + ".partial"} {
				if _, err := os.Stat(d); err == nil {
					t.Errorf("bad input left %s behind", d)
				}
			}
		})
	}

	os.WriteFile(filepath.Join(work, "measured.csv"), []byte(good.String()), 0o644)
	out := filepath.Join(work, "out")
	if code, _, stderr := runCmd(t, "", "run", spec, "-out", out, "-quiet"); code != 0 {
		t.Fatalf("run: exit %d: %s", code, stderr)
	}
	recs := benchtest.ReadCSV(t, filepath.Join(out, "predictions.csv"))
	head := recs[0]
	cm, cpred, cpacc, cshots, cprobs := column(t, head, "model"), column(t, head, "predicted"), column(t, head, "p_acc"), column(t, head, "shots"), column(t, head, "probs")
	n := 0
	for _, r := range recs[1:] {
		if r[cm] != "device" {
			continue
		}
		n++
		// Derived by hand: N = 10 shots, N_acc = 5 + 3 = 8, p_acc 0.8,
		// P(setosa | acc) = 5/8, P(versicolor | acc) = 3/8; setosa wins.
		if r[cpred] != "setosa" || r[cpacc] != "0.800000" || r[cshots] != "8" || r[cprobs] != "0.625000;0.375000" {
			t.Fatalf("counts record %v", r)
		}
	}
	if n != 100 {
		t.Errorf("%d counts records, want 100", n)
	}
	folds := benchtest.ReadCSV(t, filepath.Join(out, "folds.csv"))
	if ce := column(t, folds[0], "exact_disagreement"); folds[1][ce] == "" && folds[len(folds)-1][ce] == "" {
		t.Errorf("folds.csv has no exact disagreement for the counts model")
	}
}

// TestExportUsage checks the usage rules of circuit -export.
func TestExportUsage(t *testing.T) {
	work := t.TempDir()
	spec := filepath.Join(work, "s.toml")
	os.WriteFile(spec, []byte("name = \"s\"\nseed = 1\ndatasets = [\"iris\"]\n[[model]]\nkind = \"centroid\"\n[[model]]\nkind = \"interference\"\ntrain_subset = 4\n"), 0o644)
	for _, c := range []struct {
		args []string
		code int
		want string
	}{
		{[]string{"circuit", "-export", filepath.Join(work, "c")}, 2, "exactly one spec"},
		{[]string{"circuit", "-export", filepath.Join(work, "c"), "-dataset", "wine", spec}, 2, "-dataset"},
		{[]string{"circuit", "-model", "x"}, 2, "-model applies with -export only"},
		{[]string{"circuit", "-export", filepath.Join(work, "c"), "-model", "centroid", spec}, 2, "kind centroid"},
		{[]string{"circuit", "-export", filepath.Join(work, "c"), spec}, 0, ""},
	} {
		code, _, stderr := runCmd(t, "", c.args...)
		if code != c.code || !strings.Contains(stderr, c.want) {
			t.Errorf("fringe %v: exit %d (want %d), stderr %q (want %q)", c.args, code, c.code, stderr, c.want)
		}
	}
	code, out, _ := runCmd(t, "", "list")
	if code != 0 || !strings.Contains(out, "command") || !strings.Contains(out, "counts") || !strings.Contains(out, "FRINGE_SEED") {
		t.Errorf("fringe list does not describe the command and counts kinds:\n%s", out)
	}
	if n := len(benchtest.ReadCSV(t, filepath.Join(work, "c", "index.csv"))); n != 151 {
		t.Errorf("export of iris under the default 10 folds: %d index lines, want 151 (header and one per row)", n)
	}
}
