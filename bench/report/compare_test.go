package report

import (
	"encoding/json"
	"errors"
	"math"
	"os"
	"strings"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"

	"fringe/bench/input"
	"fringe/bench/stats"
	"fringe/results"
)

type refCompare struct {
	Source string `json:"source"`
	Welch  []struct {
		M1, SE1  float64
		DF1      int `json:"df1"`
		M2, SE2  float64
		DF2      int `json:"df2"`
		Alpha    float64
		T, P, DF float64
		Lo, Hi   float64
	} `json:"welch"`
	TwoProportions []struct {
		K1, N1, K2, N2 int
		Alpha          float64
		Z2             float64 `json:"z2"`
		P, Lo, Hi      float64
	} `json:"two_proportions"`
}

func loadRefCompare(t *testing.T) refCompare {
	t.Helper()
	raw, err := os.ReadFile("testdata/ref_compare.json")
	if err != nil {
		t.Fatal(err)
	}
	var r refCompare
	if err := json.Unmarshal(raw, &r); err != nil {
		t.Fatal(err)
	}
	if len(r.Welch) < 10 || len(r.TwoProportions) < 5 {
		t.Fatalf("fixture too small: %d, %d cases", len(r.Welch), len(r.TwoProportions))
	}
	return r
}

// TestWelchAgainstScipy: scripts/ref_compare.py, scipy 1.10.1
// ttest_ind_from_stats(m1, se1·√n1, n1, m2, se2·√n2, n2, equal_var=False)
// for t and p, the Welch–Satterthwaite df, and t.ppf for the interval.
func TestWelchAgainstScipy(t *testing.T) {
	ref := loadRefCompare(t)
	for i, c := range ref.Welch {
		w := WelchT(c.M1, c.SE1, c.DF1, c.M2, c.SE2, c.DF2, c.Alpha)
		// t and df are closed forms (rounding only); p goes through gonum's
		// and scipy's incomplete beta functions, which agree to ~1e-12
		// relative (as in bench/stats' checks); the interval through
		// gonum's inverse incomplete beta (StudentsT.Quantile), which at
		// fractional df agrees with scipy's t.ppf to about 1e-9 relative;
		// the bounds differed by at most 4.3e-10 (measured), so 1e-8.
		for _, x := range []struct {
			name      string
			got, want float64
			tol       float64
		}{{"t", w.T, c.T, 1e-12}, {"df", w.DF, c.DF, 1e-12}, {"p", w.P, c.P, 1e-10}, {"lo", w.Lo, c.Lo, 1e-8}, {"hi", w.Hi, c.Hi, 1e-8}} {
			if !scalar.EqualWithinAbsOrRel(x.got, x.want, x.tol, x.tol) {
				t.Errorf("case %d %s = %v, want %v (%s)", i, x.name, x.got, x.want, ref.Source)
			}
		}
	}
	if w := WelchT(0.5, 0, 9, 0.5, 0, 9, 0.05); !math.IsNaN(w.P) {
		t.Errorf("zero standard errors: p = %v, want NaN", w.P)
	}
}

// TestTwoProportionsAgainstScipy: scipy 1.10.1 chi2_contingency(table,
// correction=False) gives z² and p; the Newcombe interval is built from
// binomtest(k, n).proportion_ci(method='wilson').
func TestTwoProportionsAgainstScipy(t *testing.T) {
	ref := loadRefCompare(t)
	for i, c := range ref.TwoProportions {
		r := TwoProportions(c.K1, c.N1, c.K2, c.N2, c.Alpha)
		// z² is a closed form (rounding only); p through the normal and
		// chi-square tails; the Wilson bounds through a normal quantile.
		if !scalar.EqualWithinAbsOrRel(r.Z*r.Z, c.Z2, 1e-12, 1e-12) || !scalar.EqualWithinAbsOrRel(r.P, c.P, 1e-10, 1e-10) {
			t.Errorf("case %d: z² = %v p = %v, want %v %v", i, r.Z*r.Z, r.P, c.Z2, c.P)
		}
		if !scalar.EqualWithinAbsOrRel(r.Lo, c.Lo, 1e-9, 1e-9) || !scalar.EqualWithinAbsOrRel(r.Hi, c.Hi, 1e-9, 1e-9) {
			t.Errorf("case %d: interval [%v, %v], want [%v, %v]", i, r.Lo, r.Hi, c.Lo, c.Hi)
		}
	}
	// Newcombe (1998), worked example (a) of the difference of independent
	// proportions, 56/70 − 48/80: method 10 gives 0.0524 to 0.3339 (recalled
	// from memory; four printed decimals, so half a unit of the fourth).
	r := TwoProportions(56, 70, 48, 80, 0.05)
	if !scalar.EqualWithinAbs(r.Lo, 0.0524, 5e-5) || !scalar.EqualWithinAbs(r.Hi, 0.3339, 5e-5) {
		t.Errorf("Newcombe example: [%v, %v], want [0.0524, 0.3339]", r.Lo, r.Hi)
	}
}

// synthRun makes a run from invented fold scores; predictions are
// written (one per test instance, rows offset by rowShift) when withPred.
func synthRun(dir string, seed uint64, cells []synthCell, withPred bool, rowShift int) *results.Run {
	folds, sum := synthRecords(cells, 2, 5)
	run := &results.Run{Dir: dir, Manifest: &results.Manifest{Seed: seed}, Summary: sum, Folds: folds}
	if withPred {
		run.Predictions = []results.Prediction{}
		for _, f := range folds {
			for i := 0; i < f.NTest; i++ {
				run.Predictions = append(run.Predictions, results.Prediction{Dataset: f.Dataset, Pipeline: f.Pipeline, Model: f.Model,
					Repeat: f.Repeat, Fold: f.Fold, Row: f.Fold*f.NTest + i + rowShift, Label: "a", Predicted: "a"})
			}
		}
	}
	return run
}

func TestCompareRuns(t *testing.T) {
	base := []synthCell{{"iris", "std+l2", "clf", 0.90, 0.03}, {"iris", "std+l2", "knn", 0.92, 0.03}, {"wine", "std+l2", "clf", 0.95, 0.02}}
	same := synthRun("base", 1, base, true, 0)

	// Identical runs: no change, no regression, paired.
	rc, err := Compare(same, synthRun("new", 1, base, true, 0), CompareOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if rc.Regressions != 0 || !strings.Contains(rc.Pairing, "the same in all 3 cells") {
		t.Errorf("identical runs: %d regressions, %q", rc.Regressions, rc.Pairing)
	}
	for _, c := range rc.Cells {
		if c.Delta != 0 || c.Method != "paired-t" || (c.Gated && c.P != 1) {
			t.Errorf("identical runs, %s/%s %s: Δ %v method %s p %v", c.Dataset, c.Model, c.Metric, c.Delta, c.Method, c.P)
		}
	}

	// The classifier got worse by 0.10 on iris (same splits, fresh noise).
	worse := []synthCell{{"iris", "std+l2", "clf", 0.80, 0.03}, base[1], base[2]}
	rc, err = Compare(same, synthRun("new", 1, worse, true, 0), CompareOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if rc.Regressions != 1 {
		t.Fatalf("worse run: %d regressions, want 1", rc.Regressions)
	}
	var reg results.CellChange
	for _, c := range rc.Cells {
		if c.Regression {
			reg = c
		}
	}
	if reg.Dataset != "iris" || reg.Model != "clf" || reg.Metric != "accuracy" || !(reg.Hi < 0) {
		t.Errorf("regression %+v", reg)
	}
	// The paired test is the corrected resampled t on the fold scores.
	bf, _ := synthRecords(base, 2, 5)
	nf, _ := synthRecords(worse, 2, 5)
	var xs, ys []float64
	for i := range bf {
		if bf[i].Dataset == "iris" && bf[i].Model == "clf" {
			xs, ys = append(xs, nf[i].Scores.Accuracy), append(ys, bf[i].Scores.Accuracy)
		}
	}
	tr, err := stats.CorrectedPairedT(xs, ys, 120, 30, 0.05)
	if err != nil {
		t.Fatal(err)
	}
	// Same function on the same numbers.
	if !scalar.EqualWithinAbsOrRel(reg.P, tr.P, 1e-12, 1e-12) || !scalar.EqualWithinAbsOrRel(reg.Statistic, tr.Statistic, 1e-12, 1e-12) {
		t.Errorf("regression p %v t %v, want %v %v", reg.P, reg.Statistic, tr.P, tr.Statistic)
	}
	// Holm over the 3 gated accuracy tests: the adjusted p of the smallest
	// p-value is 3 p (derived by hand from Holm's procedure).
	if !scalar.EqualWithinAbsOrRel(reg.PAdj, math.Min(1, 3*reg.P), 1e-12, 1e-12) {
		t.Errorf("Holm-adjusted p %v, want 3 × %v", reg.PAdj, reg.P)
	}

	// A tolerance larger than the drop: no regression.
	if rc, _ := Compare(same, synthRun("new", 1, worse, true, 0), CompareOptions{Tolerance: 0.15}); rc.Regressions != 0 {
		t.Errorf("tolerance 0.15: %d regressions", rc.Regressions)
	}
	// Gating only another model: no regression, the drop still reported.
	rc, err = Compare(same, synthRun("new", 1, worse, true, 0), CompareOptions{Models: []string{"knn"}})
	if err != nil || rc.Regressions != 0 {
		t.Errorf("gating knn only: %d regressions, %v", rc.Regressions, err)
	}

	// Different test rows: the splits differ and the test is unpaired.
	rc, err = Compare(same, synthRun("new", 1, worse, true, 1), CompareOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(rc.Pairing, "different in all 3 cells") || rc.Cells[0].Method != "welch-t" {
		t.Errorf("shifted rows: pairing %q, method %s", rc.Pairing, rc.Cells[0].Method)
	}
	// Without predictions, the manifests decide: same seed → paired,
	// another seed → unpaired.
	rc, _ = Compare(synthRun("b", 1, base, false, 0), synthRun("n", 1, worse, false, 0), CompareOptions{})
	if !strings.Contains(rc.Pairing, "judged from the manifests") {
		t.Errorf("no predictions, same seed: %q", rc.Pairing)
	}
	rc, _ = Compare(synthRun("b", 1, base, false, 0), synthRun("n", 2, worse, false, 0), CompareOptions{})
	if !strings.Contains(rc.Pairing, "different in all") {
		t.Errorf("no predictions, other seed: %q", rc.Pairing)
	}

	// Cells only in one run are listed; no common cell is an input error.
	extra := append([]synthCell{{"iris", "std+l2", "svm", 0.9, 0.03}}, base[1:]...)
	rc, err = Compare(same, synthRun("new", 1, extra, true, 0), CompareOptions{})
	if err != nil || len(rc.OnlyBase) != 1 || rc.OnlyBase[0] != "iris/std+l2/clf" || len(rc.OnlyNew) != 1 {
		t.Errorf("only-in lists %v %v (%v)", rc.OnlyBase, rc.OnlyNew, err)
	}
	_, err = Compare(same, synthRun("new", 1, []synthCell{{"x", "raw", "y", 0.5, 0.1}}, true, 0), CompareOptions{})
	if !errors.Is(err, input.ErrBad) {
		t.Errorf("no common cell: error %v, want an input error", err)
	}
	for _, opt := range []CompareOptions{{Alpha: 0.7}, {Tolerance: -1}, {Metrics: []string{"auc"}}, {Models: []string{"forest"}}} {
		if _, err := Compare(same, same, opt); !errors.Is(err, input.ErrBad) {
			t.Errorf("options %+v: error %v, want an input error", opt, err)
		}
	}
}

// TestCompareLeaveOneOut: pooled protocols compare accuracy with
// McNemar's test on the paired predictions.
func TestCompareLeaveOneOut(t *testing.T) {
	mk := func(dir string, wrong func(i int) bool) *results.Run {
		const n = 40
		run := &results.Run{Dir: dir, Manifest: &results.Manifest{Seed: 1}, Predictions: []results.Prediction{}}
		right := 0
		for i := 0; i < n; i++ {
			pred, v := "a", 1.0
			if wrong(i) {
				pred, v = "b", 0
			} else {
				right++
			}
			run.Predictions = append(run.Predictions, results.Prediction{Dataset: "d", Pipeline: "raw", Model: "m", Fold: i, Row: i, Label: "a", Predicted: pred})
			run.Folds = append(run.Folds, results.Fold{Dataset: "d", Pipeline: "raw", Model: "m", Fold: i, NTrain: n - 1, NTest: 1, Scores: results.Scores{Accuracy: v, BalancedAccuracy: v, MacroF1: v}})
		}
		acc := float64(right) / n
		lo, hi := stats.Wilson(right, n, Alpha)
		nan := math.NaN()
		run.Summary = []results.Summary{{Dataset: "d", Pipeline: "raw", Model: "m", Folds: n, Interval: "wilson",
			Metrics: []results.MetricSummary{{Mean: acc, Std: nan, Lo: lo, Hi: hi}, {Mean: acc, Std: nan, Lo: nan, Hi: nan}, {Mean: acc, Std: nan, Lo: nan, Hi: nan}}, MeanPAcc: nan}}
		return run
	}
	base := mk("b", func(i int) bool { return i < 2 })
	cur := mk("n", func(i int) bool { return i < 2 || i%4 == 3 }) // 10 more wrong
	rc, err := Compare(base, cur, CompareOptions{})
	if err != nil {
		t.Fatal(err)
	}
	c := rc.Cells[0]
	// b = 0, c = 10 discordant pairs: exact p = 2 · 0.5^10 (derived by hand).
	if c.Method != "mcnemar" || !scalar.EqualWithinAbsOrRel(c.P, 2*math.Pow(0.5, 10), 1e-12, 1e-12) || !c.Regression {
		t.Errorf("McNemar cell %+v", c)
	}
	if rc.Cells[1].Method != "none" || rc.Cells[1].Gated {
		t.Errorf("balanced accuracy under leave-one-out: %+v", rc.Cells[1])
	}
	// Without predictions the pooled accuracies are compared unpaired.
	base.Predictions, cur.Predictions = nil, nil
	rc, err = Compare(base, cur, CompareOptions{})
	if err != nil {
		t.Fatal(err)
	}
	want := TwoProportions(28, 40, 38, 40, 0.05)
	if c := rc.Cells[0]; c.Method != "two-proportion" || !scalar.EqualWithinAbsOrRel(c.P, want.P, 1e-12, 1e-12) {
		t.Errorf("unpaired pooled cell %+v, want p %v", c, want.P)
	}
}
