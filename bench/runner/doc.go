// Package runner executes plans and writes run directories.
//
//   - Execute runs a plan's tasks (all of them, or one shard's, or those a
//     resumed run still lacks) on a worker pool, one unit of work
//     (dataset, pipeline, split) at a time so that the pipeline is fitted
//     once for all models (with few units per worker, every task on its
//     own, sharing its unit's prepared split); every task's model gets a seed derived from the
//     run seed and its key, so results never depend on the worker count
//     or on scheduling (execute.go).
//   - Partial directories keep finished tasks as they complete, so that a
//     killed run resumes and a shard of a job array can be merged; their
//     identity (run.json) binds them to the spec's canonical form, seed,
//     version and plan fingerprint; task files store floats bit for bit
//     (partial.go, taskfile.go, lock_*.go). Merge joins complete shards
//     into the results of one run (merge.go).
//   - Records, Summarise, Manifest, Report and Write turn results into the
//     run directory: predictions.csv, folds.csv, summary.csv, summary.tex,
//     summary.md, comparisons.csv, timings.csv, manifest.json and figures,
//     written atomically; every file but the manifest and the timings is
//     byte-identical for the same spec and seed (rundir.go). Models with
//     readout mitigation add the raw (unmitigated) decision to
//     predictions.csv (raw_predicted, raw_p_acc, raw_probs) and the count
//     of decisions mitigation changed to folds.csv (mitigation_changed);
//     those columns appear only in runs that mitigate. The manifest lists
//     the models' devices and calibration files with their SHA-256
//     (DeviceRecords), and Verify reports one that changed since the run.
//   - Progress draws the progress bar or log lines (progress.go).
//   - SetGC tunes the garbage collector for a run from its plan's memory
//     estimate: small runs let the heap grow before collecting, every run
//     keeps under the memory limit (gc.go). Options.Keep lets a whole run
//     hold its last batch of results instead of saving task files it
//     would delete at once (Partial.Hold).
//
// Imports: bench/input, bench/spec, bench/modelkit, bench/plan,
// bench/report, bench/outdir, bench/stats, bench/cv (inner folds of tuned
// models) and results. It must never
// import export, assess or cluster.
package runner
