package runner

import (
	"bytes"
	"context"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"fringe/bench/internal/benchtest"
	"fringe/bench/plan"
	"fringe/bench/report"
	"fringe/results"
)

// TestWriteRunDirectory runs a small spec with 1 and 2 workers and checks
// that every file but the manifest and timings is byte-identical,
// figures included, and that the report files and figures exist.
func TestWriteRunDirectory(t *testing.T) {
	s := benchtest.Spec(t, "test.toml", `
name = "small"
seed = 5
datasets = ["iris", "wine"]
pipelines = ["std+l2"]
[cv]
method = "stratified"
folds = 3
repeats = 2
[[model]]
kind = "interference"
[[model]]
kind = "knn"
k = 5
[[model]]
kind = "svm"
kernel = "rbf"
[[model]]
kind = "centroid"
`)
	dir := t.TempDir()
	var outs [2]string
	for i, w := range []int{1, 2} {
		p, err := plan.New(s)
		if err != nil {
			t.Fatal(err)
		}
		res, err := Execute(context.Background(), p, Options{Workers: w})
		if err != nil {
			t.Fatal(err)
		}
		outs[i] = filepath.Join(dir, []string{"a", "b"}[i])
		if err := Write(p, outs[i], res, RunInfo{Workers: w}, nil); err != nil {
			t.Fatal(err)
		}
	}
	for _, f := range []string{"summary.tex", "summary.md", "comparisons.csv", "summary.csv", "folds.csv", "predictions.csv",
		"figures/cd-std+l2.svg", "figures/cd-std+l2.pdf", "figures/cd-std+l2.png",
		"figures/kernel-profile.svg", "figures/kernel-profile.png", "figures/pacc-interference.svg", "figures/pacc-interference.png", "figures/pacc-interference.pdf"} {
		x, err := os.ReadFile(filepath.Join(outs[0], f))
		if err != nil {
			t.Fatal(err)
		}
		y, err := os.ReadFile(filepath.Join(outs[1], f))
		if err != nil {
			t.Fatal(err)
		}
		if !bytes.Equal(x, y) {
			t.Errorf("%s differs between -workers 1 and 2", f)
		}
	}
	md, _ := os.ReadFile(filepath.Join(outs[0], "summary.md"))
	for _, want := range []string{"stratified 3-fold cross-validation, 2 repeats; seed 5", "## Against the reference", "figures/kernel-profile.svg"} {
		if !strings.Contains(string(md), want) {
			t.Errorf("summary.md lacks %q", want)
		}
	}
	// The run reads back, and compares with itself without regression.
	run, err := results.ReadRun(outs[0])
	if err != nil {
		t.Fatal(err)
	}
	other, err := results.ReadRun(outs[1])
	if err != nil {
		t.Fatal(err)
	}
	rc, err := report.Compare(run, other, report.CompareOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if rc.Regressions != 0 || !strings.Contains(rc.Pairing, "the same in all 8 cells") {
		t.Errorf("self-comparison: %d regressions, pairing %q", rc.Regressions, rc.Pairing)
	}
}
