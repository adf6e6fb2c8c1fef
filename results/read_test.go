package results

import (
	"bytes"
	"errors"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
)

// The writers print FloatDigits = 6 decimals: a value read back differs
// from the one written by at most half a unit of the sixth decimal.
const roundTrip = 5e-7

func sameFloat(a, b float64) bool {
	if math.IsNaN(a) || math.IsNaN(b) {
		return math.IsNaN(a) && math.IsNaN(b)
	}
	return scalar.EqualWithinAbs(a, b, roundTrip)
}

func TestRecordsRoundTrip(t *testing.T) {
	nan := math.NaN()
	folds := []Fold{
		{Dataset: "iris", Pipeline: "std+l2", Model: "knn-k5", Repeat: 0, Fold: 0, NTrain: 120, NTest: 30,
			Scores: Scores{0.9333333333, 0.93, 0.9298}, MeanPAcc: nan},
		{Dataset: "iris", Pipeline: "std+l2", Model: "interference", Repeat: 1, Fold: 4, NTrain: 120, NTest: 30,
			Scores: Scores{1, 1, 1}, MeanPAcc: 0.51234567},
	}
	preds := []Prediction{
		{Dataset: "iris", Pipeline: "std+l2", Model: "knn-k5", Repeat: 0, Fold: 0, Row: 17, Label: "setosa", Predicted: "versicolor", PAcc: nan},
		{Dataset: "wine, red", Pipeline: "raw", Model: "interference", Repeat: 2, Fold: 1, Row: 0, Label: "a\"b", Predicted: "a\"b", PAcc: 0.25},
	}
	sum := []Summary{{Dataset: "iris", Pipeline: "std+l2", Model: "knn-k5", Folds: 30, Interval: "corrected-t",
		Metrics: []MetricSummary{{0.95, 0.02, 0.9, 1}, {0.94, nan, nan, nan}, {0.93, 0.01, 0.92, 0.94}}, MeanPAcc: nan}}

	var b bytes.Buffer
	if err := WriteFolds(&b, folds); err != nil {
		t.Fatal(err)
	}
	gotF, err := ReadFolds(&b, "folds.csv")
	if err != nil {
		t.Fatal(err)
	}
	if len(gotF) != len(folds) {
		t.Fatalf("read %d folds, want %d", len(gotF), len(folds))
	}
	for i, f := range folds {
		g := gotF[i]
		if g.Dataset != f.Dataset || g.Pipeline != f.Pipeline || g.Model != f.Model || g.Repeat != f.Repeat || g.Fold != f.Fold || g.NTrain != f.NTrain || g.NTest != f.NTest {
			t.Errorf("fold %d: got %+v, want %+v", i, g, f)
		}
		for j, v := range f.Scores.Values() {
			if !sameFloat(g.Scores.Values()[j], v) {
				t.Errorf("fold %d metric %d: got %v, want %v", i, j, g.Scores.Values()[j], v)
			}
		}
		if !sameFloat(g.MeanPAcc, f.MeanPAcc) {
			t.Errorf("fold %d mean p_acc: got %v, want %v", i, g.MeanPAcc, f.MeanPAcc)
		}
	}

	b.Reset()
	if err := WritePredictions(&b, preds); err != nil {
		t.Fatal(err)
	}
	gotP, err := ReadPredictions(&b, "predictions.csv")
	if err != nil {
		t.Fatal(err)
	}
	for i, p := range preds {
		g := gotP[i]
		if g.Dataset != p.Dataset || g.Row != p.Row || g.Label != p.Label || g.Predicted != p.Predicted || g.Repeat != p.Repeat || g.Fold != p.Fold || !sameFloat(g.PAcc, p.PAcc) {
			t.Errorf("prediction %d: got %+v, want %+v", i, g, p)
		}
	}

	b.Reset()
	if err := WriteSummary(&b, sum); err != nil {
		t.Fatal(err)
	}
	gotS, err := ReadSummary(&b, "summary.csv")
	if err != nil {
		t.Fatal(err)
	}
	if gotS[0].Folds != 30 || gotS[0].Interval != "corrected-t" || len(gotS[0].Metrics) != 3 {
		t.Fatalf("summary: got %+v", gotS[0])
	}
	for j, m := range sum[0].Metrics {
		g := gotS[0].Metrics[j]
		if !sameFloat(g.Mean, m.Mean) || !sameFloat(g.Std, m.Std) || !sameFloat(g.Lo, m.Lo) || !sameFloat(g.Hi, m.Hi) {
			t.Errorf("summary metric %d: got %+v, want %+v", j, g, m)
		}
	}
}

func TestReadErrorsLocated(t *testing.T) {
	head := "dataset,pipeline,model,repeat,fold,n_train,n_test,accuracy,balanced_accuracy,macro_f1,mean_p_acc\n"
	row := "iris,raw,knn,0,0,120,30,0.9,0.9,0.9,\n"
	// line and col: 1-based, col counted in bytes by hand from the text.
	cases := []struct {
		name, text string
		line, col  int
		want       string
	}{
		{"missing column", "dataset,pipeline,model,repeat,fold,n_train,accuracy,balanced_accuracy,macro_f1\n", 1, 0, `missing column "n_test"`},
		{"not a number", head + row + "iris,raw,knn,0,1,120,30,0.9,abc,0.9,\n", 3, 29, `column balanced_accuracy: want a finite number`},
		{"not an integer", head + "iris,raw,knn,x,0,120,30,0.9,0.9,0.9,\n", 2, 14, "column repeat: want an integer"},
		{"ragged", head + row + "iris,raw,knn,0,1\n", 3, 1, "wrong number of fields"},
		{"empty metric", head + "iris,raw,knn,0,0,120,30,,0.9,0.9,\n", 2, 25, "empty metric"},
		{"empty name", head + ",raw,knn,0,0,120,30,0.9,0.9,0.9,\n", 2, 1, "column dataset: empty value"},
		{"zero n_train", head + "iris,raw,knn,0,0,0,30,0.9,0.9,0.9,\n", 2, 18, "want at least 1"},
		{"infinite", head + "iris,raw,knn,0,0,120,30,Inf,0.9,0.9,\n", 2, 25, "finite"},
		{"empty file", "", 1, 0, "empty file"},
		{"bare quote", head + "iris,raw,\"knn,0,0,120,30,0.9,0.9,0.9,\n", 0, 0, "quote"},
	}
	for _, c := range cases {
		_, err := ReadFolds(strings.NewReader(c.text), "run/folds.csv")
		if err == nil {
			t.Errorf("%s: no error", c.name)
			continue
		}
		var pe *ParseError
		if !errors.As(err, &pe) || !errors.Is(err, ErrFormat) {
			t.Errorf("%s: error %v is not a *ParseError wrapping ErrFormat", c.name, err)
			continue
		}
		if !strings.Contains(err.Error(), "run/folds.csv") || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: error %q lacks the file or %q", c.name, err, c.want)
		}
		if c.line > 0 && (pe.Line != c.line || pe.Column != c.col) {
			t.Errorf("%s: located at %d:%d, want %d:%d (%v)", c.name, pe.Line, pe.Column, c.line, c.col, err)
		}
	}
}

func TestReadManifestSyntaxError(t *testing.T) {
	_, err := ReadManifest(strings.NewReader("{\n  \"tool\": \"fringe\",\n  \"seed\": 7,,\n}\n"), "m.json")
	var pe *ParseError
	if !errors.As(err, &pe) || pe.Line != 3 {
		t.Fatalf("error %v: want a ParseError on line 3", err)
	}
	_, err = ReadManifest(strings.NewReader("{\"seed\": \"seven\"}"), "m.json")
	if !errors.As(err, &pe) || pe.Line != 1 || !strings.Contains(err.Error(), "m.json:1:") {
		t.Fatalf("type error %v: want a located ParseError", err)
	}
}

func TestReadRun(t *testing.T) {
	dir := t.TempDir()
	write := func(name, text string) {
		t.Helper()
		if err := os.WriteFile(filepath.Join(dir, name), []byte(text), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	var m bytes.Buffer
	if err := WriteManifest(&m, &Manifest{Tool: "fringe", Seed: 3}); err != nil {
		t.Fatal(err)
	}
	write("manifest.json", m.String())
	var s bytes.Buffer
	WriteSummary(&s, []Summary{{Dataset: "d", Pipeline: "p", Model: "m", Folds: 1, Interval: "wilson",
		Metrics: []MetricSummary{{0.5, 0, 0, 1}, {0.5, 0, 0, 1}, {0.5, 0, 0, 1}}, MeanPAcc: math.NaN()}})
	write("summary.csv", s.String())
	_, err := ReadRun(dir)
	if err == nil || !strings.Contains(err.Error(), "folds.csv") {
		t.Fatalf("missing folds.csv: error %v should name it", err)
	}
	var f bytes.Buffer
	WriteFolds(&f, []Fold{{Dataset: "d", Pipeline: "p", Model: "m", NTrain: 9, NTest: 1, Scores: Scores{1, 1, 1}, MeanPAcc: math.NaN()}})
	write("folds.csv", f.String())
	run, err := ReadRun(dir)
	if err != nil {
		t.Fatal(err)
	}
	if run.Predictions != nil || run.Manifest.Seed != 3 || len(run.Folds) != 1 || len(run.Summary) != 1 {
		t.Errorf("run read back wrongly: %+v", run)
	}
	if _, err := ReadRun(filepath.Join(dir, "nope")); err == nil || !strings.Contains(err.Error(), "nope") {
		t.Errorf("missing directory: error %v should name it", err)
	}
}
