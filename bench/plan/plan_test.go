package plan_test

import (
	"fmt"
	"strings"
	"testing"

	"fringe/bench/internal/benchtest"
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
