package export

import (
	"bytes"
	"context"
	"errors"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"

	"fringe/bench/input"
	"fringe/bench/internal/benchtest"
	"fringe/bench/modelkit"
	"fringe/bench/runner"
	"fringe/qkernel/sim"
)

const exportSpec = `
name = "export"
seed = 31
pipelines = ["std+l2", "std"]
[[dataset]]
name = "iris"
classes = ["versicolor", "virginica"]
as = "iris-vv"
[[dataset]]
name = "iris"
features = [0, 2]
[cv]
folds = 4
[[model]]
kind = "knn"
[[model]]
kind = "interference"
name = "exact"
[[model]]
kind = "interference"
name = "sub"
balance = true
train_subset = 6
mode = "shots"
shots = 100
`

// readIndex reads an export's index.csv.
func readIndex(t *testing.T, dir string) [][]string {
	t.Helper()
	return benchtest.ReadCSV(t, filepath.Join(dir, "index.csv"))
}

// TestExportCircuits checks the index (one line per test instance and
// pipeline, in plan order, files that exist and hold OpenQASM 3 with the
// documented comments), that the export does not depend on the number of
// workers, and that the exported circuits are those of the run: simulated,
// each gives the p_acc and class probabilities of the exact-mode model on
// the same instance.
func TestExportCircuits(t *testing.T) {
	p := benchtest.Plan(t, "t.toml", exportSpec)
	dir := t.TempDir()
	a, b := filepath.Join(dir, "a"), filepath.Join(dir, "b")
	sum, err := Circuits(context.Background(), p, a, Options{Model: "exact", Workers: 1})
	if err != nil {
		t.Fatal(err)
	}
	if _, err := Circuits(context.Background(), p, b, Options{Model: "exact", Workers: 2}); err != nil {
		t.Fatal(err)
	}
	want := 2 * (100 + 150) // two pipelines; iris-vv has 100 rows, iris 150
	if sum.Circuits != want || sum.Model != "exact" || sum.Balance || sum.TrainSubset != 0 {
		t.Errorf("summary %+v, want %d circuits with the settings of model exact", sum, want)
	}
	index := readIndex(t, a)
	if strings.Join(index[0], ",") != strings.Join(IndexColumns, ",") || len(index) != want+1 {
		t.Fatalf("index header %v with %d lines", index[0], len(index))
	}
	files, _ := os.ReadDir(a)
	if len(files) != want+1 {
		t.Errorf("export holds %d files, want %d circuits and index.csv", len(files), want)
	}
	for _, f := range files {
		x, _ := os.ReadFile(filepath.Join(a, f.Name()))
		y, err := os.ReadFile(filepath.Join(b, f.Name()))
		if err != nil || !bytes.Equal(x, y) {
			t.Errorf("%s differs between 1 and 2 workers", f.Name())
		}
	}

	// Run the exact model and compare each instance with its simulated circuit.
	res, err := runner.Execute(context.Background(), p, runner.Options{Workers: 2})
	if err != nil {
		t.Fatal(err)
	}
	preds, _, _ := runner.Records(p, res)
	type inst struct {
		d, pipe   string
		fold, row int
	}
	exact := map[inst]int{}
	for i, pr := range preds {
		if pr.Model == "exact" {
			exact[inst{pr.Dataset, pr.Pipeline, pr.Fold, pr.Row}] = i
		}
	}
	set, err := resolveExport(p, "exact")
	if err != nil {
		t.Fatal(err)
	}
	line := 1
	for di, d := range p.Datasets {
		for pi := range p.Spec.Pipelines {
			for si, sp := range d.Splits {
				err := exportUnit(p, di, pi, si, set, func(it exportItem) error {
					rec := index[line]
					line++
					wantRec := []string{it.Dataset, it.Pipeline, strconv.Itoa(it.Repeat), strconv.Itoa(it.Fold), strconv.Itoa(it.Row),
						strconv.Itoa(it.Circuit.NQubits), strconv.Itoa(len(it.Circuit.Regs.Class)), joinRows(it.TrainRows)}
					if strings.Join(rec[1:], ",") != strings.Join(wantRec, ",") {
						t.Fatalf("index line %d: %v, want %v", line, rec, wantRec)
					}
					if len(it.TrainRows) != len(sp.Train) {
						t.Fatalf("%s: circuit encodes %d training rows, the fold has %d", rec[0], len(it.TrainRows), len(sp.Train))
					}
					text, err := os.ReadFile(filepath.Join(a, rec[0]))
					if err != nil {
						t.Fatal(err)
					}
					for _, w := range []string{"// fringe: interference circuit of dataset " + it.Dataset, "class_out[0] is the least significant bit", "OPENQASM 3.0;", "class_out[0] = measure class[0];"} {
						if !bytes.Contains(text, []byte(w)) {
							t.Fatalf("%s lacks %q", rec[0], w)
						}
					}
					dist, err := sim.Outcomes(it.Circuit, sim.Options{})
					if err != nil {
						t.Fatal(err)
					}
					pr := preds[exact[inst{it.Dataset, it.Pipeline, it.Fold, it.Row}]]
					h := len(dist) / 2
					acc := 0.0
					for _, v := range dist[:h] {
						acc += v
					}
					// Simulated circuit against the closed form: 1e-12, the
					// bound of qkernel's TestCircuitEqualsExact.
					if !scalar.EqualWithinAbsOrRel(acc, pr.PAcc, 1e-12, 1e-12) {
						t.Errorf("%s: circuit p_acc %.15g, run %.15g", rec[0], acc, pr.PAcc)
					}
					for k, pk := range pr.Probs {
						if !scalar.EqualWithinAbsOrRel(dist[k]/acc, pk, 1e-12, 1e-12) {
							t.Errorf("%s class %d: circuit %.15g, run %.15g", rec[0], k, dist[k]/acc, pk)
						}
					}
					return nil
				})
				if err != nil {
					t.Fatal(err)
				}
			}
		}
	}
	if line != len(index) {
		t.Errorf("checked %d index lines of %d", line-1, len(index)-1)
	}
}

// TestExportSettings checks which model's settings an export uses, the
// subset sizes, and the folder rules.
func TestExportSettings(t *testing.T) {
	p := benchtest.Plan(t, "t.toml", exportSpec)
	for _, c := range []struct {
		model  string
		want   string
		subset int
		err    string
	}{
		{"", "exact", 0, ""},
		{"sub", "sub", 6, ""},
		{"knn-k5", "", 0, "kind knn"},
		{"nope", "", 0, `no model named "nope" (interference and counts models of the spec: exact, sub)`},
	} {
		set, err := resolveExport(p, c.model)
		if c.err != "" {
			if err == nil || !errors.Is(err, input.ErrBad) || !strings.Contains(err.Error(), c.err) {
				t.Errorf("model %q: error %v, want one naming %q", c.model, err, c.err)
			}
			continue
		}
		if err != nil || set.model != c.want || set.subset != c.subset {
			t.Errorf("model %q: settings %+v (%v), want model %s subset %d", c.model, set, err, c.want, c.subset)
		}
	}
	withCounts := benchtest.Plan(t, "t.toml", exportSpec+"\n[[model]]\nkind = \"counts\"\nfile = \"m.csv\"\ntrain_subset = 5\nbalance = true\n")
	if set, _ := resolveExport(withCounts, ""); set.model != "counts-m-k5-balanced" || set.subset != 5 || !set.balance {
		t.Errorf("default with a counts model: %+v", set)
	}
	none := benchtest.Plan(t, "t.toml", "name = \"n\"\nseed = 1\ndatasets = [\"iris\"]\n[[model]]\nkind = \"centroid\"\n")
	if set, err := resolveExport(none, ""); err != nil || set != (exportSettings{}) {
		t.Errorf("no interference model: %+v, %v", set, err)
	}

	dir := t.TempDir()
	out := filepath.Join(dir, "c")
	sum, err := Circuits(context.Background(), p, out, Options{Model: "sub"})
	if err != nil {
		t.Fatal(err)
	}
	// Ancilla 1 + index 3 (6 rows) + data 2 (4 features) + class 1 for
	// iris-vv; data 1 (2 features) and class 2 for iris: 7 either way.
	if sum.MaxQubits != 7 {
		t.Errorf("max qubits %d, want 7", sum.MaxQubits)
	}
	// An earlier export is replaced; another folder is refused.
	if _, err := Circuits(context.Background(), p, out, Options{Model: "sub"}); err != nil {
		t.Errorf("replacing an earlier export: %v", err)
	}
	other := filepath.Join(dir, "mine")
	os.MkdirAll(other, 0o755)
	os.WriteFile(filepath.Join(other, "notes.txt"), []byte("keep"), 0o644)
	if _, err := Circuits(context.Background(), p, other, Options{Model: "sub"}); err == nil || !errors.Is(err, input.ErrBad) {
		t.Errorf("export into a folder of other files: %v", err)
	}
	if b, err := os.ReadFile(filepath.Join(other, "notes.txt")); err != nil || string(b) != "keep" {
		t.Errorf("the other folder was touched")
	}
	entries, _ := os.ReadDir(dir)
	if len(entries) != 2 {
		t.Errorf("parent folder holds %d entries, want 2 (no temporary folders left)", len(entries))
	}
}

// TestBits checks the bit-string convention of counts files: most
// significant bit first (derived by hand).
func TestBits(t *testing.T) {
	for _, c := range []struct {
		k, n int
		s    string
	}{{0, 1, "0"}, {1, 1, "1"}, {2, 2, "10"}, {1, 2, "01"}, {5, 3, "101"}, {6, 3, "110"}} {
		if got := modelkit.FormatBits(c.k, c.n); got != c.s {
			t.Errorf("modelkit.FormatBits(%d, %d) = %s, want %s", c.k, c.n, got, c.s)
		}
		if k, ok := modelkit.ParseBits(c.s, c.n); !ok || k != c.k {
			t.Errorf("modelkit.ParseBits(%s, %d) = %d %v, want %d", c.s, c.n, k, ok, c.k)
		}
	}
	for _, s := range []string{"", "2", "0b1", " 1"} {
		if _, ok := modelkit.ParseBits(s, 1); ok && s != "" {
			t.Errorf("modelkit.ParseBits(%q, 1) accepted", s)
		}
	}
}
