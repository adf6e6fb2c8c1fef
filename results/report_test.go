package results

import (
	"bytes"
	"encoding/csv"
	"encoding/json"
	"math"
	"slices"
	"strings"
	"testing"
)

// synthReport is a hand-made report: two datasets, the interference
// classifier exact, with two shot budgets and one noise strength, and two
// baselines. The numbers are invented.
func synthReport() *Report {
	nan := math.NaN()
	ms := func(mean, lo, hi float64) []MetricSummary {
		return []MetricSummary{{mean, 0.05, lo, hi}, {mean, 0.05, lo, hi}, {mean - 0.01, 0.05, lo - 0.01, hi - 0.01}}
	}
	rows := []Summary{
		{Dataset: "iris_2", Pipeline: "std+l2", Model: "q-depol", Metrics: ms(0.70, 0.65, 0.75), MeanPAcc: 0.5},
		{Dataset: "iris_2", Pipeline: "std+l2", Model: "q-shots100", Metrics: ms(0.80, 0.75, 0.85), MeanPAcc: 0.5},
		{Dataset: "iris_2", Pipeline: "std+l2", Model: "q", Metrics: ms(0.90, 0.85, 0.95), MeanPAcc: 0.5},
		{Dataset: "iris_2", Pipeline: "std+l2", Model: "q-shots10", Metrics: ms(0.60, 0.50, 0.70), MeanPAcc: 0.5},
		{Dataset: "iris_2", Pipeline: "std+l2", Model: "knn", Metrics: ms(0.95, 0.90, 1), MeanPAcc: nan},
		{Dataset: "iris_2", Pipeline: "std+l2", Model: "svm & co", Metrics: ms(0.94, 0.89, 0.99), MeanPAcc: nan},
		{Dataset: "wine", Pipeline: "std+l2", Model: "q", Metrics: ms(0.97, 0.94, 1), MeanPAcc: 0.5},
		{Dataset: "wine", Pipeline: "std+l2", Model: "knn", Metrics: ms(0.96, 0.93, 0.99), MeanPAcc: nan},
	}
	marks := make([][]Mark, len(rows))
	for i := range marks {
		marks[i] = []Mark{MarkNone, MarkNone, MarkNone}
	}
	marks[4] = []Mark{MarkBest, MarkBest, MarkBest}
	marks[5] = []Mark{MarkNotWorse, MarkNotWorse, MarkNotWorse}
	marks[6] = []Mark{MarkBest, MarkBest, MarkBest}
	marks[7] = []Mark{MarkNotWorse, MarkNone, MarkNone}
	return &Report{
		Protocol: Protocol{Run: "synth_1", Seed: 7, CV: "stratified 5-fold cross-validation, 2 repeats", Interval: "corrected resampled t interval, Nadeau & Bengio 2003",
			Level: 0.95, Test: "corrected resampled t-test", Alpha: 0.05, Correction: "Holm"},
		Label:   "tab:synth",
		Summary: rows,
		Marks:   marks,
		Variants: []Variant{
			{Model: "q", Kind: "interference", Interference: true, Family: "interference", Mode: "exact", Strength: nan},
			{Model: "q-shots100", Kind: "interference", Interference: true, Family: "interference", Mode: "shots", Shots: 100, Strength: nan},
			{Model: "q-shots10", Kind: "interference", Interference: true, Family: "interference", Mode: "shots", Shots: 10, Strength: nan},
			{Model: "q-depol", Kind: "interference", Interference: true, Family: "interference", Mode: "noisy", Noise: "global_depolarizing", Strength: 0.05},
			{Model: "knn", Kind: "knn", Family: "knn", Strength: nan},
			{Model: "svm & co", Kind: "svm", Family: "svm & co", Strength: nan},
		},
		Reference: "knn",
		Comparisons: []Comparison{{Dataset: "iris_2", Pipeline: "std+l2", Model: "q", RefPipeline: "std+l2", RefModel: "knn", Metric: "accuracy",
			Test: "corrected-t", Diff: -0.05, Lo: -0.09, Hi: -0.01, Statistic: -2.5, DF: 9, P: 0.034, PAdj: 0.068, Alpha: 0.05}},
		Ranks: []RankTable{{Pipeline: "std+l2", Metric: "accuracy", Models: []string{"q", "knn"}, Datasets: []string{"iris_2", "wine"},
			AvgRanks: []float64{1.5, 1.5}, ChiSq: 0, ChiSqP: 1, ChiSqTieCorrected: 0, ChiSqTieCorrectedP: 1, DF: 1, F: 0, DF1: 1, DF2: 1, P: 1, Alpha: 0.05, CD: 1.386}},
		Figures:  []FigureRef{{Path: "figures/cd-std+l2", Caption: "ranks"}},
		Warnings: []string{"few data sets (N = 2 ≤ 10)"},
	}
}

func TestVariantDescribeAndSort(t *testing.T) {
	r := synthReport()
	var got []string
	for _, v := range SortVariants(r.Variants) {
		got = append(got, v.Model+"="+v.Describe())
	}
	// Interference first: exact, shots ascending, noisy; baselines in input order.
	want := []string{"q=exact", "q-shots10=10 shots", "q-shots100=100 shots", "q-depol=global_depolarizing 0.05", "knn=", "svm & co="}
	if !slices.Equal(got, want) {
		t.Errorf("sorted variants %q, want %q", got, want)
	}
	v := Variant{Interference: true, Mode: "noisy", Noise: "depolarizing", Strength: 0.01, Shots: 1000}
	if d := v.Describe(); d != "depolarizing 0.01, 1000 shots" {
		t.Errorf("Describe = %q", d)
	}
}

func TestReportTeX(t *testing.T) {
	var b bytes.Buffer
	if err := WriteReportTeX(&b, synthReport()); err != nil {
		t.Fatal(err)
	}
	s := b.String()
	for _, want := range []string{
		`\caption{Run synth\_1 (stratified 5-fold cross-validation, 2 repeats; seed 7): mean with 95\% confidence interval (corrected resampled t interval, Nadeau \& Bengio 2003).`,
		`$^{\dagger}$: not significantly worse than the best (corrected resampled t-test, Holm correction within each dataset and metric, $\alpha = 0.05$).}`,
		`\label{tab:synth}`, `\label{tab:synth-modes}`, `Table~\ref{tab:synth}`, `\label{tab:synth-tests}`, `\label{tab:synth-ranks}`,
		// Numbers in dcolumn columns: bold digits on both sides of the point.
		`D{.}{.}{1.4}@{}>{${}}l<{$}`,
		`& knn & \mathbf{0}.\mathbf{950} & \hphantom{{}^{\dagger}}\pm 0.050`, // best: bold mean, symmetric interval
		`& svm \& co & 0.940 & {}^{\dagger}\pm 0.050`,                        // not significantly worse
		`\multicolumn{8}{@{}l@{}}{\emph{iris\_2}} \\*`,
		`std+l2 & q & \mathbf{0}.\mathbf{970} & \hphantom{{}^{\dagger}}\pm 0.030`, // wine q: [0.94, 1] around 0.97
		`& q-depol & global\_depolarizing 0.05 &`,
		`\cmidrule(l){2-7}`,
		`std+l2 & q & exact & 0.900 & \hphantom{{}^{\dagger}}\pm 0.050 & \mathbf{0}.\mathbf{970}`,
		"Friedman $\\chi^2$ (tie-corrected)",
	} {
		if !strings.Contains(s, want) {
			t.Errorf("summary.tex lacks %q:\n%s", want, s)
		}
	}
	// Symmetric at the shown precision: ±, not ^{+}_{-}.
	if strings.Contains(s, `^{+0.030}_{-0.030}`) {
		t.Errorf("symmetric interval printed asymmetrically:\n%s", s)
	}
	// Mode table order: exact, 10 shots, 100 shots, noisy, then the baselines.
	mode := s[strings.Index(s, "tab:synth-modes"):]
	idx := func(x string) int { return strings.Index(mode, x) }
	if !(idx("& q & exact") < idx("& q-shots10 &") && idx("& q-shots10 &") < idx("& q-shots100 &") &&
		idx("& q-shots100 &") < idx("& q-depol &") && idx("& q-depol &") < idx("& knn & baseline")) {
		t.Errorf("mode table rows out of order:\n%s", mode)
	}
	// Missing cells (q-shots10 on wine) print as a centred dash.
	if !strings.Contains(mode, "& q-shots10 & 10 shots & 0.600 & \\hphantom{{}^{\\dagger}}\\pm 0.100 & \\multicolumn{1}{c@{}}{--} &  \\\\") {
		t.Errorf("missing cell not printed as --:\n%s", mode)
	}
}

func TestCellAsymmetric(t *testing.T) {
	// A Wilson interval [0.913, 1.000] around 0.973: +0.027 / −0.060.
	got := texCell(MetricSummary{Mean: 0.973, Lo: 0.913, Hi: 1}, MarkBest, 3)
	if got != `$\mathbf{0.973}{}^{+0.027}_{-0.060}$` {
		t.Errorf("texCell = %q", got)
	}
	if got := mdCell(MetricSummary{Mean: 0.973, Lo: 0.913, Hi: 1}, MarkNotWorse, 3); got != "_0.973_ +0.027/−0.060" {
		t.Errorf("mdCell = %q", got)
	}
	if got := texCell(MetricSummary{Mean: 0.5, Lo: math.NaN(), Hi: math.NaN()}, MarkNone, 3); got != "$0.500$" {
		t.Errorf("texCell without interval = %q", got)
	}
}

func TestReportMarkdown(t *testing.T) {
	var b bytes.Buffer
	if err := WriteReportMarkdown(&b, synthReport()); err != nil {
		t.Fatal(err)
	}
	s := b.String()
	for _, want := range []string{
		"# Run synth\\_1", "## Summary", "## Interference classifier across modes", "## Against the reference", "## Across datasets",
		"## Figures", "## Warnings",
		"in italics: not significantly worse than the best",
		"| iris\\_2 | std+l2 | knn | **0.950** ± 0.050 |",
		"| iris\\_2 | std+l2 | svm & co | _0.940_ ± 0.050 |",
		"| iris\\_2 | std+l2 | q | std+l2 / knn | accuracy | -0.050 | [-0.090, -0.010] | -2.500 | 9 | 0.0340 | 0.0680 | n.s. |",
		"Friedman χ² = 0.000 in Demšar's form (df 1, p = 1.0000), 0.000 tie-corrected (p = 1.0000); ",
		"Iman–Davenport F = 0.000 (df 1, 1), p = 1.0000: retain equal performance at α = 0.05. Nemenyi critical difference 1.386.",
		"{q, knn}",
		"[ranks](figures/cd-std+l2.svg)",
		"| std+l2 | q-depol | global\\_depolarizing 0.05 | 0.700 ± 0.050 | – |",
	} {
		if !strings.Contains(s, want) {
			t.Errorf("summary.md lacks %q:\n%s", want, s)
		}
	}
	if strings.HasSuffix(s, "\n\n") || !strings.HasSuffix(s, "\n") {
		t.Error("summary.md should end with exactly one newline")
	}
}

func TestRankGroups(t *testing.T) {
	// Demšar (2006), worked example on Table 6: average ranks 3.143, 2.000,
	// 2.893, 1.964 (C4.5, C4.5+m, C4.5+cf, C4.5+m+cf); at CD = 1.25
	// (alpha 0.05) no pair differs, at CD = 1.12 (alpha 0.10) C4.5+m+cf
	// differs from C4.5 (3.143 − 1.964 = 1.179 > 1.12) and the diagram has
	// two groups (derived by hand from the ranks).
	ranks := []float64{3.143, 2.000, 2.893, 1.964}
	if g := RankGroups(ranks, 1.25); !slices.EqualFunc(g, [][]int{{3, 1, 2, 0}}, slices.Equal) {
		t.Errorf("groups at CD 1.25: %v", g)
	}
	if g := RankGroups(ranks, 1.12); !slices.EqualFunc(g, [][]int{{3, 1, 2}, {2, 0}}, slices.Equal) {
		t.Errorf("groups at CD 1.12: %v", g)
	}
	// Every pair apart: no groups. Derived by hand.
	if g := RankGroups([]float64{1, 2, 3}, 0.5); len(g) != 0 {
		t.Errorf("groups with CD 0.5: %v", g)
	}
}

func TestWriteComparisons(t *testing.T) {
	var b bytes.Buffer
	rows := []Comparison{
		{Dataset: "d", Pipeline: "p", Model: "m", RefPipeline: "p", RefModel: "r", Metric: "accuracy", Test: "corrected-t",
			Diff: 0.1, Lo: math.NaN(), Hi: math.NaN(), Statistic: math.Inf(1), DF: 9, P: 0, PAdj: 0, Alpha: 0.05, Reject: true},
		{Dataset: "d", Pipeline: "p", Model: "n", RefPipeline: "p", RefModel: "r", Metric: "accuracy", Test: "mcnemar",
			Diff: -0.02, Lo: math.NaN(), Hi: math.NaN(), Statistic: 0.5, DF: 1, P: 0.48, PAdj: 0.48, Alpha: 0.05},
	}
	if err := WriteComparisons(&b, rows); err != nil {
		t.Fatal(err)
	}
	recs, err := csv.NewReader(&b).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	if len(recs) != 3 || len(recs[0]) != 16 {
		t.Fatalf("comparisons.csv has %d rows of %d fields", len(recs), len(recs[0]))
	}
	if recs[1][10] != "inf" || recs[1][8] != "" || recs[1][15] != "better" || recs[2][15] != "n.s." {
		t.Errorf("rows %q, %q", recs[1], recs[2])
	}
}

func TestRankWriters(t *testing.T) {
	rt := RankTable{Metric: "score", Models: []string{"a", "b", "c"}, Datasets: []string{"x", "y", "z"},
		AvgRanks: []float64{2.5, 1, 2.5}, ChiSq: 4.667, ChiSqP: 0.097, ChiSqTieCorrected: 5.6, ChiSqTieCorrectedP: 0.061, DF: 2, F: math.Inf(1), DF1: 2, DF2: 4, P: 0, Alpha: 0.1, Reject: true, CD: 1.5,
		Warnings: []string{"ties within 1 data sets (indices 0)"}}
	var b bytes.Buffer
	if err := WriteRankText(&b, rt); err != nil {
		t.Fatal(err)
	}
	for _, want := range []string{"1     b      1.000", "Iman-Davenport F        ∞", "tie-corrected         5.600  (df 2, p = 0.0610; the F below uses it)", "(data set indices: 0 = x, 1 = y, 2 = z)", "b, a, c"} {
		if !strings.Contains(b.String(), want) {
			t.Errorf("rank text lacks %q:\n%s", want, b.String())
		}
	}
	b.Reset()
	if err := WriteRankJSON(&b, rt); err != nil {
		t.Fatal(err)
	}
	var j map[string]any
	if err := json.Unmarshal(b.Bytes(), &j); err != nil {
		t.Fatalf("rank JSON does not parse: %v\n%s", err, b.String())
	}
	for _, k := range []string{"avg_ranks", "friedman_chi2", "friedman_chi2_tie_corrected", "p_value_chi2_tie_corrected", "iman_davenport_f", "p_value", "critical_difference"} {
		if _, ok := j[k]; !ok {
			t.Errorf("rank JSON lacks %q", k)
		}
	}
	if r := j["avg_ranks"].(map[string]any)["b"].(float64); r != 1 {
		t.Errorf("avg_ranks.b = %v", r)
	}
	// Every dataset tied: no tie-corrected statistic, written as null.
	rt.ChiSqTieCorrected, rt.ChiSqTieCorrectedP = math.NaN(), math.NaN()
	b.Reset()
	if err := WriteRankJSON(&b, rt); err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(b.String(), `"friedman_chi2_tie_corrected": null`) {
		t.Errorf("NaN tie-corrected chi-square not null:\n%s", b.String())
	}
}

func TestCompareWriters(t *testing.T) {
	rc := &RunComparison{BaseDir: "base", NewDir: "new", Alpha: 0.05, Tolerance: 0.01, Correction: "holm", Gated: []string{"accuracy"},
		Pairing: "Splits: the same.", Regressions: 1, OnlyBase: []string{"d/p/gone"},
		Cells: []CellChange{
			{Dataset: "d", Pipeline: "p", Model: "m", Metric: "accuracy", Base: 0.9, New: 0.8, Delta: -0.1, Lo: -0.15, Hi: -0.05,
				Method: "paired-t", Statistic: -4, DF: 9, P: 0.003, PAdj: 0.003, Gated: true, Regression: true},
			{Dataset: "d", Pipeline: "p", Model: "m", Metric: "macro_f1", Base: 0.9, New: 0.8, Delta: -0.1, Lo: math.NaN(), Hi: math.NaN(),
				Method: "none", Statistic: math.NaN(), P: math.NaN(), PAdj: math.NaN()},
		}}
	var b bytes.Buffer
	if err := WriteCompareMarkdown(&b, rc); err != nil {
		t.Fatal(err)
	}
	for _, want := range []string{"**REGRESSION**", "| d | p | m | macro\\_f1 | 0.900 | 0.800 | -0.100 | – | none | – | – | not gated |", "Only in the baseline (not compared): d/p/gone", "Verdict: 1 regression(s)."} {
		if !strings.Contains(b.String(), want) {
			t.Errorf("compare table lacks %q:\n%s", want, b.String())
		}
	}
	b.Reset()
	if err := WriteCompareJSON(&b, rc); err != nil {
		t.Fatal(err)
	}
	var j struct {
		Regressed bool `json:"regressed"`
		Compared  int  `json:"cells_compared"`
		Cells     []struct {
			P *float64 `json:"p_value"`
		} `json:"cells"`
	}
	if err := json.Unmarshal(b.Bytes(), &j); err != nil {
		t.Fatal(err)
	}
	if !j.Regressed || j.Compared != 1 || j.Cells[0].P == nil || j.Cells[1].P != nil {
		t.Errorf("compare JSON: %+v\n%s", j, b.String())
	}
}
