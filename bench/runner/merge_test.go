package runner

import (
	"context"
	"errors"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"fringe/bench/input"
	"fringe/bench/internal/benchtest"
	"fringe/bench/plan"
	"fringe/bench/spec"
)

// writeShards runs every shard of n into dir/shard-i and returns the
// directories.
func writeShards(t *testing.T, p *plan.Plan, dir string, n int) []string {
	t.Helper()
	var dirs []string
	for i := 1; i <= n; i++ {
		d := filepath.Join(dir, "shard-"+string(rune('0'+i)))
		pr, err := OpenPartial(d, p, plan.Shard{I: i, N: n}, PartialOptions{Workers: 1})
		if err != nil {
			t.Fatal(err)
		}
		runPartial(t, p, pr)
		dirs = append(dirs, d)
	}
	return dirs
}

// TestMergeEqualsWholeRun checks that merging the shards of a run gives
// exactly the results of the whole run, in task order, for several shard
// counts and in any order of the directories.
func TestMergeEqualsWholeRun(t *testing.T) {
	p := benchtest.Plan(t, "cluster.toml", clusterSpec)
	want, err := Execute(context.Background(), p, Options{Workers: 2})
	if err != nil {
		t.Fatal(err)
	}
	for _, n := range []int{1, 3} {
		dirs := writeShards(t, p, t.TempDir(), n)
		for i, j := 0, len(dirs)-1; i < j; i, j = i+1, j-1 {
			dirs[i], dirs[j] = dirs[j], dirs[i]
		}
		m, err := Merge(dirs)
		if err != nil {
			t.Fatalf("n=%d: %v", n, err)
		}
		if m.Shards != n || len(m.Results) != len(want) {
			t.Fatalf("n=%d: %d shards, %d results", n, m.Shards, len(m.Results))
		}
		if m.Plan.Fingerprint() != p.Fingerprint() {
			t.Fatalf("n=%d: the rebuilt plan differs", n)
		}
		for i := range want {
			sameResult(t, want[i], m.Results[i])
		}
	}
}

// TestMergeRefuses checks every refusal of Merge and its message.
func TestMergeRefuses(t *testing.T) {
	p := benchtest.Plan(t, "cluster.toml", clusterSpec)
	base := t.TempDir()
	dirs := writeShards(t, p, filepath.Join(base, "a"), 3)
	seed4 := benchtest.Plan(t, "cluster.toml", strings.Replace(clusterSpec, "seed = 3", "seed = 4", 1))
	other := writeShards(t, seed4, filepath.Join(base, "b"), 3)
	four := writeShards(t, p, filepath.Join(base, "c"), 4)

	// An incomplete shard: shard 2 of 3 with only part of its tasks.
	inc := filepath.Join(base, "incomplete")
	pr, _ := OpenPartial(inc, p, plan.Shard{I: 2, N: 3}, PartialOptions{})
	todo := pr.Missing()
	if _, err := Execute(context.Background(), p, Options{Workers: 1, Tasks: todo[:5], Save: pr.Save}); err != nil {
		t.Fatal(err)
	}
	// A complete run directory and an unrelated one.
	complete := filepath.Join(base, "complete")
	os.MkdirAll(complete, 0o755)
	os.WriteFile(filepath.Join(complete, "summary.csv"), []byte("x\n"), 0o644)
	plain := filepath.Join(base, "plain")
	os.MkdirAll(plain, 0o755)

	for _, c := range []struct {
		name string
		dirs []string
		want []string
	}{
		{"none", nil, []string{"no partial run directories"}},
		{"missing", []string{dirs[0]}, []string{"missing shard(s) 2, 3 of 3", "given: 1"}},
		{"missing middle", []string{dirs[0], dirs[2]}, []string{"missing shard(s) 2 of 3"}},
		{"extra shard of another run", []string{dirs[0], dirs[1], dirs[2], other[1]}, []string{other[1], "different run", "seed 4, not 3"}},
		{"same dir twice", []string{dirs[0], dirs[1], dirs[1], dirs[2]}, []string{dirs[1], "given twice"}},
		{"copied shard", []string{dirs[0], dirs[1], dirs[2], benchtest.CopyDir(t, dirs[1], filepath.Join(base, "copy"))}, []string{"duplicate shards", "shard 2/3 in", filepath.Join(base, "copy")}},
		{"other seed", []string{dirs[0], other[1], dirs[2]}, []string{other[1], "seed 4, not 3"}},
		{"shard count", []string{dirs[0], four[1], dirs[2]}, []string{four[1], "shard 2/4", "shard 1/3", "different shard counts"}},
		{"incomplete", []string{dirs[0], inc, dirs[2]}, []string{inc, "incomplete", "5 of its"}},
		{"complete run", []string{complete}, []string{complete, "complete run directory"}},
		{"not partial", []string{plain}, []string{plain, "not a partial run directory"}},
		{"nonexistent", []string{filepath.Join(base, "nope")}, []string{"nope", "no such directory"}},
	} {
		_, err := Merge(c.dirs)
		if err == nil {
			t.Errorf("%s: merged, want a refusal", c.name)
			continue
		}
		if !errors.Is(err, input.ErrBad) || !errors.Is(err, ErrPartial) {
			t.Errorf("%s: %v is not an input error", c.name, err)
		}
		if strings.Contains(err.Error(), "\n") {
			t.Errorf("%s: message spans lines: %q", c.name, err)
		}
		for _, w := range c.want {
			if !strings.Contains(err.Error(), w) {
				t.Errorf("%s: message %q lacks %q", c.name, err, w)
			}
		}
	}

	// The data changed since the shards ran: the recorded spec is rebuilt
	// and its fingerprint no longer matches.
	csvDir := filepath.Join(base, "csv")
	os.MkdirAll(csvDir, 0o755)
	csv := "a,b,label\n1,2,x\n2,1,y\n1,1,x\n2,2,y\n3,1,x\n1,3,y\n"
	os.WriteFile(filepath.Join(csvDir, "d.csv"), []byte(csv), 0o644)
	specPath := filepath.Join(csvDir, "s.toml")
	os.WriteFile(specPath, []byte("name = \"csv\"\nseed = 1\ndatasets = [\"d.csv\"]\n[cv]\nmethod = \"holdout\"\ntest_fraction = 0.5\nrepeats = 2\n[[model]]\nkind = \"knn\"\nk = 1\n"), 0o644)
	s, err := spec.Load(specPath)
	if err != nil {
		t.Fatal(err)
	}
	cp, err := plan.New(s)
	if err != nil {
		t.Fatal(err)
	}
	sh := writeShards(t, cp, filepath.Join(base, "csvshards"), 2)
	if _, err := Merge(sh); err != nil {
		t.Fatalf("merge of a CSV spec: %v", err)
	}
	os.WriteFile(filepath.Join(csvDir, "d.csv"), []byte(strings.Replace(csv, "3,1,x", "3,2,x", 1)), 0o644)
	if _, err := Merge(sh); err == nil || !strings.Contains(err.Error(), "has changed") {
		t.Errorf("changed data: %v, want a refusal", err)
	}
}
