package spec_test

import (
	"errors"
	"strings"
	"testing"

	"fringe/bench/input"
	"fringe/bench/internal/benchtest"
	"fringe/bench/plan"
	"fringe/bench/spec"
)

func TestParseSpecFull(t *testing.T) {
	src := `
name = "full"
seed = 42
datasets = ["iris"]
pipelines = ["std+l2", "lift(2)"]

[[dataset]]
name = "iris"
classes = ["versicolor", "virginica"]
features = ["petal length (cm)", 3]
as = "iris-vv"

[cv]
method = "stratified"
folds = 5
repeats = 2

[[model]]
kind = "interference"
balance = true
[[model]]
kind = "knn"
k = 3
metric = "cosine"
vote = "inverse-distance"
[[model]]
kind = "svm"
kernel = "poly"
C = 0.5
gamma = 0.25
degree = 2
[[model]]
kind = "logreg"
name = "lr-strong"
C = 0.01
[[model]]
kind = "centroid"
`
	s, err := spec.Parse("full.toml", []byte(src))
	if err != nil {
		t.Fatal(err)
	}
	if s.Name != "full" || s.Seed != 42 {
		t.Errorf("name/seed = %q/%d", s.Name, s.Seed)
	}
	if len(s.Datasets) != 2 || s.Datasets[1].Display() != "iris-vv" || strings.Join(s.Datasets[1].Features, "|") != "petal length (cm)|3" {
		t.Errorf("datasets = %+v", s.Datasets)
	}
	if s.CV.Method != spec.CVStratified || s.CV.Folds != 5 || s.CV.Repeats != 2 {
		t.Errorf("cv = %+v", s.CV)
	}
	var names []string
	for _, m := range s.Models {
		names = append(names, m.Name)
	}
	want := "interference-balanced,knn-k3-cosine-inverse-distance,svm-poly-C0.5-g0.25-d2,lr-strong,centroid"
	if strings.Join(names, ",") != want {
		t.Errorf("model names = %s, want %s", strings.Join(names, ","), want)
	}
	p, err := plan.New(s)
	if err != nil {
		t.Fatal(err)
	}
	if got := len(p.Tasks); got != 2*2*5*2*5 {
		t.Errorf("%d tasks, want %d", got, 2*2*5*2*5)
	}
	vv := p.Datasets[1].Data
	if vv.Len() != 100 || vv.Dim() != 2 || vv.Rows[0] != 50 {
		t.Errorf("iris-vv: %d rows x %d, first row %d; want 100 x 2 starting at dataset row 50", vv.Len(), vv.Dim(), vv.Rows[0])
	}
}

func TestParseSpecErrors(t *testing.T) {
	base := "name = \"x\"\nseed = 1\ndatasets = [\"iris\"]\n"
	model := "[[model]]\nkind = \"centroid\"\n"
	for _, c := range []struct {
		src, key string
		line     int
	}{
		{"seed = 1\ndatasets = [\"iris\"]\n" + model, "name", 0},
		{"name = \"x\"\ndatasets = [\"iris\"]\n" + model, "seed", 0},
		{"name = \"x\"\nseed = -3\ndatasets = [\"iris\"]\n" + model, "seed", 2},
		{base, "model", 0},
		{base + "[cv]\nmethod = \"bootstrap\"\n" + model, "cv.method", 5},
		{base + "[cv]\nmethod = \"loo\"\nrepeats = 3\n" + model, "cv.repeats", 6},
		{base + "[cv]\nmethod = \"holdout\"\ntest_fraction = 1.5\n" + model, "cv.test_fraction", 6},
		{base + "[cv]\nfolds = 5\nshuffle = true\n" + model, "cv.shuffle", 6},
		{base + "[[model]]\nkind = \"knn\"\nk = 0\n", "model[1].k", 6},
		{base + "[[model]]\nkind = \"knn\"\nmetric = \"chebyshev\"\n", "model[1].metric", 6},
		{base + "[[model]]\nkind = \"svm\"\ngamma = \"auto\"\n", "model[1].gamma", 6},
		{base + "[[model]]\nkind = \"svm\"\nkernel = \"sigmoid\"\n", "model[1].kernel", 6},
		{base + "[[model]]\nkind = \"interference\"\nmode = \"magic\"\n", "model[1].mode", 6},
		{base + "[[model]]\nkind = \"interference\"\nbalance = \"yes\"\n", "model[1].balance", 6},
		{base + model + model, "model[2]", 6},
		{base + "pipelines = [\"std\", \"std\"]\n" + model, "pipelines", 4},
		{base + "[[dataset]]\nclasses = [\"a\"]\n" + model, "dataset[1].name", 4},
	} {
		_, err := spec.Parse("s.toml", []byte(c.src))
		var ie *input.Error
		if !errors.As(err, &ie) || !errors.Is(err, input.ErrBad) {
			t.Errorf("spec %q: error %v, want an input.Error", c.src, err)
			continue
		}
		if ie.Key != c.key || ie.Line != c.line {
			t.Errorf("spec %q: key %q line %d, want key %q line %d (%v)", c.src, ie.Key, ie.Line, c.key, c.line, err)
		}
	}
}

func TestSpecTestKeys(t *testing.T) {
	base := "name = \"x\"\nseed = 1\ndatasets = [\"iris\"]\n[cv]\n%s\n[[model]]\nkind = \"knn\"\n[[model]]\nkind = \"centroid\"\n"
	ok := benchtest.Spec(t, "test.toml", strings.Replace(base, "%s", "method = \"stratified\"\nfolds = 2\nrepeats = 5\ntest = \"5x2cv\"\nalpha = 0.1\nreference = \"centroid\"", 1))
	if ok.CV.Test != spec.Test5x2CV || ok.CV.Alpha != 0.1 || ok.CV.Reference != "centroid" {
		t.Errorf("cv = %+v", ok.CV)
	}
	for _, c := range []struct {
		cv, key string
		line    int
	}{
		{"folds = 10\ntest = \"5x2cv\"", "cv.test", 6},
		{"test = \"bootstrap\"", "cv.test", 5},
		{"method = \"loo\"\ntest = \"corrected-t\"", "cv.test", 6},
		{"repeats = 3\ntest = \"mcnemar\"", "cv.test", 6},
		{"alpha = 0.7", "cv.alpha", 5},
		{"reference = \"forest\"", "cv.reference", 5},
	} {
		_, err := spec.Parse("t.toml", []byte(strings.Replace(base, "%s", c.cv, 1)))
		var ie *input.Error
		if !errors.As(err, &ie) || ie.Key != c.key || ie.Line != c.line {
			t.Errorf("%q: error %v, want key %s on line %d", c.cv, err, c.key, c.line)
		}
	}
}

// TestCanonicalSpecSHA checks what changes the canonical spec digest.
func TestCanonicalSpecSHA(t *testing.T) {
	a := spec.CanonicalSHA([]byte("name = \"x\"\nseed = 1\n[cv]\nfolds = 5\n"))
	for _, same := range []string{
		"seed = 1\nname = 'x'\n\n[cv]\nfolds = 5 # five\n",
		"# comment\nname=\"x\"\nseed=1\ncv = { folds = 5 }\n",
	} {
		if b := spec.CanonicalSHA([]byte(same)); b != a {
			t.Errorf("%q: digest differs from the original's", same)
		}
	}
	for _, diff := range []string{
		"name = \"x\"\nseed = 2\n[cv]\nfolds = 5\n",
		"name = \"x\"\nseed = 1\n[cv]\nfolds = 5.0\n",
		"name = \"x \"\nseed = 1\n[cv]\nfolds = 5\n",
		"name = \"x\"\nseed = 1\n",
	} {
		if b := spec.CanonicalSHA([]byte(diff)); b == a {
			t.Errorf("%q: digest equals the original's", diff)
		}
	}
}
