// Package spec reads experiment specs: the TOML file that names a run's
// datasets, pipelines, cross-validation protocol, tests and models (see
// DESIGN.md for the format). Parse and Load validate everything that can be
// validated without loading data: unknown keys, types, ranges, names that
// appear twice, pipeline syntax, and every [[model]] table through package
// modelkit. Errors are *input.Error values naming the file, the 1-based
// line and the key at fault. Old spellings of renamed model keys and
// values (modelkit.Respellings) are read as the new ones, with one located
// warning per key in Spec.Warnings.
//
// The [report] table (report.go) chooses what the tables of summary.tex
// and summary.md show: models, pipelines, datasets and metrics and their
// order, the layout (page, column, wide, landscape), the split rule, the
// tables left out, the row count before a table runs over pages, the
// decimals, the room of a table in pt, and a caption and \label key per
// kind of table; a model's display label is the `label` key of its
// [[model]] table. Spec.ReportOptions returns them as
// results.ReportOptions (the zero value without [report] and labels: the
// tables every run had before the table existed). Parse checks every
// name [report] lists against the spec's own (CheckReport; plan.New
// checks again), so a wrong name is a located error before anything runs.
//
// Warnings: a spec without pipelines (or with an empty list) runs pipeline
// raw, the features as read; it is accepted, with NoPipelinesWarning in
// Spec.Warnings, which the command prints once on standard error and the
// manifest keeps. Writing pipelines = ["raw"] says so and has no warning.
//
// It also holds the spec's canonical form (CanonicalSHA: the decoded
// document written with sorted keys and exact numbers, and model tables in
// the current spellings, so that comments, blank lines, key order and old
// spellings do not change a run's identity while any value does) and the
// built-in demo spec.
//
// Names: no string of a spec may hold invalid UTF-8 or control characters,
// and the names the user chooses (spec, dataset display names, model
// names) may not start like a spreadsheet formula (results.FormulaLike);
// both are located errors.
//
// Imports: bench/input, bench/modelkit, package datasets (pipeline
// syntax) and results (the one rule of what a spreadsheet reads as a
// formula). It must never import plan, runner, report, export, assess or
// cluster: a spec is read before anything is planned or run.
package spec
