package runner

import (
	"context"
	"reflect"
	"testing"

	"fringe/bench/internal/benchtest"
)

// TestTasksOfFewUnits checks that a plan with few units per worker, whose
// tasks run as pieces of work of their own sharing their unit's prepared
// split (sharedUnit), gives the results of the same plan run unit by
// unit: 3 x 4 = 12 units of 4 models each, run with 1 worker (12 >= 8
// units per worker: whole units) and with 4 (12 < 32: single tasks).
func TestTasksOfFewUnits(t *testing.T) {
	p := benchtest.Plan(t, "t.toml", `
name = "few"
seed = 5
datasets = ["iris", "wine", "breast-cancer"]
pipelines = ["std+l2"]
[cv]
folds = 4
[[model]]
kind = "interference"
[[model]]
kind = "knn"
[[model]]
kind = "svm"
[[model]]
kind = "logreg"
`)
	if n := len(p.Units()); n != 12 {
		t.Fatalf("%d units, want 12", n)
	}
	one, err := Execute(context.Background(), p, Options{Workers: 1})
	if err != nil {
		t.Fatal(err)
	}
	four, err := Execute(context.Background(), p, Options{Workers: 4})
	if err != nil {
		t.Fatal(err)
	}
	if len(one) != len(p.Tasks) || len(four) != len(p.Tasks) {
		t.Fatalf("%d and %d results for %d tasks", len(one), len(four), len(p.Tasks))
	}
	// Bit for bit: the same tasks with the same seeds must give the same
	// numbers whatever the scheduling (this is not a numeric tolerance).
	for i := range one {
		a, b := one[i], four[i]
		if a.Task != b.Task || !reflect.DeepEqual(a.Pred, b.Pred) || a.Scores != b.Scores ||
			!reflect.DeepEqual(a.Details, b.Details) || a.NTrain != b.NTrain || a.NTest != b.NTest {
			t.Errorf("task %s: results differ between whole units and single tasks", p.Key(a.Task))
		}
	}
}
