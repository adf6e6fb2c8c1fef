// Package stats holds the statistics that fringe uses to compare
// classifiers: confidence intervals of a cross-validated score, paired
// tests of two models on one data set, and rank tests of several models
// over several data sets.
//
// # What it computes
//
// One model on one data set (scores of the r×k folds of repeated k-fold
// cross-validation, or of any resampling scheme):
//
//   - CorrectedIntervalSizes: the corrected resampled t interval of
//     Nadeau and Bengio (Machine Learning 52:239, 2003) with the variance
//     factor 1/(r·k) + n_test/n_train of Bouckaert and Frank (PAKDD 2004):
//     Var(mean) = (1/n + n_test/n_train)·s², s² the sample variance
//     (n−1 denominator), and a t quantile with n−1 degrees of freedom.
//     n_test/n_train is the ratio of the mean split sizes (Sizes,
//     MeanSizes), never of rounded means: with uneven folds (Wine, 178
//     rows, 10 folds of 17 or 18) it is 17.8/160.2 = 1/9, not 18/160.
//     CorrectedInterval takes whole sizes, for splits of equal size.
//   - NaiveInterval: the textbook t interval, Var(mean) = s²/n, which
//     ignores the overlap of training sets and is too narrow; kept for
//     comparison only.
//   - Wilson: the score interval of a binomial proportion (Wilson, JASA
//     22:209, 1927), without continuity correction.
//
// Two models on one data set:
//
//   - CorrectedPairedTSizes (CorrectedPairedT with whole sizes): the
//     corrected resampled t test on paired fold scores (same variance
//     factor as CorrectedIntervalSizes), two-sided.
//   - FiveByTwoCV: Dietterich's 5×2cv paired t test (Neural Computation
//     10:1895, 1998), t = p₁⁽¹⁾ / sqrt(Σ s_i² / 5), 5 degrees of freedom.
//   - McNemar: McNemar's test on the discordant counts b and c with
//     continuity correction, plus the exact binomial (sign test) p-value.
//
// Several models over several data sets (Demšar, JMLR 7:1, 2006):
//
//   - Wilcoxon: the signed-rank test with Demšar's handling of zero
//     differences, a normal approximation and an exact p-value.
//   - Friedman: average ranks, Friedman's chi-square in Demšar's form
//     (no tie correction) and tie-corrected (equal to
//     scipy.stats.friedmanchisquare), the Iman–Davenport F computed from
//     the tie-corrected statistic (the decision is taken on its p-value;
//     without ties both forms agree) and the Nemenyi critical difference.
//   - NemenyiQ and NemenyiCD: the Nemenyi critical value and critical
//     difference, computed from the distribution of the range of k
//     standard normals (StudentizedRangeCDF, StudentizedRangeQuantile),
//     not looked up in a table.
//   - Holm and HolmAdjust: Holm's step-down multiple-test procedure.
//
// # Conventions
//
// Every test returns its statistic, degrees of freedom (0 where the
// statistic has none), the two-sided p-value, the significance level and
// the decision Reject = (P ≤ Alpha). Problems that do not stop the
// computation — too few samples, ties, zero variance, a poor
// approximation — are reported in the Warnings field of the result, in a
// fixed order, never silently and never to standard error.
//
// Scores are "higher is better" wherever a direction matters (Friedman
// ranks: rank 1 is the best model on a data set). Wilcoxon's R+ is the sum
// of ranks of the data sets on which the first sample is larger.
//
// Two values count as tied when they differ by at most TieTolerance times
// the largest magnitude among the input scores, so that scores printed
// to a few digits (0.768 − 0.763 and 0.936 − 0.931) tie although their
// floating-point differences need not be bit-identical. Tie groups are
// formed after sorting, by chaining neighbours.
//
// # Leave-one-out
//
// With one test instance per split (n_test = 1) the per-split scores of an
// accuracy are 0 or 1 and the corrected t interval is not meaningful.
// CorrectedIntervalSizes and CorrectedPairedTSizes still apply their
// formula — they never switch method on their own — and add a warning;
// the caller chooses the replacement: Wilson on the pooled count of
// correct predictions for one model, McNemar on the pooled predictions
// for two.
//
// # Errors, NaN and panics
//
// Functions that take data return an error for structurally bad input:
// samples of different lengths, NaN or infinite values, non-positive set
// sizes or negative counts, an alpha outside (0, 1), a p-value outside
// [0, 1], or fewer values than the formula needs at all. Every such error
// reads "stats: <function>: ..." and wraps one of the sentinel errors
// ErrLength, ErrNotFinite, ErrTooFew, ErrAlpha or ErrProbability. A sample
// that is valid but degenerate (one score, zero variance, all differences
// zero) is not an error: the result carries a warning and the affected
// fields follow the rules documented on each function (NaN where a
// quantity is undefined).
//
// The scalar functions Wilson, StudentizedRangeCDF,
// StudentizedRangeQuantile, NemenyiQ and NemenyiCD return NaN for
// arguments outside their domain instead of an error.
//
// The package panics only on a broken internal invariant (a rank that is
// not a multiple of 1/2, a rank buffer of the wrong length), never on
// user input. It uses no randomness and no mutable shared state, so every
// function is safe for concurrent use.
package stats
