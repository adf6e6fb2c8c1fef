package cluster

import (
	"bytes"
	"errors"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"

	"fringe/bench/input"
)

// stub writes an executable shell script.
func stub(t *testing.T, path, body string) {
	t.Helper()
	if err := os.WriteFile(path, []byte("#!/bin/bash\n"+body), 0o755); err != nil {
		t.Fatal(err)
	}
}

// TestSlurmScript writes the cluster job and runs it under bash with
// stand-ins for sbatch and fringe that record their arguments: on the
// login node it must submit itself as the array and then the merge job
// with an afterok dependency on the array's job id; as array task i it
// must run shard i/N; the merge job's script must merge every shard.
func TestSlurmScript(t *testing.T) {
	bash, err := exec.LookPath("bash")
	if err != nil {
		t.Skip("bash not found")
	}
	dir := t.TempDir()
	bin := filepath.Join(dir, "bin")
	os.MkdirAll(bin, 0o755)
	log := filepath.Join(dir, "log")
	os.MkdirAll(log, 0o755)
	// sbatch stand-in: records arguments and standard input per call, and
	// answers with a job id as --parsable does ("id" or "id;cluster").
	stub(t, filepath.Join(bin, "sbatch"), `n=$(ls "`+log+`" | grep -c '^sbatch.*args$' || true)
printf '%s\n' "$@" > "`+log+`/sbatch$n.args"
if [ ! -t 0 ]; then cat > "`+log+`/sbatch$n.stdin"; fi
if [ "$n" = 0 ]; then echo 4242; else echo "4243;cluster1"; fi
`)
	fringe := filepath.Join(dir, "my fringe's bin", "fringe")
	os.MkdirAll(filepath.Dir(fringe), 0o755)
	stub(t, fringe, `printf '%s\n' "$@" > "`+log+`/fringe.args"`+"\n")
	specPath := filepath.Join(dir, "specs dir", "lab's spec.toml")
	out := filepath.Join(dir, "runs", "lab")

	var b bytes.Buffer
	err = WriteSlurmScript(&b, SlurmOptions{Spec: specPath, Out: out, Shards: 3, Fringe: fringe, CPUs: 4, Mem: "6G",
		Time: "1-02:00:00", Partition: "short", Account: "qml", JobName: "fringe-lab week", Tasks: 96})
	if err != nil {
		t.Fatal(err)
	}
	text := b.String()
	for _, w := range []string{
		"#!/bin/bash\n", "#SBATCH --job-name=fringe-lab-week\n", "#SBATCH --array=1-3\n", "#SBATCH --cpus-per-task=4\n",
		"#SBATCH --mem=6G\n", "#SBATCH --time=1-02:00:00\n", "#SBATCH --partition=short\n", "#SBATCH --account=qml\n",
		"#SBATCH --output=" + out + ".shards/logs/shard-%a-of-3.log\n", "96 tasks in 3 shards",
	} {
		if !strings.Contains(text, w) {
			t.Errorf("script lacks %q", w)
		}
	}
	script := filepath.Join(dir, "job.sh")
	os.WriteFile(script, b.Bytes(), 0o755)
	if o, err := exec.Command(bash, "-n", script).CombinedOutput(); err != nil {
		t.Fatalf("bash -n: %v\n%s", err, o)
	}
	env := func(extra ...string) []string {
		var e []string
		for _, kv := range os.Environ() {
			if !strings.HasPrefix(kv, "SLURM_") && !strings.HasPrefix(kv, "PATH=") {
				e = append(e, kv)
			}
		}
		return append(append(e, "PATH="+bin+":/usr/bin:/bin"), extra...)
	}
	read := func(name string) []string {
		b, err := os.ReadFile(filepath.Join(log, name))
		if err != nil {
			t.Fatal(err)
		}
		return strings.Split(strings.TrimSuffix(string(b), "\n"), "\n")
	}

	// On the login node: two submissions.
	cmd := exec.Command(bash, script)
	cmd.Env = env()
	o, err := cmd.CombinedOutput()
	if err != nil {
		t.Fatalf("submit: %v\n%s", err, o)
	}
	if !strings.Contains(string(o), "job array 4242") || !strings.Contains(string(o), "merge job 4243") {
		t.Errorf("submit output %q", o)
	}
	if got := read("sbatch0.args"); strings.Join(got, " ") != "--parsable "+script {
		t.Errorf("array submission: %q", got)
	}
	merge := read("sbatch1.args")
	for _, w := range []string{"--dependency=afterok:4242", "--kill-on-invalid-dep=yes", "--job-name=fringe-lab-week-merge",
		"--cpus-per-task=1", "--mem=6G", "--time=1-02:00:00", "--partition=short", "--account=qml", "--output=" + out + ".shards/logs/merge.log"} {
		if !strings.Contains(strings.Join(merge, "\n")+"\n", w+"\n") {
			t.Errorf("merge submission %q lacks %q", merge, w)
		}
	}
	if _, err := os.Stat(out + ".shards/logs"); err != nil {
		t.Errorf("log directory not created: %v", err)
	}
	// The merge job's script, run as Slurm would run it.
	mergeScript := filepath.Join(log, "sbatch1.stdin")
	cmd = exec.Command(bash, mergeScript)
	cmd.Env = env("SLURM_JOB_ID=4243")
	if o, err := cmd.CombinedOutput(); err != nil {
		t.Fatalf("merge script: %v\n%s", err, o)
	}
	want := []string{"merge", "-out", out, out + ".shards/shard-1-of-3", out + ".shards/shard-2-of-3", out + ".shards/shard-3-of-3"}
	if got := read("fringe.args"); strings.Join(got, "|") != strings.Join(want, "|") {
		t.Errorf("merge job runs fringe %q, want %q", got, want)
	}

	// As array task 2.
	cmd = exec.Command(bash, script)
	cmd.Env = env("SLURM_JOB_ID=4244", "SLURM_ARRAY_JOB_ID=4242", "SLURM_ARRAY_TASK_ID=2", "SLURM_CPUS_PER_TASK=4")
	if o, err := cmd.CombinedOutput(); err != nil {
		t.Fatalf("array task: %v\n%s", err, o)
	}
	want = []string{"run", specPath, "-shard", "2/3", "-out", out + ".shards/shard-2-of-3", "-workers", "4"}
	if got := read("fringe.args"); strings.Join(got, "|") != strings.Join(want, "|") {
		t.Errorf("array task runs fringe %q, want %q", got, want)
	}
}

func TestSlurmOptionsRefused(t *testing.T) {
	good := SlurmOptions{Spec: "s.toml", Out: "out", Shards: 2, Fringe: "fringe", CPUs: 1, Mem: "1G", Time: "10"}
	for _, c := range []struct {
		flag string
		edit func(*SlurmOptions)
	}{
		{"-shards", func(o *SlurmOptions) { o.Shards = 0 }},
		{"-cpus", func(o *SlurmOptions) { o.CPUs = 0 }},
		{"-mem", func(o *SlurmOptions) { o.Mem = "lots" }},
		{"-mem", func(o *SlurmOptions) { o.Mem = "4 G" }},
		{"-time", func(o *SlurmOptions) { o.Time = "2h" }},
		{"-time", func(o *SlurmOptions) { o.Time = "1:2:3:4" }},
		{"-partition", func(o *SlurmOptions) { o.Partition = "a b" }},
		{"-account", func(o *SlurmOptions) { o.Account = "x;rm" }},
		{"-out", func(o *SlurmOptions) { o.Out = "my runs/x" }},
		{"-out", func(o *SlurmOptions) { o.Out = "runs/%j" }},
		{"-fringe", func(o *SlurmOptions) { o.Fringe = "" }},
	} {
		o := good
		c.edit(&o)
		err := WriteSlurmScript(&bytes.Buffer{}, o)
		if err == nil || !errors.Is(err, input.ErrBad) || !strings.Contains(err.Error(), c.flag) {
			t.Errorf("%s: err %v, want an input error naming the flag", c.flag, err)
		}
	}
	for _, tm := range []string{"90", "90:30", "02:00:00", "1-12", "1-12:30", "1-12:30:00"} {
		o := good
		o.Time = tm
		if err := WriteSlurmScript(&bytes.Buffer{}, o); err != nil {
			t.Errorf("-time %s refused: %v", tm, err)
		}
	}
}
