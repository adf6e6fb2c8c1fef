package results

import (
	"bytes"
	"encoding/csv"
	"math"
	"slices"
	"strings"
	"testing"
)

// handAssessment is a two-row assessment with invented numbers, one row
// without a finite shot budget.
func handAssessment() *Assessment {
	nan := math.NaN()
	row := func(ds, pipe string, rank, front int, shots, gap float64) AssessRow {
		return AssessRow{
			Dataset: ds, Pipeline: pipe, Rank: rank, Front: front, Instances: 100, Features: 3, Classes: 2,
			Folds: 10, Repeats: 1, TrainSize: 90, Index: 7, Data: 2, Class: 1, Qubits: 11, PaddingWaste: 0.25,
			CNOT: 1000, SingleQubit: 900, Depth: 1500, NoiseBudget: 6.5e-4, Weights: "balanced",
			PAccMean: 0.6, PAccMin: 0.4, PAcc5: 0.45, MarginMedian: 0.1, ShotsMedian: shots, Shots90: shots * 2,
			PAcc:  []float64{0.4, 0.5, 0.6, 0.7, 0.8},
			Exact: MetricSummary{Mean: 0.9, Std: 0.05, Lo: 0.85, Hi: 0.95}, Uniform: MetricSummary{Mean: 0.88, Lo: nan, Hi: nan},
			Balanced: MetricSummary{Mean: 0.9, Std: 0.05, Lo: 0.85, Hi: 0.95}, Baseline: "svm-rbf-C1 (std)",
			BaselineAcc: MetricSummary{Mean: 0.95, Lo: 0.9, Hi: 1}, Gap: gap, GapLo: gap - 0.02, GapHi: gap + 0.02, GapP: 0.01,
			Before: "std", KNNBefore: 0.93, KNNL2: 0.9, Lift: "lift", KNNLift: 0.92, NormOnly: 0.6, Chance: 0.5, NormShare: nan,
			KTAInterference: 0.4, KTARBF: 0.45, RBFGamma: 0.33, Verdict: "trails",
		}
	}
	return &Assessment{
		Seed: 5, Repeats: 1, Confidence: 0.95, Ratio: 10, Weights: "balanced", Level: 0.95, Subsets: []int{8, 16},
		ClassicalPipeline: "std", Margin: 0.01,
		Rows: []AssessRow{
			row("alpha", "std+l2", 2, 1, 120.2, -0.05),
			row("alpha", "l2", 1, 1, math.Inf(1), -0.01),
		},
		Ranking: []int{1, 0},
		Resources: []AssessResource{
			{Dataset: "alpha", Pipeline: "std+l2", Train: 8, Index: 3, Data: 2, Class: 1, Qubits: 7, PaddingWaste: 0.25, CNOT: 40, SingleQubit: 45, Depth: 70, NoiseBudget: 0.012},
			{Dataset: "alpha", Pipeline: "std+l2", Train: 90, Full: true, Index: 7, Data: 2, Class: 1, Qubits: 11, PaddingWaste: 0.25, CNOT: 1000, SingleQubit: 900, Depth: 1500, NoiseBudget: 6.5e-4},
		},
	}
}

func TestWriteAssessCSV(t *testing.T) {
	a := handAssessment()
	var b bytes.Buffer
	if err := WriteAssessCSV(&b, a); err != nil {
		t.Fatal(err)
	}
	recs, err := csv.NewReader(&b).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	if len(recs) != 3 || !slices.Equal(recs[0], AssessColumns) {
		t.Fatalf("%d records, header %q", len(recs), recs[0])
	}
	col := func(r int, name string) string { return recs[r][slices.Index(AssessColumns, name)] }
	// Fixed decimals, "inf" for no finite budget, "" for NaN, scientific
	// notation for the noise budget.
	checks := []struct{ got, want string }{
		{col(1, "rank"), "2"}, {col(1, "shots_median"), "120.200000"}, {col(2, "shots_median"), "inf"},
		{col(1, "norm_share"), ""}, {col(1, "p2_budget"), "6.500e-04"}, {col(1, "uniform_accuracy"), "0.880000"},
		{col(1, "baseline"), "svm-rbf-C1 (std)"},
	}
	for _, c := range checks {
		if c.got != c.want {
			t.Errorf("got %q, want %q", c.got, c.want)
		}
	}
	b.Reset()
	if err := WriteAssessResourcesCSV(&b, a); err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(b.String(), "alpha,std+l2,90,true,7,2,1,11,0.250000,1000,900,1500,6.500e-04\n") {
		t.Errorf("resources CSV:\n%s", b.String())
	}
}

func TestWriteAssessMarkdownAndTeX(t *testing.T) {
	a := handAssessment()
	var b bytes.Buffer
	if err := WriteAssessMarkdown(&b, a); err != nil {
		t.Fatal(err)
	}
	md := b.String()
	// Ranking order: rank 1 (the l2 row) before rank 2.
	i1, i2 := strings.Index(md, "| 1 | 1 | alpha | l2 |"), strings.Index(md, "| 2 | 1 | alpha | std+l2 |")
	if i1 < 0 || i2 < 0 || i1 > i2 {
		t.Errorf("ranking rows missing or out of order:\n%s", md)
	}
	for _, want := range []string{"within ±0.01, the equivalence margin (practical equivalence by two one-sided tests, Schuirmann 1987, each at level 0.025)", "| ∞ |", "| 121 |", "0.900 ± 0.050", "−0.010 [−0.030, +0.010]", "| 90 (full) | 11 = 1 + 7 + 2 + 1 |", "6.5e-04", "seed 5"} {
		want = strings.ReplaceAll(want, "−", "-") // fmtSigned writes ASCII minus
		if !strings.Contains(md, want) {
			t.Errorf("Markdown lacks %q", want)
		}
	}
	b.Reset()
	if err := WriteAssessTeX(&b, a); err != nil {
		t.Fatal(err)
	}
	tex := b.String()
	for _, want := range []string{"\\toprule", "\\bottomrule", "$\\infty$", "$6.5 \\times 10^{-4}$", "train\\_subset", "90*",
		"within \\ensuremath{\\pm}0.01, the equivalence margin", "Schuirmann 1987"} {
		if !strings.Contains(tex, want) {
			t.Errorf("LaTeX lacks %q", want)
		}
	}
	if strings.Count(tex, "\\begin{table}") != 2 || strings.Count(tex, "\\begin{table}") != strings.Count(tex, "\\end{table}") {
		t.Error("unbalanced table environments")
	}
}

func TestAssessFigures(t *testing.T) {
	a := handAssessment()
	figs, err := AssessFigures(a, func(s string) string { return strings.ReplaceAll(s, "+", "_") })
	if err != nil {
		t.Fatal(err)
	}
	var names []string
	for _, f := range figs {
		names = append(names, f.Name)
		if _, err := f.Render("svg"); err != nil {
			t.Errorf("%s: %v", f.Name, err)
		}
	}
	// No resource row has pipeline l2: it gets no noise-budget figure.
	want := []string{"figures/assess-cost-gain", "figures/assess-p-acc", "figures/assess-noise-std_l2", "figures/assess-norm-std"}
	if !slices.Equal(names, want) {
		t.Errorf("figures %q, want %q", names, want)
	}
	// The row without a finite budget is named in the cost–gain title.
	if !strings.Contains(figs[0].Plot.Title.Text, "alpha/l2") {
		t.Errorf("cost-gain title %q does not name the row left out", figs[0].Plot.Title.Text)
	}
	if _, err := AssessFigures(&Assessment{}, nil); err == nil {
		t.Error("an empty assessment must be an error")
	}
}

func TestDecadeTicks(t *testing.T) {
	ticks := decadeTicks{}.Ticks(1e-3, 1e12)
	var labelled []string
	for _, tk := range ticks {
		if tk.Label != "" {
			labelled = append(labelled, tk.Label)
		}
	}
	// 16 decades, every third labelled (at most seven labels): derived by
	// hand from the rule.
	if len(ticks) != 16 || !slices.Equal(labelled, []string{"1e-3", "1", "1000", "1e6", "1e9", "1e12"}) {
		t.Errorf("%d ticks, labels %q", len(ticks), labelled)
	}
}
