package bench

import (
	"context"
	"errors"
	"fmt"
	"math"
	"reflect"
	"strings"
	"testing"

	"fringe/bench/input"
	"fringe/bench/spec"
)

// clusterSpec is a small grid for the shard, resume and merge tests: 2
// datasets x 2 pipelines x 8 splits = 32 units of 3 tasks. The one-shot
// interference model often accepts nothing, so its class probabilities
// hold NaN and the round trip of NaN through task files is exercised.
const clusterSpec = `name = "cluster-test"
seed = 3
datasets = ["iris", "wine"]
pipelines = ["std+l2", "minmax"]

[cv]
method = "stratified"
folds = 4
repeats = 2

[[model]]
kind = "knn"
k = 3

[[model]]
kind = "interference"
mode = "shots"
shots = 1
balance = true

[[model]]
kind = "logreg"
`

func clusterPlan(t testing.TB, text string) *Plan {
	t.Helper()
	s, err := spec.Parse("cluster.toml", []byte(text))
	if err != nil {
		t.Fatal(err)
	}
	p, err := NewPlan(s)
	if err != nil {
		t.Fatal(err)
	}
	return p
}

func TestParseShard(t *testing.T) {
	for _, c := range []struct {
		in   string
		want Shard
		ok   bool
	}{
		{"1/1", Shard{1, 1}, true},
		{"3/7", Shard{3, 7}, true},
		{" 7/7 ", Shard{7, 7}, true},
		{"0/3", Shard{}, false},
		{"4/3", Shard{}, false},
		{"1/0", Shard{}, false},
		{"-1/3", Shard{}, false},
		{"3", Shard{}, false},
		{"a/b", Shard{}, false},
		{"1/2/3", Shard{}, false},
		{"", Shard{}, false},
		{"1/100001", Shard{}, false},
	} {
		got, err := ParseShard(c.in)
		if c.ok != (err == nil) {
			t.Errorf("ParseShard(%q): err %v, want ok=%v", c.in, err, c.ok)
			continue
		}
		if err != nil {
			if !errors.Is(err, input.ErrBad) || !errors.Is(err, ErrShard) {
				t.Errorf("ParseShard(%q): %v is not an input and shard error", c.in, err)
			}
			continue
		}
		if got != c.want {
			t.Errorf("ParseShard(%q) = %v, want %v", c.in, got, c.want)
		}
		if back, _ := ParseShard(got.String()); back != got {
			t.Errorf("String round trip of %v gives %v", got, back)
		}
	}
}

// TestShardTasks checks that the shards of a plan partition its tasks into
// whole units, dealt out round-robin, balanced to within one unit, and
// that every dataset is spread over the shards.
func TestShardTasks(t *testing.T) {
	p := clusterPlan(t, clusterSpec)
	units := p.Units()
	if len(units) != 32 {
		t.Fatalf("%d units, want 32 (2 datasets x 2 pipelines x 8 splits)", len(units))
	}
	unitOf := map[int]int{}
	for j, u := range units {
		if len(u) != 3 {
			t.Fatalf("unit %d has %d tasks, want 3 (one per model)", j, len(u))
		}
		for _, i := range u {
			unitOf[i] = j
		}
	}
	for _, n := range []int{1, 2, 3, 7, 32} {
		seen := make([]int, len(p.Tasks))
		var sizes []int
		for i := 1; i <= n; i++ {
			tasks, err := p.ShardTasks(Shard{i, n})
			if err != nil {
				t.Fatalf("shard %d/%d: %v", i, n, err)
			}
			sizes = append(sizes, len(tasks))
			perDataset := map[int]int{}
			for k, ti := range tasks {
				if k > 0 && tasks[k-1] >= ti {
					t.Fatalf("shard %d/%d: tasks not in task order", i, n)
				}
				seen[ti]++
				if got := unitOf[ti] % n; got != i-1 {
					t.Fatalf("shard %d/%d holds task %d of unit %d (round-robin gives shard %d)", i, n, ti, unitOf[ti], got+1)
				}
				perDataset[p.Tasks[ti].Dataset]++
			}
			// Each dataset has 16 units; round-robin gives every shard
			// floor or ceil of 16/n of them (n <= 16) or at most one.
			for d, c := range perDataset {
				if u := c / 3; u > (16+n-1)/n {
					t.Errorf("shard %d/%d: %d units of dataset %d, more than ceil(16/%d)", i, n, u, d, n)
				}
			}
		}
		for ti, c := range seen {
			if c != 1 {
				t.Fatalf("n=%d: task %d in %d shards, want exactly 1", n, ti, c)
			}
		}
		lo, hi := sizes[0], sizes[0]
		for _, s := range sizes {
			lo, hi = min(lo, s), max(hi, s)
		}
		if hi-lo > 3 {
			t.Errorf("n=%d: shard sizes %v differ by more than one unit (3 tasks)", n, sizes)
		}
	}
	// The same plan built again gives the same shards.
	q := clusterPlan(t, clusterSpec)
	a, _ := p.ShardTasks(Shard{2, 7})
	b, _ := q.ShardTasks(Shard{2, 7})
	if !reflect.DeepEqual(a, b) {
		t.Error("shard 2/7 differs between two builds of the same plan")
	}
	// More shards than units: refused, with the number of units.
	_, err := p.ShardTasks(Shard{1, 33})
	if err == nil || !errors.Is(err, input.ErrBad) || !strings.Contains(err.Error(), "at most 32 shards") {
		t.Errorf("33 shards of 32 units: %v", err)
	}
	whole, err := p.ShardTasks(Shard{})
	if err != nil || len(whole) != len(p.Tasks) {
		t.Errorf("the zero Shard gives %d tasks (%v), want all %d", len(whole), err, len(p.Tasks))
	}
}

// TestExecuteSubset checks that a task's result does not depend on which
// other tasks run in the same process: running one shard gives exactly
// the results the whole run gives for its tasks.
func TestExecuteSubset(t *testing.T) {
	p := clusterPlan(t, clusterSpec)
	all, err := Execute(context.Background(), p, Options{Workers: 2})
	if err != nil {
		t.Fatal(err)
	}
	sub, _ := p.ShardTasks(Shard{2, 3})
	part, err := Execute(context.Background(), p, Options{Workers: 1, Tasks: sub})
	if err != nil {
		t.Fatal(err)
	}
	if len(part) != len(sub) {
		t.Fatalf("%d results for %d tasks", len(part), len(sub))
	}
	for k, i := range sub {
		sameResult(t, all[i], part[k])
	}
}

// sameResult checks two task results for exact equality (Elapsed aside).
// Floats are compared bit for bit (NaN matching NaN): the claims under test
// are bit-exact (independent tasks, an exact round trip through task
// files), and any tolerance would hide a lossy encoding.
func sameResult(t *testing.T, a, b TaskResult) {
	t.Helper()
	key := func() string { return fmt.Sprint(a.Task.Index) }
	if a.Task != b.Task || a.NTrain != b.NTrain || a.NTest != b.NTest {
		t.Fatalf("task %s: header differs: %+v vs %+v", key(), a.Task, b.Task)
	}
	if !reflect.DeepEqual(a.Pred, b.Pred) {
		t.Fatalf("task %s: predictions differ", key())
	}
	if (a.Details == nil) != (b.Details == nil) || len(a.Details) != len(b.Details) {
		t.Fatalf("task %s: details differ in presence or length", key())
	}
	for i := range a.Details {
		x, y := a.Details[i], b.Details[i]
		if !sameBits(x.PAcc, y.PAcc) || x.Shots != y.Shots || x.Exact != y.Exact || (x.Probs == nil) != (y.Probs == nil) || len(x.Probs) != len(y.Probs) {
			t.Fatalf("task %s instance %d: details differ: %+v vs %+v", key(), i, x, y)
		}
		for j := range x.Probs {
			if !sameBits(x.Probs[j], y.Probs[j]) {
				t.Fatalf("task %s instance %d: probs differ: %v vs %v", key(), i, x.Probs, y.Probs)
			}
		}
	}
	for m, v := range a.Scores.Values() {
		if !sameBits(v, b.Scores.Values()[m]) {
			t.Fatalf("task %s: scores differ: %+v vs %+v", key(), a.Scores, b.Scores)
		}
	}
}

func sameBits(a, b float64) bool {
	if math.IsNaN(a) || math.IsNaN(b) {
		return math.IsNaN(a) && math.IsNaN(b)
	}
	return math.Float64bits(a) == math.Float64bits(b)
}

// countNaN counts NaN class probabilities in results.
func countNaN(res []TaskResult) int {
	n := 0
	for _, r := range res {
		for _, d := range r.Details {
			for _, v := range d.Probs {
				if math.IsNaN(v) {
					n++
				}
			}
		}
	}
	return n
}
