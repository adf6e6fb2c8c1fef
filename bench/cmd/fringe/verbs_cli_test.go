package main

import (
	"encoding/json"
	"flag"
	"os"
	"path/filepath"
	"regexp"
	"runtime/debug"
	"strings"
	"testing"
)

// TestFlagErrors checks the message of a wrong flag: one line, the verb
// named once (before: "fringe: fringe assess: flag provided but not
// defined: -x"), and a hint naming the flag meant when the guess is close
// or a known alias, or where the setting lives.
func TestFlagErrors(t *testing.T) {
	for _, c := range []struct {
		args []string
		want string
	}{
		{[]string{"assess", "-datset", "wine"}, "fringe: assess: unknown flag -datset; did you mean -dataset? (see 'fringe assess -h')"},
		{[]string{"run", "x.toml", "-wokers", "2"}, "fringe: run: unknown flag -wokers; did you mean -workers? (see 'fringe run -h')"},
		{[]string{"demo", "-o", "x"}, "fringe: demo: unknown flag -o; did you mean -out? (see 'fringe demo -h')"},
		{[]string{"run", "x.toml", "-j", "4"}, "fringe: run: unknown flag -j; did you mean -workers? (see 'fringe run -h')"},
		{[]string{"circuit", "-Qasm"}, "fringe: circuit: unknown flag -Qasm; did you mean -qasm? (see 'fringe circuit -h')"},
		{[]string{"compare", "-json_file", "x", "a", "b"}, "fringe: compare: unknown flag -json_file; did you mean -json-file? (see 'fringe compare -h')"},
		{[]string{"run", "x.toml", "-seed", "3"}, "fringe: run: unknown flag -seed; the seed of a run is the spec's seed key (see 'fringe run -h')"},
		{[]string{"run", "x.toml", "-version"}, "fringe: run: unknown flag -version; the version is printed by 'fringe version' or 'fringe -version' (see 'fringe run -h')"},
		{[]string{"rank", "-frobnicate"}, "fringe: rank: unknown flag -frobnicate (see 'fringe rank -h')"},
		{[]string{"run", "x.toml", "-workers", "many"}, "fringe: run: invalid value \"many\" for flag -workers: parse error (see 'fringe run -h')"},
		{[]string{"-workers", "2"}, "fringe: -workers is not a verb; flags follow the verb: fringe VERB [flags]"},
	} {
		code, _, stderr := runCmd(t, "", c.args...)
		lines := strings.Split(strings.TrimSpace(stderr), "\n")
		if code != 2 || lines[len(lines)-1] != c.want {
			t.Errorf("fringe %s: exit %d, last line %q\nwant exit 2 and %q", strings.Join(c.args, " "), code, lines[len(lines)-1], c.want)
		}
		if len(c.args[0]) > 0 && c.args[0][0] != '-' && len(lines) != 1 {
			t.Errorf("fringe %s: %d lines on stderr, want one", strings.Join(c.args, " "), len(lines))
		}
		if strings.Contains(stderr, "fringe: fringe") {
			t.Errorf("doubled prefix: %q", stderr)
		}
	}
}

// TestEditDistance checks the optimal-string-alignment distance on
// worked examples (derived by hand from its definition: insert, delete,
// substitute, swap adjacent).
func TestEditDistance(t *testing.T) {
	for _, c := range []struct {
		a, b string
		d    int
	}{
		{"", "", 0}, {"out", "out", 0}, {"", "abc", 3}, {"datset", "dataset", 1}, {"wokers", "workers", 1},
		{"wrokers", "workers", 1}, {"kitten", "sitting", 3}, {"ca", "abc", 3}, {"json_file", "json-file", 1},
	} {
		if got := editDistance(c.a, c.b); got != c.d {
			t.Errorf("editDistance(%q, %q) = %d, want %d", c.a, c.b, got, c.d)
		}
		if got := editDistance(c.b, c.a); got != c.d {
			t.Errorf("editDistance(%q, %q) = %d, want %d (symmetry)", c.b, c.a, got, c.d)
		}
	}
}

// TestUsageListsEveryFlag parses every verb's flag set and checks that its
// usage line names every flag, so that the two cannot drift apart again;
// an alias ("same as -x") needs only its target there.
func TestUsageListsEveryFlag(t *testing.T) {
	var seen *flag.FlagSet
	parsing = func(fs *flag.FlagSet) { seen = fs }
	t.Cleanup(func() { parsing = nil })
	for _, c := range commands() {
		seen = nil
		code, stdout, _ := runCmd(t, "", c.name, "-h")
		if code != 0 || seen == nil {
			t.Errorf("%s -h: exit %d, flag set seen %v", c.name, code, seen != nil)
			continue
		}
		if !strings.HasPrefix(stdout, "usage: fringe "+c.name+" "+c.args) {
			t.Errorf("%s -h does not start with its usage line:\n%s", c.name, stdout)
		}
		seen.VisitAll(func(f *flag.Flag) {
			name := f.Name
			if target, ok := strings.CutPrefix(f.Usage, "same as -"); ok {
				name = strings.FieldsFunc(target, func(r rune) bool { return r == ' ' || r == ')' })[0]
			}
			if !regexp.MustCompile(`(^|[\[ |])-` + regexp.QuoteMeta(name) + `([ \]=|]|$)`).MatchString(c.args) {
				t.Errorf("usage line of %s lacks -%s: %q", c.name, name, c.args)
			}
		})
	}
}

// TestVersion checks `fringe version` and `fringe -version`: the same four
// lines in a fixed order, and the format of each from a build record.
func TestVersion(t *testing.T) {
	code, a, _ := runCmd(t, "", "version")
	code2, b, _ := runCmd(t, "", "-version")
	if code != 0 || code2 != 0 || a != b {
		t.Fatalf("version: exit %d and %d, outputs differ:\n%s\n%s", code, code2, a, b)
	}
	if !regexp.MustCompile(`^fringe \S+\nmodule: .+\ncommit: .+\ngo: go\S* \S+/\S+\n$`).MatchString(a) {
		t.Errorf("version output:\n%s", a)
	}
	bi := &debug.BuildInfo{GoVersion: "go1.26.8", Main: debug.Module{Path: "fringe", Version: "(devel)"},
		Settings: []debug.BuildSetting{{Key: "vcs", Value: "git"}, {Key: "vcs.revision", Value: "5a3453c"}, {Key: "vcs.time", Value: "2026-01-02T03:04:05Z"}, {Key: "vcs.modified", Value: "true"}}}
	want := "fringe 0.1.0-dev\nmodule: fringe (devel)\ncommit: 5a3453c 2026-01-02T03:04:05Z (modified: uncommitted changes)\ngo: go1.26.8 linux/amd64\n"
	if got := versionText(bi, "go0", "linux/amd64"); got != want {
		t.Errorf("versionText:\n%s\nwant\n%s", got, want)
	}
	bi.Settings = nil
	if got := versionText(bi, "go0", "linux/amd64"); !strings.Contains(got, "commit: unknown (built without version-control information") {
		t.Errorf("without a vcs stamp:\n%s", got)
	}
	if got := versionText(nil, "go1.26.8", "linux/amd64"); got != "fringe 0.1.0-dev\nmodule: unknown (no build information)\ncommit: unknown (no build information)\ngo: go1.26.8 linux/amd64\n" {
		t.Errorf("without build information:\n%s", got)
	}
	if code, _, _ := runCmd(t, "", "version", "extra"); code != 2 {
		t.Errorf("version extra: exit %d, want 2", code)
	}
}

// TestDatasetArguments checks that dataset names are arguments where no
// spec is given (before: "read spec: open wine: no such file or
// directory"), and that -dataset and -datasets are both accepted by assess
// and circuit.
func TestDatasetArguments(t *testing.T) {
	work := t.TempDir()
	for _, args := range [][]string{
		{"assess", "iris", "cats"},
		{"assess", "-dataset", "iris,cats"},
	} {
		out := filepath.Join(work, strings.Join(args[1:], "_"))
		code, _, stderr := runCmd(t, "", append(args, "-pipelines", "l2", "-repeats", "1", "-folds", "3", "-subsets", "", "-quiet", "-out", out)...)
		if code != 0 {
			t.Fatalf("%v: exit %d: %s", args, code, stderr)
		}
		csv, err := os.ReadFile(filepath.Join(out, "assess.csv"))
		if err != nil {
			t.Fatal(err)
		}
		if n := strings.Count(string(csv), "\n"); n != 3 || !strings.Contains(string(csv), ",iris,l2,") || !strings.Contains(string(csv), ",cats,l2,") {
			t.Errorf("%v: assess.csv has %d lines, want iris and cats:\n%s", args, n, csv)
		}
	}
	for _, c := range []struct {
		args []string
		want string
	}{
		{[]string{"circuit", "wine"}, "wine (3 classes, 13 features after std+l2)"},
		{[]string{"circuit", "-datasets", "wine", "-train", "8"}, "wine (3 classes, 13 features after std+l2)"},
		{[]string{"circuit", "-dataset", "wine", "wine"}, "qubits"},
	} {
		code, out, stderr := runCmd(t, "", c.args...)
		if code != 0 || !strings.Contains(out, c.want) {
			t.Errorf("%v: exit %d, output %q (stderr %q), want %q", c.args, code, out, stderr, c.want)
		}
	}
	for _, c := range []struct {
		args []string
		want string
	}{
		{[]string{"circuit", "wine", "iris"}, "one dataset"},
		{[]string{"circuit", "-dataset", "iris", "wine"}, "one way"},
		{[]string{"circuit", "-datasets", "iris,wine"}, "one dataset"},
		{[]string{"circuit", "my.toml"}, "-export DIR my.toml"},
		{[]string{"circuit", "irises"}, "irises"},
		{[]string{"assess", "a.toml", "b.toml"}, "at most one spec"},
		{[]string{"assess", "iris", "-datasets", "wine"}, "one way"},
		{[]string{"assess", "-datasets", "s.toml"}, "a spec file is an argument"},
		{[]string{"assess", "irises", "-out", filepath.Join(work, "bad")}, "irises"},
		{[]string{"assess", "iris", "-margin", "0"}, "-margin"},
	} {
		code, _, stderr := runCmd(t, "", c.args...)
		msg := strings.TrimSpace(stderr)
		if code != 2 || !strings.Contains(msg, c.want) || strings.Contains(msg, "\n") {
			t.Errorf("%v: exit %d, %q; want 2 and one line naming %q", c.args, code, msg, c.want)
		}
	}
}

// TestQuietSaysWhere checks that -quiet still prints the one line that
// says where the run went (before: nothing at all).
func TestQuietSaysWhere(t *testing.T) {
	spec, _ := filepath.Abs("../../../examples/own-csv.toml")
	out := filepath.Join(t.TempDir(), "run")
	code, stdout, stderr := runCmd(t, "", "run", spec, "-out", out, "-quiet")
	if code != 0 || stdout != "run directory: "+out+"\n" || stderr != "" {
		t.Fatalf("run -quiet: exit %d, stdout %q, stderr %q", code, stdout, stderr)
	}
	shard := filepath.Join(t.TempDir(), "shard")
	code, stdout, _ = runCmd(t, "", "run", spec, "-out", shard, "-quiet", "-shard", "1/2")
	if code != 0 || stdout != "partial run directory: "+shard+"\n" {
		t.Fatalf("run -quiet -shard: exit %d, stdout %q", code, stdout)
	}
}

// TestNoPipelinesWarning checks the decision for a spec without
// pipelines: it runs pipeline raw, warns once on standard error and keeps
// the warning in the manifest; pipelines = ["raw"] says so without a
// warning.
func TestNoPipelinesWarning(t *testing.T) {
	dir := t.TempDir()
	base := "name = \"np\"\nseed = 1\ndatasets = [\"iris\"]\n%s[cv]\nfolds = 3\n[[model]]\nkind = \"knn\"\n"
	for _, c := range []struct {
		name, pipes string
		warn        bool
	}{
		{"missing", "", true},
		{"empty", "pipelines = []\n", true},
		{"raw", "pipelines = [\"raw\"]\n", false},
	} {
		t.Run(c.name, func(t *testing.T) {
			spec := filepath.Join(dir, c.name+".toml")
			if err := os.WriteFile(spec, []byte(strings.Replace(base, "%s", c.pipes, 1)), 0o644); err != nil {
				t.Fatal(err)
			}
			out := filepath.Join(dir, c.name)
			code, _, stderr := runCmd(t, "", "run", spec, "-out", out, "-quiet")
			if code != 0 {
				t.Fatalf("exit %d: %s", code, stderr)
			}
			n := strings.Count(stderr, "no pipelines given")
			if c.warn && (n != 1 || strings.Count(stderr, "\n") != 1 || !strings.Contains(stderr, "fringe: warning: "+spec+": no pipelines given")) || !c.warn && stderr != "" {
				t.Errorf("stderr %q (warning %v)", stderr, c.warn)
			}
			data, err := os.ReadFile(filepath.Join(out, "manifest.json"))
			if err != nil {
				t.Fatal(err)
			}
			var m struct{ Warnings []string }
			if err := json.Unmarshal(data, &m); err != nil {
				t.Fatal(err)
			}
			got := strings.Contains(strings.Join(m.Warnings, "\n"), "no pipelines given")
			if got != c.warn {
				t.Errorf("manifest warnings %q, want the warning: %v", m.Warnings, c.warn)
			}
			summary, _ := os.ReadFile(filepath.Join(out, "summary.csv"))
			if !strings.Contains(string(summary), ",raw,") {
				t.Errorf("summary.csv does not show pipeline raw:\n%s", summary)
			}
		})
	}
}

// TestNoGoIdentifiers checks that `fringe list` and every verb's help
// speak in words: no mixed-case Go identifier (before: "see
// IrisUCIVariant" in the iris note). Units and proper names written in
// mixed case are allowed.
func TestNoGoIdentifiers(t *testing.T) {
	allowed := map[string]bool{"MiB": true, "GiB": true, "PLoS": true, "OpenQASM": true, "LaTeX": true}
	mixed := regexp.MustCompile(`\b[A-Za-z]*[a-z][A-Z][A-Za-z]*\b`)
	texts := map[string]string{}
	_, texts["list"], _ = runCmd(t, "", "list")
	for _, c := range commands() {
		_, texts[c.name+" -h"], _ = runCmd(t, "", c.name, "-h")
	}
	for what, text := range texts {
		for _, w := range mixed.FindAllString(text, -1) {
			if !allowed[w] {
				t.Errorf("%s shows the identifier %q", what, w)
			}
		}
	}
	if !strings.Contains(texts["list"], "no dataset name in a spec") {
		t.Error("the iris note does not say in words that the UCI variant has no dataset name")
	}
}
