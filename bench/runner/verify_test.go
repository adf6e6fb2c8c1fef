package runner

import (
	"bytes"
	"context"
	"fmt"
	"io/fs"
	"os"
	"path/filepath"
	"sort"
	"strings"
	"testing"

	"fringe/bench/internal/benchtest"
	"fringe/bench/plan"
	"fringe/results"
)

const verifySpec = `
name = "verify"
seed = 4
datasets = ["iris", "wine"]
pipelines = ["std+l2"]
[cv]
folds = 3
[[model]]
kind = "interference"
mode = "shots"
shots = 64
[[model]]
kind = "knn"
[[model]]
kind = "centroid"
`

// writeVerifyRun writes the run directory of verifySpec and returns it.
func writeVerifyRun(t *testing.T) string {
	t.Helper()
	p := benchtest.Plan(t, "verify.toml", verifySpec)
	res, err := Execute(context.Background(), p, Options{Workers: 2})
	if err != nil {
		t.Fatal(err)
	}
	dir := filepath.Join(t.TempDir(), "run")
	if err := Write(p, dir, res, RunInfo{Workers: 2}, nil); err != nil {
		t.Fatal(err)
	}
	return dir
}

func filesOf(t *testing.T, dir string) []string {
	t.Helper()
	var out []string
	filepath.WalkDir(dir, func(path string, d fs.DirEntry, err error) error {
		if err == nil && !d.IsDir() {
			rel, _ := filepath.Rel(dir, path)
			out = append(out, filepath.ToSlash(rel))
		}
		return nil
	})
	sort.Strings(out)
	return out
}

func problemFiles(v *Verified) []string {
	var out []string
	for _, p := range v.Problems {
		out = append(out, p.File)
	}
	return out
}

// TestVerifyEveryByte: a run directory as written verifies; then for
// every file of it, changing one byte (in the middle of the file) makes
// Verify report a problem naming that file.
func TestVerifyEveryByte(t *testing.T) {
	dir := writeVerifyRun(t)
	v, err := Verify(dir, VerifyOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if len(v.Problems) != 0 {
		t.Fatalf("a fresh run directory does not verify: %v", v.Problems)
	}
	if strings.Join(v.Recomputed, " ") != "predictions.csv folds.csv summary.csv comparisons.csv" {
		t.Errorf("recomputed %v", v.Recomputed)
	}
	files := filesOf(t, dir)
	if v.Digests != len(files)-3 {
		t.Errorf("%d digests checked for %d files (all but manifest, timings, digest list)", v.Digests, len(files))
	}
	for _, name := range files {
		path := filepath.Join(dir, filepath.FromSlash(name))
		orig, _ := os.ReadFile(path)
		edited := bytes.Clone(orig)
		i := len(edited) / 2
		edited[i] ^= 0x01 // '0' <-> '1', 'a' <-> '`': one byte, one bit
		os.WriteFile(path, edited, 0o644)
		v, err := Verify(dir, VerifyOptions{})
		os.WriteFile(path, orig, 0o644)
		if err != nil {
			// An edited manifest may no longer parse: the error names it.
			if name == "manifest.json" && strings.Contains(err.Error(), "manifest.json") {
				continue
			}
			t.Fatalf("%s edited: %v", name, err)
		}
		found := false
		for _, p := range v.Problems {
			found = found || p.File == name
		}
		if !found {
			t.Errorf("one byte of %s changed: problems %v do not name it", name, v.Problems)
		}
	}
	if v, _ := Verify(dir, VerifyOptions{}); len(v.Problems) != 0 {
		t.Fatalf("restored directory does not verify: %v", v.Problems)
	}
}

// TestVerifyRecomputes: an edited folds.csv whose digests are updated too
// (as someone who knows the formats could) is still caught, by
// recomputing it from predictions.csv; an added file is named.
func TestVerifyRecomputes(t *testing.T) {
	dir := writeVerifyRun(t)
	path := filepath.Join(dir, "folds.csv")
	data, _ := os.ReadFile(path)
	lines := strings.Split(string(data), "\n")
	f := strings.Split(lines[1], ",")
	f[7] = "0.123456" // the accuracy of the first fold
	lines[1] = strings.Join(f, ",")
	os.WriteFile(path, []byte(strings.Join(lines, "\n")), 0o644)
	// Re-seal everything as fringe would.
	content := map[string][]byte{}
	for _, name := range filesOf(t, dir) {
		if name != "manifest.json" && name != "timings.csv" && name != results.DigestsFile {
			content[name], _ = os.ReadFile(filepath.Join(dir, name))
		}
	}
	list := results.DigestList(content)
	os.WriteFile(filepath.Join(dir, results.DigestsFile), list, 0o644)
	mdata, _ := os.ReadFile(filepath.Join(dir, "manifest.json"))
	m, err := results.ReadManifest(bytes.NewReader(mdata), "manifest.json")
	if err != nil {
		t.Fatal(err)
	}
	m.DigestsSHA = results.SHA256Hex(list)
	sealed, _ := results.SealManifest(m)
	os.WriteFile(filepath.Join(dir, "manifest.json"), sealed, 0o644)
	os.WriteFile(filepath.Join(dir, "notes.txt"), []byte("added"), 0o644)

	v, err := Verify(dir, VerifyOptions{})
	if err != nil {
		t.Fatal(err)
	}
	got := strings.Join(problemFiles(v), " ")
	if got != "notes.txt folds.csv" {
		t.Fatalf("problems %v, want notes.txt (unlisted) and folds.csv (recomputed)", v.Problems)
	}
	if msg := v.Problems[1].Msg; !strings.Contains(msg, "line 2, column accuracy") || !strings.Contains(msg, "0.123456") {
		t.Errorf("folds.csv problem %q does not locate the edit", msg)
	}
}

// TestCompareCSVRounding: in mean_p_acc, 1.5 units of the last decimal
// are rounding; more, or any change elsewhere, is a difference.
func TestCompareCSVRounding(t *testing.T) {
	want := []byte("model,mean_p_acc,accuracy\nq,0.500000,0.900000\n")
	for _, c := range []struct {
		have string
		ok   bool
	}{
		{"model,mean_p_acc,accuracy\nq,0.500000,0.900000\n", true},
		{"model,mean_p_acc,accuracy\nq,0.500001,0.900000\n", true},
		{"model,mean_p_acc,accuracy\nq,0.499999,0.900000\n", true},
		{"model,mean_p_acc,accuracy\nq,0.500002,0.900000\n", false},
		{"model,mean_p_acc,accuracy\nq,0.500000,0.900001\n", false},
		{"model,mean_p_acc,accuracy\r\nq,0.500000,0.900000\r\n", false},
	} {
		if msg := compareCSV([]byte(c.have), want); (msg == "") != c.ok {
			t.Errorf("%q: %q, want ok=%v", c.have, msg, c.ok)
		}
	}
}

// TestDegenerateWarning: a model that predicts one class everywhere with
// equal decision values (k-NN with k = the whole training part of a
// balanced Iris: every vote ties, every prediction is the first class) is
// named in the manifest's warnings and in summary.md; a model that
// discriminates is not. Before, such a run passed with exit 0 and no word.
func TestDegenerateWarning(t *testing.T) {
	p := benchtest.Plan(t, "d.toml", `
name = "degenerate"
seed = 1
datasets = ["iris"]
pipelines = ["std"]
[[model]]
kind = "knn"
k = 135
[[model]]
kind = "centroid"
`)
	res, err := Execute(context.Background(), p, Options{Workers: 2})
	if err != nil {
		t.Fatal(err)
	}
	dir := filepath.Join(t.TempDir(), "run")
	if err := Write(p, dir, res, RunInfo{Workers: 2, NoFigures: true}, nil); err != nil {
		t.Fatal(err)
	}
	for _, f := range []string{"manifest.json", "summary.md"} {
		data, _ := os.ReadFile(filepath.Join(dir, f))
		if !bytes.Contains(data, []byte("iris/std/knn-k135")) || !bytes.Contains(data, []byte("predicts class setosa on every test instance of every fold, with the same decision values")) {
			t.Errorf("%s does not warn about the constant k-NN", f)
		}
		if bytes.Contains(data, []byte("iris/std/centroid")) {
			t.Errorf("%s warns about the centroid model, which discriminates", f)
		}
	}
}

const tunedSpec = `
name = "tuned"
seed = 6
datasets = ["iris", "wine"]
pipelines = ["std"]
[cv]
folds = 3
repeats = 2
[tune]
folds = 4
metric = "balanced_accuracy"
[[model]]
kind = "svm"
C = [0.5, 5]
gamma = ["inverse-variance", 0.1]
[[model]]
kind = "knn"
k = [1, 7]
pipelines = ["raw", "l2"]
[[model]]
kind = "centroid"
`

// TestTunedRun: a run with tuned models gives the same files for 1 and 3
// workers, keeps its grid searches through task files (a resumed run
// loads them exactly), writes tuning.csv with one chosen point per task
// (the first best inner score), and verifies.
func TestTunedRun(t *testing.T) {
	p := benchtest.Plan(t, "tuned.toml", tunedSpec)
	var dirs []string
	var first []TaskResult
	for _, w := range []int{1, 3} {
		res, err := Execute(context.Background(), p, Options{Workers: w})
		if err != nil {
			t.Fatal(err)
		}
		if first == nil {
			first = res
		}
		dir := filepath.Join(t.TempDir(), "run")
		if err := Write(p, dir, res, RunInfo{Workers: w, NoFigures: true}, nil); err != nil {
			t.Fatal(err)
		}
		dirs = append(dirs, dir)
	}
	for _, name := range []string{"predictions.csv", "folds.csv", "summary.csv", "tuning.csv", "summary.md", "summary.tex"} {
		a, _ := os.ReadFile(filepath.Join(dirs[0], name))
		b, _ := os.ReadFile(filepath.Join(dirs[1], name))
		if !bytes.Equal(a, b) || len(a) == 0 {
			t.Errorf("%s differs between 1 and 3 workers (or is empty)", name)
		}
	}
	for _, r := range first {
		g := p.Spec.Models[r.Task.Model].Grid
		if (g == nil) != (r.Tuning == nil) {
			t.Fatalf("task %s: tuning %v for grid %v", p.Key(r.Task), r.Tuning, g)
		}
		if g == nil {
			continue
		}
		if len(r.Tuning.Scores) != len(g.Points) || r.Tuning.Chosen != best(r.Tuning.Scores) {
			t.Errorf("task %s: scores %v, chosen %d", p.Key(r.Task), r.Tuning.Scores, r.Tuning.Chosen)
		}
	}
	// Through a partial directory and back.
	pdir := filepath.Join(t.TempDir(), "run.partial")
	pr, _ := OpenPartial(pdir, p, plan.Shard{}, PartialOptions{})
	runPartial(t, p, pr)
	back, err := OpenPartial(pdir, p, plan.Shard{}, PartialOptions{})
	if err != nil {
		t.Fatal(err)
	}
	got, err := back.Results()
	if err != nil {
		t.Fatal(err)
	}
	for i := range first {
		if fmt.Sprint(first[i].Tuning) != fmt.Sprint(got[i].Tuning) {
			t.Fatalf("task %d: tuning %v after the round trip, %v before", i, got[i].Tuning, first[i].Tuning)
		}
	}
	tuning, _ := os.ReadFile(filepath.Join(dirs[0], "tuning.csv"))
	if n := bytes.Count(tuning, []byte(",1\n")); n != 2*3*2*2 {
		t.Errorf("tuning.csv marks %d points chosen, want one per tuned task (24)", n)
	}
	if !bytes.Contains(tuning, []byte("pipeline=l2 k=7")) || !bytes.Contains(tuning, []byte(",balanced_accuracy,")) {
		t.Errorf("tuning.csv lacks the pipeline dimension or the metric:\n%s", tuning[:300])
	}
	v, err := Verify(dirs[0], VerifyOptions{})
	if err != nil || len(v.Problems) != 0 {
		t.Fatalf("verify: %v %v", err, v.Problems)
	}
}

// TestLearningCurve: learning.csv has one row per cell and size, sizes
// ascending with the run itself last, whose metrics are summary.csv's; the
// subsample rows train on the subsample's size; the interference
// classifier's rows have p_acc and shots; a figure per dataset; and the
// run's own files are those of the same spec without train_sizes.
func TestLearningCurve(t *testing.T) {
	const base = `
name = "lc"
seed = 9
datasets = ["iris", "wine"]
pipelines = ["std+l2"]
[cv]
folds = 4
%s
[[model]]
kind = "interference"
[[model]]
kind = "knn"
k = 3
`
	write := func(extra string) string {
		p := benchtest.Plan(t, "lc.toml", fmt.Sprintf(base, extra))
		res, err := Execute(context.Background(), p, Options{Workers: 2})
		if err != nil {
			t.Fatal(err)
		}
		dir := filepath.Join(t.TempDir(), "run")
		if err := Write(p, dir, res, RunInfo{Workers: 2}, nil); err != nil {
			t.Fatal(err)
		}
		return dir
	}
	plain, lc := write(""), write("train_sizes = [0.25, 0.5]")
	for _, f := range []string{"predictions.csv", "folds.csv", "summary.csv", "comparisons.csv"} {
		a, _ := os.ReadFile(filepath.Join(plain, f))
		b, _ := os.ReadFile(filepath.Join(lc, f))
		if !bytes.Equal(a, b) {
			t.Errorf("%s differs with train_sizes", f)
		}
	}
	recs := benchtest.ReadCSV(t, filepath.Join(lc, "learning.csv"))
	sum := benchtest.ReadCSV(t, filepath.Join(lc, "summary.csv"))
	if len(recs) != 1+2*2*3 {
		t.Fatalf("%d rows in learning.csv, want 12 and a header", len(recs))
	}
	col := func(head []string, name string) int {
		for i, h := range head {
			if h == name {
				return i
			}
		}
		t.Fatalf("no column %s", name)
		return -1
	}
	size, acc, pacc, shots, ntr := col(recs[0], "train_size"), col(recs[0], "accuracy_mean"), col(recs[0], "mean_p_acc"), col(recs[0], "shots_median"), col(recs[0], "n_train")
	for c := 0; c < 4; c++ {
		rows := recs[1+3*c : 4+3*c]
		if rows[0][size] != "0.25" || rows[1][size] != "0.5" || rows[2][size] != "1" {
			t.Errorf("cell %d: sizes %s %s %s", c, rows[0][size], rows[1][size], rows[2][size])
		}
		if rows[2][acc] != sum[1+c][col(sum[0], "accuracy_mean")] {
			t.Errorf("cell %d: size 1 accuracy %s, summary %s", c, rows[2][acc], sum[1+c][col(sum[0], "accuracy_mean")])
		}
		if interference := c%2 == 0; interference != (rows[0][pacc] != "" && rows[0][shots] != "") {
			t.Errorf("cell %d: p_acc %q shots %q", c, rows[0][pacc], rows[0][shots])
		}
		if rows[0][ntr] >= rows[1][ntr] && len(rows[0][ntr]) >= len(rows[1][ntr]) {
			t.Errorf("cell %d: training rows %s then %s, want growing", c, rows[0][ntr], rows[1][ntr])
		}
	}
	for _, ds := range []string{"iris", "wine"} {
		if _, err := os.Stat(filepath.Join(lc, "figures", "learning-"+ds+".svg")); err != nil {
			t.Errorf("no learning figure for %s", ds)
		}
	}
}
