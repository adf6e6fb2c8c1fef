package runner

import (
	"context"
	"fmt"
	"math"
	"os"
	"reflect"
	"testing"

	"fringe/bench/internal/benchtest"
	"fringe/bench/plan"
)

// clusterSpec is a small grid for the shard, resume and merge tests
// (../plan/testdata/cluster.toml says what it exercises).
var clusterSpec = func() string {
	b, err := os.ReadFile("../plan/testdata/cluster.toml")
	if err != nil {
		panic(err)
	}
	return string(b)
}()

// TestExecuteSubset checks that a task's result does not depend on which
// other tasks run in the same process: running one shard gives exactly
// the results the whole run gives for its tasks.
func TestExecuteSubset(t *testing.T) {
	p := benchtest.Plan(t, "cluster.toml", clusterSpec)
	all, err := Execute(context.Background(), p, Options{Workers: 2})
	if err != nil {
		t.Fatal(err)
	}
	sub, _ := p.ShardTasks(plan.Shard{I: 2, N: 3})
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
