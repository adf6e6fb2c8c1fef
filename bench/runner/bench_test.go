package runner

import (
	"context"
	"fmt"
	"path/filepath"
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

// BenchmarkWriteGrid writes the run directory of the speed-comparison grid
// (scripts/speed/grid.toml, executed once before the loop) with and
// without figures, with one and two workers. Reference in the same run:
// sub-benchmark stage=execute runs the grid's tasks themselves (two
// workers), so that the cost of writing reads as a share of the run.
// Metric: ms per run directory (or per execution).
func BenchmarkWriteGrid(b *testing.B) {
	s, err := spec.Load("../../scripts/speed/grid.toml")
	if err != nil {
		b.Fatal(err)
	}
	p, err := plan.New(s)
	if err != nil {
		b.Fatal(err)
	}
	res, err := Execute(context.Background(), p, Options{Workers: 2})
	if err != nil {
		b.Fatal(err)
	}
	dir := b.TempDir()
	for _, figures := range []bool{true, false} {
		for _, workers := range []int{1, 2} {
			b.Run(fmt.Sprintf("stage=write/figures=%v/workers=%d", figures, workers), func(b *testing.B) {
				b.ReportAllocs()
				for b.Loop() {
					info := RunInfo{Workers: workers, NoFigures: !figures}
					if err := Write(p, filepath.Join(dir, "run"), res, info, nil); err != nil {
						b.Fatal(err)
					}
				}
				b.ReportMetric(b.Elapsed().Seconds()*1e3/float64(b.N), "ms/run")
			})
		}
	}
	b.Run("stage=execute/workers=2", func(b *testing.B) {
		b.ReportAllocs()
		for b.Loop() {
			if _, err := Execute(context.Background(), p, Options{Workers: 2}); err != nil {
				b.Fatal(err)
			}
		}
		b.ReportMetric(b.Elapsed().Seconds()*1e3/float64(b.N), "ms/run")
	})
}
