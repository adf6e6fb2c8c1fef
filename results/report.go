package results

import (
	"cmp"
	"fmt"
	"math"
	"slices"
	"strconv"
	"strings"
)

// Protocol describes how a run's scores were obtained and compared; the
// writers turn it into table captions and the notes of summary.md.
type Protocol struct {
	Run        string  // spec name
	Seed       uint64  // run seed
	CV         string  // the resampling scheme, e.g. "stratified 10-fold cross-validation, 3 repeats"
	Interval   string  // how the intervals were computed
	Level      float64 // nominal coverage of the intervals, e.g. 0.95
	Test       string  // the paired test used against the best cell and the reference
	Alpha      float64 // significance level of every test
	Correction string  // multiple-test correction, e.g. "Holm"
	Pooled     bool    // metrics computed on pooled predictions (leave-one-out, single holdout)
}

// Mark says how a summary cell compares with the best cell of its dataset
// for one metric.
type Mark uint8

const (
	// MarkNone: significantly worse than the best, or not tested.
	MarkNone Mark = iota
	// MarkBest: the highest mean of the dataset (every tied cell).
	MarkBest
	// MarkNotWorse: not significantly worse than the best cell at the
	// protocol's alpha after the correction.
	MarkNotWorse
)

// Variant describes one model configuration of a run for the per-mode
// table and the sweep figures: how the interference classifier is run
// (mode, shot budget, noise), or that the model is a classical baseline.
type Variant struct {
	Model        string  // display name (the model column of the records)
	Kind         string  // model kind, e.g. "interference", "svm"
	Interference bool    // the interference classifier (any mode); false for baselines
	Family       string  // the configuration apart from mode, shots and noise: variants of one family form one line of a sweep
	Mode         string  // "exact", "shots", "noisy"; "" for baselines
	Shots        int     // shot budget; 0 means infinitely many (exact probabilities)
	Noise        string  // noise model name; "" for none
	Strength     float64 // noise strength; NaN when there is no noise
}

// Describe returns a short description of the way the variant is run:
// "exact", "1000 shots", "depolarizing 0.01", "depolarizing 0.01, 1000
// shots"; "" for a baseline.
func (v Variant) Describe() string {
	if !v.Interference {
		return ""
	}
	var parts []string
	if v.Noise != "" {
		s := v.Noise
		if !math.IsNaN(v.Strength) {
			s += " " + strconv.FormatFloat(v.Strength, 'g', -1, 64)
		}
		parts = append(parts, s)
	}
	if v.Shots > 0 {
		parts = append(parts, strconv.Itoa(v.Shots)+" shots")
	}
	if len(parts) == 0 {
		if v.Mode == "" || v.Mode == "exact" {
			return "exact"
		}
		return v.Mode
	}
	return strings.Join(parts, ", ")
}

func modeRank(m string) int {
	switch m {
	case "exact", "":
		return 0
	case "shots":
		return 1
	case "noisy":
		return 2
	}
	return 3
}

// SortVariants orders variants for tables: interference variants first,
// grouped by family in first-seen order, then by mode (exact, shots,
// noisy), noise model name, strength and shot budget (infinite last);
// baselines follow in their given order. The sort is stable.
func SortVariants(vs []Variant) []Variant {
	out := slices.Clone(vs)
	fam := map[string]int{}
	for _, v := range vs {
		if _, ok := fam[v.Family]; !ok && v.Interference {
			fam[v.Family] = len(fam)
		}
	}
	shots := func(n int) int {
		if n <= 0 {
			return math.MaxInt
		}
		return n
	}
	str := func(x float64) float64 {
		if math.IsNaN(x) {
			return math.Inf(-1)
		}
		return x
	}
	slices.SortStableFunc(out, func(a, b Variant) int {
		if a.Interference != b.Interference {
			if a.Interference {
				return -1
			}
			return 1
		}
		if !a.Interference {
			return 0
		}
		return cmp.Or(
			cmp.Compare(fam[a.Family], fam[b.Family]),
			cmp.Compare(modeRank(a.Mode), modeRank(b.Mode)),
			cmp.Compare(a.Noise, b.Noise),
			cmp.Compare(str(a.Strength), str(b.Strength)),
			cmp.Compare(shots(a.Shots), shots(b.Shots)),
		)
	})
	return out
}

// Comparison is a paired test of one cell against another cell of the
// same dataset (the reference, or the best cell) on one metric.
type Comparison struct {
	Dataset, Pipeline, Model string
	RefPipeline, RefModel    string
	Metric                   string
	// Test names the test: "corrected-t", "5x2cv" or "mcnemar".
	Test string
	// Diff is the model's mean minus the reference's mean; Lo and Hi are
	// its confidence interval (NaN when the test gives none).
	Diff, Lo, Hi float64
	Statistic    float64
	DF           int // 0 where the statistic has none
	P            float64
	// PAdj is the p-value adjusted for the family of tests the comparison
	// belongs to (Holm); Reject is PAdj ≤ Alpha.
	PAdj     float64
	Alpha    float64
	Reject   bool
	Warnings []string
}

// Verdict is "better", "worse" or "n.s." (not significant).
func (c Comparison) Verdict() string {
	switch {
	case !c.Reject:
		return "n.s."
	case c.Diff > 0:
		return "better"
	case c.Diff < 0:
		return "worse"
	}
	return "n.s."
}

// RankTable is the comparison of several models across datasets for one
// pipeline: average ranks (1 = best), the Friedman test with the
// Iman–Davenport correction and the Nemenyi critical difference.
type RankTable struct {
	Pipeline string
	Metric   string
	Models   []string
	Datasets []string
	AvgRanks []float64
	ChiSq    float64 // Friedman's chi-square (Demšar's form, no tie correction)
	ChiSqP   float64
	// ChiSqTieCorrected is Friedman's chi-square with the tie correction
	// (scipy.stats.friedmanchisquare's statistic), ChiSqTieCorrectedP its
	// p-value; NaN when every dataset ties all models. Equal to ChiSq
	// without ties.
	ChiSqTieCorrected, ChiSqTieCorrectedP float64
	DF                                    int
	F                                     float64 // Iman–Davenport, from the tie-corrected chi-square
	DF1, DF2                              int
	P                                     float64 // p-value of F; the decision is taken on it
	Alpha                                 float64
	Reject                                bool
	CD                                    float64 // Nemenyi critical difference at Alpha
	Warnings                              []string
}

// Groups returns the cliques of a critical-difference diagram: maximal
// runs of models, in order of average rank, whose ranks differ by at most
// the critical difference. Each group lists indices into Models, best
// first; single models are not groups.
func (t RankTable) Groups() [][]int {
	return RankGroups(t.AvgRanks, t.CD)
}

// RankGroups returns the maximal sets of models, consecutive in order of
// average rank, whose ranks span at most cd (with a relative slack of 1e-9
// for ranks that are equal up to rounding), each as indices into avgRanks
// sorted best (lowest rank) first. Single models are not groups.
func RankGroups(avgRanks []float64, cd float64) [][]int {
	order := make([]int, len(avgRanks))
	for i := range order {
		order[i] = i
	}
	slices.SortStableFunc(order, func(a, b int) int { return cmp.Compare(avgRanks[a], avgRanks[b]) })
	var groups [][]int
	lastEnd := -1
	for i := range order {
		j := i
		for j+1 < len(order) && avgRanks[order[j+1]]-avgRanks[order[i]] <= cd*(1+1e-9) {
			j++
		}
		if j > i && j > lastEnd {
			groups = append(groups, slices.Clone(order[i:j+1]))
			lastEnd = j
		}
	}
	return groups
}

// PairAcross is a Wilcoxon signed-ranks test of two models across
// datasets (one pipeline), A's scores minus B's.
type PairAcross struct {
	Pipeline, A, B string
	Metric         string
	N              int // differences ranked
	RPlus, RMinus  float64
	Statistic      float64 // T = min(R+, R−)
	P              float64
	PAdj           float64 // Holm within the family (pipeline, A)
	Alpha          float64
	Reject         bool
	Warnings       []string
}

// FigureRef names a figure of the run directory for summary.md: Path is
// relative to the run directory, without extension (every figure exists
// as .svg, .pdf and .png).
type FigureRef struct {
	Path    string
	Caption string
}

// Report is everything summary.tex and summary.md show about a run.
type Report struct {
	Protocol Protocol
	Label    string // LaTeX label prefix, e.g. "tab:demo"; reduced to TeXLabelKey's alphabet
	// Options select and lay out what the tables show; the zero value
	// shows everything in tables that fit a page.
	Options ReportOptions
	Summary []Summary
	// Marks[i][j] is the mark of Summary[i] for metric MetricNames[j].
	Marks [][]Mark
	// Variants describes every model of the run, in the run's model order.
	Variants []Variant
	// Reference says what the comparisons are against.
	Reference   string
	Comparisons []Comparison
	Ranks       []RankTable
	Pairs       []PairAcross
	Figures     []FigureRef
	// Warnings of the statistics, grouped, in a fixed order.
	Warnings []string
	// Choices says, for every tuned model and (dataset, pipeline), how
	// often each grid point was chosen over the outer folds, in run order
	// and then grid order.
	Choices []ChoiceCount
}

// variant returns the variant of a model name, and false when unknown.
func (r *Report) variant(model string) (Variant, bool) {
	for _, v := range r.Variants {
		if v.Model == model {
			return v, true
		}
	}
	return Variant{}, false
}

// HasInterference reports whether any variant is the interference
// classifier.
func (r *Report) HasInterference() bool {
	for _, v := range r.Variants {
		if v.Interference {
			return true
		}
	}
	return false
}

// datasetsInOrder returns the datasets of the summary in first-seen order.
func datasetsInOrder(rows []Summary) []string {
	var out []string
	seen := map[string]bool{}
	for _, r := range rows {
		if !seen[r.Dataset] {
			seen[r.Dataset] = true
			out = append(out, r.Dataset)
		}
	}
	return out
}

func pipelinesInOrder(rows []Summary) []string {
	var out []string
	seen := map[string]bool{}
	for _, r := range rows {
		if !seen[r.Pipeline] {
			seen[r.Pipeline] = true
			out = append(out, r.Pipeline)
		}
	}
	return out
}

// modeTable is the per-dataset view of the interference classifier across
// modes beside the baselines: one row per (pipeline, variant), one column
// per dataset, accuracy cells.
type modeTable struct {
	datasets []string
	groups   []modeGroup
}

type modeGroup struct {
	pipeline string
	rows     []modeRow
}

type modeRow struct {
	v     Variant
	cells []int // index into Report.Summary per dataset; -1 when absent
}

// spreadParts returns the mean and the distances to the interval bounds,
// formatted with digits decimals; symmetric reports whether both
// distances print alike.
func spreadParts(m MetricSummary, digits int) (mean, plus, minus string, symmetric, ok bool) {
	mean = fmt.Sprintf("%.*f", digits, m.Mean)
	if math.IsNaN(m.Lo) || math.IsNaN(m.Hi) {
		return mean, "", "", false, false
	}
	plus = fmt.Sprintf("%.*f", digits, math.Max(m.Hi-m.Mean, 0))
	minus = fmt.Sprintf("%.*f", digits, math.Max(m.Mean-m.Lo, 0))
	return mean, plus, minus, plus == minus, true
}

// percent formats a level such as 0.95 as "95%".
func percent(level float64) string {
	return strconv.FormatFloat(100*level, 'f', -1, 64) + "%"
}

func fmtAlpha(a float64) string { return strconv.FormatFloat(a, 'f', -1, 64) }

// GroupWarnings folds identical warnings: each item is {where, text}; the
// result has one line per distinct text, "text (n× — where; where; ...)"
// (at most six places listed), in first-seen order of the texts.
func GroupWarnings(items [][2]string) []string {
	var texts []string
	where := map[string][]string{}
	for _, it := range items {
		if _, ok := where[it[1]]; !ok {
			texts = append(texts, it[1])
		}
		where[it[1]] = append(where[it[1]], it[0])
	}
	var out []string
	for _, t := range texts {
		w := where[t]
		const show = 6
		list := strings.Join(w[:min(len(w), show)], "; ")
		if len(w) > show {
			list += fmt.Sprintf("; and %d more", len(w)-show)
		}
		out = append(out, fmt.Sprintf("%s (%d× — %s)", t, len(w), list))
	}
	return out
}
