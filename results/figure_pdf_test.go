package results

import (
	"bytes"
	"fmt"
	"testing"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgpdf"
)

// BenchmarkPDFText draws a PDF page with a title at a size not seen before
// in the process (fitted titles and legends shrink in quarter points, so
// a run meets many sizes): impl=fringe through pdfText, which sets every
// size at pdfTextSize and scales it, and, as the reference in the same
// run, impl=vgpdf on gonum/plot's PDF canvas directly, where fpdf builds
// the embedded font program (the whole TrueType file parsed and
// compressed) once per new size. Metric: ms per page.
func BenchmarkPDFText(b *testing.B) {
	for _, c := range []struct {
		name string
		wrap func(*vgpdf.Canvas) vg.CanvasSizer
	}{
		{"fringe", func(c *vgpdf.Canvas) vg.CanvasSizer { return pdfText{c} }},
		{"vgpdf", func(c *vgpdf.Canvas) vg.CanvasSizer { return c }},
	} {
		b.Run("impl="+c.name, func(b *testing.B) {
			warmPDFFonts()
			size := 9.0 + map[string]float64{"fringe": 0, "vgpdf": 0.5}[c.name]
			for b.Loop() {
				size += 1.0 / 1024 // a size of its own each time
				p := plot.New()
				p.Title.Text = fmt.Sprintf("size %.4f", size)
				p.Title.TextStyle.Font.Size = vg.Points(size)
				pc := vgpdf.New(vg.Points(200), vg.Points(100))
				p.Draw(draw.New(c.wrap(pc)))
				var buf bytes.Buffer
				if _, err := pc.WriteTo(&buf); err != nil {
					b.Fatal(err)
				}
			}
			b.ReportMetric(b.Elapsed().Seconds()*1e3/float64(b.N), "ms/page")
		})
	}
}
