package plan

import (
	"errors"
	"fmt"
	"strconv"
	"strings"

	"fringe/bench/input"
)

// ErrShard marks a bad shard selection (syntax, range, or more shards than
// the plan has units of work). It is an input error.
var ErrShard = errors.New("bad shard")

// Shard selects the I-th (1-based) of N deterministic slices of a plan's
// tasks. The zero value and 1/1 both mean the whole plan.
//
// Slices are made of whole units (the tasks that share a dataset, a
// pipeline and a split, so a shard fits each pipeline once for all models
// of a split): unit j, in task order, goes to shard j mod N + 1. A
// dataset's splits are thus dealt out in turn, so every shard gets about
// 1/N of every dataset's work whatever the datasets cost, and the slices
// depend only on the plan and N, never on the machine or the worker count.
type Shard struct {
	I, N int
}

// Whole reports whether the shard is the whole plan (0/0 or 1/1).
func (s Shard) Whole() bool { return s.N <= 1 }

// Norm returns the shard with the zero value made explicit (1/1).
func (s Shard) Norm() Shard {
	if s.N == 0 {
		return Shard{1, 1}
	}
	return s
}

// String formats the shard as "i/n".
func (s Shard) String() string {
	s = s.Norm()
	return fmt.Sprintf("%d/%d", s.I, s.N)
}

// ParseShard parses "i/n" with 1 <= i <= n. Errors wrap ErrShard and
// input.ErrBad.
func ParseShard(text string) (Shard, error) {
	bad := func(format string, args ...any) (Shard, error) {
		return Shard{}, &input.Error{Err: fmt.Errorf("-shard %s: %w: %s", text, ErrShard, fmt.Sprintf(format, args...))}
	}
	a, b, ok := strings.Cut(strings.TrimSpace(text), "/")
	if !ok {
		return bad("want i/n (the i-th of n shards, 1 <= i <= n), got %q", text)
	}
	i, err1 := strconv.Atoi(a)
	n, err2 := strconv.Atoi(b)
	if err1 != nil || err2 != nil {
		return bad("want i/n with two whole numbers, got %q", text)
	}
	if n < 1 || n > MaxShards {
		return bad("n must lie between 1 and %d, got %d", MaxShards, n)
	}
	if i < 1 || i > n {
		return bad("i must lie between 1 and n = %d, got %d", n, i)
	}
	return Shard{I: i, N: n}, nil
}

// MaxShards bounds n in -shard i/n (Slurm's default maximum job array
// size is 1001; a larger grid can still be cut into this many slices).
const MaxShards = 100000

// Units returns the plan's units of work: the indices of the tasks that
// share a dataset, a pipeline and a split, grouped in order of first
// appearance in task order.
func (p *Plan) Units() [][]int {
	all := make([]int, len(p.Tasks))
	for i := range all {
		all[i] = i
	}
	return p.UnitsOf(all)
}

// UnitsOf groups the given task indices by (dataset, pipeline, split), in
// order of first appearance.
func (p *Plan) UnitsOf(tasks []int) [][]int {
	type key struct{ d, p, s, size int }
	pos := map[key]int{}
	var units [][]int
	for _, i := range tasks {
		t := p.Tasks[i]
		k := key{t.Dataset, t.Pipeline, t.Split, t.Size}
		j, ok := pos[k]
		if !ok {
			j = len(units)
			pos[k] = j
			units = append(units, nil)
		}
		units[j] = append(units[j], i)
	}
	return units
}

// ShardTasks returns the task indices of shard s, in task order. It fails
// (ErrShard, an input error) when s.N exceeds the number of units, since a
// shard would then be empty.
func (p *Plan) ShardTasks(s Shard) ([]int, error) {
	s = s.Norm()
	units := p.Units()
	if s.I < 1 || s.I > s.N {
		return nil, &input.Error{Err: fmt.Errorf("-shard %s: %w: out of range", s, ErrShard)}
	}
	if s.N > len(units) {
		return nil, &input.Error{File: p.Spec.File, Err: fmt.Errorf("-shard %s: %w: the plan has %d units of work (dataset x pipeline x split), so it can be cut into at most %d shards",
			s, ErrShard, len(units), len(units))}
	}
	in := make([]bool, len(p.Tasks))
	for j := s.I - 1; j < len(units); j += s.N {
		for _, i := range units[j] {
			in[i] = true
		}
	}
	var out []int
	for i, ok := range in {
		if ok {
			out = append(out, i)
		}
	}
	return out, nil
}
