// Package results holds the records of a run, reads them back and writes
// them: CSV files (predictions, folds, summary, timings, comparisons), the
// report (summary.tex with booktabs tables, summary.md), figures (SVG, PDF,
// PNG through gonum/plot), the manifest (JSON), and the outputs of the
// rank and compare verbs. It also scores predictions (accuracy, balanced
// accuracy, macro F1).
//
// # Records
//
// Prediction, Fold, Summary and Timing are the rows of the run files;
// WritePredictions, WriteFolds, WriteSummary and WriteTimings write them,
// ReadPredictions, ReadFolds, ReadSummary and ReadManifest read them back
// (columns found by header name, in any order, extra columns ignored), and
// ReadRun reads a whole run directory. A malformed file gives a
// *ParseError naming the file, line and column (wrapping ErrFormat); a
// missing file an error naming its path.
//
// Metric definitions follow scikit-learn 1.2.1's accuracy_score,
// balanced_accuracy_score (mean recall over the classes present in the
// true labels) and f1_score(average="macro", zero_division=0) over the
// classes present in the true or the predicted labels.
//
// # Report
//
// A Report is computed elsewhere (bench.Analyse) and only formatted here:
// the summary with a Mark per cell and metric (best of its dataset, or not
// significantly worse than the best), the Variant of every model (how the
// interference classifier is run: exact, shot budget, noise model and
// strength; or a classical baseline), the paired Comparisons with the
// reference model, the RankTables across datasets, Wilcoxon pairs,
// figures and warnings. WriteReportTeX writes the summary table (mean and
// confidence interval, best in bold, not significantly worse underlined,
// the protocol in the caption) and the per-dataset table of the
// interference classifier across modes beside the baselines;
// WriteReportMarkdown writes the same and the statistics as Markdown.
// An interval that is not symmetric at the shown precision (clipped to
// [0, 1], or a Wilson interval) is written mean^{+a}_{-b}.
//
// # Figures
//
// SweepPlot (a metric against shot budget or noise strength, with interval
// bands and reference levels), CDDiagram (critical-difference diagram of a
// RankTable), KernelProfile (the interference kernel against the distance
// of unit vectors, beside RBF kernels) and BoxPlot (grouped box plots, for
// p_acc) build plots; Figure.Render draws one in a format of
// FigureFormats. Colours, order and layout depend only on the input.
// SVG, PNG and PDF output is byte-identical for identical input: PDF
// documents get a fixed creation date (2000-01-01) and sorted catalogues
// through fpdf's package-wide defaults, which Render sets once.
//
// # Determinism and formats
//
// Output is deterministic: records are written in the order given, floats
// with a fixed number of decimals (FloatDigits in CSV), and nothing that
// varies between identical runs (times, host names) is written anywhere
// except the manifest and the timings file. A metric that is undefined is
// written as an empty CSV field, "--" in LaTeX and "–" in Markdown; an
// infinite test statistic as "inf" in CSV and the largest float64 in JSON;
// NaN as null in JSON. Warnings are never written into CSV files.
//
// # Panics
//
// Score panics on slices of different or zero length and on class indices
// out of range: broken invariants of the caller. Nothing else panics on
// its input.
package results
