package cluster

import (
	"fmt"
	"io"
	"path/filepath"
	"regexp"
	"strings"

	"fringe/bench/input"
	"fringe/bench/plan"
)

// SlurmOptions describe the cluster job that `fringe slurm` writes: a job
// array with one shard of the spec per array task, and a merge job that
// waits for the whole array.
type SlurmOptions struct {
	Spec   string // spec file; made absolute
	Out    string // directory of the merged run; made absolute. Shards go to Out.shards/
	Shards int    // array size, 1 <= Shards <= the plan's units

	Fringe    string // the fringe binary: a path (made absolute) or a name looked up on PATH
	CPUs      int    // --cpus-per-task, also fringe's -workers
	Mem       string // --mem, e.g. "4G"
	Time      string // --time, e.g. "02:00:00" or "1-12:00:00"
	Partition string // --partition; "" = the cluster's default
	Account   string // --account; "" = none
	JobName   string // --job-name of the array; the merge job adds "-merge"

	Tasks int // tasks of the plan, for the script's comment
}

var (
	slurmMem   = regexp.MustCompile(`^[0-9]+[KMGT]?$`)
	slurmTime  = regexp.MustCompile(`^([0-9]+-)?[0-9]+(:[0-9]+){0,2}$`)
	slurmWord  = regexp.MustCompile(`^[A-Za-z0-9_.,+-]+$`)
	slurmClean = regexp.MustCompile(`[^A-Za-z0-9_.-]+`)
)

// check validates the options; errors are input errors naming the flag.
func (o *SlurmOptions) check() error {
	bad := func(flag, format string, args ...any) error {
		return &input.Error{Err: fmt.Errorf("%s: %s", flag, fmt.Sprintf(format, args...))}
	}
	switch {
	case o.Shards < 1 || o.Shards > plan.MaxShards:
		return bad("-shards", "want 1 to %d shards, got %d", plan.MaxShards, o.Shards)
	case o.CPUs < 1:
		return bad("-cpus", "want at least 1, got %d", o.CPUs)
	case !slurmMem.MatchString(o.Mem):
		return bad("-mem", "want a size such as 4G or 500M (Slurm's --mem), got %q", o.Mem)
	case !slurmTime.MatchString(o.Time):
		return bad("-time", "want a Slurm time limit such as 90, 02:00:00 or 1-12:00:00, got %q", o.Time)
	case o.Partition != "" && !slurmWord.MatchString(o.Partition):
		return bad("-partition", "unexpected characters in %q", o.Partition)
	case o.Account != "" && !slurmWord.MatchString(o.Account):
		return bad("-account", "unexpected characters in %q", o.Account)
	case o.Fringe == "":
		return bad("-fringe", "empty path")
	case strings.ContainsAny(o.Fringe, "\n\r"):
		return bad("-fringe", "%q: line breaks in the path", o.Fringe)
	case strings.ContainsAny(o.Spec, "\n\r"):
		return bad("spec", "%q: line breaks in the path", o.Spec)
	case strings.ContainsAny(o.Out, " \t\n\"'\\%$`"):
		return bad("-out", "%q: the path appears in #SBATCH lines, which take no spaces, quotes, backslashes, %% or $", o.Out)
	}
	return nil
}

// WriteSlurmScript writes the cluster job for a spec: a bash script that is
// also a Slurm batch script. Run with bash on a login node, it submits
// itself as a job array (#SBATCH --array=1-N, one shard per array task,
// resources from the options) and then the merge job with
// --dependency=afterok on the array, so the merge starts only when every
// shard has succeeded. Run by Slurm as an array task, it runs one shard:
//
//	fringe run SPEC -shard $SLURM_ARRAY_TASK_ID/N -out OUT.shards/shard-I-of-N
//
// (exec'd, so Slurm's SIGTERM at the time limit reaches fringe, which
// keeps the finished tasks: resubmitting the same array task resumes it).
func WriteSlurmScript(w io.Writer, o SlurmOptions) error {
	var err error
	if o.Spec, err = filepath.Abs(o.Spec); err != nil {
		return err
	}
	if o.Out, err = filepath.Abs(o.Out); err != nil {
		return err
	}
	if strings.ContainsRune(o.Fringe, '/') {
		if o.Fringe, err = filepath.Abs(o.Fringe); err != nil {
			return err
		}
	}
	if err := o.check(); err != nil {
		return err
	}
	name := slurmClean.ReplaceAllString(o.JobName, "-")
	if name == "" || name == "-" {
		name = "fringe"
	}
	var b strings.Builder
	sb := func(format string, args ...any) { fmt.Fprintf(&b, "#SBATCH "+format+"\n", args...) }
	res := func(prefix string, cpus int) string {
		s := fmt.Sprintf("%s--cpus-per-task=%d --mem=%s --time=%s", prefix, cpus, o.Mem, o.Time)
		if o.Partition != "" {
			s += " --partition=" + o.Partition
		}
		if o.Account != "" {
			s += " --account=" + o.Account
		}
		return s
	}
	b.WriteString("#!/bin/bash\n")
	sb("--job-name=%s", name)
	sb("--array=1-%d", o.Shards)
	sb("--cpus-per-task=%d", o.CPUs)
	sb("--mem=%s", o.Mem)
	sb("--time=%s", o.Time)
	if o.Partition != "" {
		sb("--partition=%s", o.Partition)
	}
	if o.Account != "" {
		sb("--account=%s", o.Account)
	}
	sb("--output=%s.shards/logs/shard-%%a-of-%d.log", o.Out, o.Shards)
	fmt.Fprintf(&b, `#
# Cluster job written by 'fringe slurm' for the spec %s
# (%d tasks in %d shards). Submit it from a login node with
#
#     bash THIS_FILE
#
# which submits this file as a job array (one shard per array task) and a
# merge job that starts once every shard has succeeded; the merged run
# goes to %s
# A shard that failed or ran out of time: resubmit it alone, e.g.
#     sbatch --array=3 THIS_FILE
# (it resumes where it stopped), then merge by hand:
#     fringe merge -out %s %s.shards/shard-*-of-%d
set -euo pipefail

fringe=%s
spec=%s
out=%s
shards=%d

shard_dir() { printf '%%s.shards/shard-%%d-of-%%d' "$out" "$1" "$shards"; }

if [ -z "${SLURM_ARRAY_TASK_ID:-}" ]; then
	# On the login node: submit the array, then the merge job.
	mkdir -p "$out.shards/logs"
	array=$(sbatch --parsable "$0")
	array=${array%%%%;*}
	dirs=()
	for i in $(seq 1 "$shards"); do dirs+=("$(shard_dir "$i")"); done
	merge=$(sbatch --parsable --dependency=afterok:"$array" --kill-on-invalid-dep=yes \
		--job-name=%s-merge %s \
		--output="$out.shards/logs/merge.log" <<EOF
#!/bin/bash
exec $(printf '%%q ' "$fringe" merge -out "$out" "${dirs[@]}")
EOF
)
	echo "submitted job array $array ($shards shards) and merge job ${merge%%%%;*}; the merged run goes to $out"
	exit 0
fi

# In array task $SLURM_ARRAY_TASK_ID: run one shard.
exec "$fringe" run "$spec" -shard "$SLURM_ARRAY_TASK_ID/$shards" -out "$(shard_dir "$SLURM_ARRAY_TASK_ID")" -workers "${SLURM_CPUS_PER_TASK:-%d}"
`, o.Spec, o.Tasks, o.Shards, o.Out, o.Out, o.Out, o.Shards,
		shellQuote(o.Fringe), shellQuote(o.Spec), shellQuote(o.Out), o.Shards,
		name, res("", 1), o.CPUs)
	_, err = io.WriteString(w, b.String())
	return err
}

// shellQuote quotes s for bash as one word.
func shellQuote(s string) string {
	return "'" + strings.ReplaceAll(s, "'", `'\''`) + "'"
}
