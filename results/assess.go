package results

import (
	"encoding/csv"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"
)

// The assessment report (fringe assess): per dataset and pipeline, what the
// interference classifier would cost on a device and what it would gain
// against the classical baselines. The numbers are computed by
// bench/assess.Run; this file holds the records and writes them.

// AssessRow is one (dataset, pipeline) row of the assessment.
type AssessRow struct {
	Dataset, Pipeline string
	Rank              int // 1-based position in the ranking
	Front             int // Pareto front of the ranking criteria (1 = not dominated)

	Instances, Features, Classes int // rows of the dataset; features after the pipeline; classes
	Folds, Repeats               int
	TrainSize                    int // training instances of the first split (M of the full-set circuit)

	// Registers of the full-set circuit: ancilla 1, index ceil(log2 M),
	// data max(1, ceil(log2 d)), class ceil(log2 C).
	Index, Data, Class, Qubits int
	PaddingWaste               float64 // share of the 2^data amplitudes that are zero padding
	// Gate counts and depth of the full-set circuit (state preparation, H,
	// measurement excluded) and the two-qubit error rate at which its
	// estimated fidelity drops to 1/2.
	CNOT, SingleQubit, Depth int
	NoiseBudget              float64

	// Post-selection of the assessed form over all test instances (every
	// repeat): p_acc mean, minimum, 5th percentile; the median of the
	// margin P(k1|acc) − P(k2|acc); the shots needed for a 95% right
	// decision at the median and 90th percentile test instance.
	Weights                  string // "balanced" or "uniform": the assessed form
	PAccMean, PAccMin, PAcc5 float64
	MarginMedian             float64
	ShotsMedian, Shots90     float64
	PAcc                     []float64 // every test instance's p_acc (figures only)

	// Accuracy: the assessed form, both forms, the best baseline (on the
	// classical pipeline), the paired difference with its corrected
	// interval and p-value.
	Exact, Uniform, Balanced MetricSummary
	Baseline                 string // model name, e.g. svm-rbf-C1 (std)
	BaselineAcc              MetricSummary
	Gap, GapLo, GapHi, GapP  float64

	// What unit-norm scaling throws away: k-NN (k = 5) accuracy on the
	// vectors before normalisation (pipeline Before), after "l2", after
	// "lift", on the norm alone, the majority-class rate, and the share of
	// the above-chance accuracy with the norm present (max of before and
	// lift) that the norm alone reaches (NaN when that is within 0.05 of
	// chance).
	Before                              string
	KNNBefore, KNNL2, KNNLift, NormOnly float64
	Chance, NormShare                   float64
	Lift                                string // the lift step compared ("lift" or "lift(c)")
	KTAInterference, KTARBF, RBFGamma   float64
	Verdict                             string
	// Device is the full-set circuit on the device of fringe assess
	// -device (nil without one).
	Device *AssessDevice
}

// AssessResource is the circuit of one dataset and pipeline for one
// training-set size (the full training part or a train_subset size).
type AssessResource struct {
	Dataset, Pipeline          string
	Train                      int
	Full                       bool
	Index, Data, Class, Qubits int
	PaddingWaste               float64
	CNOT, SingleQubit, Depth   int
	NoiseBudget                float64
	Device                     *AssessDevice // on the device of -device; nil without one
}

// Assessment is a whole report.
type Assessment struct {
	Seed              uint64
	Repeats           int
	Confidence        float64 // of a right decision in the shots budget (0.95)
	Ratio             float64 // p2 / p1 of the noise budget
	Weights           string
	Level             float64 // of the intervals (0.95)
	Margin            float64 // equivalence margin of the verdicts (0: not stated)
	Subsets           []int
	ClassicalPipeline string
	Datasets          []DatasetRecord  // provenance of the assessed datasets, in order
	Rows              []AssessRow      // in dataset, pipeline order
	Ranking           []int            // indices into Rows, best first
	Resources         []AssessResource // in dataset, pipeline, size order
	Figures           []FigureRef
	Warnings          []string
	// Device, DeviceNote and DeviceFamily name the device of fringe
	// assess -device ("" without one); DeviceInstances is the number of
	// test instances simulated per row and training-set size.
	Device, DeviceNote, DeviceFamily, DeviceSHA string
	DeviceInstances                             int
}

// fmtCSV writes a float for CSV: fixed decimals, "" for NaN, "inf".
func fmtCSV(v float64) string {
	if math.IsInf(v, 1) {
		return "inf"
	}
	return Fmt(v)
}

// fmtSci writes a small positive number in scientific notation.
func fmtSci(v float64) string {
	if math.IsNaN(v) {
		return ""
	}
	return strconv.FormatFloat(v, 'e', 3, 64)
}

// AssessColumns are the columns of assess.csv.
var AssessColumns = []string{
	"rank", "front", "dataset", "pipeline", "instances", "features", "classes", "folds", "repeats", "train_size",
	"qubits_index", "qubits_data", "qubits_class", "qubits", "padding_waste",
	"cnot", "single_qubit", "depth", "p2_budget",
	"weights", "p_acc_mean", "p_acc_min", "p_acc_p5", "margin_median", "shots_median", "shots_p90",
	"exact_accuracy", "exact_lo", "exact_hi", "uniform_accuracy", "balanced_accuracy",
	"baseline", "baseline_accuracy", "baseline_lo", "baseline_hi", "gap", "gap_lo", "gap_hi", "gap_p",
	"before", "knn_before", "knn_l2", "lift", "knn_lift", "norm_only", "chance", "norm_share",
	"kta_interference", "kta_rbf", "rbf_gamma", "verdict",
}

// WriteAssessCSV writes assess.csv: one row per (dataset, pipeline) in the
// order of a.Rows.
func WriteAssessCSV(w io.Writer, a *Assessment) error {
	cw := csv.NewWriter(w)
	head := AssessColumns
	if a.Device != "" {
		head = append(append([]string(nil), AssessColumns...), deviceColumns(a)...)
	}
	cw.Write(head)
	it := strconv.Itoa
	for _, r := range a.Rows {
		t := csvTexts(r.Dataset, r.Pipeline, r.Weights, r.Baseline, r.Before, r.Lift, r.Verdict)
		rec := []string{
			it(r.Rank), it(r.Front), t[0], t[1], it(r.Instances), it(r.Features), it(r.Classes), it(r.Folds), it(r.Repeats), it(r.TrainSize),
			it(r.Index), it(r.Data), it(r.Class), it(r.Qubits), Fmt(r.PaddingWaste),
			it(r.CNOT), it(r.SingleQubit), it(r.Depth), fmtSci(r.NoiseBudget),
			t[2], Fmt(r.PAccMean), Fmt(r.PAccMin), Fmt(r.PAcc5), Fmt(r.MarginMedian), fmtCSV(r.ShotsMedian), fmtCSV(r.Shots90),
			Fmt(r.Exact.Mean), Fmt(r.Exact.Lo), Fmt(r.Exact.Hi), Fmt(r.Uniform.Mean), Fmt(r.Balanced.Mean),
			t[3], Fmt(r.BaselineAcc.Mean), Fmt(r.BaselineAcc.Lo), Fmt(r.BaselineAcc.Hi), Fmt(r.Gap), Fmt(r.GapLo), Fmt(r.GapHi), Fmt(r.GapP),
			t[4], Fmt(r.KNNBefore), Fmt(r.KNNL2), t[5], Fmt(r.KNNLift), Fmt(r.NormOnly), Fmt(r.Chance), Fmt(r.NormShare),
			Fmt(r.KTAInterference), Fmt(r.KTARBF), Fmt(r.RBFGamma), t[6],
		}
		if a.Device != "" {
			rec = append(rec, deviceCells(a, r)...)
		}
		cw.Write(rec)
	}
	cw.Flush()
	return cw.Error()
}

// WriteAssessResourcesCSV writes assess-resources.csv: the circuit of
// every (dataset, pipeline) for the full training part and each
// train_subset size.
func WriteAssessResourcesCSV(w io.Writer, a *Assessment) error {
	cw := csv.NewWriter(w)
	head := []string{"dataset", "pipeline", "train", "full", "qubits_index", "qubits_data", "qubits_class", "qubits",
		"padding_waste", "cnot", "single_qubit", "depth", "p2_budget"}
	if a.Device != "" {
		head = append(append(head, "device"), deviceResourceColumns...)
	}
	cw.Write(head)
	it := strconv.Itoa
	for _, r := range a.Resources {
		t := csvTexts(r.Dataset, r.Pipeline)
		rec := []string{t[0], t[1], it(r.Train), strconv.FormatBool(r.Full), it(r.Index), it(r.Data), it(r.Class), it(r.Qubits),
			Fmt(r.PaddingWaste), it(r.CNOT), it(r.SingleQubit), it(r.Depth), fmtSci(r.NoiseBudget)}
		if a.Device != "" {
			rec = append(append(rec, csvTexts(a.Device)[0]), deviceResourceCells(r.Device)...)
		}
		cw.Write(rec)
	}
	cw.Flush()
	return cw.Error()
}

// fmtShots formats a shot budget: rounded up to a whole shot, "∞" (or
// inf) when nothing decides, "–" for NaN.
func fmtShots(v float64, inf string) string {
	switch {
	case math.IsNaN(v):
		return "–"
	case math.IsInf(v, 1):
		return inf
	case v >= 1e6:
		return strconv.FormatFloat(math.Ceil(v), 'e', 1, 64)
	}
	return strconv.FormatFloat(math.Ceil(v), 'f', 0, 64)
}

func af3(v float64) string {
	if math.IsNaN(v) {
		return "–"
	}
	return fmt.Sprintf("%.3f", v)
}

func f2e(v float64) string {
	if math.IsNaN(v) {
		return "–"
	}
	return strconv.FormatFloat(v, 'e', 1, 64)
}

// accCell formats a mean with its interval (as in summary.md).
func accCell(m MetricSummary) string { return mdCell(m, MarkNone, 3) }

// gapCell formats the paired difference and its interval.
func gapCell(r AssessRow) string {
	if math.IsNaN(r.Gap) {
		return "–"
	}
	return fmtSigned(r.Gap) + " " + fmtInterval(r.GapLo, r.GapHi)
}

// AssessCriteria describes the ranking, for the report and the command.
const AssessCriteria = "Rows are ranked by Pareto fronts over three criteria, each shown in its column: " +
	"the accuracy gap of the exact classifier to the best classical baseline (higher is better), " +
	"the shots a device needs for a 95% right decision at the median test instance (fewer is better), " +
	"and the two-qubit error rate at which the full-set circuit keeps an estimated fidelity of 1/2 (higher is better). " +
	"Front 1 holds the rows no other row beats on all three; within a front, rows are ordered by gap, then shots."

// AssessVerdicts says how a verdict reads the gap and its interval, for
// assess.md and the caption of assess.tex ("" when the assessment states
// no margin).
func AssessVerdicts(a *Assessment) string {
	if !(a.Margin > 0) {
		return ""
	}
	return fmt.Sprintf("A gap is called on par with the best baseline when its whole %s interval lies within ±%s, the equivalence margin "+
		"(practical equivalence by two one-sided tests, Schuirmann 1987, each at level %s); it beats or trails the baseline when the interval excludes 0 otherwise; "+
		"an interval that holds 0 but reaches beyond the margin is not significantly different, which is no evidence that the accuracies are alike.",
		percent(a.Level), strconv.FormatFloat(a.Margin, 'f', -1, 64), strconv.FormatFloat((1-a.Level)/2, 'g', 3, 64))
}

// WriteAssessMarkdown writes assess.md.
func WriteAssessMarkdown(w io.Writer, a *Assessment) error {
	var b strings.Builder
	b.WriteString("# Which datasets suit the interference classifier\n\n")
	b.WriteString("Generated by fringe assess. ")
	fmt.Fprintf(&b, "Stratified k-fold cross-validation (k = 10, or the smallest class size when that is smaller), %d repeat(s), seed %d; ", a.Repeats, a.Seed)
	fmt.Fprintf(&b, "intervals at %s are corrected resampled t intervals (Nadeau & Bengio 2003). ", percent(a.Level))
	fmt.Fprintf(&b, "The assessed form of the classifier uses %s index weights; the baselines (k-NN k = 5, RBF SVM, logistic regression, nearest centroid) run on pipeline %s.\n\n", a.Weights, a.ClassicalPipeline)

	b.WriteString("## Ranking\n\n")
	b.WriteString(AssessCriteria + "\n\n")
	if v := AssessVerdicts(a); v != "" {
		b.WriteString(v + "\n\n")
	}
	b.WriteString(AssessRankingMarkdown(a))

	b.WriteString("\n## Registers and gates\n\n")
	fmt.Fprintf(&b, "Qubits of the full-set circuit (ancilla 1 + index + data + class) and its state-preparation cost; the noise budget p2 is the two-qubit error rate at which (1 − p2)^CNOT · (1 − p2/%s)^single drops to 1/2 (an estimate: the probability that no gate fails). Training-set sizes %s are train_subset sizes; \"full\" is the training part of a fold.\n\n", strconv.FormatFloat(a.Ratio, 'f', -1, 64), joinInts(a.Subsets))
	b.WriteString("| dataset | pipeline | training set | qubits (i + d + c) | padding waste | CNOT | single-qubit | depth | p2 budget |\n")
	b.WriteString("|---|---|---:|---|---:|---:|---:|---:|---:|\n")
	for _, r := range a.Resources {
		train := strconv.Itoa(r.Train)
		if r.Full {
			train += " (full)"
		}
		fmt.Fprintf(&b, "| %s | %s | %s | %d = 1 + %d + %d + %d | %s | %d | %d | %d | %s |\n",
			MDEscape(r.Dataset), MDEscape(r.Pipeline), train, r.Qubits, r.Index, r.Data, r.Class, af3(r.PaddingWaste), r.CNOT, r.SingleQubit, r.Depth, f2e(r.NoiseBudget))
	}

	if a.Device != "" {
		writeAssessDeviceMarkdown(&b, a)
	}

	b.WriteString("\n## Post-selection and shots\n\n")
	fmt.Fprintf(&b, "p_acc over every test instance of every repeat; margin = P(k1 | acc) − P(k2 | acc) of the two most likely classes; shots = total budget N for a right decision with probability %s, N = z²(a + b − (a − b)²)/(a − b)² with a = p_acc·P(k1 | acc), b = p_acc·P(k2 | acc), z = Φ⁻¹(%s) (normal approximation to the difference of the two counts; checked against the exact binomial sum).\n\n",
		percent(a.Confidence), strconv.FormatFloat(a.Confidence, 'f', -1, 64))
	b.WriteString("| dataset | pipeline | p_acc mean | p_acc min | p_acc 5% | margin (median) | shots (median) | shots (90%) |\n")
	b.WriteString("|---|---|---:|---:|---:|---:|---:|---:|\n")
	for _, r := range a.Rows {
		fmt.Fprintf(&b, "| %s | %s | %s | %s | %s | %s | %s | %s |\n", MDEscape(r.Dataset), MDEscape(r.Pipeline),
			af3(r.PAccMean), af3(r.PAccMin), af3(r.PAcc5), fmt.Sprintf("%.4f", r.MarginMedian), fmtShots(r.ShotsMedian, "∞"), fmtShots(r.Shots90, "∞"))
	}

	b.WriteString("\n## What unit norm throws away\n\n")
	b.WriteString("Accuracy of k-NN (k = 5) on the vectors before normalisation, after `l2`, after the norm-keeping `lift`, and of k-NN on the norm alone (pipeline `…+norm`); chance = majority-class rate; norm share = (norm only − chance)/(max(before, lift) − chance), the part of the above-chance accuracy that the norm alone reaches (not shown when k-NN is within 0.05 of chance).\n\n")
	b.WriteString("| dataset | before | k-NN before | k-NN l2 | k-NN lift | norm only | chance | norm share |\n")
	b.WriteString("|---|---|---:|---:|---:|---:|---:|---:|\n")
	seen := map[string]bool{}
	for _, r := range a.Rows {
		k := r.Dataset + "\x00" + r.Before + "\x00" + r.Lift
		if seen[k] {
			continue
		}
		seen[k] = true
		fmt.Fprintf(&b, "| %s | %s | %s | %s | %s | %s | %s | %s |\n", MDEscape(r.Dataset), MDEscape(r.Before),
			af3(r.KNNBefore), af3(r.KNNL2), af3(r.KNNLift)+" ("+MDEscape(r.Lift)+")", af3(r.NormOnly), af3(r.Chance), af3(r.NormShare))
	}

	b.WriteString("\n## Kernel-target alignment\n\n")
	b.WriteString("Centered alignment (Cortes, Mohri & Rostamizadeh, JMLR 13:795, 2012) of each kernel with the labels' ideal kernel on the training part of the first fold, on the vectors the pipeline produces: the interference kernel (1 + cos)/2 and the RBF kernel exp(−γ‖x − x'‖²) with γ = 1/(d·Var).\n\n")
	b.WriteString("| dataset | pipeline | interference | RBF | γ |\n|---|---|---:|---:|---:|\n")
	for _, r := range a.Rows {
		fmt.Fprintf(&b, "| %s | %s | %s | %s | %s |\n", MDEscape(r.Dataset), MDEscape(r.Pipeline), af3(r.KTAInterference), af3(r.KTARBF), strconv.FormatFloat(r.RBFGamma, 'g', 3, 64))
	}

	b.WriteString("\n## Accuracy\n\n")
	b.WriteString("| dataset | pipeline | uniform weights | balanced weights | best baseline | gap (assessed − baseline) | p |\n|---|---|---:|---:|---|---:|---:|\n")
	for _, r := range a.Rows {
		fmt.Fprintf(&b, "| %s | %s | %s | %s | %s %s | %s | %s |\n", MDEscape(r.Dataset), MDEscape(r.Pipeline),
			accCell(r.Uniform), accCell(r.Balanced), MDEscape(r.Baseline), accCell(r.BaselineAcc), gapCell(r), fmtP(r.GapP))
	}
	if len(a.Figures) > 0 {
		b.WriteString("\n## Figures\n\n")
		for _, f := range a.Figures {
			fmt.Fprintf(&b, "- `%s.svg` (also .pdf, .png): %s\n", f.Path, MDEscape(f.Caption))
		}
	}
	if len(a.Warnings) > 0 {
		b.WriteString("\n## Warnings\n\n")
		for _, wn := range a.Warnings {
			b.WriteString("- " + MDEscape(wn) + "\n")
		}
	}
	_, err := io.WriteString(w, b.String())
	return err
}

// AssessRankingMarkdown returns the ranking table alone (the command
// prints it).
func AssessRankingMarkdown(a *Assessment) string {
	var b strings.Builder
	b.WriteString("| rank | front | dataset | pipeline | exact accuracy | best baseline | gap [interval] | shots (median) | p2 budget | qubits | padding waste | norm share | KTA interference / RBF | verdict |\n")
	b.WriteString("|---:|---:|---|---|---:|---|---:|---:|---:|---:|---:|---:|---:|---|\n")
	for _, i := range a.Ranking {
		r := a.Rows[i]
		fmt.Fprintf(&b, "| %d | %d | %s | %s | %s | %s %s | %s | %s | %s | %d | %s | %s | %s / %s | %s |\n",
			r.Rank, r.Front, MDEscape(r.Dataset), MDEscape(r.Pipeline), accCell(r.Exact), MDEscape(r.Baseline), af3(r.BaselineAcc.Mean),
			gapCell(r), fmtShots(r.ShotsMedian, "∞"), f2e(r.NoiseBudget), r.Qubits, af3(r.PaddingWaste), af3(r.NormShare),
			af3(r.KTAInterference), af3(r.KTARBF), MDEscape(r.Verdict))
	}
	return b.String()
}

func joinInts(v []int) string {
	s := make([]string, len(v))
	for i, x := range v {
		s[i] = strconv.Itoa(x)
	}
	return strings.Join(s, ", ")
}

// texNum writes a number for a booktabs table.
func texSci(v float64) string {
	if math.IsNaN(v) {
		return "--"
	}
	m, e, _ := strings.Cut(strconv.FormatFloat(v, 'e', 1, 64), "e")
	ex, _ := strconv.Atoi(e)
	return fmt.Sprintf("$%s \\times 10^{%d}$", m, ex)
}

func texShots(v float64) string {
	switch {
	case math.IsNaN(v):
		return "--"
	case math.IsInf(v, 1):
		return "$\\infty$"
	case v >= 1e6:
		return texSci(math.Ceil(v))
	}
	return strconv.FormatFloat(math.Ceil(v), 'f', 0, 64)
}

func texF3(v float64) string {
	if math.IsNaN(v) {
		return "--"
	}
	return fmt.Sprintf("$%.3f$", v)
}

func texGap(r AssessRow) string {
	if math.IsNaN(r.Gap) {
		return "--"
	}
	s := fmt.Sprintf("$%+.3f$", r.Gap)
	if !math.IsNaN(r.GapLo) {
		s += fmt.Sprintf(" $[%+.3f, %+.3f]$", r.GapLo, r.GapHi)
	}
	return s
}

// WriteAssessTeX writes assess.tex: the ranking and the resource table as
// booktabs tables, to \input into a document that loads booktabs.
func WriteAssessTeX(w io.Writer, a *Assessment) error {
	var b strings.Builder
	b.WriteString("% Generated by fringe assess. Needs \\usepackage{booktabs}.\n")
	b.WriteString("\\begin{table}\n\\centering\n\\small\n")
	verdicts := ""
	if v := AssessVerdicts(a); v != "" {
		verdicts = " " + TeXEscape(v)
	}
	fmt.Fprintf(&b, "\\caption{%s Seed %d, %d repeat(s); %s weights; baselines on pipeline %s.%s}\n",
		TeXEscape(AssessCriteria), a.Seed, a.Repeats, TeXEscape(a.Weights), TeXEscape(a.ClassicalPipeline), verdicts)
	b.WriteString("\\label{tab:assess-ranking}\n")
	b.WriteString("\\begin{tabular}{rrllrlrrrrr}\n\\toprule\n")
	b.WriteString("Rank & Front & Dataset & Pipeline & Exact & Best baseline & Gap & Shots & $p_2$ budget & Qubits & Norm share \\\\\n\\midrule\n")
	for _, i := range a.Ranking {
		r := a.Rows[i]
		exact := "--"
		if !math.IsNaN(r.Exact.Mean) {
			exact = texCell(r.Exact, MarkNone, 3)
		}
		fmt.Fprintf(&b, "%d & %d & %s & %s & %s & %s %s & %s & %s & %s & %d & %s \\\\\n",
			r.Rank, r.Front, TeXEscape(r.Dataset), TeXEscape(r.Pipeline), exact, TeXEscape(r.Baseline), texF3(r.BaselineAcc.Mean),
			texGap(r), texShots(r.ShotsMedian), texSci(r.NoiseBudget), r.Qubits, texF3(r.NormShare))
	}
	b.WriteString("\\bottomrule\n\\end{tabular}\n\\end{table}\n\n")

	b.WriteString("\\begin{table}\n\\centering\n\\small\n")
	fmt.Fprintf(&b, "\\caption{Registers and state-preparation cost of the compiled circuit (uniformly controlled rotations in Gray-code order) for the full training part and train\\_subset sizes %s; $p_2$ budget: two-qubit error rate at which $(1-p_2)^{n_2}(1-p_2/%s)^{n_1} = 1/2$.}\n",
		TeXEscape(joinInts(a.Subsets)), strconv.FormatFloat(a.Ratio, 'f', -1, 64))
	b.WriteString("\\label{tab:assess-resources}\n")
	b.WriteString("\\begin{tabular}{llrrrrrrr}\n\\toprule\n")
	b.WriteString("Dataset & Pipeline & $M$ & Qubits & Padding & CNOT & 1-qubit & Depth & $p_2$ budget \\\\\n\\midrule\n")
	for _, r := range a.Resources {
		m := strconv.Itoa(r.Train)
		if r.Full {
			m += "*"
		}
		fmt.Fprintf(&b, "%s & %s & %s & %d & %s & %d & %d & %d & %s \\\\\n", TeXEscape(r.Dataset), TeXEscape(r.Pipeline), m, r.Qubits,
			texF3(r.PaddingWaste), r.CNOT, r.SingleQubit, r.Depth, texSci(r.NoiseBudget))
	}
	b.WriteString("\\bottomrule\n\\end{tabular}\n\\end{table}\n")
	if a.Device != "" {
		writeAssessDeviceTeX(&b, a)
	}
	_, err := io.WriteString(w, b.String())
	return err
}
