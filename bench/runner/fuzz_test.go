package runner

import (
	"context"
	"testing"
	"time"

	"fringe/bench/internal/benchtest"
	"fringe/bench/plan"
)

var fixedTime = time.Date(2026, 1, 1, 0, 0, 0, 0, time.UTC)

func executeForFuzz(p *plan.Plan) ([]TaskResult, error) {
	return Execute(context.Background(), p, Options{Workers: 1})
}

// FuzzTaskFile feeds arbitrary bytes to the task-file decoder of partial
// run directories, checked against a fixed plan. It must never panic;
// anything it accepts must be safe for the run writer, so the decoded
// results are turned into records and summaries.
func FuzzTaskFile(f *testing.F) {
	p := benchtest.Plan(f, "cluster.toml", clusterSpec)
	id := identity(p, plan.Shard{}, len(p.Tasks), 1, fixedTime)
	res, err := executeForFuzz(p)
	if err != nil {
		f.Fatal(err)
	}
	for _, batch := range [][]TaskResult{res[:1], res[1:3], res[3:6], res[40:50]} {
		data, err := encodeTasks(p, id.digest(), batch)
		if err != nil {
			f.Fatal(err)
		}
		f.Add(data)
	}
	f.Add([]byte(`{"run":"` + id.digest() + `","tasks":[]}`))
	f.Add([]byte(`{"run":"` + id.digest() + `","tasks":[{"index":1,"key":"x","pred":[1e9]}]}`))
	f.Add([]byte(`{"run":"` + id.digest() + `","tasks":[{"index":-1}]}`))
	member := make([]bool, len(p.Tasks))
	for i := range member {
		member[i] = i%2 == 0
	}
	f.Fuzz(func(t *testing.T, data []byte) {
		defer benchtest.Watchdog("decodeTasks")()
		for _, m := range [][]bool{nil, member} {
			rs, err := decodeTasks(p, id.digest(), m, data)
			if err != nil {
				continue
			}
			// What the run writer would see: the whole run with the
			// decoded tasks in their places.
			out := append([]TaskResult(nil), res...)
			for _, r := range rs {
				out[r.Task.Index] = *r
			}
			Records(p, out)
			Summarise(p, out)
		}
	})
}
