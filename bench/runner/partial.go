package runner

import (
	"bytes"
	"crypto/sha256"
	"encoding/hex"
	"encoding/json"
	"errors"
	"fmt"
	"io/fs"
	"os"
	"path/filepath"
	"regexp"
	"strings"
	"sync"
	"time"

	"fringe/bench/input"
	"fringe/bench/outdir"
	"fringe/bench/plan"
	"fringe/bench/spec"
)

// A partial run directory holds the finished tasks of a run that is not
// complete: a run in progress (kept at OUT.partial beside its output
// directory until the run is written) or one shard of a run (kept at the
// shard's output directory, for `fringe merge`). Its layout:
//
//	PARTIAL              a note for people: what this is and how to finish it
//	run.json             the run's identity (runIdentity), written first
//	tasks/NNNNNNN.json   finished tasks, in batches; NNNNNNN is the lowest
//	                     task index of the batch; each file is written under
//	                     a temporary name and renamed into place, so it is
//	                     either absent or complete
//
// A run may only continue from, or merge with, tasks of the same identity:
// the same spec (compared in canonical form, so comments, blank lines and
// key order do not matter), seed, fringe version, plan (datasets loaded,
// splits, task keys) and shard.

// ErrPartial marks a partial run directory that cannot be used: it belongs
// to another run, it is damaged, or it is incomplete. It is an input
// error.
var ErrPartial = errors.New("unusable partial run directory")

// errInUse reports a partial run directory locked by another process.
var errInUse = errors.New("in use by another fringe process (the same command running elsewhere?); let it finish or stop it, then run again")

// partialError is an error about a partial run directory; it satisfies
// errors.Is(err, ErrPartial) without repeating ErrPartial's text.
type partialError struct{ msg string }

func (e *partialError) Error() string        { return e.msg }
func (e *partialError) Is(target error) bool { return target == ErrPartial }

// partialErr makes an input error about a partial run directory.
func partialErr(file, format string, args ...any) error {
	return &input.Error{File: file, Err: &partialError{fmt.Sprintf(format, args...)}}
}

const (
	partialFormat = "fringe partial run 2"
	identityFile  = "run.json"
	markerFile    = "PARTIAL"
	tasksDir      = "tasks"
)

// runIdentity is run.json: what a run is and which part of it a partial
// directory holds. Only the fields compared by same identify the run; the
// others inform people and `fringe merge`.
type runIdentity struct {
	Format     string `json:"format"`
	Version    string `json:"fringe_version"`
	SpecName   string `json:"spec_name"`
	SpecSHA    string `json:"spec_sha256"` // of the canonical spec (canonicalSpec)
	Seed       uint64 `json:"seed"`
	PlanSHA    string `json:"plan_sha256"` // of the plan (fingerprint)
	Tasks      int    `json:"tasks"`       // in the whole plan
	Shard      string `json:"shard"`       // "i/n"
	ShardTasks int    `json:"shard_tasks"`

	SpecFile string `json:"spec_file"` // as given on the command line
	SpecDir  string `json:"spec_dir"`  // absolute; relative CSV paths are resolved against it
	SpecText string `json:"spec_text"`
	Started  string `json:"started"` // RFC 3339, when the directory was created
	Workers  int    `json:"workers"`
}

// same reports whether two identities name the same run and shard.
func (a runIdentity) same(b runIdentity) bool {
	return a.Format == b.Format && a.Version == b.Version && a.SpecSHA == b.SpecSHA && a.Seed == b.Seed &&
		a.PlanSHA == b.PlanSHA && a.Tasks == b.Tasks && a.Shard == b.Shard && a.ShardTasks == b.ShardTasks
}

// sameRun reports whether two identities name the same run (any shard).
func (a runIdentity) sameRun(b runIdentity) bool {
	return a.Format == b.Format && a.Version == b.Version && a.SpecSHA == b.SpecSHA && a.Seed == b.Seed &&
		a.PlanSHA == b.PlanSHA && a.Tasks == b.Tasks
}

// digest identifies the run (not the shard) in every task file, so that a
// task file copied from another run is recognised.
func (a runIdentity) digest() string {
	h := sha256.New()
	fmt.Fprintf(h, "%s\x00%s\x00%s\x00%d\x00%s\x00%d", a.Format, a.Version, a.SpecSHA, a.Seed, a.PlanSHA, a.Tasks)
	return hex.EncodeToString(h.Sum(nil))
}

// differences describes how a differs from b (the identity wanted), for
// error messages. A seed change is told apart from other spec changes.
func (a runIdentity) differences(b runIdentity) string {
	var d []string
	if a.Format != b.Format {
		return fmt.Sprintf("a run written in format %q (this fringe reads %q)", a.Format, b.Format)
	}
	if a.SpecSHA != b.SpecSHA {
		switch {
		case a.SpecName != b.SpecName:
			d = append(d, fmt.Sprintf("spec %q, not %q", a.SpecName, b.SpecName))
		case a.Seed == b.Seed || spec.CanonicalSHAWithoutSeed([]byte(a.SpecText)) != spec.CanonicalSHAWithoutSeed([]byte(b.SpecText)):
			d = append(d, fmt.Sprintf("a different spec %q (sha256 %.12s, not %.12s)", a.SpecName, a.SpecSHA, b.SpecSHA))
		}
	}
	if a.Seed != b.Seed {
		d = append(d, fmt.Sprintf("seed %d, not %d", a.Seed, b.Seed))
	}
	if a.Version != b.Version {
		d = append(d, fmt.Sprintf("fringe %s, not %s", a.Version, b.Version))
	}
	if len(d) == 0 && (a.PlanSHA != b.PlanSHA || a.Tasks != b.Tasks) {
		d = append(d, fmt.Sprintf("different data or tasks (%d tasks, plan sha256 %.12s; now %d tasks, %.12s): has a data file changed?", a.Tasks, a.PlanSHA, b.Tasks, b.PlanSHA))
	}
	if a.Shard != b.Shard {
		d = append(d, fmt.Sprintf("shard %s, not %s", a.Shard, b.Shard))
	}
	if len(d) == 0 {
		d = append(d, "a different shard layout")
	}
	return strings.Join(d, "; ")
}

// identity builds the identity of a plan's shard, but for its PlanSHA,
// which withPlan adds: the plan's fingerprint digests all its data and
// tasks, and a run that finishes before it saves anything never needs it.
func identity(p *plan.Plan, s plan.Shard, nShardTasks, workers int, started time.Time) runIdentity {
	dir := absDir(p.Spec.Dir) // "" for a built-in spec
	return runIdentity{
		Format: partialFormat, Version: Version,
		SpecName: p.Spec.Name, SpecSHA: spec.CanonicalSHA(p.Spec.Source), Seed: p.Spec.Seed,
		Tasks: len(p.Tasks), Shard: s.String(), ShardTasks: nShardTasks,
		SpecFile: p.Spec.File, SpecDir: dir, SpecText: string(p.Spec.Source),
		Started: started.UTC().Format(time.RFC3339Nano), Workers: workers,
	}
}

// withPlan sets the identity's PlanSHA to the fingerprint of p, once.
func (a *runIdentity) withPlan(p *plan.Plan) {
	if a.PlanSHA == "" {
		a.PlanSHA = p.Fingerprint()
	}
}

// PartialOptions configure OpenPartial.
type PartialOptions struct {
	// Fresh discards an existing partial run directory (one holding
	// run.json) instead of continuing it.
	Fresh bool
	// Workers and Start are recorded in run.json when it is created.
	Workers int
	Start   time.Time
}

// Partial is a partial run directory opened for one shard of a plan (the
// whole plan for plan.Shard{}): the tasks finished so far, and Save to add
// more. The directory is created on the first Save, so a run that fails
// before finishing anything leaves nothing behind. Its methods are safe for
// concurrent use.
type Partial struct {
	dir    string
	plan   *plan.Plan
	shard  plan.Shard
	id     runIdentity
	want   []int  // the shard's tasks, in task order
	member []bool // member[i]: task i belongs to the shard

	mu      sync.Mutex
	lock    *os.File // flock on run.json while this process uses the directory
	created bool
	have    []*TaskResult // by task index
	nHave   int
	loaded  int
	warns   []string
}

// OpenPartial opens the partial run directory dir for shard s of plan p,
// loading the tasks it already holds; dir need not exist. While open (until
// Close, Remove or the end of the process) the directory is locked, so
// that a second process on the same directory is refused instead of
// writing beside the first. It refuses
// (ErrPartial, an input error) a directory that holds another run or
// shard, that exists but is not a partial run directory, or whose task
// files contradict the plan. A task file that cannot be read or decoded
// (left damaged by a machine crash) is deleted with a warning (Warnings):
// its tasks are run again.
func OpenPartial(dir string, p *plan.Plan, s plan.Shard, opt PartialOptions) (*Partial, error) {
	want, err := p.ShardTasks(s)
	if err != nil {
		return nil, err
	}
	start := opt.Start
	if start.IsZero() {
		start = time.Now()
	}
	pr := &Partial{dir: dir, plan: p, shard: s.Norm(), want: want, member: make([]bool, len(p.Tasks)), have: make([]*TaskResult, len(p.Tasks))}
	for _, i := range want {
		pr.member[i] = true
	}
	pr.id = identity(p, s.Norm(), len(want), opt.Workers, start)
	bad := func(format string, args ...any) error { return partialErr(dir, format, args...) }
	st, err := os.Stat(dir)
	if errors.Is(err, fs.ErrNotExist) {
		return pr, nil
	}
	if err != nil {
		return nil, fmt.Errorf("partial run directory: %w", err)
	}
	if !st.IsDir() {
		return nil, bad("exists and is not a directory")
	}
	have, err := readIdentity(dir)
	if errors.Is(err, fs.ErrNotExist) {
		// An empty directory is as good as none; so is one that a run
		// killed while creating it left with only a temporary file.
		entries, _ := os.ReadDir(dir)
		for _, e := range entries {
			if !strings.HasPrefix(e.Name(), ".tmp-") || e.IsDir() {
				return nil, bad("exists and is not a partial run directory (no %s); choose another -out or remove it", identityFile)
			}
		}
		for _, e := range entries {
			os.Remove(filepath.Join(dir, e.Name()))
		}
		return pr, nil
	}
	if err != nil && !opt.Fresh {
		return nil, bad("%v; run again with -fresh to discard it", err)
	}
	pr.id.withPlan(p)
	if err == nil && !opt.Fresh && !have.same(pr.id) {
		return nil, bad("holds the tasks of %s; they are not mixed with this run: finish that run with its own spec and flags, or run again with -fresh to discard it",
			have.differences(pr.id))
	}
	lock, lerr := lockFile(filepath.Join(dir, identityFile))
	if lerr != nil {
		return nil, fmt.Errorf("%s: %w", dir, lerr)
	}
	if opt.Fresh {
		if lock != nil {
			lock.Close()
		}
		return pr, pr.discard()
	}
	pr.id = have // keep its start time and workers
	pr.lock = lock
	pr.created = true
	results, warns, err := loadTasks(dir, p, have, pr.member, false)
	if err != nil {
		pr.Close()
		return nil, err
	}
	pr.warns = warns
	for _, r := range results {
		if pr.have[r.Task.Index] != nil {
			pr.Close()
			return nil, bad("task %s is recorded twice", p.Key(r.Task))
		}
		pr.have[r.Task.Index] = r
		pr.nHave++
	}
	pr.loaded = pr.nHave
	return pr, nil
}

// discard removes a partial run directory (only one holding run.json).
func (pr *Partial) discard() error {
	if err := os.RemoveAll(pr.dir); err != nil {
		return fmt.Errorf("discard %s: %w", pr.dir, err)
	}
	return nil
}

// Dir is the partial run directory.
func (pr *Partial) Dir() string { return pr.dir }

// Exists reports whether the directory exists (it is created by the first
// Save, or existed when opened).
func (pr *Partial) Exists() bool {
	pr.mu.Lock()
	defer pr.mu.Unlock()
	return pr.created
}

// Total is the number of tasks of the shard.
func (pr *Partial) Total() int { return len(pr.want) }

// Finished is the number of the shard's tasks finished so far.
func (pr *Partial) Finished() int {
	pr.mu.Lock()
	defer pr.mu.Unlock()
	return pr.nHave
}

// Loaded is the number of tasks that were already finished when the
// directory was opened.
func (pr *Partial) Loaded() int { return pr.loaded }

// Warnings lists problems met while loading (damaged task files).
func (pr *Partial) Warnings() []string { return append([]string(nil), pr.warns...) }

// Started is when the run began (the creation of its partial directory, or
// of this Partial if the directory does not exist yet).
func (pr *Partial) Started() time.Time {
	t, err := time.Parse(time.RFC3339Nano, pr.id.Started)
	if err != nil {
		return time.Now()
	}
	return t
}

// Missing returns the shard's unfinished tasks, in task order.
func (pr *Partial) Missing() []int {
	pr.mu.Lock()
	defer pr.mu.Unlock()
	var out []int
	for _, i := range pr.want {
		if pr.have[i] == nil {
			out = append(out, i)
		}
	}
	return out
}

// Results returns the results of all the shard's tasks in task order; it
// fails if some are missing.
func (pr *Partial) Results() ([]TaskResult, error) {
	pr.mu.Lock()
	defer pr.mu.Unlock()
	out := make([]TaskResult, 0, len(pr.want))
	for _, i := range pr.want {
		if pr.have[i] == nil {
			return nil, fmt.Errorf("runner: %s: task %s is not finished", pr.dir, pr.plan.Key(pr.plan.Tasks[i]))
		}
		out = append(out, *pr.have[i])
	}
	return out, nil
}

// Save persists a batch of finished tasks of the shard: it creates the
// directory with run.json and PARTIAL if needed, then writes the batch to
// a temporary file in tasks/ and renames it into place. It is Options.Save
// for Execute. It panics if a task is not part of the shard or was saved
// before: Execute never does that.
func (pr *Partial) Save(batch []TaskResult) error {
	if len(batch) == 0 {
		return nil
	}
	pr.mu.Lock()
	defer pr.mu.Unlock()
	for _, r := range batch {
		i := r.Task.Index
		if i < 0 || i >= len(pr.member) || !pr.member[i] {
			panic(fmt.Sprintf("runner: Partial.Save: task %d is not part of shard %s", i, pr.shard))
		}
		if pr.have[i] != nil {
			panic(fmt.Sprintf("runner: Partial.Save: task %d saved twice", i))
		}
	}
	if !pr.created {
		pr.id.withPlan(pr.plan)
		if err := pr.create(); err != nil {
			return err
		}
		pr.created = true
	}
	data, err := encodeTasks(pr.plan, pr.id.digest(), batch)
	if err != nil {
		return err
	}
	lowest := batch[0].Task.Index
	for _, r := range batch {
		lowest = min(lowest, r.Task.Index)
	}
	name := filepath.Join(pr.dir, tasksDir, fmt.Sprintf("%07d.json", lowest))
	if err := outdir.WriteAtomic(name, data); err != nil {
		return err
	}
	for _, r := range batch {
		pr.have[r.Task.Index] = &r
		pr.nHave++
	}
	return nil
}

// Hold records a batch of finished tasks of the shard in memory only, as
// Save without writing them: Results returns them, a later run does not
// find them. It is Options.Keep for Execute, when the run directory is
// written right after. It panics as Save does.
func (pr *Partial) Hold(batch []TaskResult) {
	pr.mu.Lock()
	defer pr.mu.Unlock()
	for _, r := range batch {
		i := r.Task.Index
		if i < 0 || i >= len(pr.member) || !pr.member[i] {
			panic(fmt.Sprintf("runner: Partial.Hold: task %d is not part of shard %s", i, pr.shard))
		}
		if pr.have[i] != nil {
			panic(fmt.Sprintf("runner: Partial.Hold: task %d held or saved twice", i))
		}
	}
	for _, r := range batch {
		pr.have[r.Task.Index] = &r
		pr.nHave++
	}
}

// create makes the directory and writes run.json first (only if no other
// process has created it meanwhile; then it is locked), then tasks/ and
// PARTIAL. Killed at any point, it leaves a directory that OpenPartial
// takes up again: empty, holding only a temporary file, or with run.json.
func (pr *Partial) create() error {
	if err := os.MkdirAll(filepath.Dir(filepath.Clean(pr.dir)), 0o755); err != nil {
		return fmt.Errorf("create partial run directory: %w", err)
	}
	if err := os.Mkdir(pr.dir, 0o755); err != nil && !errors.Is(err, fs.ErrExist) {
		return fmt.Errorf("create partial run directory: %w", err)
	}
	id, err := json.MarshalIndent(pr.id, "", "  ")
	if err != nil {
		return err
	}
	path := filepath.Join(pr.dir, identityFile)
	if err := outdir.WriteExclusive(path, append(id, '\n')); err != nil {
		if errors.Is(err, fs.ErrExist) {
			return fmt.Errorf("%s: %w", pr.dir, errInUse)
		}
		return err
	}
	lock, err := lockFile(path)
	if err != nil {
		return fmt.Errorf("%s: %w", pr.dir, err)
	}
	pr.lock = lock
	if err := os.MkdirAll(filepath.Join(pr.dir, tasksDir), 0o755); err != nil {
		return fmt.Errorf("create partial run directory: %w", err)
	}
	return outdir.WriteAtomic(filepath.Join(pr.dir, markerFile), []byte(pr.note()))
}

// note is the text of PARTIAL.
func (pr *Partial) note() string {
	var b strings.Builder
	b.WriteString("This is a partial fringe run directory, not a complete run.\n\n")
	fmt.Fprintf(&b, "spec %q (seed %d), shard %s: %d of the run's %d tasks.\n", pr.id.SpecName, pr.id.Seed, pr.id.Shard, pr.id.ShardTasks, pr.id.Tasks)
	b.WriteString("Finished tasks are kept in tasks/; run.json records the run they belong to.\n")
	b.WriteString("The same `fringe run` command continues it where it stopped;\n")
	b.WriteString("`fringe merge -out DIR SHARD_DIR...` joins the complete shards of a run.\n")
	return b.String()
}

// Remove deletes the partial run directory (after the complete run has
// been written, or when the run cannot complete because its input is bad).
func (pr *Partial) Remove() error {
	pr.mu.Lock()
	defer pr.mu.Unlock()
	pr.unlock()
	if !pr.created {
		return nil
	}
	pr.created = false
	return os.RemoveAll(pr.dir)
}

// Close releases the directory for other processes (the lock also ends
// with the process). Its results stay readable; Save must not be called
// afterwards.
func (pr *Partial) Close() {
	pr.mu.Lock()
	defer pr.mu.Unlock()
	pr.unlock()
}

func (pr *Partial) unlock() {
	if pr.lock != nil {
		pr.lock.Close()
		pr.lock = nil
	}
}

// readIdentity reads run.json of a partial run directory.
func readIdentity(dir string) (runIdentity, error) {
	var id runIdentity
	data, err := os.ReadFile(filepath.Join(dir, identityFile))
	if err != nil {
		return id, err
	}
	dec := json.NewDecoder(bytes.NewReader(data))
	dec.DisallowUnknownFields()
	if err := dec.Decode(&id); err != nil {
		return id, fmt.Errorf("%s is damaged: %v", identityFile, err)
	}
	if id.Format != partialFormat {
		return id, fmt.Errorf("%s: unknown format %q (this fringe reads %q)", identityFile, id.Format, partialFormat)
	}
	return id, nil
}

var taskFileName = regexp.MustCompile(`^[0-9]{7,}\.json$`)

// loadTasks reads the task files of a partial run directory and checks
// each task against the plan and the shard (member). A file that does not
// decode is an error when strict (merge); otherwise (resume) it is
// deleted, its tasks are run again, and a warning says so. Leftover
// temporary files are removed unless strict.
func loadTasks(dir string, p *plan.Plan, id runIdentity, member []bool, strict bool) ([]*TaskResult, []string, error) {
	tdir := filepath.Join(dir, tasksDir)
	entries, err := os.ReadDir(tdir)
	if errors.Is(err, fs.ErrNotExist) {
		return nil, nil, nil
	}
	if err != nil {
		return nil, nil, fmt.Errorf("read %s: %w", tdir, err)
	}
	var out []*TaskResult
	var warns []string
	for _, e := range entries {
		name := e.Name()
		path := filepath.Join(tdir, name)
		if strings.HasPrefix(name, ".tmp-") {
			if !strict {
				os.Remove(path)
			}
			continue
		}
		if !taskFileName.MatchString(name) || e.IsDir() {
			continue
		}
		data, err := os.ReadFile(path)
		if err != nil {
			return nil, nil, fmt.Errorf("read %s: %w", path, err)
		}
		rs, err := decodeTasks(p, id.digest(), member, data)
		if err != nil {
			var de *damagedError
			if errors.As(err, &de) && !strict {
				if rerr := os.Remove(path); rerr != nil {
					return nil, nil, fmt.Errorf("remove damaged %s: %w", path, rerr)
				}
				warns = append(warns, fmt.Sprintf("%s is damaged (%v) and is removed; its tasks run again", path, de.err))
				continue
			}
			return nil, nil, partialErr(path, "%v", err)
		}
		out = append(out, rs...)
	}
	return out, warns, nil
}
