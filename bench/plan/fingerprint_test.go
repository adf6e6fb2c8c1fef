package plan_test

import (
	"os"
	"path/filepath"
	"testing"

	"fringe/bench/plan"
	"fringe/bench/spec"
)

// TestFingerprintCoversModelFiles checks that a run's identity changes when
// a file a model reads while it runs changes (a counts file, an external
// program's script), so that a resumed run never mixes old and new results.
func TestFingerprintCoversModelFiles(t *testing.T) {
	dir := t.TempDir()
	counts := filepath.Join(dir, "measured.csv")
	script := filepath.Join(dir, "mine.py")
	specPath := filepath.Join(dir, "s.toml")
	write := func(path, text string) {
		t.Helper()
		if err := os.WriteFile(path, []byte(text), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	write(counts, "dataset,repeat,fold,row,ancilla,class,count\n")
	write(script, "print('v1')\n")
	write(specPath, `name = "fp"
seed = 1
datasets = ["iris"]
[cv]
folds = 3
[[model]]
kind = "counts"
file = "measured.csv"
[[model]]
kind = "command"
run = ["python3", "mine.py"]
`)
	fp := func() string {
		t.Helper()
		s, err := spec.Load(specPath)
		if err != nil {
			t.Fatal(err)
		}
		p, err := plan.New(s)
		if err != nil {
			t.Fatal(err)
		}
		return p.Fingerprint()
	}
	a := fp()
	if b := fp(); a != b {
		t.Fatal("fingerprint is not stable")
	}
	write(script, "print('v2')\n")
	b := fp()
	if b == a {
		t.Error("changing the external program's script left the fingerprint unchanged")
	}
	write(counts, "dataset,repeat,fold,row,ancilla,class,count\niris,0,0,0,0,00,1\n")
	if c := fp(); c == b {
		t.Error("changing the counts file left the fingerprint unchanged")
	}
}
