package assess

import (
	"bytes"
	"context"
	"errors"
	"math"
	"os"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"

	"fringe/bench/input"
	"fringe/bench/spec"
	"fringe/qkernel/circuit"
	"fringe/results"
)

// smallAssessment runs a quick assessment shared by the tests below.
func smallAssessment(t *testing.T, workers int) *results.Assessment {
	t.Helper()
	a, err := Run(context.Background(), Options{
		Datasets:  []spec.Dataset{{Name: "iris"}, {Name: "cats"}},
		Pipelines: []string{"std+l2", "std+lift"},
		Subsets:   []int{2, 8, 16},
		Seed:      11, Repeats: 1, Workers: workers,
	})
	if err != nil {
		t.Fatal(err)
	}
	return a
}

// gateFormula is the gate count of the compiled circuit as documented in
// qkernel/circuit/doc.go (index tree, data tree with the ancilla and index
// as controls, class rotations; UCRY with k controls = 2^k RY and 2^k CNOT,
// Möttönen et al., quant-ph/0407010), plus the two Hadamards.
func gateFormula(nm, nd, nc int) (cnot, single int) {
	p := func(k int) int { return 1 << k }
	ind := 0
	if nm >= 1 {
		ind = 1
	}
	cnot = (p(nm)-2)*ind + p(1+nm)*(p(nd)-1) + nc*p(nm)*ind
	ry := (p(nm) - 1) + p(1+nm)*(p(nd)-1) + nc*p(nm)
	return cnot, ry + 2
}

// TestAssessResources checks the register and gate table against the
// published formulas: register sizes ceil(log2 M), max(1, ceil(log2 d)),
// ceil(log2 C) (Schuld, Fingerhuth & Petruccione 2017, the circuit's
// layout), the gate counts of qkernel/circuit's doc (quant-ph/0407010),
// the padding waste and the noise budget's defining equation.
func TestAssessResources(t *testing.T) {
	a := smallAssessment(t, 2)
	if len(a.Rows) != 4 {
		t.Fatalf("%d rows, want 4", len(a.Rows))
	}
	// Features after the pipeline (derived by hand): std+l2 keeps d, lift
	// appends one. Classes: iris 3, cats 2.
	wantDim := map[string]int{"iris/std+l2": 4, "iris/std+lift": 5, "cats/std+l2": 2, "cats/std+lift": 3}
	fulls := 0
	for _, r := range a.Resources {
		key := r.Dataset + "/" + r.Pipeline
		d, ok := wantDim[key]
		if !ok {
			t.Fatalf("unexpected resource row %s", key)
		}
		C := map[string]int{"iris": 3, "cats": 2}[r.Dataset]
		ni, nd, nc := circuit.RegisterSizes(r.Train, d, C)
		if r.Index != ni || r.Data != nd || r.Class != nc || r.Qubits != 1+ni+nd+nc {
			t.Errorf("%s M=%d: registers %d+%d+%d = %d, want %d+%d+%d", key, r.Train, r.Index, r.Data, r.Class, r.Qubits, ni, nd, nc)
		}
		// ceil(log2) by hand for the sizes in play.
		if want := int(math.Ceil(math.Log2(float64(r.Train)))); r.Index != want {
			t.Errorf("%s M=%d: index %d, want ceil(log2 M) = %d", key, r.Train, r.Index, want)
		}
		// The published counts are an upper bound: the circuit's dead
		// gates (rotations by 0, cancelling pairs) are removed
		// (circuit.Simplify; qkernel/circuit checks the unsimplified
		// circuit against the formula exactly).
		cn, sq := gateFormula(ni, nd, nc)
		if r.CNOT > cn || r.SingleQubit > sq || r.CNOT == 0 {
			t.Errorf("%s M=%d: CNOT %d single %d, formula (upper bound) %d %d", key, r.Train, r.CNOT, r.SingleQubit, cn, sq)
		}
		if want := float64((1<<nd)-d) / float64(int(1)<<nd); r.PaddingWaste != want {
			t.Errorf("%s: padding waste %v, want %v", key, r.PaddingWaste, want)
		}
		f := math.Pow(1-r.NoiseBudget, float64(r.CNOT)) * math.Pow(1-r.NoiseBudget/a.Ratio, float64(r.SingleQubit))
		if !scalar.EqualWithinAbs(f, 0.5, 1e-9) {
			t.Errorf("%s M=%d: fidelity at the budget %v = %v", key, r.Train, r.NoiseBudget, f)
		}
		if r.Train < C {
			t.Errorf("%s: subset %d below the %d classes", key, r.Train, C)
		}
		if r.Full {
			fulls++
		}
	}
	if fulls != 4 {
		t.Errorf("%d full-set rows, want one per row (4)", fulls)
	}
	for _, r := range a.Rows {
		// Stratified 10-fold on 150 / 144 rows: every training part holds
		// 135 / 129 or 130 rows (derived by hand).
		if r.Dataset == "iris" && r.TrainSize != 135 || r.Dataset == "cats" && (r.TrainSize < 129 || r.TrainSize > 130) {
			t.Errorf("%s: training size %d", r.Dataset, r.TrainSize)
		}
		if r.Features != wantDim[r.Dataset+"/"+r.Pipeline] {
			t.Errorf("%s/%s: %d features", r.Dataset, r.Pipeline, r.Features)
		}
	}
}

// TestAssessRows checks the other columns for internal consistency and
// against values derived by hand.
func TestAssessRows(t *testing.T) {
	a := smallAssessment(t, 2)
	for _, r := range a.Rows {
		where := r.Dataset + "/" + r.Pipeline
		// Majority-class rates: iris 50/150, cats 97/144 (the class counts).
		want := map[string]float64{"iris": 50.0 / 150, "cats": 97.0 / 144}[r.Dataset]
		if !scalar.EqualWithinAbs(r.Chance, want, 1e-15) {
			t.Errorf("%s: chance %v, want %v", where, r.Chance, want)
		}
		// Every test instance once per repeat.
		if len(r.PAcc) != r.Instances*r.Repeats {
			t.Errorf("%s: %d p_acc values for %d instances", where, len(r.PAcc), r.Instances)
		}
		if !(r.PAccMin <= r.PAcc5 && r.PAcc5 <= r.PAccMean && r.PAccMean <= 1 && r.PAccMin >= 0) {
			t.Errorf("%s: p_acc min %v, 5%% %v, mean %v", where, r.PAccMin, r.PAcc5, r.PAccMean)
		}
		if !(r.MarginMedian >= 0 && r.MarginMedian <= 1) || !(r.ShotsMedian > 0) || r.Shots90 < r.ShotsMedian {
			t.Errorf("%s: margin %v shots %v / %v", where, r.MarginMedian, r.ShotsMedian, r.Shots90)
		}
		// The default assessed form is the balanced one.
		if r.Weights != "balanced" || r.Exact != r.Balanced {
			t.Errorf("%s: assessed %s %+v, balanced %+v", where, r.Weights, r.Exact, r.Balanced)
		}
		if !(r.GapLo <= r.Gap && r.Gap <= r.GapHi) || !(r.GapP >= 0 && r.GapP <= 1) {
			t.Errorf("%s: gap %v [%v, %v] p %v", where, r.Gap, r.GapLo, r.GapHi, r.GapP)
		}
		// The mean of the paired differences is the difference of the
		// means (same folds): exact to rounding.
		if !scalar.EqualWithinAbs(r.Gap, r.Exact.Mean-r.BaselineAcc.Mean, 1e-12) {
			t.Errorf("%s: gap %v, means %v - %v", where, r.Gap, r.Exact.Mean, r.BaselineAcc.Mean)
		}
		if !strings.HasSuffix(r.Baseline, "(std)") {
			t.Errorf("%s: baseline %q", where, r.Baseline)
		}
		// Both pipelines normalise the z-scores; the lift compared is
		// std+lift's own (c = 1), and the default for std+l2.
		if r.Before != "std" || r.Lift != "lift" {
			t.Errorf("%s: before %q lift %q", where, r.Before, r.Lift)
		}
		den := math.Max(r.KNNBefore, r.KNNLift) - r.Chance
		switch {
		case den < 0.05 && !math.IsNaN(r.NormShare):
			t.Errorf("%s: norm share %v with k-NN within 0.05 of chance", where, r.NormShare)
		case den >= 0.05 && !scalar.EqualWithinAbs(r.NormShare, (r.NormOnly-r.Chance)/den, 1e-15):
			t.Errorf("%s: norm share %v", where, r.NormShare)
		}
		if !(r.KTAInterference > -1 && r.KTAInterference < 1 && r.KTARBF > -1 && r.KTARBF < 1) {
			t.Errorf("%s: alignments %v %v", where, r.KTAInterference, r.KTARBF)
		}
	}
	// std+l2 and std+lift share the vectors before normalisation: their
	// k-NN columns are the same cells.
	if a.Rows[0].KNNBefore != a.Rows[1].KNNBefore || a.Rows[0].NormOnly != a.Rows[1].NormOnly {
		t.Error("iris: the two pipelines disagree on the shared k-NN cells")
	}
}

// TestAssessRanking checks the Pareto fronts: no row dominates another of
// its own front, every row of front f > 1 is dominated by one of front
// f − 1, and the ranking is a permutation in front order.
func TestAssessRanking(t *testing.T) {
	a := smallAssessment(t, 2)
	dom := func(x, y results.AssessRow) bool {
		return x.Gap >= y.Gap && x.ShotsMedian <= y.ShotsMedian && x.NoiseBudget >= y.NoiseBudget &&
			(x.Gap > y.Gap || x.ShotsMedian < y.ShotsMedian || x.NoiseBudget > y.NoiseBudget)
	}
	seen := map[int]bool{}
	last := 0
	for pos, i := range a.Ranking {
		r := a.Rows[i]
		if seen[i] || r.Rank != pos+1 || r.Front < last {
			t.Fatalf("ranking %v broken at %d (front %d after %d)", a.Ranking, pos, r.Front, last)
		}
		seen[i], last = true, r.Front
		hasDom := r.Front == 1
		for _, s := range a.Rows {
			if s.Front == r.Front && dom(s, r) {
				t.Errorf("%s/%s is dominated within its front by %s/%s", r.Dataset, r.Pipeline, s.Dataset, s.Pipeline)
			}
			if s.Front == r.Front-1 && dom(s, r) {
				hasDom = true
			}
		}
		if !hasDom {
			t.Errorf("%s/%s in front %d has no dominating row in front %d", r.Dataset, r.Pipeline, r.Front, r.Front-1)
		}
	}
	if len(seen) != len(a.Rows) {
		t.Errorf("ranking covers %d of %d rows", len(seen), len(a.Rows))
	}
}

// TestAssessDeterministic writes the report of two runs with different
// worker counts and compares every file byte for byte.
func TestAssessDeterministic(t *testing.T) {
	if testing.Short() {
		t.Skip("renders the figures twice")
	}
	dirs := []string{filepath.Join(t.TempDir(), "a"), filepath.Join(t.TempDir(), "b")}
	for i, w := range []int{1, 2} {
		if err := Write(dirs[i], smallAssessment(t, w)); err != nil {
			t.Fatal(err)
		}
	}
	var files []string
	filepath.WalkDir(dirs[0], func(p string, d os.DirEntry, err error) error {
		if err == nil && !d.IsDir() {
			rel, _ := filepath.Rel(dirs[0], p)
			files = append(files, rel)
		}
		return err
	})
	for _, want := range []string{"assess.csv", "assess-resources.csv", "assess.md", "assess.tex", "assess.json", "figures/assess-cost-gain.svg", "figures/assess-p-acc.png", "figures/assess-noise-std+l2.pdf", "figures/assess-norm-std.svg"} {
		if !slices.Contains(files, filepath.FromSlash(want)) {
			t.Errorf("missing %s (have %v)", want, files)
		}
	}
	for _, f := range files {
		x, err1 := os.ReadFile(filepath.Join(dirs[0], f))
		y, err2 := os.ReadFile(filepath.Join(dirs[1], f))
		if err1 != nil || err2 != nil || !bytes.Equal(x, y) {
			t.Errorf("%s differs between 1 and 2 workers", f)
		}
	}
	// No partial directory is left beside the output.
	left, _ := filepath.Glob(filepath.Join(filepath.Dir(dirs[0]), ".*partial*"))
	if len(left) > 0 {
		t.Errorf("left behind: %v", left)
	}
}

// TestAssessBadInput checks that bad options are input errors naming the
// problem, and that a small class lowers the number of folds with a
// warning.
func TestAssessBadInput(t *testing.T) {
	cases := []struct {
		opt  Options
		want string
	}{
		{Options{Datasets: []spec.Dataset{{Name: "irises"}}}, "irises"},
		{Options{Datasets: []spec.Dataset{{Name: "iris"}}, Pipelines: []string{"std+whiten"}}, "whiten"},
		{Options{Datasets: []spec.Dataset{{Name: "iris"}}, Folds: 1}, "folds"},
		{Options{Datasets: []spec.Dataset{{Name: "iris"}}, Ratio: 0.5}, "ratio"},
		{Options{Datasets: []spec.Dataset{{Name: "iris"}, {Name: "iris"}}}, "twice"},
		{Options{Datasets: []spec.Dataset{{Name: "iris"}}, Subsets: []int{0}}, "subset"},
	}
	for _, c := range cases {
		_, err := Run(context.Background(), c.opt)
		if !errors.Is(err, input.ErrBad) || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%+v: error %v, want an input error naming %q", c.opt, err, c.want)
		}
	}
	dir := t.TempDir()
	csvText := "x,y,label\n"
	for i := range 16 {
		lab := "common"
		if i%4 == 0 {
			lab = "rare"
		}
		csvText += strings.Join([]string{strconv.Itoa(i%7 + 1), strconv.Itoa(i%5 + 2), lab}, ",") + "\n"
	}
	path := filepath.Join(dir, "small.csv")
	if err := os.WriteFile(path, []byte(csvText), 0o644); err != nil {
		t.Fatal(err)
	}
	// The display name is fixed (As): splits are seeded by the dataset's
	// name, and the temporary path changes from run to run.
	a, err := Run(context.Background(), Options{Datasets: []spec.Dataset{{Name: path, As: "small"}}, Pipelines: []string{"std+l2"}, Repeats: 1, Subsets: []int{}})
	if err != nil {
		t.Fatal(err)
	}
	if a.Rows[0].Folds != 4 || len(a.Warnings) != 1 || !strings.Contains(a.Warnings[0], "4 folds instead of 10") {
		t.Errorf("folds %d, warnings %q", a.Rows[0].Folds, a.Warnings)
	}
	one := filepath.Join(dir, "one.csv")
	os.WriteFile(one, []byte("x,label\n1,a\n2,a\n3,b\n"), 0o644)
	if _, err := Run(context.Background(), Options{Datasets: []spec.Dataset{{Name: one}}}); !errors.Is(err, input.ErrBad) || !strings.Contains(err.Error(), "single member") {
		t.Errorf("class of one: %v", err)
	}
}

// TestBeforeNorm checks the split of a pipeline at its unit-norm step.
func TestBeforeNorm(t *testing.T) {
	for _, c := range []struct{ in, before, lift string }{
		{"std+l2", "std", "lift"}, {"l2", "raw", "lift"}, {"std+lift", "std", "lift"},
		{"minmax+lift(0.5)", "minmax", "lift(0.5)"}, {"std", "std", "lift"}, {"raw", "raw", "lift"},
	} {
		b, l, err := beforeNorm(c.in)
		if err != nil || b != c.before || l != c.lift {
			t.Errorf("beforeNorm(%q) = %q %q %v, want %q %q", c.in, b, l, err, c.before, c.lift)
		}
	}
	if then("raw", "norm") != "norm" || then("std", "norm") != "std+norm" {
		t.Error("then")
	}
}

// TestAssessReduction: with the default pipelines, a dataset of more than
// ReduceAbove features is also assessed after principal components
// (ReductionPipelines), whose circuits have fewer data qubits; a dataset
// of at most that many features is not.
func TestAssessReduction(t *testing.T) {
	a, err := Run(context.Background(), Options{Datasets: []spec.Dataset{{Name: "wine"}, {Name: "iris"}}, Folds: 3, Repeats: 1, Subsets: []int{}})
	if err != nil {
		t.Fatal(err)
	}
	data := map[string]int{}
	for _, r := range a.Rows {
		data[r.Dataset+"/"+r.Pipeline] = r.Data
	}
	// wine: 13 features, padded to 16 amplitudes (4 data qubits); 8 and
	// 4 components need 3 and 2 (derived by hand: ceil(log2 d)).
	for key, want := range map[string]int{"wine/std+l2": 4, "wine/std+pca(8)+l2": 3, "wine/std+pca(4)+l2": 2} {
		if got, ok := data[key]; !ok || got != want {
			t.Errorf("%s: %d data qubits (row present %v), want %d", key, got, ok, want)
		}
	}
	if _, ok := data["iris/std+pca(4)+l2"]; ok {
		t.Error("iris (4 features) assessed with a reduction")
	}
}

// TestVerdictWords checks how the verdict reads the gap's interval. The
// rows are those of the observed report (cats: gap -0.085, interval
// [-0.193, +0.024], called "on par" before because the interval holds 0)
// and hand-made intervals around the ±0.01 band: on par needs the whole
// interval inside the equivalence margin (two one-sided tests,
// Schuirmann 1987); an interval holding 0 but leaving the band is "not
// significantly different".
func TestVerdictWords(t *testing.T) {
	nan := math.NaN()
	for _, c := range []struct {
		gap, lo, hi, margin float64
		want                string
	}{
		{-0.085, -0.193, 0.024, 0.01, "not significantly different from the best baseline (gap -0.085, interval [-0.193, +0.024])"},
		{-0.001, -0.020, 0.018, 0.01, "not significantly different from the best baseline (gap -0.001, interval [-0.020, +0.018])"},
		{-0.001, -0.020, 0.018, 0.05, "on par with the best baseline (gap -0.001, interval [-0.020, +0.018], within the ±0.05 equivalence margin)"},
		{0.002, -0.004, 0.008, 0.01, "on par with the best baseline (gap +0.002, interval [-0.004, +0.008], within the ±0.01 equivalence margin)"},
		{-0.005, -0.008, -0.002, 0.01, "on par with the best baseline (gap -0.005, interval [-0.008, -0.002], within the ±0.01 equivalence margin)"},
		{0.000, -0.010, 0.010, 0.01, "on par with the best baseline (gap +0.000, interval [-0.010, +0.010], within the ±0.01 equivalence margin)"},
		{-0.050, -0.080, -0.020, 0.01, "trails the best baseline by 0.050"},
		{0.040, 0.005, 0.075, 0.01, "beats the best baseline by 0.040"},
		{nan, nan, nan, 0.01, "no baseline to compare"},
	} {
		r := results.AssessRow{Gap: c.gap, GapLo: c.lo, GapHi: c.hi, ShotsMedian: 10}
		if got := verdict(r, "std+l2", c.margin); got != c.want {
			t.Errorf("gap %v [%v, %v], margin %v:\n got %q\nwant %q", c.gap, c.lo, c.hi, c.margin, got, c.want)
		}
	}
}

// TestAssessMargin checks that the margin reaches the report (assess.md,
// assess.json) and that a margin outside (0, 1) is refused with its key.
func TestAssessMargin(t *testing.T) {
	if _, err := Run(context.Background(), Options{Datasets: []spec.Dataset{{Name: "cats"}}, Margin: 1.5}); !errors.Is(err, input.ErrBad) || !strings.Contains(err.Error(), "margin") {
		t.Errorf("margin 1.5: %v", err)
	}
	a, err := Run(context.Background(), Options{
		Datasets: []spec.Dataset{{Name: "cats"}}, Pipelines: []string{"std+l2"}, Subsets: []int{},
		Seed: 11, Repeats: 1, Folds: 3, Workers: 2, Margin: 0.5,
	})
	if err != nil {
		t.Fatal(err)
	}
	// cats' accuracies differ by far less than 0.5, so the interval lies
	// inside a band that wide and the verdict must say on par.
	r := a.Rows[0]
	if a.Margin != 0.5 || !(r.GapLo >= -0.5 && r.GapHi <= 0.5) || !strings.HasPrefix(r.Verdict, "on par with the best baseline") || !strings.Contains(r.Verdict, "±0.5 equivalence margin") {
		t.Errorf("margin %v, gap [%v, %v], verdict %q", a.Margin, r.GapLo, r.GapHi, r.Verdict)
	}
	dir := filepath.Join(t.TempDir(), "out")
	if err := Write(dir, a); err != nil {
		t.Fatal(err)
	}
	md, _ := os.ReadFile(filepath.Join(dir, "assess.md"))
	js, _ := os.ReadFile(filepath.Join(dir, "assess.json"))
	if !strings.Contains(string(md), "within ±0.5, the equivalence margin") || !strings.Contains(string(js), `"equivalence_margin": 0.5`) {
		t.Errorf("assess.md or assess.json lacks the margin:\n%s\n%s", md, js)
	}
	d, err := Run(context.Background(), Options{Datasets: []spec.Dataset{{Name: "cats"}}, Pipelines: []string{"std+l2"}, Subsets: []int{}, Repeats: 1, Folds: 3})
	if err != nil {
		t.Fatal(err)
	}
	if d.Margin != DefaultMargin {
		t.Errorf("default margin %v, want %v", d.Margin, DefaultMargin)
	}
}
