package plan_test

import (
	"fmt"
	"math"
	"strings"
	"testing"

	"fringe/bench/internal/benchtest"
	"fringe/bench/plan"
)

// TestSplitsShared checks the design rule that the splits of a dataset
// depend only on the seed, the dataset and the repeat: adding pipelines or
// models does not change them.
func TestSplitsShared(t *testing.T) {
	a := "name = \"a\"\nseed = 9\ndatasets = [\"wine\"]\n[cv]\nfolds = 4\nrepeats = 2\n[[model]]\nkind = \"centroid\"\n"
	b := "name = \"b\"\nseed = 9\ndatasets = [\"iris\", \"wine\"]\npipelines = [\"std\", \"l2\"]\n[cv]\nfolds = 4\nrepeats = 2\n[[model]]\nkind = \"knn\"\n[[model]]\nkind = \"centroid\"\n"
	pa := benchtest.Plan(t, "t.toml", a)
	pb := benchtest.Plan(t, "t.toml", b)
	sa, sb := pa.Datasets[0].Splits, pb.Datasets[1].Splits
	if len(sa) != len(sb) {
		t.Fatalf("%d vs %d splits", len(sa), len(sb))
	}
	for i := range sa {
		if fmtInts(sa[i].Test) != fmtInts(sb[i].Test) {
			t.Fatalf("split %d differs between specs", i)
		}
	}
	pc := benchtest.Plan(t, "t.toml", strings.Replace(a, "seed = 9", "seed = 10", 1))
	if fmtInts(pc.Datasets[0].Splits[0].Test) == fmtInts(sa[0].Test) {
		t.Error("a different seed gave the same first fold")
	}
}

// TestInterferenceSeed checks that the seed handed to exports and counts
// models is the one the run's interference models get.
func TestInterferenceSeed(t *testing.T) {
	p := benchtest.Plan(t, "t.toml", `
name = "s"
seed = 12
datasets = ["iris"]
[cv]
folds = 3
repeats = 2
[[model]]
kind = "interference"
[[model]]
kind = "counts"
file = "x.csv"
`)
	for _, task := range p.Tasks {
		if p.Spec.Models[task.Model].Kind != "interference" {
			continue
		}
		if got, want := p.InterferenceSeed(task.Dataset, task.Split), p.ModelSeed(task); got != want {
			t.Errorf("task %s: interference seed %d, model seed %d", p.Key(task), got, want)
		}
	}
}

func fmtInts(x []int) string { return fmt.Sprint(x) }

// TestLearningSubsamples: with train_sizes the run's own tasks keep their
// order and keys (the learning curve's come after them, keyed with
// "@size"), and each training part's subsamples are nested, class by
// class, and the same for every pipeline and model.
func TestLearningSubsamples(t *testing.T) {
	base := "name = \"lc\"\nseed = 2\ndatasets = [\"wine\"]\npipelines = [\"std\", \"l2\"]\n[cv]\nfolds = 3\n%s\n[[model]]\nkind = \"knn\"\n[[model]]\nkind = \"centroid\"\n"
	plain := benchtest.Plan(t, "t.toml", fmt.Sprintf(base, ""))
	lc := benchtest.Plan(t, "t.toml", fmt.Sprintf(base, "train_sizes = [0.5, 0.2, 1.0]"))
	if len(lc.Tasks) != 3*len(plain.Tasks) {
		t.Fatalf("%d tasks with two sizes below 1, want %d", len(lc.Tasks), 3*len(plain.Tasks))
	}
	for i, task := range plain.Tasks {
		if lc.Key(lc.Tasks[i]) != plain.Key(task) || lc.Tasks[i].Size != 0 {
			t.Fatalf("task %d: %s, want %s as without train_sizes", i, lc.Key(lc.Tasks[i]), plain.Key(task))
		}
	}
	if got := lc.Key(lc.Tasks[len(plain.Tasks)]); !strings.HasSuffix(got, "@0.2") {
		t.Errorf("first learning-curve task %s, want the smallest size 0.2 first", got)
	}
	d := lc.Datasets[0]
	for _, task := range lc.Tasks {
		if task.Size == 0 || task.Size == 2 {
			continue
		}
		small := lc.TrainRows(task)
		big := lc.TrainRows(plan.Task{Dataset: task.Dataset, Split: task.Split, Size: 2})
		full := d.Splits[task.Split].Train
		in := map[int]bool{}
		for _, i := range big {
			in[i] = true
		}
		for _, i := range small {
			if !in[i] {
				t.Fatalf("split %d: row %d of the 0.2 subsample is not in the 0.5 one", task.Split, i)
			}
		}
		// Class counts: each class gets its share of the rows, within one
		// (the documented quota method keeps every count between the
		// floor and the ceiling of its quota).
		for _, sub := range [][]int{small, big} {
			frac := float64(len(sub)) / float64(len(full))
			count, all := map[int]int{}, map[int]int{}
			for _, i := range sub {
				count[d.Data.Y[i]]++
			}
			for _, i := range full {
				all[d.Data.Y[i]]++
			}
			for c, n := range all {
				q := frac * float64(n)
				if float64(count[c]) < math.Floor(q)-1 || float64(count[c]) > math.Ceil(q)+1 {
					t.Errorf("split %d, %d rows: class %d has %d, quota %.2f", task.Split, len(sub), c, count[c], q)
				}
			}
		}
	}
}
