package runner

import (
	"errors"
	"fmt"
	"io/fs"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"time"

	"fringe/bench/plan"
	"fringe/bench/spec"
)

// Merged is a run rebuilt from the partial run directories of all its
// shards: the plan (from the spec recorded in the shards) and the results
// of every task in task order, ready for runner.Write.
type Merged struct {
	Plan    *plan.Plan
	Results []TaskResult
	Shards  int
	Start   time.Time // when the earliest shard began
	Workers int       // workers of the first shard
}

// Merge joins the partial run directories of the shards of one run. Every
// shard i/n for i = 1..n must be given exactly once and be complete; all
// must come from the same spec (in canonical form), seed, fringe version
// and data. It refuses, naming the directories at fault, anything else:
// directories that are not partial runs, shards of another run, of another
// shard count, duplicates, missing shards (listed) and incomplete shards.
// The plan is rebuilt from the recorded spec text, its CSV files read from
// the recorded spec directory, and checked against the recorded plan
// fingerprint. All such errors are input errors (ErrPartial).
func Merge(dirs []string) (*Merged, error) {
	bad := partialErr
	if len(dirs) == 0 {
		return nil, partialErr("", "merge: no partial run directories given")
	}
	ids, shards, err := readShards(dirs)
	if err != nil {
		return nil, err
	}
	first, n := ids[0], shards[0].N
	pl, err := rebuildPlan(first, dirs[0])
	if err != nil {
		return nil, err
	}
	m := &Merged{Plan: pl, Shards: n, Workers: first.Workers}
	all := make([]*TaskResult, len(pl.Tasks))
	for k, dir := range dirs {
		want, err := pl.ShardTasks(shards[k])
		if err != nil {
			return nil, bad(dir, "%v", err)
		}
		if len(want) != ids[k].ShardTasks {
			return nil, bad(dir, "records %d tasks for shard %s, the plan gives it %d", ids[k].ShardTasks, shards[k], len(want))
		}
		member := make([]bool, len(pl.Tasks))
		for _, i := range want {
			member[i] = true
		}
		rs, _, err := loadTasks(dir, pl, ids[k], member, true)
		if err != nil {
			return nil, err
		}
		for _, r := range rs {
			if all[r.Task.Index] != nil {
				return nil, bad(dir, "task %s is recorded twice", pl.Key(r.Task))
			}
			all[r.Task.Index] = r
		}
		if len(rs) != len(want) {
			return nil, bad(dir, "shard %s is incomplete: %d of its %d tasks are finished; run its command again (fringe run ... -shard %s -out %s) to finish it",
				shards[k], len(rs), len(want), shards[k], dir)
		}
		if t, err := time.Parse(time.RFC3339Nano, ids[k].Started); err == nil && (m.Start.IsZero() || t.Before(m.Start)) {
			m.Start = t
		}
	}
	m.Results = make([]TaskResult, len(all))
	for i, r := range all {
		if r == nil {
			// Every shard is complete and the shards cover the plan.
			panic(fmt.Sprintf("runner: Merge: task %d missing after a complete merge", i))
		}
		m.Results[i] = *r
	}
	return m, nil
}

// readShards reads the identities of the partial run directories and
// checks that they are the shards 1/n..n/n of one run, each given once.
func readShards(dirs []string) ([]runIdentity, []plan.Shard, error) {
	bad := partialErr
	ids := make([]runIdentity, len(dirs))
	shards := make([]plan.Shard, len(dirs))
	for k, dir := range dirs {
		for _, prev := range dirs[:k] {
			if sameDir(prev, dir) {
				return nil, nil, bad(dir, "given twice")
			}
		}
		id, err := readIdentity(dir)
		if errors.Is(err, fs.ErrNotExist) {
			if _, serr := os.Stat(dir); serr != nil {
				return nil, nil, bad(dir, "no such directory")
			}
			if _, serr := os.Stat(filepath.Join(dir, "summary.csv")); serr == nil {
				return nil, nil, bad(dir, "a complete run directory, not a shard: only partial run directories (from fringe run -shard i/n) merge")
			}
			return nil, nil, bad(dir, "not a partial run directory (no %s)", identityFile)
		}
		if err != nil {
			return nil, nil, bad(dir, "%v", err)
		}
		s, err := plan.ParseShard(id.Shard)
		if err != nil {
			return nil, nil, bad(dir, "%s records a bad shard %q", identityFile, id.Shard)
		}
		ids[k], shards[k] = id, s
	}
	first := ids[0]
	for k := 1; k < len(dirs); k++ {
		if !ids[k].sameRun(first) {
			d := ids[k]
			d.Shard = first.Shard // compare the runs, not the shards
			return nil, nil, bad(dirs[k], "comes from a different run than %s: %s", dirs[0], d.differences(first))
		}
		if shards[k].N != shards[0].N {
			return nil, nil, bad(dirs[k], "shard %s, but %s is shard %s: shards of different shard counts do not merge", shards[k], dirs[0], shards[0])
		}
	}
	n := shards[0].N
	byIndex := make([][]string, n+1)
	for k, s := range shards {
		byIndex[s.I] = append(byIndex[s.I], dirs[k])
	}
	var dups, missing, have []string
	for i := 1; i <= n; i++ {
		switch len(byIndex[i]) {
		case 0:
			missing = append(missing, strconv.Itoa(i))
		case 1:
			have = append(have, strconv.Itoa(i))
		default:
			dups = append(dups, fmt.Sprintf("shard %d/%d in %s", i, n, strings.Join(byIndex[i], " and ")))
		}
	}
	if len(dups) > 0 {
		return nil, nil, partialErr("", "merge: duplicate shards: %s", strings.Join(dups, "; "))
	}
	if len(missing) > 0 {
		return nil, nil, partialErr("", "merge: missing shard(s) %s of %d (given: %s)", strings.Join(missing, ", "), n, strings.Join(have, ", "))
	}

	return ids, shards, nil
}

// rebuildPlan rebuilds the plan of a run from the spec its first shard
// (in dir) records, and checks it against the recorded fingerprint.
func rebuildPlan(first runIdentity, dir string) (*plan.Plan, error) {
	bad := partialErr
	sp, err := spec.Parse(first.SpecFile, []byte(first.SpecText))
	if err != nil {
		return nil, bad(dir, "the recorded spec does not parse: %v", err)
	}
	sp.Dir = first.SpecDir
	if spec.CanonicalSHA(sp.Source) != first.SpecSHA {
		return nil, bad(dir, "%s is inconsistent: its spec text does not match its spec_sha256", identityFile)
	}
	pl, err := plan.New(sp)
	if err != nil {
		return nil, fmt.Errorf("merge: rebuild the plan of spec %q recorded in %s: %w", sp.Name, dir, err)
	}
	if fp := pl.Fingerprint(); fp != first.PlanSHA {
		return nil, bad(dir, "the data the shards were computed on has changed since (plan sha256 %.12s, now %.12s): run the shards again", first.PlanSHA, fp)
	}
	if len(pl.Tasks) != first.Tasks {
		return nil, bad(dir, "records %d tasks, the plan has %d", first.Tasks, len(pl.Tasks))
	}

	return pl, nil
}

// sameDir reports whether two paths name the same directory.
func sameDir(a, b string) bool {
	if filepath.Clean(a) == filepath.Clean(b) {
		return true
	}
	sa, err1 := os.Stat(a)
	sb, err2 := os.Stat(b)
	return err1 == nil && err2 == nil && os.SameFile(sa, sb)
}
