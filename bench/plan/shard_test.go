package plan_test

import (
	"errors"
	"os"
	"reflect"
	"strings"
	"testing"

	"fringe/bench/input"
	"fringe/bench/internal/benchtest"
	"fringe/bench/plan"
)

func TestParseShard(t *testing.T) {
	for _, c := range []struct {
		in   string
		want plan.Shard
		ok   bool
	}{
		{"1/1", plan.Shard{I: 1, N: 1}, true},
		{"3/7", plan.Shard{I: 3, N: 7}, true},
		{" 7/7 ", plan.Shard{I: 7, N: 7}, true},
		{"0/3", plan.Shard{}, false},
		{"4/3", plan.Shard{}, false},
		{"1/0", plan.Shard{}, false},
		{"-1/3", plan.Shard{}, false},
		{"3", plan.Shard{}, false},
		{"a/b", plan.Shard{}, false},
		{"1/2/3", plan.Shard{}, false},
		{"", plan.Shard{}, false},
		{"1/100001", plan.Shard{}, false},
	} {
		got, err := plan.ParseShard(c.in)
		if c.ok != (err == nil) {
			t.Errorf("plan.ParseShard(%q): err %v, want ok=%v", c.in, err, c.ok)
			continue
		}
		if err != nil {
			if !errors.Is(err, input.ErrBad) || !errors.Is(err, plan.ErrShard) {
				t.Errorf("plan.ParseShard(%q): %v is not an input and shard error", c.in, err)
			}
			continue
		}
		if got != c.want {
			t.Errorf("plan.ParseShard(%q) = %v, want %v", c.in, got, c.want)
		}
		if back, _ := plan.ParseShard(got.String()); back != got {
			t.Errorf("String round trip of %v gives %v", got, back)
		}
	}
}

// TestShardTasks checks that the shards of a plan partition its tasks into
// whole units, dealt out round-robin, balanced to within one unit, and
// that every dataset is spread over the shards.
func TestShardTasks(t *testing.T) {
	p := benchtest.Plan(t, "cluster.toml", readClusterSpec(t))
	units := p.Units()
	if len(units) != 32 {
		t.Fatalf("%d units, want 32 (2 datasets x 2 pipelines x 8 splits)", len(units))
	}
	unitOf := map[int]int{}
	for j, u := range units {
		if len(u) != 3 {
			t.Fatalf("unit %d has %d tasks, want 3 (one per model)", j, len(u))
		}
		for _, i := range u {
			unitOf[i] = j
		}
	}
	for _, n := range []int{1, 2, 3, 7, 32} {
		seen := make([]int, len(p.Tasks))
		var sizes []int
		for i := 1; i <= n; i++ {
			tasks, err := p.ShardTasks(plan.Shard{I: i, N: n})
			if err != nil {
				t.Fatalf("shard %d/%d: %v", i, n, err)
			}
			sizes = append(sizes, len(tasks))
			perDataset := map[int]int{}
			for k, ti := range tasks {
				if k > 0 && tasks[k-1] >= ti {
					t.Fatalf("shard %d/%d: tasks not in task order", i, n)
				}
				seen[ti]++
				if got := unitOf[ti] % n; got != i-1 {
					t.Fatalf("shard %d/%d holds task %d of unit %d (round-robin gives shard %d)", i, n, ti, unitOf[ti], got+1)
				}
				perDataset[p.Tasks[ti].Dataset]++
			}
			// Each dataset has 16 units; round-robin gives every shard
			// floor or ceil of 16/n of them (n <= 16) or at most one.
			for d, c := range perDataset {
				if u := c / 3; u > (16+n-1)/n {
					t.Errorf("shard %d/%d: %d units of dataset %d, more than ceil(16/%d)", i, n, u, d, n)
				}
			}
		}
		for ti, c := range seen {
			if c != 1 {
				t.Fatalf("n=%d: task %d in %d shards, want exactly 1", n, ti, c)
			}
		}
		lo, hi := sizes[0], sizes[0]
		for _, s := range sizes {
			lo, hi = min(lo, s), max(hi, s)
		}
		if hi-lo > 3 {
			t.Errorf("n=%d: shard sizes %v differ by more than one unit (3 tasks)", n, sizes)
		}
	}
	// The same plan built again gives the same shards.
	q := benchtest.Plan(t, "cluster.toml", readClusterSpec(t))
	a, _ := p.ShardTasks(plan.Shard{I: 2, N: 7})
	b, _ := q.ShardTasks(plan.Shard{I: 2, N: 7})
	if !reflect.DeepEqual(a, b) {
		t.Error("shard 2/7 differs between two builds of the same plan")
	}
	// More shards than units: refused, with the number of units.
	_, err := p.ShardTasks(plan.Shard{I: 1, N: 33})
	if err == nil || !errors.Is(err, input.ErrBad) || !strings.Contains(err.Error(), "at most 32 shards") {
		t.Errorf("33 shards of 32 units: %v", err)
	}
	whole, err := p.ShardTasks(plan.Shard{})
	if err != nil || len(whole) != len(p.Tasks) {
		t.Errorf("the zero plan.Shard gives %d tasks (%v), want all %d", len(whole), err, len(p.Tasks))
	}
}

// FuzzParseShard feeds arbitrary text to the -shard parser.
func FuzzParseShard(f *testing.F) {
	for _, s := range []string{"1/1", "3/7", "0/1", "2/1", "1/0", "a/b", "1/2/3", "-1/-1", " 2/3", "99999999999999999999/1"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		defer benchtest.Watchdog("plan.ParseShard")()
		sh, err := plan.ParseShard(s)
		if err != nil {
			if !errors.Is(err, input.ErrBad) || !errors.Is(err, plan.ErrShard) {
				t.Fatalf("%q: %v is not an input and shard error", s, err)
			}
			return
		}
		if sh.I < 1 || sh.I > sh.N || sh.N > plan.MaxShards {
			t.Fatalf("%q accepted as %d/%d", s, sh.I, sh.N)
		}
		if back, err := plan.ParseShard(sh.String()); err != nil || back != sh {
			t.Fatalf("%q: %v does not round-trip (%v)", s, sh, err)
		}
	})
}

func readClusterSpec(t testing.TB) string {
	t.Helper()
	b, err := os.ReadFile("testdata/cluster.toml")
	if err != nil {
		t.Fatal(err)
	}
	return string(b)
}
