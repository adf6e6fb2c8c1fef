// Package spec reads experiment specs: the TOML file that names a run's
// datasets, pipelines, cross-validation protocol, tests and models (see
// DESIGN.md for the format). Parse and Load validate everything that can be
// validated without loading data: unknown keys, types, ranges, names that
// appear twice, pipeline syntax, and every [[model]] table through package
// modelkit. Errors are *input.Error values naming the file, the 1-based
// line and the key at fault.
//
// Warnings: a spec without pipelines (or with an empty list) runs pipeline
// raw, the features as read; it is accepted, with NoPipelinesWarning in
// Spec.Warnings, which the command prints once on standard error and the
// manifest keeps. Writing pipelines = ["raw"] says so and has no warning.
//
// It also holds the spec's canonical form (CanonicalSHA: the decoded
// document written with sorted keys and exact numbers, so that comments,
// blank lines and key order do not change a run's identity while any value
// does) and the built-in demo spec.
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
