package runner

import (
	"context"
	"encoding/json"
	"errors"
	"math"
	"os"
	"path/filepath"
	"strings"
	"sync/atomic"
	"testing"

	"fringe/bench/input"
	"fringe/bench/internal/benchtest"
	"fringe/bench/plan"
)

// TestJSONFloatRoundTrip checks that the task-file float encoding gives
// back the same bits for the values that matter: NaN and the infinities
// (which plain JSON cannot hold), signed zero, subnormals, the extremes
// and values without a short decimal form.
func TestJSONFloatRoundTrip(t *testing.T) {
	vals := []float64{0, math.Copysign(0, -1), 1, -1, 0.1, 1.0 / 3, 2.0 / 3, math.Pi, 1e-300,
		math.SmallestNonzeroFloat64, -math.SmallestNonzeroFloat64, math.MaxFloat64, -math.MaxFloat64,
		math.Nextafter(1, 2), math.Nextafter(1, 0), math.Inf(1), math.Inf(-1), math.NaN(), 123456789.123456789}
	for _, v := range vals {
		b, err := json.Marshal(jsonFloat(v))
		if err != nil {
			t.Fatalf("marshal %v: %v", v, err)
		}
		var got jsonFloat
		if err := json.Unmarshal(b, &got); err != nil {
			t.Fatalf("unmarshal %s: %v", b, err)
		}
		if !sameBits(v, float64(got)) {
			t.Errorf("%v -> %s -> %v: bits %x, want %x", v, b, float64(got), math.Float64bits(float64(got)), math.Float64bits(v))
		}
	}
	for _, bad := range []string{`"nan"`, `"1.5"`, `"Infinity"`, `true`, `{}`, `1e999`} {
		var f jsonFloat
		if err := json.Unmarshal([]byte(bad), &f); err == nil {
			t.Errorf("unmarshal %s gave %v, want an error", bad, float64(f))
		}
	}
}

// runPartial runs the tasks a partial directory lacks and saves them.
func runPartial(t *testing.T, p *plan.Plan, pr *Partial) {
	t.Helper()
	if _, err := Execute(context.Background(), p, Options{Workers: 2, Tasks: pr.Missing(), Save: pr.Save}); err != nil {
		t.Fatal(err)
	}
	pr.Close()
}

// TestPartialRoundTrip runs a plan into a partial directory, reopens it and
// checks that every result comes back exactly (NaN probabilities
// included), that nothing is missing, and that the directory has the
// documented layout.
func TestPartialRoundTrip(t *testing.T) {
	p := benchtest.Plan(t, "cluster.toml", clusterSpec)
	want, err := Execute(context.Background(), p, Options{Workers: 2})
	if err != nil {
		t.Fatal(err)
	}
	if countNaN(want) == 0 {
		t.Fatal("the one-shot model produced no NaN probability; the NaN round trip is not exercised")
	}
	dir := filepath.Join(t.TempDir(), "run.partial")
	pr, err := OpenPartial(dir, p, plan.Shard{}, PartialOptions{Workers: 2})
	if err != nil {
		t.Fatal(err)
	}
	if pr.Exists() || len(pr.Missing()) != len(p.Tasks) {
		t.Fatalf("a new partial directory exists=%v with %d missing tasks", pr.Exists(), len(pr.Missing()))
	}
	if _, err := os.Stat(dir); !errors.Is(err, os.ErrNotExist) {
		t.Fatal("OpenPartial created the directory before any task finished")
	}
	runPartial(t, p, pr)
	for _, f := range []string{"PARTIAL", "run.json", "tasks"} {
		if _, err := os.Stat(filepath.Join(dir, f)); err != nil {
			t.Errorf("partial directory lacks %s: %v", f, err)
		}
	}
	again, err := OpenPartial(dir, p, plan.Shard{}, PartialOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if again.Loaded() != len(p.Tasks) || len(again.Missing()) != 0 {
		t.Fatalf("reopened: %d loaded, %d missing; want %d and 0", again.Loaded(), len(again.Missing()), len(p.Tasks))
	}
	got, err := again.Results()
	if err != nil {
		t.Fatal(err)
	}
	for i := range want {
		sameResult(t, want[i], got[i])
	}
	if err := again.Remove(); err != nil {
		t.Fatal(err)
	}
	if _, err := os.Stat(dir); !errors.Is(err, os.ErrNotExist) {
		t.Error("Remove left the directory")
	}
}

// TestPartialIdentity checks that a partial directory is continued only
// by the same run: a seed change, a value change or another shard is
// refused with a message naming the difference; comments, blank lines and
// key order are not a change.
func TestPartialIdentity(t *testing.T) {
	p := benchtest.Plan(t, "cluster.toml", clusterSpec)
	dir := filepath.Join(t.TempDir(), "run.partial")
	pr, err := OpenPartial(dir, p, plan.Shard{}, PartialOptions{})
	if err != nil {
		t.Fatal(err)
	}
	sub, _ := p.ShardTasks(plan.Shard{I: 1, N: 2})
	if _, err := Execute(context.Background(), p, Options{Workers: 2, Tasks: sub, Save: pr.Save}); err != nil {
		t.Fatal(err)
	}
	pr.Close()
	reordered := "# the same experiment, reformatted\n" + strings.Replace(clusterSpec, "name = \"cluster-test\"\nseed = 3", "seed   =   3   # same\nname = 'cluster-test'", 1)
	same, err := OpenPartial(dir, benchtest.Plan(t, "cluster.toml", reordered), plan.Shard{}, PartialOptions{})
	if err != nil {
		t.Fatalf("a reformatted spec is refused: %v", err)
	}
	if same.Loaded() != len(sub) {
		t.Errorf("reformatted spec: %d tasks loaded, want %d", same.Loaded(), len(sub))
	}
	same.Close()
	for _, c := range []struct {
		name  string
		spec  string
		shard plan.Shard
		want  string
	}{
		{"seed", strings.Replace(clusterSpec, "seed = 3", "seed = 4", 1), plan.Shard{}, "seed 3, not 4"},
		{"value", strings.Replace(clusterSpec, "k = 3", "k = 5", 1), plan.Shard{}, "a different spec"},
		{"name", strings.Replace(clusterSpec, `"cluster-test"`, `"other"`, 1), plan.Shard{}, `spec "cluster-test", not "other"`},
		{"shard", clusterSpec, plan.Shard{I: 1, N: 2}, "shard 1/1, not 1/2"},
	} {
		_, err := OpenPartial(dir, benchtest.Plan(t, "cluster.toml", c.spec), c.shard, PartialOptions{})
		if err == nil || !errors.Is(err, input.ErrBad) || !errors.Is(err, ErrPartial) {
			t.Errorf("%s change: err %v, want a refusal", c.name, err)
			continue
		}
		for _, w := range []string{dir, c.want, "-fresh", "not mixed"} {
			if !strings.Contains(err.Error(), w) {
				t.Errorf("%s change: message %q lacks %q", c.name, err, w)
			}
		}
	}
	// -fresh discards it.
	fresh, err := OpenPartial(dir, benchtest.Plan(t, "cluster.toml", strings.Replace(clusterSpec, "seed = 3", "seed = 4", 1)), plan.Shard{}, PartialOptions{Fresh: true})
	if err != nil || fresh.Loaded() != 0 {
		t.Fatalf("fresh: %v, %d loaded", err, fresh.Loaded())
	}
	if _, err := os.Stat(dir); !errors.Is(err, os.ErrNotExist) {
		t.Error("fresh kept the old directory")
	}
}

// TestPartialDamage checks the treatment of damaged and foreign task
// files: a truncated file (a crash while the file system flushed) is
// removed with a warning and its tasks run again; a file that decodes but
// contradicts the plan, or comes from another run, is refused; leftover
// temporary files are ignored and removed; a directory that is not a
// partial run is never taken over, not even with Fresh.
func TestPartialDamage(t *testing.T) {
	p := benchtest.Plan(t, "cluster.toml", clusterSpec)
	dir := filepath.Join(t.TempDir(), "run.partial")
	pr, _ := OpenPartial(dir, p, plan.Shard{}, PartialOptions{})
	runPartial(t, p, pr)
	files, _ := filepath.Glob(filepath.Join(dir, "tasks", "*.json"))
	if len(files) == 0 {
		t.Fatal("no task files")
	}
	data, _ := os.ReadFile(files[0])
	var tf taskFile
	if err := json.Unmarshal(data, &tf); err != nil {
		t.Fatal(err)
	}
	var list []taskJSON
	if err := json.Unmarshal(tf.Tasks, &list); err != nil {
		t.Fatal(err)
	}
	n0 := len(list)
	os.WriteFile(files[0], data[:len(data)/2], 0o644)
	os.WriteFile(filepath.Join(dir, "tasks", ".tmp-0000007.json-123"), []byte("{"), 0o644)
	again, err := OpenPartial(dir, p, plan.Shard{}, PartialOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if w := again.Warnings(); len(w) != 1 || !strings.Contains(w[0], "damaged") {
		t.Errorf("warnings %q, want one about the damaged file", w)
	}
	if got := len(again.Missing()); got != n0 {
		t.Errorf("%d tasks missing after losing a file of %d", got, n0)
	}
	if _, err := os.Stat(files[0]); !errors.Is(err, os.ErrNotExist) {
		t.Error("the damaged file is still there")
	}
	if m, _ := filepath.Glob(filepath.Join(dir, "tasks", ".tmp-*")); len(m) != 0 {
		t.Errorf("temporary files left: %v", m)
	}
	runPartial(t, p, again)

	// Decodes, matches its digest (recomputed as fringe would), but
	// contradicts the plan: refused, not repaired.
	type editable struct {
		Run   string
		Tasks []taskJSON
	}
	tamper := func(edit func(*editable)) error {
		files, _ := filepath.Glob(filepath.Join(dir, "tasks", "*.json"))
		data, _ := os.ReadFile(files[0])
		var tf taskFile
		json.Unmarshal(data, &tf)
		e := editable{Run: tf.Run}
		json.Unmarshal(tf.Tasks, &e.Tasks)
		edit(&e)
		list, _ := json.Marshal(e.Tasks)
		b, _ := json.Marshal(taskFile{Run: e.Run, Digest: taskDigest(e.Run, list), Tasks: list})
		os.WriteFile(files[0], b, 0o644)
		defer os.WriteFile(files[0], data, 0o644)
		_, err := OpenPartial(dir, p, plan.Shard{}, PartialOptions{})
		return err
	}
	for name, edit := range map[string]func(*editable){
		"class out of range": func(tf *editable) { tf.Tasks[0].Pred[0] = 99 },
		"key":                func(tf *editable) { tf.Tasks[0].Key = "iris/raw/x/0/0" },
		"index":              func(tf *editable) { tf.Tasks[0].Index = 100000 },
		"short predictions":  func(tf *editable) { tf.Tasks[0].Pred = tf.Tasks[0].Pred[:1] },
		"other run":          func(tf *editable) { tf.Run = strings.Repeat("0", 64) },
		"split size":         func(tf *editable) { tf.Tasks[0].NTrain++ },
		"duplicate":          func(tf *editable) { tf.Tasks = append(tf.Tasks, tf.Tasks[0]) },
	} {
		err := tamper(edit)
		if err == nil || !errors.Is(err, input.ErrBad) {
			t.Errorf("%s: err %v, want an input error", name, err)
		}
	}
	if _, err := OpenPartial(dir, p, plan.Shard{}, PartialOptions{}); err != nil {
		t.Fatalf("restored directory refused: %v", err)
	}

	// Not a partial directory: refused, and never removed.
	other := filepath.Join(t.TempDir(), "mine")
	os.MkdirAll(other, 0o755)
	os.WriteFile(filepath.Join(other, "notes.txt"), []byte("keep me"), 0o644)
	for _, fresh := range []bool{false, true} {
		if _, err := OpenPartial(other, p, plan.Shard{}, PartialOptions{Fresh: fresh}); err == nil || !strings.Contains(err.Error(), "not a partial run directory") {
			t.Errorf("fresh=%v: err %v, want a refusal", fresh, err)
		}
	}
	if _, err := os.Stat(filepath.Join(other, "notes.txt")); err != nil {
		t.Error("a foreign directory was touched")
	}

	// A run killed while creating its directory leaves it empty or with a
	// temporary run.json only: taken up as new.
	killed := filepath.Join(t.TempDir(), "killed.partial")
	os.MkdirAll(killed, 0o755)
	os.WriteFile(filepath.Join(killed, ".tmp-run.json-4711"), []byte("{\"form"), 0o644)
	kp, err := OpenPartial(killed, p, plan.Shard{}, PartialOptions{})
	if err != nil {
		t.Fatalf("directory left by a kill during creation: %v", err)
	}
	runPartial(t, p, kp)
	if m, _ := filepath.Glob(filepath.Join(killed, ".tmp-*")); len(m) != 0 {
		t.Errorf("temporary files left: %v", m)
	}
}

// TestExecuteCancelKeepsFinished cancels a run once some tasks are
// finished and checks that everything finished reached Save before
// Execute returned, and that the rest can be run later to the same
// results.
func TestExecuteCancelKeepsFinished(t *testing.T) {
	p := benchtest.Plan(t, "cluster.toml", clusterSpec)
	want, err := Execute(context.Background(), p, Options{Workers: 2})
	if err != nil {
		t.Fatal(err)
	}
	dir := filepath.Join(t.TempDir(), "run.partial")
	pr, _ := OpenPartial(dir, p, plan.Shard{}, PartialOptions{})
	ctx, cancel := context.WithCancel(context.Background())
	var progressed atomic.Int64
	_, err = Execute(ctx, p, Options{Workers: 2, Tasks: pr.Missing(), Save: pr.Save, Progress: func(done, total int) {
		progressed.Store(int64(done))
		if done == 20 {
			cancel()
		}
	}})
	if !errors.Is(err, context.Canceled) {
		t.Fatalf("err %v, want context.Canceled", err)
	}
	pr.Close()
	if got := int64(pr.Finished()); got != progressed.Load() || got < 20 || got >= int64(len(p.Tasks)) {
		t.Fatalf("%d tasks saved, %d reported finished; want equal, >= 20 and < %d", got, progressed.Load(), len(p.Tasks))
	}
	again, err := OpenPartial(dir, p, plan.Shard{}, PartialOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if again.Loaded() != pr.Finished() {
		t.Fatalf("reopened with %d tasks, %d were saved", again.Loaded(), pr.Finished())
	}
	runPartial(t, p, again)
	got, err := again.Results()
	if err != nil {
		t.Fatal(err)
	}
	for i := range want {
		sameResult(t, want[i], got[i])
	}
}

// TestSaveErrorStopsRun checks that a failing Save stops the run with its
// error.
func TestSaveErrorStopsRun(t *testing.T) {
	p := benchtest.Plan(t, "cluster.toml", clusterSpec)
	boom := errors.New("disk full")
	_, err := Execute(context.Background(), p, Options{Workers: 2, Save: func([]TaskResult) error { return boom }})
	if !errors.Is(err, boom) {
		t.Fatalf("err %v, want the save error", err)
	}
}

// TestPartialLock checks that a partial directory in use by one Partial
// (one process) is refused to a second one, for a directory that exists
// and for one that two runs create at the same time, and is free again
// after Close.
func TestPartialLock(t *testing.T) {
	p := benchtest.Plan(t, "cluster.toml", clusterSpec)
	dir := filepath.Join(t.TempDir(), "run.partial")
	a, _ := OpenPartial(dir, p, plan.Shard{}, PartialOptions{})
	b, _ := OpenPartial(dir, p, plan.Shard{}, PartialOptions{})
	res, err := Execute(context.Background(), p, Options{Workers: 1, Tasks: []int{0, 1}})
	if err != nil {
		t.Fatal(err)
	}
	if err := a.Save(res[:1]); err != nil {
		t.Fatal(err)
	}
	// b was opened before a created the directory: its first Save finds
	// run.json made by another and stops.
	if err := b.Save(res[1:]); err == nil || !strings.Contains(err.Error(), "in use by another fringe process") {
		t.Fatalf("second creator: %v, want in use", err)
	}
	for _, fresh := range []bool{false, true} {
		if _, err := OpenPartial(dir, p, plan.Shard{}, PartialOptions{Fresh: fresh}); err == nil || !strings.Contains(err.Error(), "in use") {
			t.Fatalf("fresh=%v while locked: %v, want in use", fresh, err)
		}
	}
	a.Close()
	c, err := OpenPartial(dir, p, plan.Shard{}, PartialOptions{})
	if err != nil {
		t.Fatalf("after Close: %v", err)
	}
	if c.Loaded() != 1 {
		t.Errorf("%d tasks loaded, want 1", c.Loaded())
	}
	c.Close()
}
