package main

import (
	"bytes"
	"context"
	"os"
	"path/filepath"
	"regexp"
	"strings"
	"testing"
)

// runCmd drives the command in-process from dir and returns the exit
// status it would have, with stdout and stderr.
func runCmd(t *testing.T, dir string, args ...string) (int, string, string) {
	t.Helper()
	if dir != "" {
		t.Chdir(dir)
	}
	var out, errb bytes.Buffer
	err := run(context.Background(), args, &out, &errb)
	if err != nil {
		errb.WriteString("fringe: " + err.Error() + "\n")
	}
	return exitCode(err), out.String(), errb.String()
}

// TestBadInput checks the bad-input corpus: every case exits with status 2,
// prints a one-line message naming the file and line or the key at fault,
// and leaves no run directory behind.
func TestBadInput(t *testing.T) {
	bad, err := filepath.Abs("testdata/bad")
	if err != nil {
		t.Fatal(err)
	}
	cases := []struct {
		spec string
		want []string // substrings of the message
	}{
		{"empty.toml", []string{"empty.csv", "empty"}},
		{"header_only.toml", []string{"header_only.csv:1", "no data"}},
		{"ragged.toml", []string{"ragged.csv:4"}},
		{"nonnumeric.toml", []string{"nonnumeric.csv:3", "x2"}},
		{"nan.toml", []string{"nan.csv:3", "x2"}},
		{"inf.toml", []string{"inf.csv:4", "x2"}},
		{"one_class.toml", []string{"one_class.csv", "class"}},
		{"small_class.toml", []string{"small_class.toml", `class "c" has 2 members`, "3 folds"}},
		{"zero_row.toml", []string{"zero_row.csv:4", "row 2", "zero"}},
		{"unknown_key.toml", []string{"unknown_key.toml:4", "colour"}},
		{"unknown_model_key.toml", []string{"unknown_model_key.toml:7", "model[1].gama"}},
		{"unknown_kind.toml", []string{"unknown_kind.toml:7", "forest"}},
		{"k_too_large.toml", []string{"k_too_large.toml:9", "model[1].k", "k = 200"}},
		{"c_nonpositive.toml", []string{"c_nonpositive.toml:7", "model[1].C"}},
		{"logreg_c_negative.toml", []string{"logreg_c_negative.toml:6", "model[1].C"}},
		{"folds_lt2.toml", []string{"folds_lt2.toml:6", "cv.folds"}},
		{"unknown_dataset.toml", []string{"unknown_dataset.toml:3", "irises"}},
		{"unreadable_path.toml", []string{"no/such/file.csv"}},
		{"syntax.toml", []string{"syntax.toml:"}},
		{"unknown_step.toml", []string{"unknown_step.toml:4", "whiten"}},
		{"unknown_class.toml", []string{"unknown_class.toml", "tulip"}},
		{"missing.toml", []string{"missing.toml"}},
		{"noise_prob.toml", []string{"noise_prob.toml:7", "model[1].noise.depolarizing", "1.5"}},
		{"noise_key.toml", []string{"noise_key.toml:7", "model[1].noise.dephasing"}},
		{"shots_zero.toml", []string{"shots_zero.toml:7", "model[1].shots"}},
		{"too_many_qubits.toml", []string{"too_many_qubits.toml:7", "16 qubits", "at most 12", "trajectories"}},
		{"subset_large.toml", []string{"subset_large.toml:9", "model[1].train_subset", "500"}},
		{"subset_small.toml", []string{"subset_small.toml:8", "model[1].train_subset", "3 classes"}},
		{"control_char.toml", []string{"control_char.toml:6", "model[1].name", "U+0008"}},
		{"control_class.toml", []string{"control_class.toml:5", "dataset[1].classes", "U+0000"}},
		{"formula_name.toml", []string{"formula_name.toml:6", "model[1].name", "formula"}},
		{"formula_dataset.toml", []string{"formula_dataset.toml:5", "dataset[1].as", "formula"}},
		{"formula_spec.toml", []string{"formula_spec.toml:1", "key name", "formula"}},
		{"overflow.toml", []string{"overflow.csv:32", "overflows"}},
		{"pca_too_many.toml", []string{"pca_too_many.toml:4", "key pipelines", "pca(9)", "4 features"}},
		{"pca_fraction.toml", []string{"pca_fraction.toml:4", "pca(1.5)"}},
		{"grid_type.toml", []string{"grid_type.toml:6", "model[1].C", "value 2", "big"}},
		{"grid_empty.toml", []string{"grid_empty.toml:6", "model[1].k", "empty list"}},
		{"grid_value.toml", []string{"grid_value.toml:6", "model[1].C", "value 2 (-1)", "positive"}},
		{"tune_folds_class.toml", []string{"tune_folds_class.toml:8", "tune.folds", "9 inner folds", "members"}},
		{"tune_untuned.toml", []string{"tune_untuned.toml:4", "key tune", "no model is tuned"}},
		{"train_sizes.toml", []string{"train_sizes.toml:5", "cv.train_sizes", "value 1"}},
		{"report_model.toml", []string{"report_model.toml:8", "key report.models", `"svm-rbf-C1" is not a model`}},
		{"report_key.toml", []string{"report_key.toml:8", "key report.summary.colour", "caption, label"}},
		{"report_label.toml", []string{"report_label.toml:9", "key model[2].label", "also the label of model[1]"}},
		{"report_dataset.toml", []string{"report_dataset.toml:10", "key report.datasets", `shown as "wine-all"`}},
	}
	for _, c := range cases {
		t.Run(c.spec, func(t *testing.T) {
			checkRefused(t, []string{"run", filepath.Join(bad, c.spec), "-workers", "2"}, c.want)
		})
	}
	if n := len(cases); n < 15 {
		t.Fatalf("bad-input corpus has %d cases, want at least 15", n)
	}
	// Every spec of the corpus is a case: a fixture added without one
	// would never be run.
	specs, err := filepath.Glob(filepath.Join(bad, "*.toml"))
	if err != nil {
		t.Fatal(err)
	}
	// A .toml file another fixture names (a device description) is data,
	// not a case.
	var texts strings.Builder
	for _, path := range specs {
		b, err := os.ReadFile(path)
		if err != nil {
			t.Fatal(err)
		}
		texts.Write(b)
	}
	for _, path := range specs {
		if strings.Contains(texts.String(), `"`+filepath.Base(path)+`"`) {
			continue
		}
		listed := false
		for _, c := range cases {
			listed = listed || c.spec == filepath.Base(path)
		}
		for _, c := range badDeviceCases {
			listed = listed || c.spec == filepath.Base(path)
		}
		if !listed {
			t.Errorf("testdata/bad/%s has no case in TestBadInput or TestBadDeviceInput", filepath.Base(path))
		}
	}
}

func TestUsage(t *testing.T) {
	for _, c := range []struct {
		args []string
		code int
	}{
		{nil, 2},
		{[]string{"frobnicate"}, 2},
		{[]string{"run"}, 2},
		{[]string{"run", "-workers", "0", "x.toml"}, 2},
		{[]string{"demo", "-nosuchflag"}, 2},
		{[]string{"-h"}, 0},
		{[]string{"demo", "-h"}, 0},
		{[]string{"run", "-h"}, 0},
		{[]string{"list", "-h"}, 0},
	} {
		code, _, stderr := runCmd(t, "", c.args...)
		if code != c.code {
			t.Errorf("fringe %v: exit %d, want %d (stderr %q)", c.args, code, c.code, stderr)
		}
	}
}

func TestList(t *testing.T) {
	code, out, stderr := runCmd(t, "", "list")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	for _, w := range []string{"iris", "wine", "breast-cancer", "sha256", "licence", "std", "l2", "pad", "lift", "interference", "knn", "svm", "logreg", "centroid",
		"DEVICES", "line-16", "grid-4x4", "heavy-27", "ions-20", "27 qubits, native rz-sx-x-cx"} {
		if !strings.Contains(out, w) {
			t.Errorf("list output lacks %q", w)
		}
	}
	if !regexp.MustCompile(`[0-9a-f]{64}`).MatchString(out) {
		t.Error("list output shows no sha256 digest")
	}
}

// TestDemoDeterministic runs the demo with 1 and 2 workers and compares the
// output files byte for byte (manifest.json and timings.csv excepted: they
// record times by design).
func TestDemoDeterministic(t *testing.T) {
	if testing.Short() {
		t.Skip("demo run skipped in -short mode")
	}
	dir := t.TempDir()
	a, b := filepath.Join(dir, "a"), filepath.Join(dir, "b")
	if code, stdout, stderr := runCmd(t, "", "demo", "-out", a, "-workers", "1", "-quiet"); code != 0 || stdout != "run directory: "+a+"\n" {
		t.Fatalf("demo -workers 1 -quiet: exit %d, stdout %q (want the one line saying where the run went): %s", code, stdout, stderr)
	}
	code, out, stderr := runCmd(t, "", "demo", "-out", b, "-workers", "2")
	if code != 0 {
		t.Fatalf("demo -workers 2: exit %d: %s", code, stderr)
	}
	if !strings.Contains(out, "interference") {
		t.Errorf("demo summary lacks the interference classifier:\n%s", out)
	}
	files := runFiles(t, a)
	if len(files) < 10 {
		t.Fatalf("run directory holds %d files: %v", len(files), files)
	}
	if got := runFiles(t, b); strings.Join(got, ",") != strings.Join(files, ",") {
		t.Fatalf("file lists differ:\n%v\n%v", files, got)
	}
	for _, f := range files {
		if f == "manifest.json" || f == "timings.csv" {
			continue // times and host by design
		}
		x, err := os.ReadFile(filepath.Join(a, f))
		if err != nil {
			t.Fatal(err)
		}
		y, err := os.ReadFile(filepath.Join(b, f))
		if err != nil {
			t.Fatal(err)
		}
		if !bytes.Equal(x, y) {
			t.Errorf("%s differs between -workers 1 and -workers 2", f)
		}
	}
	for _, f := range []string{"manifest.json", "timings.csv"} {
		if _, err := os.Stat(filepath.Join(a, f)); err != nil {
			t.Errorf("missing %s: %v", f, err)
		}
	}
	entries, _ := os.ReadDir(dir)
	if len(entries) != 2 {
		t.Errorf("output parent holds %d entries, want 2 (no leftover temporary directories)", len(entries))
	}
}

// runFiles lists the files of a run directory (relative, sorted).
func runFiles(t *testing.T, dir string) []string {
	t.Helper()
	var out []string
	err := filepath.WalkDir(dir, func(path string, d os.DirEntry, err error) error {
		if err != nil || d.IsDir() {
			return err
		}
		rel, err := filepath.Rel(dir, path)
		out = append(out, rel)
		return err
	})
	if err != nil {
		t.Fatal(err)
	}
	return out
}

// TestExamples runs every spec in examples/ (the README points users at
// them), so a spec change that breaks one fails here.
func TestExamples(t *testing.T) {
	if testing.Short() {
		t.Skip("examples skipped in -short mode")
	}
	specs, err := filepath.Glob("../../../examples/*.toml")
	if err != nil || len(specs) == 0 {
		t.Fatalf("no example specs found (%v)", err)
	}
	for _, s := range specs {
		t.Run(filepath.Base(s), func(t *testing.T) {
			out := filepath.Join(t.TempDir(), "run")
			code, _, stderr := runCmd(t, "", "run", s, "-out", out, "-quiet")
			if code != 0 {
				t.Fatalf("exit %d: %s", code, stderr)
			}
			if _, err := os.Stat(filepath.Join(out, "summary.csv")); err != nil {
				t.Fatal(err)
			}
		})
	}
}

// TestNoFigures checks that -figures=false leaves out the figures and
// nothing else.
func TestNoFigures(t *testing.T) {
	dir := t.TempDir()
	a, b := filepath.Join(dir, "a"), filepath.Join(dir, "b")
	spec := "../../../examples/own-csv.toml"
	if code, _, stderr := runCmd(t, "", "run", spec, "-out", a, "-quiet"); code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	if code, _, stderr := runCmd(t, "", "run", spec, "-out", b, "-quiet", "-figures=false"); code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	if _, err := os.Stat(filepath.Join(b, "figures")); !os.IsNotExist(err) {
		t.Errorf("-figures=false left a figures directory (%v)", err)
	}
	for _, f := range []string{"predictions.csv", "folds.csv", "summary.csv", "summary.tex", "comparisons.csv"} {
		x, _ := os.ReadFile(filepath.Join(a, f))
		y, err := os.ReadFile(filepath.Join(b, f))
		if err != nil || !bytes.Equal(x, y) {
			t.Errorf("%s differs with -figures=false (%v)", f, err)
		}
	}
}

// checkRefused runs fringe with args and -out DIR/out in a fresh working
// directory DIR and checks that the input is refused as bad input: exit
// status 2, a one-line message holding every string of want, and nothing
// left behind in DIR.
func checkRefused(t *testing.T, args []string, want []string) {
	t.Helper()
	work := t.TempDir()
	args = append(args, "-out", filepath.Join(work, "out"))
	code, _, stderr := runCmd(t, work, args...)
	if code != 2 {
		t.Fatalf("exit status %d, want 2; stderr:\n%s", code, stderr)
	}
	msg := strings.TrimSpace(stderr)
	if strings.Count(msg, "\n") != 0 {
		t.Errorf("message has %d lines, want one:\n%s", strings.Count(msg, "\n")+1, msg)
	}
	for _, w := range want {
		if !strings.Contains(msg, w) {
			t.Errorf("message %q lacks %q", msg, w)
		}
	}
	entries, err := os.ReadDir(work)
	if err != nil {
		t.Fatal(err)
	}
	for _, e := range entries {
		t.Errorf("left %s behind in the working directory", e.Name())
	}
}
