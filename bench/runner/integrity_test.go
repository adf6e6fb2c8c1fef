package runner

import (
	"bytes"
	"context"
	"errors"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"fringe/bench/input"
	"fringe/bench/internal/benchtest"
	"fringe/bench/plan"
)

// editPred changes the first predicted class of a task file the way a
// person with a text editor would: the file stays valid JSON with the
// same structure ("pred":[0 becomes "pred":[1, or 1 becomes 0), and only
// the digest, which the editor does not recompute, gives it away.
func editPred(t *testing.T, path string) {
	t.Helper()
	data, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	var edited []byte
	for _, c := range [][2]string{{`"pred":[0`, `"pred":[1`}, {`"pred":[1`, `"pred":[0`}} {
		if bytes.Contains(data, []byte(c[0])) {
			edited = bytes.Replace(data, []byte(c[0]), []byte(c[1]), 1)
			break
		}
	}
	if edited == nil {
		t.Fatalf("%s: no prediction to edit", path)
	}
	if err := os.WriteFile(path, edited, 0o644); err != nil {
		t.Fatal(err)
	}
}

// TestEditedTaskFileRecomputed: an edited (still valid) task file in a
// partial run directory is not used on resume: a warning names the file,
// its tasks run again, and the results equal those of an untouched run.
// Before task files carried a digest, the edit was used silently.
func TestEditedTaskFileRecomputed(t *testing.T) {
	p := benchtest.Plan(t, "cluster.toml", clusterSpec)
	want, err := Execute(context.Background(), p, Options{Workers: 2})
	if err != nil {
		t.Fatal(err)
	}
	dir := filepath.Join(t.TempDir(), "run.partial")
	pr, _ := OpenPartial(dir, p, plan.Shard{}, PartialOptions{})
	runPartial(t, p, pr)
	files, _ := filepath.Glob(filepath.Join(dir, "tasks", "*.json"))
	editPred(t, files[0])

	again, err := OpenPartial(dir, p, plan.Shard{}, PartialOptions{})
	if err != nil {
		t.Fatal(err)
	}
	w := again.Warnings()
	if len(w) != 1 || !strings.Contains(w[0], files[0]) || !strings.Contains(w[0], "digest") || !strings.Contains(w[0], "run again") {
		t.Fatalf("warnings %q, want one naming %s and its digest", w, files[0])
	}
	if len(again.Missing()) == 0 {
		t.Fatal("no task is to be recomputed")
	}
	runPartial(t, p, again)
	final, err := OpenPartial(dir, p, plan.Shard{}, PartialOptions{})
	if err != nil {
		t.Fatal(err)
	}
	got, err := final.Results()
	if err != nil {
		t.Fatal(err)
	}
	for i := range want {
		sameResult(t, want[i], got[i])
	}
}

// TestMergeRefusesEditedShard: an edited task file in a shard makes the
// merge fail with an input error (exit status 2) that names the file;
// before, the edit changed the merged tables and the merge succeeded.
func TestMergeRefusesEditedShard(t *testing.T) {
	p := benchtest.Plan(t, "cluster.toml", clusterSpec)
	dirs := writeShards(t, p, t.TempDir(), 2)
	files, _ := filepath.Glob(filepath.Join(dirs[0], "tasks", "*.json"))
	editPred(t, files[0])
	_, err := Merge(dirs)
	if err == nil || !errors.Is(err, input.ErrBad) || !errors.Is(err, ErrPartial) {
		t.Fatalf("merge of an edited shard: %v, want an input error", err)
	}
	if !strings.Contains(err.Error(), files[0]) || !strings.Contains(err.Error(), "digest") {
		t.Errorf("message %q does not name the file and its digest", err)
	}
}

// TestTaskDigestBoundToRun: the digest covers the run, not only the
// content, so a task file copied from another run fails even if its task
// list were acceptable; and any change of one byte of the list changes it.
func TestTaskDigestBoundToRun(t *testing.T) {
	list := []byte(`[{"index":0}]`)
	a := taskDigest("run-a", list)
	if a == taskDigest("run-b", list) {
		t.Error("the digest does not depend on the run")
	}
	for i := range list {
		b := bytes.Clone(list)
		b[i] ^= 1
		if taskDigest("run-a", b) == a {
			t.Errorf("flipping a bit of byte %d leaves the digest unchanged", i)
		}
	}
}
