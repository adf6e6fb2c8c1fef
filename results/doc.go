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
// A Report is computed elsewhere (bench/report.Analyse) and only formatted here:
// the summary with a Mark per cell and metric (best of its dataset, or not
// significantly worse than the best), the Variant of every model (how the
// interference classifier is run: exact, shot budget, noise model and
// strength; or a classical baseline), the paired Comparisons with the
// reference model, the RankTables across datasets, Wilcoxon pairs,
// figures and warnings. Report.Options (ReportOptions; the zero value
// shows everything) select the models, pipelines, datasets and metrics of
// the tables and their order, give models display labels (the CSV files
// keep the names), set captions and label keys, and choose the layout.
//
// ReportTeX lays out summary.tex: tables to \input into a document, no
// preamble, needing array, booktabs, dcolumn and longtable (and pdflscape
// for the landscape layout), all in texlive-latex-base and
// texlive-latex-recommended. Tables, each with its own caption and label:
// the summary (mean and interval per metric, best per dataset in bold,
// not significantly worse marked †, the protocol in the caption; one
// table per metric when all metrics would not fit), the interference
// classifier across modes (one column per dataset, in groups of datasets
// that fit), the paired tests against the reference, the average ranks
// with both forms of Friedman's statistic, the Iman–Davenport F and the
// Nemenyi critical difference, and the Wilcoxon tests. Numbers sit in
// dcolumn columns aligned on the decimal point (the point of a bold
// number stays in the regular weight). StandaloneTeX returns
// summary-standalone.tex, a document of the standard article class that
// \input's summary.tex and compiles alone.
//
// Fitting (texlayout.go, texwidth.go): widths are estimated from the TFM
// metrics of Computer Modern at 9 pt (\small in a 10 pt article), for a
// table room of 345 pt (page), 229.5 pt (one column of a two-column
// article), 469 pt (table*, across both columns) or 550 pt (landscape),
// and a page height of 550 pt (345 pt landscape). A table too wide takes
// \tabcolsep 6, 5 or 4 pt, then lets names wrap in ragged-right p
// columns; tests tables drop the statistic and then the interval before
// that. A table taller than the page becomes a longtable, or in the two
// two-column layouts several floats. After every ten floats summary.tex
// writes \clearpage, so a document never holds more than LaTeX's 18
// floats waiting. A table that still does not fit is written with a
// warning.
//
// Text in summary.tex is pure ASCII (TeXText): LaTeX specials escaped,
// accented Latin letters as accent commands, Greek letters as math
// symbols, letters OT1 lacks transliterated, anything else as U+XXXX in
// typewriter type, with warnings (ReportTeX returns them). Label keys are
// reduced to ASCII letters, digits, ':', '-' and '.' (TeXLabelKey).
//
// WriteReportMarkdown writes summary.md with the same selection, order
// and labels, and the statistics. An interval that is not symmetric at
// the shown precision (clipped to [0, 1], or a Wilson interval) is
// written mean^{+a}_{-b}.
//
// # CSV text cells
//
// Every CSV writer neutralises text cells against spreadsheet formula
// injection (the OWASP "CSV Injection" rule): a cell starting with '=',
// '+', '-', '@', a tab or a carriage return gets a leading apostrophe,
// unless it is a plain decimal number ([+-]?digits[.digits], so class
// labels such as "-1" and "+1" stay as they are); a cell that starts with
// apostrophes followed by such text gets one more. EscapeCSVCell and
// UnescapeCSVCell are exact inverses; the readers undo the escape, so
// every name survives a write and a read. FormulaLike says which names a
// spec should refuse.
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
// Cost (figures are part of every run): a PDF figure sets all its text at
// one size (12 pt) scaled to the size wanted, so that fpdf builds the
// embedded font program (the whole TrueType file parsed and compressed,
// tens of milliseconds) once per process, not once per size;
// WarmFigureFonts builds it ahead, and a caller may run it beside other
// work. PNG figures are written with filter None at zlib's fastest level
// (figure_png.go: about 3.5 times faster than image/png's default, files
// of about its size). Render may draw the formats of one figure, and
// different figures, concurrently.
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
// out of range: broken invariants of the caller. The LaTeX writer panics
// only on a header of its own whose width it does not know (a broken
// internal invariant). Nothing else panics on its input.
package results
