package main

import (
	"context"
	"flag"
	"io"
	"os"
	"path/filepath"
	"regexp"
	"strings"
	"testing"
	"time"

	"fringe/qkernel/sim"
)

var update = flag.Bool("update", false, "rewrite the golden files in testdata/plan")

// fixedCalibration replaces the calibration by a cost model of round
// numbers for the test (so estimates are the same on every machine) and
// the terminal check by the given answer; both are restored afterwards.
func fixedCalibration(t *testing.T, terminal bool) {
	t.Helper()
	oldCal, oldTerm := calibrate, interactive
	calibrate = func(context.Context) (*sim.CostModel, error) {
		return &sim.CostModel{
			StateVector: sim.Fit{Fixed: 50, Entry: 1}, Density: sim.Fit{Fixed: 100, Entry: 2}, DensityDamp: sim.Fit{Fixed: 100, Entry: 3},
			Trajectory: sim.Fit{Fixed: 60, Entry: 1.5}, UCRYControl: 0.5, Jump: 1, Sample: 10, Alloc: 0.25, Dot: 2,
		}, nil
	}
	interactive = func(io.Writer) bool { return terminal }
	t.Cleanup(func() { calibrate, interactive = oldCal, oldTerm })
}

// calibrationTime is the one part of the plan's output that varies.
var calibrationTime = regexp.MustCompile(`calibrated on this machine in [^;]+;`)

// TestPlanVerb compares `fringe plan` on a spec with every way of
// computing a model (closed form, shots, closed-form channels, state
// vector, density matrix, trajectories, a tuned k-NN, classical models
// with and without an estimate) with a golden file, under a fixed cost
// model: the structure of the output and every estimate are fixed; only
// the calibration's duration varies. Rewrite with -update and review.
func TestPlanVerb(t *testing.T) {
	fixedCalibration(t, false)
	for _, c := range []struct {
		golden string
		args   []string
	}{
		{"mixed.golden", []string{"plan", "testdata/plan/mixed.toml", "-workers", "2", "-max-estimate", "1s"}},
		{"mixed-cells.golden", []string{"plan", "-cells", "-workers", "1", "-shard", "1/2", "testdata/plan/mixed.toml"}},
	} {
		t.Run(c.golden, func(t *testing.T) {
			code, out, stderr := runCmd(t, "", c.args...)
			if code != 0 || stderr != "" {
				t.Fatalf("exit %d, stderr %q", code, stderr)
			}
			if !calibrationTime.MatchString(out) {
				t.Fatalf("no calibration time in:\n%s", out)
			}
			got := calibrationTime.ReplaceAllString(out, "calibrated on this machine in (time);")
			path := filepath.Join("testdata", "plan", c.golden)
			if *update {
				if err := os.WriteFile(path, []byte(got), 0o644); err != nil {
					t.Fatal(err)
				}
			}
			want, err := os.ReadFile(path)
			if err != nil {
				t.Fatal(err)
			}
			if got != string(want) {
				t.Errorf("output differs from %s (go test -run TestPlanVerb -update to rewrite):\n%s", path, got)
			}
		})
	}
	// Bad usage: exit 2, one line.
	for _, args := range [][]string{{"plan"}, {"plan", "a.toml", "b.toml"}, {"plan", "-workers", "0", "testdata/plan/mixed.toml"}, {"plan", "missing.toml"}} {
		code, _, stderr := runCmd(t, "", args...)
		if code != 2 || strings.Count(strings.TrimSpace(stderr), "\n") != 0 {
			t.Errorf("%v: exit %d, stderr %q", args, code, stderr)
		}
	}
}

// TestPlanRealCalibration runs the plan verb with the real calibration:
// the same rows, every model estimated that can be, no error.
func TestPlanRealCalibration(t *testing.T) {
	code, out, stderr := runCmd(t, "", "plan", "testdata/plan/mixed.toml")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	for _, want := range []string{"60 tasks, 96 model fits", "density matrix", "trajectories (200)", "state vector", "closed form + shots", "not estimated: svm-rbf-C1, logreg-C1"} {
		if !strings.Contains(out, want) {
			t.Errorf("output lacks %q:\n%s", want, out)
		}
	}
}

// gateSpec writes a small spec with gate-level noise (a few seconds of
// work at most) and returns its path.
func gateSpec(t *testing.T) string {
	t.Helper()
	path := filepath.Join(t.TempDir(), "gate.toml")
	src := `name = "gate"
seed = 2
datasets = ["iris"]
pipelines = ["std+l2"]
[cv]
folds = 2
[[model]]
kind = "interference"
mode = "noisy"
train_subset = 8
noise = { depolarizing = [0.001, 0.01] }
`
	if err := os.WriteFile(path, []byte(src), 0o644); err != nil {
		t.Fatal(err)
	}
	return path
}

// TestEstimateGate checks the threshold: on a terminal a run above
// -max-estimate is refused (exit 2, one line naming -yes and the spec keys
// that make it faster, nothing written); -yes starts it; without a
// terminal it warns and starts; under the limit it only prints the
// estimate line (and nothing under -quiet).
func TestEstimateGate(t *testing.T) {
	spec := gateSpec(t)
	t.Run("terminal", func(t *testing.T) {
		fixedCalibration(t, true)
		work := t.TempDir()
		out := filepath.Join(work, "out")
		code, stdout, stderr := runCmd(t, work, "run", spec, "-out", out, "-max-estimate", "1ns")
		msg := strings.TrimSpace(stderr)
		lines := strings.Split(msg, "\n")
		if code != 2 || len(lines) != 2 || stdout != "" {
			t.Fatalf("exit %d, stdout %q, stderr:\n%s\nwant exit 2, the estimate line and one refusal", code, stdout, stderr)
		}
		if !strings.HasPrefix(lines[0], "fringe: estimate: 2 tasks (2 model fits), about ") {
			t.Errorf("estimate line %q", lines[0])
		}
		for _, w := range []string{"above -max-estimate 1ns", "add -yes", "model[1]", "global_depolarizing", "train_subset = 4", "fringe plan " + spec} {
			if !strings.Contains(lines[1], w) {
				t.Errorf("refusal lacks %q: %s", w, lines[1])
			}
		}
		if entries, _ := os.ReadDir(work); len(entries) != 0 {
			t.Errorf("a refused run left %d entries behind", len(entries))
		}
		code, _, stderr = runCmd(t, work, "run", spec, "-out", out, "-max-estimate", "1ns", "-yes", "-quiet")
		if code != 0 || stderr != "" {
			t.Fatalf("-yes: exit %d, stderr %q", code, stderr)
		}
		if _, err := os.Stat(filepath.Join(out, "summary.csv")); err != nil {
			t.Error(err)
		}
	})
	t.Run("no terminal", func(t *testing.T) {
		fixedCalibration(t, false)
		out := filepath.Join(t.TempDir(), "out")
		code, _, stderr := runCmd(t, "", "run", spec, "-out", out, "-max-estimate", "1ns", "-quiet")
		if code != 0 || strings.Count(stderr, "\n") != 1 || !strings.Contains(stderr, "fringe: warning: the estimate") || !strings.Contains(stderr, "starting anyway") {
			t.Fatalf("exit %d, stderr %q; want 0 and one warning", code, stderr)
		}
	})
	t.Run("log of a short run", func(t *testing.T) {
		fixedCalibration(t, false)
		out := filepath.Join(t.TempDir(), "out")
		code, _, stderr := runCmd(t, "", "run", spec, "-out", out)
		if code != 0 || stderr != "" {
			t.Fatalf("exit %d, stderr %q; a short run without a terminal writes no estimate line", code, stderr)
		}
	})
	t.Run("under the limit", func(t *testing.T) {
		fixedCalibration(t, true)
		out := filepath.Join(t.TempDir(), "out")
		code, _, stderr := runCmd(t, "", "run", spec, "-out", out)
		if code != 0 || !strings.Contains(stderr, "fringe: estimate: 2 tasks") || strings.Contains(stderr, "warning") {
			t.Fatalf("exit %d, stderr %q", code, stderr)
		}
		code, _, stderr = runCmd(t, "", "run", spec, "-out", out, "-quiet", "-max-estimate", "0")
		if code != 0 || stderr != "" {
			t.Fatalf("-quiet: exit %d, stderr %q", code, stderr)
		}
		code, _, stderr = runCmd(t, "", "run", spec, "-out", out, "-max-estimate", "-1s")
		if code != 2 || !strings.Contains(stderr, "-max-estimate") {
			t.Fatalf("negative limit: exit %d, stderr %q", code, stderr)
		}
	})
}

// TestFmtDuration checks the duration words of the estimates.
func TestFmtDuration(t *testing.T) {
	for _, c := range []struct {
		ns   int64
		want string
	}{
		{0, "<1 ms"}, {999_999, "<1 ms"}, {1_000_000, "1 ms"}, {999_000_000, "999 ms"},
		{4_240_000_000, "4.2 s"}, {185_000_000_000, "3 min 05 s"}, {8_040_000_000_000, "2 h 14 min"},
	} {
		if got := fmtDuration(time.Duration(c.ns)); got != c.want {
			t.Errorf("fmtDuration(%d ns) = %q, want %q", c.ns, got, c.want)
		}
	}
}
