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
)

// deviceSpec runs the classifier on two embedded devices and with
// closed-form readout noise, each with readout mitigation, beside a
// baseline.
const deviceSpec = `
name = "device-run"
seed = 8
pipelines = ["std+l2"]
[[dataset]]
name = "iris"
classes = ["versicolor", "virginica"]
[cv]
folds = 3
[[model]]
kind = "interference"
mode = "noisy"
device = "ions-20"
train_subset = 4
balance = true
mitigate = "readout"
[[model]]
kind = "interference"
mode = "noisy"
device = "line-16"
shots = 300
train_subset = 4
mitigate = "readout"
[[model]]
kind = "interference"
mode = "noisy"
noise = { readout = [0.08, 0.12] }
shots = 200
mitigate = "readout"
[[model]]
kind = "knn"
`

// TestDeviceRunWorkers: a run with devices and mitigation writes the same
// bytes whatever the worker count (manifest.json and timings.csv
// excepted), with the raw (unmitigated) columns in predictions.csv, the
// mitigation_changed column in folds.csv and the devices in the manifest;
// and fringe verify recomputes predictions, folds (mitigation_changed
// from the raw columns read back), summary and comparisons from it.
func TestDeviceRunWorkers(t *testing.T) {
	var dirs []string
	for _, w := range []int{1, 3} {
		p := benchtest.Plan(t, "device.toml", deviceSpec)
		res, err := Execute(context.Background(), p, Options{Workers: w})
		if err != nil {
			t.Fatal(err)
		}
		dir := filepath.Join(t.TempDir(), "run")
		if err := Write(p, dir, res, RunInfo{Workers: w}, nil); err != nil {
			t.Fatal(err)
		}
		dirs = append(dirs, dir)
	}
	files := filesOf(t, dirs[0])
	if got := filesOf(t, dirs[1]); strings.Join(got, " ") != strings.Join(files, " ") {
		t.Fatalf("files differ: %v vs %v", files, got)
	}
	for _, f := range files {
		if f == "manifest.json" || f == "timings.csv" {
			continue
		}
		a, _ := os.ReadFile(filepath.Join(dirs[0], f))
		b, _ := os.ReadFile(filepath.Join(dirs[1], f))
		if !bytes.Equal(a, b) {
			t.Errorf("%s differs between 1 and 3 workers", f)
		}
	}
	preds, _ := os.ReadFile(filepath.Join(dirs[0], "predictions.csv"))
	head, _, _ := strings.Cut(string(preds), "\n")
	if !strings.HasSuffix(head, ",raw_predicted,raw_p_acc,raw_probs") {
		t.Errorf("predictions.csv header %q lacks the raw columns", head)
	}
	folds, _ := os.ReadFile(filepath.Join(dirs[0], "folds.csv"))
	if fh, _, _ := strings.Cut(string(folds), "\n"); !strings.HasSuffix(fh, ",mitigation_changed") {
		t.Errorf("folds.csv header %q lacks mitigation_changed", fh)
	}
	for _, line := range strings.Split(strings.TrimSpace(string(folds)), "\n")[1:] {
		f := strings.Split(line, ",")
		last := f[len(f)-1]
		if strings.Contains(line, ",knn") != (last == "") {
			t.Errorf("folds.csv: mitigation_changed %q on %s", last, line)
		}
	}
	man, _ := os.ReadFile(filepath.Join(dirs[0], "manifest.json"))
	for _, w := range []string{`"devices"`, `"device": "ions-20"`, `"device": "line-16"`, `"mitigate": "readout"`} {
		if !bytes.Contains(man, []byte(w)) {
			t.Errorf("manifest lacks %s", w)
		}
	}
	v, err := Verify(dirs[0], VerifyOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if len(v.Problems) > 0 {
		t.Fatalf("a mitigated run does not verify: %v", v.Problems)
	}
	if strings.Join(v.Recomputed, " ") != "predictions.csv folds.csv summary.csv comparisons.csv" {
		t.Errorf("recomputed %v", v.Recomputed)
	}
}

// TestDeviceRunResume: task files keep the unmitigated decisions; a run
// resumed from them gives back every result exactly.
func TestDeviceRunResume(t *testing.T) {
	p := benchtest.Plan(t, "device.toml", deviceSpec)
	want, err := Execute(context.Background(), p, Options{Workers: 2})
	if err != nil {
		t.Fatal(err)
	}
	dir := filepath.Join(t.TempDir(), "run.partial")
	pr, err := OpenPartial(dir, p, plan.Shard{}, PartialOptions{Workers: 2})
	if err != nil {
		t.Fatal(err)
	}
	runPartial(t, p, pr)
	again, err := OpenPartial(dir, p, plan.Shard{}, PartialOptions{})
	if err != nil {
		t.Fatal(err)
	}
	got, err := again.Results()
	if err != nil {
		t.Fatal(err)
	}
	raws := 0
	for i := range want {
		sameResult(t, want[i], got[i])
		for k, d := range want[i].Details {
			g := got[i].Details[k]
			if (d.Raw == nil) != (g.Raw == nil) {
				t.Fatalf("task %d instance %d: raw decision lost or made up", i, k)
			}
			if d.Raw == nil {
				continue
			}
			raws++
			if d.Raw.Pred != g.Raw.Pred || !sameBits(d.Raw.PAcc, g.Raw.PAcc) || !sameBits(d.Raw.Unused, g.Raw.Unused) || len(d.Raw.Probs) != len(g.Raw.Probs) {
				t.Fatalf("task %d instance %d: raw %+v, read back %+v", i, k, d.Raw, g.Raw)
			}
			for j := range d.Raw.Probs {
				if !sameBits(d.Raw.Probs[j], g.Raw.Probs[j]) {
					t.Fatalf("task %d instance %d: raw probs %v, read back %v", i, k, d.Raw.Probs, g.Raw.Probs)
				}
			}
		}
	}
	if raws == 0 {
		t.Fatal("no raw decisions: mitigation did not run")
	}
	// A spec whose device changes (here: another embedded device) does
	// not continue the partial run.
	other := strings.Replace(deviceSpec, `device = "line-16"`, `device = "grid-4x4"`, 1)
	if _, err := OpenPartial(dir, benchtest.Plan(t, "device.toml", other), plan.Shard{}, PartialOptions{}); err == nil {
		t.Error("a partial run continued with another device")
	}

	// Nor one whose device file changed between sessions.
	work := t.TempDir()
	devText, err := os.ReadFile(filepath.Join("..", "..", "qkernel", "device", "devices", "line-16.toml"))
	if err != nil {
		t.Fatal(err)
	}
	devFile := filepath.Join(work, "mine.toml")
	if err := os.WriteFile(devFile, bytes.Replace(devText, []byte(`name = "line-16"`), []byte(`name = "mine"`), 1), 0o644); err != nil {
		t.Fatal(err)
	}
	fileSpec := strings.Replace(deviceSpec, `device = "line-16"`, `device = "mine.toml"`, 1)
	mk := func() *plan.Plan {
		s := benchtest.Spec(t, filepath.Join(work, "device.toml"), fileSpec)
		s.Dir = work
		p, err := plan.New(s)
		if err != nil {
			t.Fatal(err)
		}
		return p
	}
	fdir := filepath.Join(work, "run.partial")
	fp, err := OpenPartial(fdir, mk(), plan.Shard{}, PartialOptions{Workers: 2})
	if err != nil {
		t.Fatal(err)
	}
	runPartial(t, mk(), fp)
	if err := os.WriteFile(devFile, append(bytes.Replace(devText, []byte(`name = "line-16"`), []byte(`name = "mine"`), 1), []byte("# recalibrated\n")...), 0o644); err != nil {
		t.Fatal(err)
	}
	if _, err := OpenPartial(fdir, mk(), plan.Shard{}, PartialOptions{}); err == nil || !strings.Contains(err.Error(), "not mixed") {
		t.Errorf("a partial run continued after its device file changed: %v", err)
	}
}
