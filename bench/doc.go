// Package bench is the harness of fringe. It holds no code of its own: each
// stage of a run has a package below it, and imports point one way, from
// the command down to the ground:
//
//	cmd/fringe   the command: flags, verbs, exit status
//	assess       the dataset suitability report
//	cluster      the Slurm job script (job array of shards, merge job)
//	export       circuits of test instances as OpenQASM programs
//	runner       worker pool, task files, resume, merge, run directories
//	report       statistics of records, figures, rank, compare
//	plan         datasets loaded, splits, tasks, seeds, units, shards
//	spec         the experiment spec: parse, validate, canonical form
//	modelkit     model kinds: keys, labels, builders, command and counts
//	outdir       atomic output files and directories
//	input        the bad-input error every stage returns
//	cv, stats    splitters; intervals and significance tests
//
// layout_test.go states which package may import which and fails on any
// other arrow. Below bench, the model packages (datasets, baselines,
// qkernel) never import bench or results.
package bench
