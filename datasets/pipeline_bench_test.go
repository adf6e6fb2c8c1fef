package datasets

import (
	"testing"

	"gonum.org/v1/gonum/mat"
)

// BenchmarkPipelineFold fits the speed grid's pipeline std+l2 on the
// training part of a 10-fold split of breast-cancer (512 x 30) and applies
// it to the test part (57 rows), as the harness does once per split.
// Reference in the same run: impl=copy copies both parts once (one pass
// over the values, the least any step costs). Metric ns/value: time over
// the values of both parts; the ratio of the two is the pipeline's cost in
// memory passes. Measured on two shared cores: 43 to 51 ns/value before
// the steps checked each matrix once (pipeline.go: allFinite,
// checkedStep), 17 to 23 after, against 2.5 to 3.5 for the copy.
func BenchmarkPipelineFold(b *testing.B) {
	d, err := Load("breast-cancer")
	if err != nil {
		b.Fatal(err)
	}
	tr := mat.DenseCopyOf(d.X.Slice(0, 512, 0, d.Dim()))
	te := mat.DenseCopyOf(d.X.Slice(512, d.Len(), 0, d.Dim()))
	rowsTr, rowsTe := d.Rows[:512], d.Rows[512:]
	values := float64((d.Len()) * d.Dim())
	b.Run("impl=pipeline", func(b *testing.B) {
		b.ReportAllocs()
		for b.Loop() {
			p, err := ParsePipeline("std+l2")
			if err != nil {
				b.Fatal(err)
			}
			if _, err := p.FitTransformLabeled(tr, d.Y[:512], rowsTr); err != nil {
				b.Fatal(err)
			}
			if _, err := p.Transform(te, rowsTe); err != nil {
				b.Fatal(err)
			}
		}
		b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/values, "ns/value")
	})
	b.Run("impl=copy", func(b *testing.B) {
		b.ReportAllocs()
		for b.Loop() {
			_ = mat.DenseCopyOf(tr)
			_ = mat.DenseCopyOf(te)
		}
		b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/values, "ns/value")
	})
}
