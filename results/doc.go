// Package results holds the records of a run and writes them: CSV files
// (predictions, folds, summary, timings), a LaTeX table (booktabs), and the
// manifest (JSON). It also scores predictions (accuracy, balanced accuracy,
// macro F1).
//
// Output is deterministic: records are written in the order given, floats
// with a fixed number of decimals (FloatDigits), and nothing that varies
// between identical runs (times, host names) is written anywhere except the
// manifest and the timings file. A metric that is undefined is written as an
// empty CSV field and as "--" in LaTeX.
//
// Metric definitions follow scikit-learn 1.2.1's accuracy_score,
// balanced_accuracy_score (mean recall over the classes present in the true
// labels) and f1_score(average="macro", zero_division=0) over the classes
// present in the true or the predicted labels.
package results
