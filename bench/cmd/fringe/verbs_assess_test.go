package main

import (
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// TestAssessVerb runs `fringe assess` on two small embedded sets and checks
// the exit status, the printed ranking and the files written.
func TestAssessVerb(t *testing.T) {
	work := t.TempDir()
	out := filepath.Join(work, "report")
	code, stdout, stderr := runCmd(t, work, "assess", "-datasets", "iris,cats", "-pipelines", "std+l2,l2", "-repeats", "1", "-subsets", "2,16", "-out", out, "-workers", "2")
	if code != 0 {
		t.Fatalf("exit %d, stderr:\n%s", code, stderr)
	}
	for _, want := range []string{"| rank | front | dataset |", "| iris | std+l2 |", "| cats | l2 |", "Pareto", "assess.md"} {
		if !strings.Contains(stdout, want) {
			t.Errorf("output lacks %q:\n%s", want, stdout)
		}
	}
	for _, f := range []string{"assess.csv", "assess-resources.csv", "assess.md", "assess.tex", "assess.json", "figures/assess-cost-gain.svg", "figures/assess-norm-raw.png"} {
		if _, err := os.Stat(filepath.Join(out, f)); err != nil {
			t.Errorf("missing %s: %v", f, err)
		}
	}
	csv, err := os.ReadFile(filepath.Join(out, "assess.csv"))
	if err != nil {
		t.Fatal(err)
	}
	if n := strings.Count(string(csv), "\n"); n != 5 { // header + 2 datasets x 2 pipelines
		t.Errorf("assess.csv has %d lines, want 5", n)
	}
}

// TestAssessVerbSpec takes the datasets and pipelines from a spec.
func TestAssessVerbSpec(t *testing.T) {
	work := t.TempDir()
	spec := filepath.Join(work, "s.toml")
	os.WriteFile(spec, []byte("name = \"mine\"\nseed = 3\ndatasets = [\"cats\"]\npipelines = [\"std+lift(2)\"]\n[[model]]\nkind = \"knn\"\n"), 0o644)
	code, stdout, stderr := runCmd(t, work, "assess", spec, "-repeats", "1", "-subsets", "", "-quiet")
	if code != 0 || stdout != "" {
		t.Fatalf("exit %d, stdout %q, stderr:\n%s", code, stdout, stderr)
	}
	md, err := os.ReadFile(filepath.Join(work, "fringe-out", "mine-assess", "assess.md"))
	if err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(string(md), "| cats | std+lift(2) |") || !strings.Contains(string(md), "seed 3") {
		t.Errorf("assess.md does not assess cats/std+lift(2) with the spec's seed:\n%s", md)
	}
}

// TestAssessVerbBadUsage checks exit status 2 with a one-line message.
func TestAssessVerbBadUsage(t *testing.T) {
	work := t.TempDir()
	for _, c := range []struct {
		args []string
		want string
	}{
		{[]string{"-weights", "heavy"}, "-weights"},
		{[]string{"-subsets", "8,x"}, "-subsets"},
		{[]string{"-folds", "1"}, "-folds"},
		{[]string{"-datasets", "irises"}, "irises"},
		{[]string{"-datasets", "iris", "-pipelines", "std+whiten"}, "whiten"},
		{[]string{"a.toml", "b.toml"}, "at most one spec"},
		{[]string{"missing.toml"}, "missing.toml"},
	} {
		code, _, stderr := runCmd(t, work, append([]string{"assess", "-out", filepath.Join(work, "o")}, c.args...)...)
		msg := strings.TrimSpace(stderr)
		if code != 2 || !strings.Contains(msg, c.want) || strings.Contains(msg, "\n") {
			t.Errorf("%v: exit %d, message %q; want 2 and one line naming %q", c.args, code, msg, c.want)
		}
	}
	if _, err := os.Stat(filepath.Join(work, "o")); err == nil {
		t.Error("bad input left an output directory")
	}
	code, stdout, _ := runCmd(t, work, "assess", "-h")
	if code != 0 || !strings.Contains(stdout, "-pipelines") || !strings.Contains(stdout, "-ratio") {
		t.Errorf("-h: exit %d, %q", code, stdout)
	}
}
