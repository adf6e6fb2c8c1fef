// Package cluster writes the job script that runs a spec on a cluster:
// WriteSlurmScript emits one Slurm script with a job array of shards (each
// `fringe run -shard i/n` into its own partial run directory) and a merge
// job that depends on the whole array (afterok) and joins the shards with
// `fringe merge`.
//
// Imports: bench/input and bench/plan (shard limits). It must never import
// runner, report, export or assess: the job calls the command, not them.
package cluster
