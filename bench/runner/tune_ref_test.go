package runner

import (
	"context"
	"encoding/json"
	"flag"
	"fmt"
	"os"
	"strings"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"

	"fringe/bench/cv"
	"fringe/bench/internal/benchtest"
	"fringe/bench/plan"
)

var update = flag.Bool("update", false, "rewrite testdata/tune_folds.json (then rerun scripts/ref_tune.py)")

// tuneRefSpec is the run the nested cross-validation is checked on: three
// embedded datasets, z-scores fitted on each outer training part, 5 outer
// and 5 inner folds, and the three grids of the check.
const tuneRefSpec = `
name = "tune-ref"
seed = 11
datasets = ["iris", "wine", "breast-cancer"]
pipelines = ["std"]
[cv]
folds = 5
[tune]
folds = 5
[[model]]
kind = "svm"
C = [0.1, 1, 10, 100]
gamma = ["inverse-variance", 0.01, 0.1, 1]
[[model]]
kind = "knn"
k = [1, 3, 5, 9, 15]
[[model]]
kind = "logreg"
C = [0.01, 0.1, 1, 10]
`

// tuneFolds is testdata/tune_folds.json: for every task of tuneRefSpec,
// the dataset, the outer split (rows of the dataset, 0-based) and the
// inner test folds (positions into the outer training rows) that fringe's
// tuning draws, so that scikit-learn can be run on exactly the same folds
// (scripts/ref_tune.py).
type tuneFolds struct {
	Tasks []struct {
		Key       string  `json:"key"`
		Dataset   string  `json:"dataset"`
		Model     string  `json:"model"`
		Train     []int   `json:"train"`
		Test      []int   `json:"test"`
		InnerTest [][]int `json:"inner_test"`
	} `json:"tasks"`
}

// tuneSklearn is testdata/tune_sklearn.json (scripts/ref_tune.py):
// scikit-learn 1.2.1 GridSearchCV(estimator, grid, cv=<the inner folds>,
// refit=True) on each outer training part after StandardScaler fitted on
// it: the inner mean scores in ParameterGrid order, the best index and the
// refitted model's outer test predictions.
type tuneSklearn struct {
	Versions map[string]string `json:"versions"`
	Tasks    []struct {
		Key     string    `json:"key"`
		Scores  []float64 `json:"mean_test_score"`
		Best    int       `json:"best_index"`
		Predict []int     `json:"predict"`
	} `json:"tasks"`
}

func writeTuneFolds(t *testing.T, p *plan.Plan) {
	var out tuneFolds
	for _, task := range p.Tasks {
		d := p.Datasets[task.Dataset]
		sp := d.Splits[task.Split]
		ytr := make([]int, len(sp.Train))
		for i, j := range sp.Train {
			ytr[i] = d.Data.Y[j]
		}
		inner, err := cv.Stratified(ytr, len(d.Data.Classes), p.Spec.Tune.Folds, plan.NewRand(p.Spec.Seed, "tune", p.Key(task)))
		if err != nil {
			t.Fatal(err)
		}
		var tests [][]int
		for _, s := range inner {
			tests = append(tests, s.Test)
		}
		rows := func(idx []int) []int {
			out := make([]int, len(idx))
			for i, j := range idx {
				out[i] = d.Data.Rows[j]
			}
			return out
		}
		out.Tasks = append(out.Tasks, struct {
			Key       string  `json:"key"`
			Dataset   string  `json:"dataset"`
			Model     string  `json:"model"`
			Train     []int   `json:"train"`
			Test      []int   `json:"test"`
			InnerTest [][]int `json:"inner_test"`
		}{p.Key(task), d.Name, p.Spec.Models[task.Model].Kind, rows(sp.Train), rows(sp.Test), tests})
	}
	b, _ := json.MarshalIndent(out, "", " ")
	if err := os.WriteFile("testdata/tune_folds.json", append(b, '\n'), 0o644); err != nil {
		t.Fatal(err)
	}
}

// TestTuneAgainstSklearn checks the nested cross-validation against
// scikit-learn 1.2.1's GridSearchCV on the same outer and inner folds
// (Debian python3-sklearn; scripts/ref_tune.py, fixture
// testdata/tune_sklearn.json): for SVC, KNeighborsClassifier and
// LogisticRegression grids, every inner mean score (the mean of fold
// accuracies: equal to 1e-12), the chosen grid point and every outer test
// prediction agree. The SVMs are fitted point by point here (svmReuse off),
// as GridSearchCV fits them: with shared kernel rows and warm starts, one
// inner test row of one point (iris, fold 0, C = 1, gamma = 0.1) has a
// decision value within the solver's tolerance of 0 and falls the other
// way, which moves that point's score by 1/120 and the choice with it.
func TestTuneAgainstSklearn(t *testing.T) {
	svmReuse = false
	defer func() { svmReuse = true }()
	p := benchtest.Plan(t, "tune-ref.toml", tuneRefSpec)
	if *update {
		writeTuneFolds(t, p)
		t.Log("wrote testdata/tune_folds.json; now run /usr/bin/python3 scripts/ref_tune.py")
		return
	}
	raw, err := os.ReadFile("testdata/tune_sklearn.json")
	if err != nil {
		t.Fatal(err)
	}
	var ref tuneSklearn
	if err := json.Unmarshal(raw, &ref); err != nil {
		t.Fatal(err)
	}
	res, err := Execute(context.Background(), p, Options{Workers: 2})
	if err != nil {
		t.Fatal(err)
	}
	byKey := map[string]TaskResult{}
	for _, r := range res {
		byKey[p.Key(r.Task)] = r
	}
	if len(ref.Tasks) != len(res) {
		t.Fatalf("fixture has %d tasks, the run %d", len(ref.Tasks), len(res))
	}
	mismatch := 0
	for _, rt := range ref.Tasks {
		r, ok := byKey[rt.Key]
		if !ok {
			t.Fatalf("task %s not in the run", rt.Key)
		}
		for i, s := range rt.Scores {
			if !scalar.EqualWithinAbs(r.Tuning.Scores[i], s, 1e-12) {
				t.Errorf("%s: point %d: inner score %v, scikit-learn %v", rt.Key, i, r.Tuning.Scores[i], s)
			}
		}
		if r.Tuning.Chosen != rt.Best {
			t.Errorf("%s: chose point %d, scikit-learn %d", rt.Key, r.Tuning.Chosen, rt.Best)
		}
		for i, c := range rt.Predict {
			if r.Pred[i] != c {
				mismatch++
				t.Errorf("%s: test instance %d predicted %d, scikit-learn %d", rt.Key, i, r.Pred[i], c)
			}
		}
	}
	if mismatch == 0 {
		t.Logf("%d tasks: every score, choice and prediction agrees (%s)", len(res), strings.TrimSpace(fmt.Sprint(ref.Versions)))
	}
}
