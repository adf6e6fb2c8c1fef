package main

import (
	"encoding/json"
	"os"
	"path/filepath"
	"reflect"
	"strings"
	"testing"
)

// TestRespelledSpec runs testdata/respell/old.toml (every old spelling of a
// renamed model key or value) and new.toml (the same spec in the current
// spellings): the run directories are byte-identical but for manifest.json
// and timings.csv; the old spec's run prints one warning per old spelling
// on stderr, naming the file, the line and the new spelling, and records
// the same warnings in manifest.json; the new one warns nowhere. A shard
// of each merges into the same run: both spellings share one identity.
func TestRespelledSpec(t *testing.T) {
	oldSpec, _ := filepath.Abs("testdata/respell/old.toml")
	newSpec, _ := filepath.Abs("testdata/respell/new.toml")
	dir := t.TempDir()
	oldOut, newOut := filepath.Join(dir, "old"), filepath.Join(dir, "new")
	code, _, oldErr := runCmd(t, "", "run", oldSpec, "-out", oldOut, "-workers", "2", "-quiet")
	if code != 0 {
		t.Fatalf("old spelling: exit %d: %s", code, oldErr)
	}
	code, _, newErr := runCmd(t, "", "run", newSpec, "-out", newOut, "-workers", "2", "-quiet")
	if code != 0 {
		t.Fatalf("new spelling: exit %d: %s", code, newErr)
	}
	sameRunDirs(t, newOut, oldOut)

	// The lines of old.toml where each old spelling is written.
	const tail = " is deprecated and will not be read by the next release; write "
	want := []string{
		oldSpec + `:18: key model[1].weights: weights = "distance"` + tail + `vote = "inverse-distance"`,
		oldSpec + `:24: key model[2].coef0: coef0 = 1.0` + tail + `offset = 1.0`,
		oldSpec + `:25: key model[2].gamma: gamma = "scale"` + tail + `gamma = "inverse-variance"`,
		oldSpec + `:31: key model[3].gamma: gamma = ["scale", 0.5]` + tail + `gamma = ["inverse-variance", 0.5]`,
		oldSpec + `:38: key model[4].method: method = "density"` + tail + `simulator = "density-matrix"`,
	}
	var wantErr strings.Builder
	for _, w := range want {
		wantErr.WriteString("fringe: warning: " + w + "\n")
	}
	if oldErr != wantErr.String() {
		t.Errorf("stderr of the old spelling:\n%s\nwant:\n%s", oldErr, wantErr.String())
	}
	if newErr != "" {
		t.Errorf("stderr of the new spelling: %q, want nothing", newErr)
	}
	if got := manifestWarnings(t, oldOut); !reflect.DeepEqual(got, want) {
		t.Errorf("manifest warnings of the old spelling:\n%s\nwant:\n%s", strings.Join(got, "\n"), strings.Join(want, "\n"))
	}
	if got := manifestWarnings(t, newOut); len(got) != 0 {
		t.Errorf("manifest warnings of the new spelling: %q", got)
	}

	// One shard in each spelling: the same run identity, so they merge
	// into the run of either spec.
	s1, s2, merged := filepath.Join(dir, "s1"), filepath.Join(dir, "s2"), filepath.Join(dir, "merged")
	if code, _, stderr := runCmd(t, "", "run", oldSpec, "-shard", "1/2", "-out", s1, "-workers", "1", "-quiet"); code != 0 {
		t.Fatalf("shard 1/2 (old spelling): exit %d: %s", code, stderr)
	}
	if code, _, stderr := runCmd(t, "", "run", newSpec, "-shard", "2/2", "-out", s2, "-workers", "1", "-quiet"); code != 0 {
		t.Fatalf("shard 2/2 (new spelling): exit %d: %s", code, stderr)
	}
	if code, _, stderr := runCmd(t, "", "merge", "-out", merged, "-quiet", s2, s1); code != 0 {
		t.Fatalf("merge of the two spellings' shards: exit %d: %s", code, stderr)
	}
	sameRunDirs(t, newOut, merged)

	// fringe list names the new spellings.
	code, out, _ := runCmd(t, "", "list")
	for _, w := range []string{"vote", "inverse-distance", "offset", "inverse-variance", "simulator", "density-matrix"} {
		if code != 0 || !strings.Contains(out, w) {
			t.Errorf("fringe list lacks %q", w)
		}
	}
}

// manifestWarnings reads the warnings of a run directory's manifest.
func manifestWarnings(t *testing.T, dir string) []string {
	t.Helper()
	b, err := os.ReadFile(filepath.Join(dir, "manifest.json"))
	if err != nil {
		t.Fatal(err)
	}
	var m struct {
		Warnings []string `json:"warnings"`
	}
	if err := json.Unmarshal(b, &m); err != nil {
		t.Fatal(err)
	}
	return m.Warnings
}
