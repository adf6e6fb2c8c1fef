package runner

import (
	"bytes"
	"context"
	"encoding/csv"
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"fringe/bench/internal/benchtest"
	"fringe/results"
)

// hostileCSV is a small invented dataset whose class names would run as
// spreadsheet formulas, or are outside what pdflatex's default fonts hold
// (Greek, CJK), and whose feature names do the same.
func hostileCSV(t *testing.T, dir string) string {
	t.Helper()
	var b strings.Builder
	b.WriteString("=f1,+f2,label\n")
	classes := []string{"=HYPERLINK(1+1)", "-1", "@sum", "αβγ", "中文"}
	for i := 0; i < 40; i++ {
		c := i % len(classes)
		b.WriteString(strconv.Itoa(c*3+i%4+1) + "," + strconv.Itoa(10-c+i%3) + "," + classes[c] + "\n")
	}
	path := filepath.Join(dir, "hostile.csv")
	if err := os.WriteFile(path, []byte(b.String()), 0o644); err != nil {
		t.Fatal(err)
	}
	return path
}

// TestSafeTextInEveryOutput runs a spec on hostileCSV and checks that no
// text cell of any CSV file of the run directory would run as a formula
// (a leading apostrophe neutralises it; "-1" is a number and stays), that
// the directory verifies (the readers undo the neutralisation exactly),
// that summary.tex is pure ASCII (its \label keys too, although the
// spec's name holds % # } ~) although the dataset is shown under a
// Greek name and a model under a CJK one (the class names appear in the
// CSV files only), that the manifest's warnings say how the CJK name was
// written, and, where pdflatex is installed, that summary-standalone.tex
// compiles.
func TestSafeTextInEveryOutput(t *testing.T) {
	work := t.TempDir()
	hostileCSV(t, work)
	s := benchtest.Spec(t, filepath.Join(work, "hostile.toml"), `
name = "hostile%1#}~"
seed = 2
pipelines = ["std+l2"]
[[dataset]]
name = "hostile.csv"
as = "δεδομένα"
[cv]
folds = 4
[[model]]
kind = "interference"
[[model]]
kind = "knn"
k = 3
name = "近邻"
`)
	s.Dir = work
	p := benchtest.PlanOf(t, s)
	res, err := Execute(context.Background(), p, Options{Workers: 2})
	if err != nil {
		t.Fatal(err)
	}
	dir := filepath.Join(work, "run")
	if err := Write(p, dir, res, RunInfo{Workers: 2}, nil); err != nil {
		t.Fatal(err)
	}
	csvs, _ := filepath.Glob(filepath.Join(dir, "*.csv"))
	if len(csvs) < 5 {
		t.Fatalf("only %d CSV files", len(csvs))
	}
	for _, path := range csvs {
		data, _ := os.ReadFile(path)
		recs, err := csv.NewReader(bytes.NewReader(data)).ReadAll()
		if err != nil {
			t.Fatalf("%s: %v", path, err)
		}
		for i, rec := range recs {
			for j, cell := range rec {
				if results.FormulaLike(cell) {
					t.Errorf("%s:%d field %d: %q would run as a formula", filepath.Base(path), i+1, j+1, cell)
				}
			}
		}
	}
	preds, _ := os.ReadFile(filepath.Join(dir, "predictions.csv"))
	for _, want := range []string{"'=HYPERLINK(1+1)", ",-1,", "'@sum", "αβγ", "中文"} {
		if !bytes.Contains(preds, []byte(want)) {
			t.Errorf("predictions.csv lacks %q", want)
		}
	}
	v, err := Verify(dir, VerifyOptions{})
	if err != nil || len(v.Problems) != 0 {
		t.Fatalf("verify: %v %v", err, v.Problems)
	}
	mdata, _ := os.ReadFile(filepath.Join(dir, "manifest.json"))
	if !bytes.Contains(mdata, []byte("summary.tex:")) || !bytes.Contains(mdata, []byte("U+8FD1")) {
		t.Errorf("the manifest's warnings do not say how the CJK names were written")
	}
	tex, _ := os.ReadFile(filepath.Join(dir, "summary.tex"))
	for _, r := range string(tex) {
		if r > 127 {
			t.Fatalf("summary.tex holds the non-ASCII %q, which pdflatex's default setup cannot typeset", r)
		}
	}
	if testing.Short() {
		return
	}
	pdflatex, err := exec.LookPath("pdflatex")
	if err != nil {
		t.Log("pdflatex not installed: compilation not checked")
		return
	}
	cmd := exec.Command(pdflatex, "-interaction=nonstopmode", "-halt-on-error", results.StandaloneName)
	cmd.Dir = dir
	if out, err := cmd.CombinedOutput(); err != nil {
		t.Fatalf("pdflatex on Greek and CJK class names: %v\n%s", err, out[max(0, len(out)-2000):])
	}
}
