package report

import (
	"bytes"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
	"gonum.org/v1/gonum/mat"

	"fringe/bench/modelkit"
	"fringe/bench/spec"
	"fringe/bench/stats"
	"fringe/results"
)

// synthCell describes the invented fold scores of one cell: accuracy
// around mean with spread sd on every fold.
type synthCell struct {
	ds, pipe, model string
	mean, sd        float64
}

// synthRecords builds fold records (repeats × folds, n_train/n_test as in
// 5-fold CV of 150 instances) and their summary rows, with the other two
// metrics equal to accuracy. Scores are drawn from a seeded generator, so
// every call with the same cells gives the same records.
func synthRecords(cells []synthCell, repeats, folds int) ([]results.Fold, []results.Summary) {
	var fs []results.Fold
	var ss []results.Summary
	for ci, c := range cells {
		rng := rand.New(rand.NewPCG(uint64(ci+1), 99))
		var acc []float64
		for r := 0; r < repeats; r++ {
			for k := 0; k < folds; k++ {
				v := math.Min(1, math.Max(0, c.mean+c.sd*rng.NormFloat64()))
				acc = append(acc, v)
				fs = append(fs, results.Fold{Dataset: c.ds, Pipeline: c.pipe, Model: c.model, Repeat: r, Fold: k,
					NTrain: 120, NTest: 30, Scores: results.Scores{Accuracy: v, BalancedAccuracy: v, MacroF1: v}, MeanPAcc: math.NaN()})
			}
		}
		iv, err := stats.CorrectedInterval(acc, 120, 30, Alpha)
		if err != nil {
			panic(err)
		}
		m := results.MetricSummary{Mean: iv.Mean, Std: iv.Std, Lo: iv.Lo, Hi: iv.Hi}
		ss = append(ss, results.Summary{Dataset: c.ds, Pipeline: c.pipe, Model: c.model, Folds: len(acc), Interval: "corrected-t",
			Metrics: []results.MetricSummary{m, m, m}, MeanPAcc: math.NaN()})
	}
	return fs, ss
}

// modeVariants describes the interference classifier exact, with three
// shot budgets and under one noise model at three strengths, and two
// baselines, as VariantOf would from a spec with those modes.
func modeVariants() []results.Variant {
	nan := math.NaN()
	q := func(model, mode string, shots int, noise string, strength float64) results.Variant {
		return results.Variant{Model: model, Kind: "interference", Interference: true, Family: "interference", Mode: mode, Shots: shots, Noise: noise, Strength: strength}
	}
	return []results.Variant{
		q("q", "exact", 0, "", nan),
		q("q-s100", "shots", 100, "", nan),
		q("q-s10000", "shots", 10000, "", nan),
		q("q-s1000", "shots", 1000, "", nan),
		q("q-d0.05", "noisy", 0, "global_depolarizing", 0.05),
		q("q-d0.001", "noisy", 0, "global_depolarizing", 0.001),
		q("q-d0.01", "noisy", 0, "global_depolarizing", 0.01),
		{Model: "knn", Kind: "knn", Family: "knn", Strength: nan},
		{Model: "svm", Kind: "svm", Family: "svm", Strength: nan},
	}
}

func modeCells() []synthCell {
	var cells []synthCell
	for di, ds := range []string{"iris", "wine", "cullet"} {
		base := 0.9 - 0.05*float64(di)
		for _, c := range []struct {
			model string
			drop  float64
		}{{"q", 0}, {"q-s100", 0.15}, {"q-s10000", 0.01}, {"q-s1000", 0.04}, {"q-d0.05", 0.3}, {"q-d0.001", 0.0}, {"q-d0.01", 0.05}, {"knn", -0.03}, {"svm", -0.02}} {
			cells = append(cells, synthCell{ds, "std+l2", c.model, base - c.drop, 0.04})
		}
	}
	return cells
}

func TestAnalyseModes(t *testing.T) {
	folds, sum := synthRecords(modeCells(), 3, 5)
	cv := spec.CV{Method: spec.CVStratified, Folds: 5, Repeats: 3}
	rep, err := Analyse(Input{Name: "modes", Seed: 1, CV: cv, Summary: sum, Folds: folds, Variants: modeVariants()})
	if err != nil {
		t.Fatal(err)
	}
	idx := map[string]int{}
	for i, s := range sum {
		idx[s.Dataset+"/"+s.Model] = i
	}
	// knn has the highest mean on every dataset (drop −0.03), up to the noise.
	for _, ds := range []string{"iris", "wine", "cullet"} {
		best, bi := -1.0, -1
		for i, s := range sum {
			if s.Dataset == ds && s.Metrics[0].Mean > best {
				best, bi = s.Metrics[0].Mean, i
			}
		}
		if rep.Marks[bi][0] != results.MarkBest {
			t.Errorf("%s: best cell %s not marked best", ds, sum[bi].Model)
		}
		// 30 accuracy points below the best on 15 folds: significantly worse.
		if m := rep.Marks[idx[ds+"/q-d0.05"]][0]; m != results.MarkNone {
			t.Errorf("%s: the strongly degraded cell has mark %d, want none", ds, m)
		}
	}
	// The marks follow from the paired tests against the best cell with
	// Holm's correction: recompute one family by hand.
	var fam []float64
	var famIdx []int
	bestI := -1
	for i, s := range sum {
		if s.Dataset == "wine" && (bestI < 0 || s.Metrics[0].Mean > sum[bestI].Metrics[0].Mean) {
			bestI = i
		}
	}
	scores := func(i int) []float64 {
		var v []float64
		for _, f := range folds {
			if f.Dataset == sum[i].Dataset && f.Model == sum[i].Model {
				v = append(v, f.Scores.Accuracy)
			}
		}
		return v
	}
	for i, s := range sum {
		if s.Dataset != "wine" || i == bestI {
			continue
		}
		r, err := stats.CorrectedPairedT(scores(i), scores(bestI), 120, 30, 0.05)
		if err != nil {
			t.Fatal(err)
		}
		fam = append(fam, r.P)
		famIdx = append(famIdx, i)
	}
	adj, _ := stats.HolmAdjust(fam)
	for j, i := range famIdx {
		worse := adj[j] <= 0.05 && sum[i].Metrics[0].Mean < sum[bestI].Metrics[0].Mean
		want := results.MarkNotWorse
		if worse {
			want = results.MarkNone
		}
		if rep.Marks[i][0] != want {
			t.Errorf("wine/%s: mark %d, want %d (Holm p %.4g)", sum[i].Model, rep.Marks[i][0], want, adj[j])
		}
	}

	// Reference: by default the best classical cell of each dataset.
	for _, c := range rep.Comparisons {
		if c.RefModel != "knn" && c.RefModel != "svm" {
			t.Errorf("comparison against %s, want a classical model", c.RefModel)
		}
		if c.Test != "corrected-t" || c.DF != 14 {
			t.Errorf("comparison %s/%s: test %s df %d, want corrected-t with 14 df", c.Dataset, c.Model, c.Test, c.DF)
		}
	}
	if n := len(rep.Comparisons); n != 3*8*3 {
		t.Errorf("%d comparisons, want 72 (3 datasets × 8 models × 3 metrics)", n)
	}
	// Across datasets: one rank table of the nine models.
	if len(rep.Ranks) != 1 || len(rep.Ranks[0].Models) != 9 || len(rep.Ranks[0].Datasets) != 3 {
		t.Fatalf("rank tables: %+v", rep.Ranks)
	}
	// Wilcoxon of each of the 7 interference variants against 2 baselines.
	if len(rep.Pairs) != 14 {
		t.Errorf("%d Wilcoxon pairs, want 14", len(rep.Pairs))
	}

	// Sweeps: one shot figure, one noise figure, points in order.
	sws := sweepSpecs(rep)
	var names []string
	for _, s := range sws {
		names = append(names, s.name)
	}
	want := []string{"figures/shots-std+l2", "figures/noise-global_depolarizing-std+l2"}
	if !slices.Equal(names, want) {
		t.Fatalf("sweeps %q, want %q", names, want)
	}
	shots := sws[0].sweep
	if !shots.LogX || len(shots.Lines) != 3 {
		t.Fatalf("shot sweep: %+v", shots)
	}
	l := shots.Lines[1] // wine
	if l.Label != "wine" || !slices.Equal(l.X, []float64{100, 1000, 10000}) {
		t.Errorf("wine shot line: label %s, x %v", l.Label, l.X)
	}
	// Same numbers as the summary, by construction: exact comparison.
	if l.Mean[0] != sum[idx["wine/q-s100"]].Metrics[0].Mean || l.Exact != sum[idx["wine/q"]].Metrics[0].Mean {
		t.Errorf("wine shot line values do not come from the summary: %+v", l)
	}
	if l.Baseline != math.Max(sum[idx["wine/knn"]].Metrics[0].Mean, sum[idx["wine/svm"]].Metrics[0].Mean) {
		t.Errorf("wine best baseline %v", l.Baseline)
	}
	noise := sws[1].sweep
	if !slices.Equal(noise.Lines[0].X, []float64{0.001, 0.01, 0.05}) || !noise.LogX {
		t.Errorf("noise sweep x %v, log %v", noise.Lines[0].X, noise.LogX)
	}

	// The figures render, and their names are listed for summary.md.
	figs, err := Figures(rep, nil)
	if err != nil {
		t.Fatal(err)
	}
	if len(figs) != 3 { // cd, shots, noise (no predictions: no p_acc figure)
		t.Errorf("%d figures, want 3", len(figs))
	}
	if dir := os.Getenv("FRINGE_KEEP_FIGURES"); dir != "" {
		for _, f := range figs {
			data, err := f.Render("png")
			if err != nil {
				t.Fatal(err)
			}
			os.WriteFile(filepath.Join(dir, filepath.Base(f.Name)+".png"), data, 0o644)
		}
	}
	// The per-mode table lists exact, the budgets ascending, then noise.
	var tex bytes.Buffer
	if err := results.WriteReportTeX(&tex, rep); err != nil {
		t.Fatal(err)
	}
	s := tex.String()
	order := []string{"& q & exact", "& q-s100 & 100 shots", "& q-s1000 & 1000 shots", "& q-s10000 & 10000 shots",
		"& q-d0.001 & global\\_depolarizing 0.001", "& q-d0.01 &", "& q-d0.05 &", "& knn & baseline"}
	last := strings.Index(s, "Run as")
	for _, o := range order {
		i := strings.Index(s[last:], o)
		if i < 0 {
			t.Fatalf("mode table lacks %q after position %d:\n%s", o, last, s)
		}
		last += i
	}
}

func TestVariantFromParams(t *testing.T) {
	cases := []struct {
		params   map[string]any
		family   string
		describe string
		strength float64
	}{
		{map[string]any{"mode": "exact", "balance": true}, "interference-balanced", "exact", math.NaN()},
		{map[string]any{"mode": "shots", "shots": 1000, "train_subset": 16}, "interference-k16", "1000 shots", math.NaN()},
		{map[string]any{"mode": "noisy", "noise": map[string]any{"depolarizing": []any{0.01, 0.02}}}, "interference", "depolarizing 0.01", 0.01},
		{map[string]any{"mode": "noisy", "shots": int64(500), "noise": map[string]any{"readout": []any{0.02, 0.03}, "phase_damping": 0.1}}, "interference", "phase_damping+readout, 500 shots", math.NaN()},
		{map[string]any{"mode": "noisy", "noise": "amplitude_damping", "strength": 0.2}, "interference", "amplitude_damping 0.2", 0.2},
	}
	for _, c := range cases {
		v := VariantOf(modelkit.Spec{Kind: "interference", Name: "q", Params: c.params})
		if !v.Interference || v.Family != c.family || v.Describe() != c.describe || !(v.Strength == c.strength || math.IsNaN(v.Strength) && math.IsNaN(c.strength)) {
			t.Errorf("%v: got family %q, %q, strength %v; want %q, %q, %v", c.params, v.Family, v.Describe(), v.Strength, c.family, c.describe, c.strength)
		}
	}
	if v := VariantOf(modelkit.Spec{Kind: "knn", Name: "knn-k5", Params: map[string]any{"k": 5}}); v.Interference || v.Describe() != "" {
		t.Errorf("knn variant %+v", v)
	}
}

// TestAnalyseMcNemar: leave-one-out scores are pooled and the paired
// test is McNemar's on the predictions.
func TestAnalyseMcNemar(t *testing.T) {
	const n = 60
	var preds []results.Prediction
	var folds []results.Fold
	correct := map[string]func(i int) bool{
		"knn": func(i int) bool { return i%20 != 0 },                      // 3 wrong
		"q":   func(i int) bool { return i%20 != 0 && i%6 != 1 },          // 3 + 10 wrong
		"svm": func(i int) bool { return i%20 != 0 && i != 7 && i != 13 }, // 5 wrong
	}
	var sum []results.Summary
	for _, m := range []string{"knn", "q", "svm"} {
		right := 0
		for i := 0; i < n; i++ {
			pred := "a"
			ok := correct[m](i)
			if !ok {
				pred = "b"
			} else {
				right++
			}
			preds = append(preds, results.Prediction{Dataset: "d", Pipeline: "raw", Model: m, Repeat: 0, Fold: i, Row: i, Label: "a", Predicted: pred})
			v := 0.0
			if ok {
				v = 1
			}
			folds = append(folds, results.Fold{Dataset: "d", Pipeline: "raw", Model: m, Fold: i, NTrain: n - 1, NTest: 1, Scores: results.Scores{Accuracy: v, BalancedAccuracy: v, MacroF1: v}})
		}
		acc := float64(right) / n
		lo, hi := stats.Wilson(right, n, Alpha)
		nan := math.NaN()
		sum = append(sum, results.Summary{Dataset: "d", Pipeline: "raw", Model: m, Folds: n, Interval: "wilson",
			Metrics: []results.MetricSummary{{Mean: acc, Std: nan, Lo: lo, Hi: hi}, {Mean: acc, Std: nan, Lo: nan, Hi: nan}, {Mean: acc, Std: nan, Lo: nan, Hi: nan}}, MeanPAcc: nan})
	}
	vs := []results.Variant{{Model: "knn", Kind: "knn"}, {Model: "q", Kind: "interference", Interference: true, Mode: "exact"}, {Model: "svm", Kind: "svm"}}
	rep, err := Analyse(Input{Name: "loo", CV: spec.CV{Method: spec.CVLeaveOneOut, Repeats: 1}, Summary: sum, Folds: folds, Predictions: preds, Variants: vs})
	if err != nil {
		t.Fatal(err)
	}
	if !rep.Protocol.Pooled || !strings.Contains(rep.Protocol.Test, "McNemar") {
		t.Errorf("protocol %+v", rep.Protocol)
	}
	// q against knn (the best classical cell): b = 0 instances only q got
	// right, c = 10 only knn got right (derived by hand from the rules
	// above: i%6 == 1 and i%20 != 0 for i < 60 gives 10 instances). With
	// b + c < 25 the exact binomial p-value is used: 2 · 0.5^10.
	var got *results.Comparison
	for i, c := range rep.Comparisons {
		if c.Model == "q" && c.Metric == "accuracy" {
			got = &rep.Comparisons[i]
		}
	}
	if got == nil || got.Test != "mcnemar" || got.RefModel != "knn" {
		t.Fatalf("comparison of q: %+v", got)
	}
	if !scalar.EqualWithinAbsOrRel(got.P, 2*math.Pow(0.5, 10), 1e-12, 1e-12) { // closed form; rounding only
		t.Errorf("McNemar p = %v, want 2·0.5^10", got.P)
	}
	for _, c := range rep.Comparisons {
		if c.Metric != "accuracy" {
			t.Errorf("pooled protocol tested %s", c.Metric)
		}
	}
	// Balanced accuracy has no paired test here: only the best is marked.
	for i := range sum {
		if m := rep.Marks[i][1]; m == results.MarkNotWorse {
			t.Errorf("%s balanced accuracy marked not worse without a test", sum[i].Model)
		}
	}
}

// TestAnalyse5x2 checks the 5x2cv path against stats.FiveByTwoCV on the
// same differences.
func TestAnalyse5x2(t *testing.T) {
	folds, sum := synthRecords([]synthCell{{"d", "raw", "a", 0.8, 0.05}, {"d", "raw", "b", 0.75, 0.05}, {"e", "raw", "a", 0.7, 0.05}, {"e", "raw", "b", 0.72, 0.05}}, 5, 2)
	vs := []results.Variant{{Model: "a", Kind: "knn"}, {Model: "b", Kind: "svm"}}
	rep, err := Analyse(Input{Name: "x", CV: spec.CV{Method: spec.CVStratified, Folds: 2, Repeats: 5, Test: spec.Test5x2CV, Reference: "a"}, Summary: sum, Folds: folds, Variants: vs})
	if err != nil {
		t.Fatal(err)
	}
	var diff [5][2]float64
	for _, f := range folds {
		if f.Dataset != "d" {
			continue
		}
		s := 1.0
		if f.Model == "a" {
			s = -1
		}
		diff[f.Repeat][f.Fold] += s * f.Scores.Accuracy // b − a
	}
	want, err := stats.FiveByTwoCV(diff, 0.05)
	if err != nil {
		t.Fatal(err)
	}
	c := rep.Comparisons[0]
	if c.Dataset != "d" || c.Model != "b" || c.RefModel != "a" || c.Test != "5x2cv" || c.DF != 5 {
		t.Fatalf("first comparison %+v", c)
	}
	// Same inputs, same function: equal up to the order of summation in the differences.
	if !scalar.EqualWithinAbsOrRel(c.Statistic, want.Statistic, 1e-12, 1e-12) || !scalar.EqualWithinAbsOrRel(c.P, want.P, 1e-12, 1e-12) {
		t.Errorf("5x2cv t = %v p = %v, want %v %v", c.Statistic, c.P, want.Statistic, want.P)
	}
	// Missing folds are an error, not a silent fallback.
	if _, err := Analyse(Input{Name: "x", CV: spec.CV{Method: spec.CVStratified, Folds: 2, Repeats: 5, Test: spec.Test5x2CV}, Summary: sum, Folds: folds[:len(folds)-1], Variants: vs}); err == nil {
		t.Error("5x2cv with a fold missing: no error")
	}
}

func TestScaleGamma(t *testing.T) {
	// X = [[1, 0], [0, 1]]: mean 0.5, population variance 0.25 over the
	// four entries, d = 2, so gamma = 1/(2 · 0.25) = 2 (derived by hand
	// from the "scale" rule 1/(d·Var(X))). A constant matrix gives 1.
	if g := ScaleGamma(mat.NewDense(2, 2, []float64{1, 0, 0, 1})); !scalar.EqualWithinAbsOrRel(g, 2, 1e-15, 1e-15) {
		t.Errorf("ScaleGamma = %v, want 2", g)
	}
	// Zero variance: the rule returns the constant 1 itself, so == is exact.
	if g := ScaleGamma(mat.NewDense(2, 3, []float64{4, 4, 4, 4, 4, 4})); g != 1 {
		t.Errorf("ScaleGamma of a constant matrix = %v, want 1", g)
	}
}
