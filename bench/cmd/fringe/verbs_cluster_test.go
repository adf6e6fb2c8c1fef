package main

import (
	"bytes"
	"encoding/json"
	"fmt"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"syscall"
	"testing"
	"time"

	"fringe/bench/internal/benchtest"
)

// TestMain lets the test binary stand in for the fringe command in a child
// process (FRINGE_TEST_CHILD=1, arguments in FRINGE_TEST_ARGS separated by
// newlines), so that a test can interrupt or kill a real process. The
// child persists finished tasks every 50 ms instead of every second, so
// the test can stop it soon after it has saved something.
func TestMain(m *testing.M) {
	if os.Getenv("FRINGE_TEST_CHILD") == "1" {
		saveEvery = 50 * time.Millisecond
		os.Args = append([]string{"fringe"}, strings.Split(os.Getenv("FRINGE_TEST_ARGS"), "\n")...)
		main()
		os.Exit(0)
	}
	os.Exit(m.Run())
}

// child starts the command as a child process.
func child(t *testing.T, stderr *bytes.Buffer, args ...string) *exec.Cmd {
	t.Helper()
	cmd := exec.Command(os.Args[0], "-test.run=^$")
	cmd.Env = append(os.Environ(), "FRINGE_TEST_CHILD=1", "FRINGE_TEST_ARGS="+strings.Join(args, "\n"))
	cmd.Stderr = stderr
	if err := cmd.Start(); err != nil {
		t.Fatal(err)
	}
	return cmd
}

// savedTasks counts the tasks held by the task files of a partial run
// directory.
func savedTasks(t *testing.T, dir string) int {
	t.Helper()
	files, _ := filepath.Glob(filepath.Join(dir, "tasks", "*.json"))
	n := 0
	for _, f := range files {
		b, err := os.ReadFile(f)
		if err != nil {
			continue // renamed away meanwhile
		}
		var tf struct{ Tasks []json.RawMessage }
		if json.Unmarshal(b, &tf) == nil {
			n += len(tf.Tasks)
		}
	}
	return n
}

// waitSaved polls until the partial directory holds more than n tasks, and
// returns the count; it fails if the child exits first or after 60 s.
func waitSaved(t *testing.T, cmd *exec.Cmd, exited <-chan error, dir string, n int) {
	t.Helper()
	deadline := time.Now().Add(60 * time.Second)
	for time.Now().Before(deadline) {
		select {
		case err := <-exited:
			t.Fatalf("the child exited (%v) before it had saved more than %d tasks", err, n)
		default:
		}
		if savedTasks(t, dir) > n {
			return
		}
		time.Sleep(5 * time.Millisecond)
	}
	cmd.Process.Kill()
	t.Fatalf("no more than %d tasks saved in %s after 60 s", n, dir)
}

// sameRunDirs compares two run directories byte for byte, manifest.json
// and timings.csv excepted (they record times by design).
func sameRunDirs(t *testing.T, want, got string) {
	t.Helper()
	a, b := runFiles(t, want), runFiles(t, got)
	if strings.Join(a, ",") != strings.Join(b, ",") {
		t.Fatalf("file lists differ:\n%v\n%v", a, b)
	}
	if len(a) < 10 {
		t.Fatalf("only %d files in %s", len(a), want)
	}
	for _, f := range a {
		if f == "manifest.json" || f == "timings.csv" {
			continue
		}
		x, _ := os.ReadFile(filepath.Join(want, f))
		y, _ := os.ReadFile(filepath.Join(got, f))
		if !bytes.Equal(x, y) {
			t.Errorf("%s differs between %s and %s", f, want, got)
		}
	}
}

// TestShardMergeIdentical runs a grid whole and as n = 1, 2, 3 and 7
// shards (n = 3 only in -short mode), merges each set, and checks that the
// merged run directory is byte-identical to the whole run's.
func TestShardMergeIdentical(t *testing.T) {
	spec, _ := filepath.Abs("testdata/cluster/grid.toml")
	dir := t.TempDir()
	whole := filepath.Join(dir, "whole")
	if code, _, stderr := runCmd(t, "", "run", spec, "-out", whole, "-workers", "2", "-quiet"); code != 0 {
		t.Fatalf("whole run: exit %d: %s", code, stderr)
	}
	counts := []int{1, 2, 3, 7}
	if testing.Short() {
		counts = []int{3} // -race -short in CI: one count keeps it quick
	}
	for _, n := range counts {
		var shards []string
		for i := 1; i <= n; i++ {
			out := filepath.Join(dir, fmt.Sprintf("n%d", n), fmt.Sprintf("shard-%d", i))
			code, stdout, stderr := runCmd(t, "", "run", spec, "-shard", fmt.Sprintf("%d/%d", i, n), "-out", out, "-workers", "1")
			if code != 0 {
				t.Fatalf("shard %d/%d: exit %d: %s", i, n, code, stderr)
			}
			if !strings.Contains(stdout, fmt.Sprintf("shard %d/%d", i, n)) {
				t.Errorf("shard %d/%d: stdout %q", i, n, stdout)
			}
			for _, f := range []string{"PARTIAL", "run.json"} {
				if _, err := os.Stat(filepath.Join(out, f)); err != nil {
					t.Errorf("shard %d/%d: %v", i, n, err)
				}
			}
			if _, err := os.Stat(filepath.Join(out, "summary.csv")); err == nil {
				t.Errorf("shard %d/%d wrote summary.csv: a partial run must not look complete", i, n)
			}
			shards = append(shards, out)
		}
		merged := filepath.Join(dir, fmt.Sprintf("merged-%d", n))
		// The directories in reverse order: order must not matter.
		for i, j := 0, len(shards)-1; i < j; i, j = i+1, j-1 {
			shards[i], shards[j] = shards[j], shards[i]
		}
		code, stdout, stderr := runCmd(t, "", append([]string{"merge", "-out", merged}, shards...)...)
		if code != 0 {
			t.Fatalf("merge of %d shards: exit %d: %s", n, code, stderr)
		}
		if !strings.Contains(stdout, fmt.Sprintf("merged %d shards (64 tasks)", n)) {
			t.Errorf("merge stdout %q", stdout)
		}
		sameRunDirs(t, whole, merged)
	}
}

// TestKillResume interrupts a real run with SIGINT, then kills the resumed
// run with SIGKILL, then resumes it to the end, and checks that (1) the
// interrupted run says how to resume and keeps what it finished, (2) each
// resumed run starts from exactly the tasks persisted before, so nothing
// finished is computed again, and (3) the final run directory is
// byte-identical to an uninterrupted run's.
func TestKillResume(t *testing.T) {
	if testing.Short() {
		t.Skip("kill-and-resume test skipped in -short mode")
	}
	spec, _ := filepath.Abs("testdata/cluster/kill.toml")
	dir := t.TempDir()
	ref := filepath.Join(dir, "ref")
	if code, _, stderr := runCmd(t, "", "run", spec, "-out", ref, "-workers", "2", "-quiet"); code != 0 {
		t.Fatalf("uninterrupted run: exit %d: %s", code, stderr)
	}
	out := filepath.Join(dir, "run")
	partial := out + ".partial"
	args := []string{"run", spec, "-out", out, "-workers", "1"}

	// 1. SIGINT once something is saved: a clean stop with a message.
	var errA bytes.Buffer
	a := child(t, &errA, args...)
	exitedA := make(chan error, 1)
	go func() { exitedA <- a.Wait() }()
	waitSaved(t, a, exitedA, partial, 0)
	a.Process.Signal(syscall.SIGINT)
	<-exitedA
	if code := a.ProcessState.ExitCode(); code != 1 {
		t.Fatalf("interrupted run: exit %d, want 1; stderr:\n%s", code, errA.String())
	}
	m := regexp.MustCompile(`interrupted: (\d+) of 600 tasks are finished and kept in (.*); run the same command again to resume`).FindStringSubmatch(errA.String())
	if m == nil || m[2] != partial {
		t.Fatalf("interrupted run's message:\n%s", errA.String())
	}
	kept, _ := strconv.Atoi(m[1])
	if got := savedTasks(t, partial); got != kept || kept == 0 || kept >= 600 {
		t.Fatalf("the message says %d tasks are kept, the directory holds %d", kept, got)
	}

	// 2. Resume, and SIGKILL once it has saved more.
	var errB bytes.Buffer
	b := child(t, &errB, args...)
	exitedB := make(chan error, 1)
	go func() { exitedB <- b.Wait() }()
	waitSaved(t, b, exitedB, partial, kept)
	b.Process.Signal(syscall.SIGKILL)
	<-exitedB
	if !strings.Contains(errB.String(), fmt.Sprintf("resuming from %s: %d of 600 tasks were finished before; running the other %d", partial, kept, 600-kept)) {
		t.Fatalf("first resume's message:\n%s", errB.String())
	}
	killed := savedTasks(t, partial)
	if killed <= kept || killed >= 600 {
		t.Fatalf("after SIGKILL %d tasks saved, before it %d", killed, kept)
	}

	// 3. Resume to the end (in-process, 2 workers).
	code, stdout, stderr := runCmd(t, "", "run", spec, "-out", out, "-workers", "2")
	if code != 0 {
		t.Fatalf("final resume: exit %d: %s", code, stderr)
	}
	if !strings.Contains(stderr, fmt.Sprintf("%d of 600 tasks were finished before; running the other %d", killed, 600-killed)) {
		t.Errorf("final resume recomputes finished tasks or does not say so:\n%s", stderr)
	}
	if !strings.Contains(stdout, fmt.Sprintf("600 tasks (%d finished before, %d now)", killed, 600-killed)) {
		t.Errorf("final resume's summary line:\n%s", stdout)
	}
	if _, err := os.Stat(partial); !os.IsNotExist(err) {
		t.Errorf("the partial directory is still there after completion (%v)", err)
	}
	sameRunDirs(t, ref, out)
	entries, _ := os.ReadDir(dir)
	if len(entries) != 2 {
		var names []string
		for _, e := range entries {
			names = append(names, e.Name())
		}
		t.Errorf("leftovers in the output parent: %v", names)
	}
}

// TestClusterBadInput checks bad shard, resume, merge and slurm input:
// exit status 2, a one-line message with the expected parts, and no run
// directory left behind.
func TestClusterBadInput(t *testing.T) {
	grid, _ := filepath.Abs("testdata/cluster/grid.toml")
	base := t.TempDir()
	// Shards of the grid with seed 99 (as is) and seed 100.
	seed100 := filepath.Join(base, "seed100.toml")
	text, _ := os.ReadFile(grid)
	os.WriteFile(seed100, bytes.Replace(text, []byte("seed = 99"), []byte("seed = 100"), 1), 0o644)
	shard := func(spec, name, s string) string {
		out := filepath.Join(base, name)
		if code, _, stderr := runCmd(t, "", "run", spec, "-shard", s, "-out", out, "-quiet"); code != 0 {
			t.Fatalf("shard %s: exit %d: %s", s, code, stderr)
		}
		return out
	}
	s1, s2, s3 := shard(grid, "s1", "1/3"), shard(grid, "s2", "2/3"), shard(grid, "s3", "3/3")
	o2 := shard(seed100, "o2", "2/3")
	f2 := shard(grid, "f2", "2/4")
	// An unfinished run of the grid, as a killed run leaves it.
	unfinished := filepath.Join(base, "unfinished")
	benchtest.CopyDir(t, s1, unfinished+".partial")
	b, _ := os.ReadFile(filepath.Join(s1, "run.json"))
	os.WriteFile(filepath.Join(unfinished+".partial", "run.json"), bytes.Replace(b, []byte(`"shard": "1/3"`), []byte(`"shard": "1/1"`), 1), 0o644)
	os.WriteFile(filepath.Join(base, "notes.txt"), []byte("x"), 0o644)

	for _, c := range []struct {
		name string
		args []string
		want []string
	}{
		{"shard syntax", []string{"run", grid, "-shard", "2"}, []string{"-shard 2", "i/n"}},
		{"shard zero", []string{"run", grid, "-shard", "0/3"}, []string{"-shard 0/3", "between 1 and n"}},
		{"shard beyond n", []string{"run", grid, "-shard", "4/3"}, []string{"-shard 4/3"}},
		{"more shards than units", []string{"run", grid, "-shard", "1/17"}, []string{"grid.toml", "16 units", "at most 16 shards"}},
		{"shard into a foreign directory", []string{"run", grid, "-shard", "1/2", "-out", base}, []string{base, "not a partial run directory"}},
		{"shard into another shard", []string{"run", grid, "-shard", "1/3", "-out", s2}, []string{s2, "shard 2/3, not 1/3", "-fresh"}},
		{"resume with another seed", []string{"run", seed100, "-out", unfinished}, []string{unfinished + ".partial", "seed 99, not 100", "not mixed"}},
		{"merge nothing", []string{"merge"}, []string{"partial run directories"}},
		{"merge missing", []string{"merge", "-out", filepath.Join(base, "m"), s1, s3}, []string{"missing shard(s) 2 of 3", "given: 1, 3"}},
		{"merge other seed", []string{"merge", "-out", filepath.Join(base, "m"), s1, o2, s3}, []string{o2, "different run", "seed 100, not 99"}},
		{"merge duplicate", []string{"merge", "-out", filepath.Join(base, "m"), s1, s2, s3, benchtest.CopyDir(t, s2, filepath.Join(base, "s2copy"))}, []string{"duplicate shards", "shard 2/3", "s2copy"}},
		{"merge shard counts", []string{"merge", "-out", filepath.Join(base, "m"), s1, f2, s3}, []string{f2, "shard 2/4", "different shard counts"}},
		{"merge into a shard", []string{"merge", "-out", s2, s1, s2, s3}, []string{"-out", "one of the partial run directories"}},
		{"merge a run directory", []string{"merge", "-out", filepath.Join(base, "m"), filepath.Join(base, "notes.txt")}, []string{"notes.txt"}},
		{"slurm without shards", []string{"slurm", grid}, []string{"-shards"}},
		{"slurm too many shards", []string{"slurm", grid, "-shards", "40"}, []string{"at most 16 shards"}},
		{"slurm bad memory", []string{"slurm", grid, "-shards", "2", "-mem", "lots"}, []string{"-mem", "lots"}},
		{"slurm bad time", []string{"slurm", grid, "-shards", "2", "-time", "2h"}, []string{"-time", "2h"}},
	} {
		t.Run(c.name, func(t *testing.T) {
			before := listDir(t, base)
			code, _, stderr := runCmd(t, "", c.args...)
			if code != 2 {
				t.Fatalf("exit %d, want 2; stderr:\n%s", code, stderr)
			}
			msg := strings.TrimSpace(stderr)
			if strings.Contains(msg, "\n") {
				t.Errorf("message spans lines:\n%s", msg)
			}
			for _, w := range c.want {
				if !strings.Contains(msg, w) {
					t.Errorf("message %q lacks %q", msg, w)
				}
			}
			if after := listDir(t, base); after != before {
				t.Errorf("the directory changed:\nbefore %s\nafter  %s", before, after)
			}
		})
	}
	// The refused directories are intact: the shards still merge.
	code, _, stderr := runCmd(t, "", "merge", "-out", filepath.Join(base, "m"), s1, s2, s3, "-quiet")
	if code != 0 {
		t.Fatalf("merge after the refusals: exit %d: %s", code, stderr)
	}
}

// listDir lists a directory tree with file sizes, for before/after checks.
func listDir(t *testing.T, dir string) string {
	t.Helper()
	var b strings.Builder
	filepath.WalkDir(dir, func(path string, d os.DirEntry, err error) error {
		if err != nil {
			return err
		}
		rel, _ := filepath.Rel(dir, path)
		info, _ := d.Info()
		fmt.Fprintf(&b, "%s:%d ", rel, info.Size())
		return nil
	})
	return b.String()
}

// TestSlurmVerb writes a job script to a file and checks its array size,
// resources and commands.
func TestSlurmVerb(t *testing.T) {
	grid, _ := filepath.Abs("testdata/cluster/grid.toml")
	dir := t.TempDir()
	script := filepath.Join(dir, "job.sh")
	code, stdout, stderr := runCmd(t, "", "slurm", grid, "-shards", "4", "-out", filepath.Join(dir, "run"), "-cpus", "8",
		"-mem", "16G", "-time", "12:00:00", "-partition", "cpu", "-fringe", "/opt/fringe/bin/fringe", "-script", script)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	if !strings.Contains(stdout, "64 tasks in 4 shards") || !strings.Contains(stdout, "bash "+script) {
		t.Errorf("stdout %q", stdout)
	}
	b, err := os.ReadFile(script)
	if err != nil {
		t.Fatal(err)
	}
	for _, w := range []string{"#SBATCH --array=1-4", "#SBATCH --cpus-per-task=8", "#SBATCH --mem=16G", "#SBATCH --time=12:00:00",
		"#SBATCH --partition=cpu", "--dependency=afterok:", "fringe='/opt/fringe/bin/fringe'", "spec='" + grid + "'",
		`-shard "$SLURM_ARRAY_TASK_ID/$shards"`} {
		if !strings.Contains(string(b), w) {
			t.Errorf("script lacks %q", w)
		}
	}
	if st, _ := os.Stat(script); st.Mode()&0o100 == 0 {
		t.Error("script is not executable")
	}
	// Without -script the script goes to standard output.
	code, stdout, _ = runCmd(t, "", "slurm", grid, "-shards", "2")
	if code != 0 || !strings.HasPrefix(stdout, "#!/bin/bash\n#SBATCH") {
		t.Errorf("exit %d, stdout starts %.40q", code, stdout)
	}
	for _, v := range []string{"merge", "slurm"} {
		if code, stdout, _ := runCmd(t, "", v, "-h"); code != 0 || !strings.Contains(stdout, "usage: fringe "+v) {
			t.Errorf("%s -h: exit %d, %q", v, code, stdout)
		}
	}
}
