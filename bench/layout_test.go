package bench

import (
	"go/build"
	"io/fs"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"testing"
)

// The import rules of the module, checked on the source tree: each
// package's doc.go says the same in words. A key lists the module's
// packages a package may import (its non-test files); any other arrow
// inside the module fails the test, and so does a package the rules do
// not know (a new package must be placed here, on purpose).
//
// The harness is layered, from the command down to the ground:
//
//	cmd/fringe
//	assess, cluster
//	export, runner
//	report
//	plan
//	spec
//	modelkit
//	outdir, input, cv, stats
//	results, datasets, baselines, qkernel, qkernel/device, qkernel/circuit, qkernel/sim
var allowed = map[string][]string{
	"bench":        {},
	"bench/cv":     {},
	"bench/stats":  {},
	"bench/input":  {},
	"bench/outdir": {"results"},
	"bench/modelkit": {"bench/input", "bench/cv",
		"baselines", "datasets", "qkernel", "qkernel/circuit", "qkernel/device", "qkernel/sim"},
	"bench/spec": {"bench/input", "bench/modelkit", "datasets", "results"},
	"bench/plan": {"bench/input", "bench/spec", "bench/modelkit", "bench/cv",
		"baselines", "datasets", "qkernel", "qkernel/circuit", "qkernel/sim"},
	"bench/report": {"bench/input", "bench/spec", "bench/modelkit", "bench/plan", "bench/outdir", "bench/stats",
		"datasets", "results"},
	"bench/runner": {"bench/input", "bench/spec", "bench/modelkit", "bench/plan", "bench/report", "bench/outdir", "bench/stats", "bench/cv",
		"baselines", "datasets", "qkernel", "results"},
	"bench/export": {"bench/input", "bench/spec", "bench/modelkit", "bench/plan", "bench/outdir",
		"datasets", "qkernel", "qkernel/circuit", "qkernel/device", "results"},
	"bench/assess": {"bench/input", "bench/spec", "bench/modelkit", "bench/plan", "bench/runner", "bench/report",
		"bench/export", "bench/outdir", "bench/stats",
		"datasets", "qkernel", "qkernel/circuit", "qkernel/device", "qkernel/sim", "results"},
	"bench/cluster": {"bench/input", "bench/plan"},
	// Helpers shared by the harness's tests (imported by tests only).
	"bench/internal/benchtest": {"bench/input", "bench/spec", "bench/plan"},
	"bench/cmd/fringe": {"bench/input", "bench/spec", "bench/modelkit", "bench/plan", "bench/runner", "bench/report",
		"bench/export", "bench/assess", "bench/cluster", "bench/outdir",
		"baselines", "datasets", "qkernel", "qkernel/circuit", "qkernel/device", "qkernel/sim", "results"},

	// The ground: the model packages and the writers never import the
	// harness (DESIGN.md: imports point one way).
	"results":         {"bench/stats"},
	"datasets":        {},
	"baselines":       {},
	"qkernel":         {"qkernel/circuit", "qkernel/sim", "qkernel/device"},
	"qkernel/device":  {"qkernel/circuit", "qkernel/sim"},
	"qkernel/circuit": {},
	"qkernel/sim":     {"qkernel/circuit"},
}

// testAllowed adds what a package's tests may import beyond its own
// rules: the package itself (external tests), and the splitters of
// bench/cv for the model packages' cross-validated checks. Tests of the
// harness may import any package of the module but the command (Go
// refuses an import cycle for internal tests); the ground's tests never
// import the harness beyond bench/cv.
var testAllowed = map[string][]string{
	"qkernel":         {"baselines", "datasets", "bench/cv"},
	"qkernel/device":  {"datasets", "bench/cv"},
	"qkernel/circuit": {"datasets"},
	"baselines":       {"datasets"},
	"results":         {"datasets"},
}

// modulePackages returns the module's packages (directories holding Go
// files, testdata excluded) relative to the module root.
func modulePackages(t *testing.T, root string) []string {
	t.Helper()
	var out []string
	err := filepath.WalkDir(root, func(path string, d fs.DirEntry, err error) error {
		if err != nil {
			return err
		}
		if d.IsDir() {
			name := d.Name()
			if path != root && (strings.HasPrefix(name, ".") || name == "testdata" || name == "scripts" || name == "examples") {
				return filepath.SkipDir
			}
			return nil
		}
		if strings.HasSuffix(path, ".go") {
			rel, _ := filepath.Rel(root, filepath.Dir(path))
			rel = filepath.ToSlash(rel)
			if len(out) == 0 || out[len(out)-1] != rel {
				out = append(out, rel)
			}
		}
		return nil
	})
	if err != nil {
		t.Fatal(err)
	}
	slices.Sort(out)
	return slices.Compact(out)
}

// internal keeps the module's own imports, without the "fringe/" prefix.
func internal(imports []string) []string {
	var out []string
	for _, p := range imports {
		if rest, ok := strings.CutPrefix(p, "fringe/"); ok {
			out = append(out, rest)
		}
	}
	return out
}

func TestImportRules(t *testing.T) {
	root, err := filepath.Abs("..")
	if err != nil {
		t.Fatal(err)
	}
	if _, err := os.Stat(filepath.Join(root, "go.mod")); err != nil {
		t.Fatalf("module root not found at %s: %v", root, err)
	}
	pkgs := modulePackages(t, root)
	for _, rel := range pkgs {
		if rel == "." {
			t.Errorf("Go files at the module root: the top level holds only the fixed layout")
			continue
		}
		rules, known := allowed[rel]
		if !known {
			t.Errorf("package %s is not in the import rules of bench/layout_test.go: add it, with the packages it may import, and say so in its doc.go", rel)
			continue
		}
		bp, err := build.Default.ImportDir(filepath.Join(root, filepath.FromSlash(rel)), 0)
		if err != nil {
			t.Errorf("%s: %v", rel, err)
			continue
		}
		for _, imp := range internal(bp.Imports) {
			if !slices.Contains(rules, imp) {
				t.Errorf("forbidden import: %s imports %s (allowed: %s)", rel, imp, strings.Join(rules, ", "))
			}
		}
		testRules := append(append(slices.Clone(rules), rel), testAllowed[rel]...)
		harness := rel == "bench" || strings.HasPrefix(rel, "bench/")
		for _, imp := range internal(append(bp.TestImports, bp.XTestImports...)) {
			switch {
			case imp == "bench/cmd/fringe":
				t.Errorf("forbidden test import: %s imports the command", rel)
			case harness:
				// Any package but the command; the compiler refuses cycles.
			case !slices.Contains(testRules, imp):
				t.Errorf("forbidden test import: %s's tests import %s (allowed: %s)", rel, imp, strings.Join(testRules, ", "))
			}
		}
		if strings.HasPrefix(rel, "bench/") && rel != "bench/cmd/fringe" {
			if _, err := os.Stat(filepath.Join(root, filepath.FromSlash(rel), "doc.go")); err != nil {
				t.Errorf("%s has no doc.go saying what it holds and what it may import", rel)
			}
		}
	}
	for rel := range allowed {
		if !slices.Contains(pkgs, rel) {
			t.Errorf("the import rules name %s, which is not a package of the module", rel)
		}
	}
}

// TestImportRulesCatchArrows checks the checker: a rule set without an
// arrow the code has must report it.
func TestImportRulesCatchArrows(t *testing.T) {
	got := internal([]string{"fmt", "fringe/bench/plan", "gonum.org/v1/gonum/mat", "fringe/results"})
	if strings.Join(got, " ") != "bench/plan results" {
		t.Fatalf("internal() = %v", got)
	}
	bp, err := build.Default.ImportDir("runner", 0)
	if err != nil {
		t.Fatal(err)
	}
	if !slices.Contains(internal(bp.Imports), "bench/plan") {
		t.Fatalf("bench/runner's imports %v lack bench/plan: the reader does not see imports", bp.Imports)
	}
}
