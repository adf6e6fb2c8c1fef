package runner

import (
	"context"
	"testing"

	"fringe/bench/plan"
	"fringe/bench/spec"
)

// BenchmarkDemoGrid plans and executes the built-in demo (all tasks, no
// output files) and reports tasks per second.
func BenchmarkDemoGrid(b *testing.B) {
	for _, workers := range []int{1, 2} {
		b.Run("workers="+string(rune('0'+workers)), func(b *testing.B) {
			demo, err := spec.Demo()
			if err != nil {
				b.Fatal(err)
			}
			b.ReportAllocs()
			var tasks int
			for b.Loop() {
				p, err := plan.New(demo)
				if err != nil {
					b.Fatal(err)
				}
				if _, err := Execute(context.Background(), p, Options{Workers: workers}); err != nil {
					b.Fatal(err)
				}
				tasks += len(p.Tasks)
			}
			b.ReportMetric(float64(tasks)/b.Elapsed().Seconds(), "tasks/s")
		})
	}
}
