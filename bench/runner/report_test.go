package runner

import (
	"bytes"
	"context"
	"strings"
	"testing"

	"fringe/bench/internal/benchtest"
	"fringe/bench/plan"
)

// reportRunBase is a small run of three datasets, two pipelines and five
// models (one tuned); %s is replaced by labels and a [report] table.
const reportRunBase = `name = "rep"
seed = 11
datasets = ["iris", "wine", "breast-cancer"]
pipelines = ["std+l2", "l2"]
[cv]
method = "stratified"
folds = 3
[[model]]
kind = "interference"
balance = true
%[1]s
[[model]]
kind = "interference"
mode = "shots"
shots = 64
balance = true
%[2]s
[[model]]
kind = "knn"
k = [1, 5]
%[3]s
[[model]]
kind = "logreg"
[[model]]
kind = "centroid"
%[4]s
`

// renderSpec runs a spec with 2 workers and renders its run directory
// without figures, by file name.
func renderSpec(t *testing.T, src string) map[string][]byte {
	t.Helper()
	p, err := plan.New(benchtest.Spec(t, "rep.toml", src))
	if err != nil {
		t.Fatal(err)
	}
	res, err := Execute(context.Background(), p, Options{Workers: 2})
	if err != nil {
		t.Fatal(err)
	}
	c, err := renderRun(p, res, true, 1)
	if err != nil {
		t.Fatal(err)
	}
	out := map[string][]byte{}
	for _, f := range c.files {
		out[f.Name] = f.Data
	}
	return out
}

func fill(a, b, c, d string) string {
	r := strings.NewReplacer("%[1]s", a, "%[2]s", b, "%[3]s", c, "%[4]s", d)
	return r.Replace(reportRunBase)
}

// TestReportOptionsInRunDirectory runs one experiment three ways: as is;
// with a [report] that restates the defaults (every file byte-identical:
// the options are what runs used before [report] existed); and with
// labels and a [report] that selects, reorders, omits and captions. The
// CSV files never change and keep the generated model names; summary.tex
// and summary.md show the labels, in the chosen order, without the
// omitted tables.
func TestReportOptionsInRunDirectory(t *testing.T) {
	if testing.Short() {
		t.Skip("three small runs")
	}
	plain := renderSpec(t, fill("", "", "", ""))
	defaults := renderSpec(t, fill("", "", "", "[report]\nlayout = \"page\"\nsplit = \"auto\"\ndigits = 3\n"))
	for name, data := range plain {
		if !bytes.Equal(defaults[name], data) {
			t.Errorf("%s differs under a [report] of the defaults", name)
		}
	}
	chosen := renderSpec(t, fill(`label = "QC exact"`, `label = "QC, 64 shots"`, `label = "k-NN (tuned k)"`, `
[report]
models = ["knn-tuned-k", "interference-shots64-balanced", "interference-balanced"]
pipelines = ["std+l2"]
datasets = ["wine", "iris"]
metrics = ["balanced_accuracy"]
omit = ["ranks", "wilcoxon"]
[report.summary]
caption = "Balanced accuracy of three models"
label = "tab:three"
[report.modes]
label = "tab:three-modes"
`))
	// Data files: identical, generated names only.
	for _, name := range []string{"predictions.csv", "folds.csv", "summary.csv", "comparisons.csv", "tuning.csv"} {
		if !bytes.Equal(chosen[name], plain[name]) {
			t.Errorf("%s changes with labels and [report]", name)
		}
		for _, label := range []string{"QC exact", "QC, 64 shots", "k-NN (tuned k)"} {
			if bytes.Contains(chosen[name], []byte(label)) {
				t.Errorf("%s holds the label %q", name, label)
			}
		}
		if !bytes.Contains(chosen[name], []byte("knn-tuned-k")) {
			t.Errorf("%s lacks the generated name knn-tuned-k", name)
		}
	}
	tex := string(chosen["summary.tex"])
	md := string(chosen["summary.md"])
	if i := strings.Index(md, "## Warnings"); i >= 0 {
		md = md[:i] // warnings name cells by their generated names
	}
	for _, want := range []string{`\label{tab:three}`, `\caption{Balanced accuracy of three models. Mean with 95\%`, `\label{tab:three-modes}`,
		"QC exact", "QC, 64 shots", "k-NN (tuned k)", "Marks compare with all 5 models and 2 pipelines of the run; 3 models and 1 pipeline are shown."} {
		if !strings.Contains(tex, want) {
			t.Errorf("summary.tex lacks %q", want)
		}
	}
	for _, want := range []string{"| wine | std+l2 | k-NN (tuned k) |", "## Interference classifier across modes", "- k-NN (tuned k), wine, std+l2: "} {
		if !strings.Contains(md, want) {
			t.Errorf("summary.md lacks %q", want)
		}
	}
	// A model left out may still be named as the reference of a paired
	// test ("l2 / centroid"), never as a row.
	for _, absent := range []string{"interference-balanced", "interference-shots64-balanced", "knn-tuned-k", "breast-cancer", "Friedman", "Wilcoxon", "Macro", "\nl2 & ", "& centroid &"} {
		if strings.Contains(tex, absent) {
			t.Errorf("summary.tex shows %q, which the options leave out", absent)
		}
	}
	for _, absent := range []string{"interference-balanced |", "knn-tuned-k", "breast-cancer", "## Across datasets", "macro F1", "| l2 |"} {
		if strings.Contains(md, absent) {
			t.Errorf("summary.md shows %q, which the options leave out", absent)
		}
	}
	// Order: datasets wine then iris; models k-NN, QC 64 shots, QC exact
	// in the summary table (the first table of summary.tex).
	sum := tex[:strings.Index(tex, `\end{table}`)]
	order := []string{`\emph{wine}`, "k-NN (tuned k)", "QC, 64 shots", "QC exact", `\emph{iris}`, "k-NN (tuned k)", "QC, 64 shots", "QC exact"}
	at := 0
	for _, w := range order {
		i := strings.Index(sum[at:], w)
		if i < 0 {
			t.Fatalf("summary table: %q not found after offset %d, want the order %q:\n%s", w, at, order, sum)
		}
		at += i + len(w)
	}
	mdSum := md[strings.Index(md, "## Summary"):strings.Index(md, "## Interference classifier across modes")]
	rows := []string{"| wine | std+l2 | k-NN (tuned k) |", "| wine | std+l2 | QC, 64 shots |", "| wine | std+l2 | QC exact |", "| iris | std+l2 | k-NN (tuned k) |"}
	at = 0
	for _, w := range rows {
		i := strings.Index(mdSum[at:], w)
		if i < 0 {
			t.Fatalf("summary.md: row %q not in order %q:\n%s", w, rows, mdSum)
		}
		at += i + len(w)
	}
}
