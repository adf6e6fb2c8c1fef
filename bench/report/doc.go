// Package report analyses the records of runs: everything a reader of a
// paper needs beyond the raw predictions.
//
//   - Analyse: the marks of the summary table (best cell per dataset and
//     metric; cells not significantly worse than it by the protocol's
//     paired test with Holm's correction), the comparisons with the
//     reference model, the Friedman/Iman–Davenport test with the Nemenyi
//     critical difference across datasets, and Wilcoxon tests of each
//     interference model against each baseline (analyse.go).
//   - Figures and KernelFigure: critical-difference diagrams, accuracy
//     against shot budget and noise strength, p_acc distributions, and the
//     interference kernel beside the spec's RBF kernels (figures.go).
//   - ReadScores and Rank: ranks and the Friedman test across datasets
//     from a scores CSV, for `fringe rank` (rank.go).
//   - Compare: the regression check of two run directories, for `fringe
//     compare` (compare.go).
//
// Confidence intervals are at level 1 - Alpha (95%); the tests' level is
// the spec's cv.alpha. Statistics come from bench/stats.
//
// Imports: bench/input, bench/spec (the protocol), bench/modelkit (model
// descriptions), bench/plan (the kernel figure draws on the plan's data),
// bench/outdir (file-name fragments), bench/stats and results. It must
// never import runner, export, assess or cluster: runs and assessments
// call it.
package report
