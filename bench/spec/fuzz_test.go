package spec_test

import (
	"os"
	"path/filepath"
	"testing"

	"fringe/bench/internal/benchtest"
	"fringe/bench/plan"
	"fringe/bench/spec"
)

// FuzzParseSpec feeds arbitrary text to the spec parser. It must never
// panic or hang; every error must be an input error with a one-line
// message; an accepted spec must name at least one dataset, pipeline and
// model, with distinct model names. Accepted specs over embedded data and
// a modest grid are also planned (NewPlan), which checks parameters
// against the data, under the same rules.
func FuzzParseSpec(f *testing.F) {
	seeds, _ := filepath.Glob("../../examples/*.toml")
	bad, _ := filepath.Glob("../cmd/fringe/testdata/bad/*.toml")
	for _, path := range append(append(seeds, bad...), "demo.toml", "../cmd/fringe/testdata/cluster/grid.toml") {
		if b, err := os.ReadFile(path); err == nil {
			f.Add(b)
		}
	}
	// The spec of the shard and task-file tests (bench/runner).
	f.Add([]byte("name = \"cluster-test\"\nseed = 3\ndatasets = [\"iris\", \"wine\"]\npipelines = [\"std+l2\", \"minmax\"]\n[cv]\nmethod = \"stratified\"\nfolds = 4\nrepeats = 2\n[[model]]\nkind = \"knn\"\nk = 3\n[[model]]\nkind = \"interference\"\nmode = \"shots\"\nshots = 1\nbalance = true\n"))
	f.Add([]byte("name = \"x\"\nseed = 1\ndatasets = [\"iris\"]\n[[model]]\nkind = \"svm\"\ngamma = \"scale\"\n"))
	f.Add([]byte("name = \"x\"\nseed = 1\ndatasets = [\"iris\"]\n[cv]\nmethod = \"holdout\"\ntest_fraction = 0.5\n[[model]]\nkind = \"interference\"\nmode = \"noisy\"\nnoise = { readout = [0.1, 0.2] }\n"))
	f.Add([]byte("name = \"x\"\nseed = 1\ndatasets = [\"iris\"]\n[[model]]\nkind = \"knn\"\nlabel = \"k-NN\"\n[report]\nmodels = [\"knn-k5\"]\nlayout = \"wide\"\ndigits = 2\n[report.summary]\ncaption = \"c\"\nlabel = \"tab:c\"\n"))
	f.Fuzz(func(t *testing.T, data []byte) {
		defer benchtest.Watchdog("spec.Parse/NewPlan")()
		s, err := spec.Parse("fuzz.toml", data)
		if err != nil {
			benchtest.CheckInputError(t, err)
			return
		}
		if s.Name == "" || len(s.Datasets) == 0 || len(s.Pipelines) == 0 || len(s.Models) == 0 {
			t.Fatalf("accepted an incomplete spec: %+v", s)
		}
		seen := map[string]bool{}
		var names []string
		for _, m := range s.Models {
			if m.Name == "" || seen[m.Name] {
				t.Fatalf("empty or repeated model name %q", m.Name)
			}
			seen[m.Name] = true
			names = append(names, m.Name)
		}
		// The [report] options of an accepted spec pass results' own
		// check, which the writers of summary.tex and summary.md apply.
		var ds []string
		for _, d := range s.Datasets {
			ds = append(ds, d.Display())
		}
		if err := s.ReportOptions().Check(names, s.Pipelines, ds); err != nil {
			t.Fatalf("accepted report options that results refuses: %v", err)
		}
		// Plan only small grids over embedded data: a spec may ask for
		// any number of repeats, and files are not the fuzzer's to read.
		if s.CV.Repeats > 2 || s.CV.Folds > 10 || len(s.Datasets) > 2 || len(s.Pipelines) > 3 {
			return
		}
		for _, d := range s.Datasets {
			if d.IsFile() {
				return
			}
		}
		if _, err := plan.New(s); err != nil {
			benchtest.CheckInputError(t, err)
		}
	})
}
