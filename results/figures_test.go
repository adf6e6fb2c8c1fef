package results

import (
	"bytes"
	"encoding/xml"
	"image/png"
	"io"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strings"
	"sync"
	"testing"

	"gonum.org/v1/plot/vg"
)

// testFigures builds one figure of each kind from invented numbers.
func testFigures(t *testing.T) []Figure {
	t.Helper()
	figs, err := buildTestFigures()
	if err != nil {
		t.Fatal(err)
	}
	return figs
}

func buildTestFigures() ([]Figure, error) {
	nan := math.NaN()
	var figs []Figure
	cd, h, err := CDDiagram(RankTable{Models: []string{"interference", "knn-k5", "svm-rbf", "logreg"},
		AvgRanks: []float64{3.6, 2.1, 1.7, 2.6}, CD: 1.2, Alpha: 0.05}, "ranks")
	if err != nil {
		return nil, err
	}
	figs = append(figs, Figure{Name: "cd", Plot: cd, Width: CDWidth, Height: h})
	sw, err := SweepPlot(Sweep{Title: "shots", XLabel: "shots", YLabel: "accuracy", LogX: true, Lines: []SweepLine{
		{Label: "iris", X: []float64{10, 100, 1000}, Mean: []float64{0.6, 0.8, 0.88}, Lo: []float64{0.5, 0.75, 0.85}, Hi: []float64{0.7, 0.85, 0.91}, Exact: 0.9, Baseline: 0.95},
		{Label: "wine", X: []float64{10, 100}, Mean: []float64{0.5, 0.7}, Lo: []float64{nan, 0.6}, Hi: []float64{nan, 0.8}, Exact: nan, Baseline: 0.97},
		{Label: "one point", X: []float64{100}, Mean: []float64{0.75}, Lo: []float64{0.7}, Hi: []float64{0.8}, Exact: 0.8, Baseline: nan},
	}})
	if err != nil {
		return nil, err
	}
	figs = append(figs, Figure{Name: "sweep", Plot: sw, Width: 7 * vg.Inch, Height: 4 * vg.Inch, LegendRight: true})
	kp, err := KernelProfile([]KernelCurve{{"RBF γ = 1", 1}, {"RBF γ = 0.25", 0.25}})
	if err != nil {
		return nil, err
	}
	figs = append(figs, Figure{Name: "kernel", Plot: kp, Width: 6 * vg.Inch, Height: 4 * vg.Inch})
	bp, err := BoxPlot(Boxes{Title: "p_acc", YLabel: "p_acc", Groups: []string{"iris", "wine"}, Series: []BoxSeries{
		{Label: "std+l2", Values: [][]float64{{0.4, 0.5, 0.55, 0.6, 0.9}, {0.5, 0.52}}},
		{Label: "l2", Values: [][]float64{{0.95, 0.97, 0.99}, {}}},
	}})
	if err != nil {
		return nil, err
	}
	figs = append(figs, Figure{Name: "boxes", Plot: bp, Width: 7 * vg.Inch, Height: 4 * vg.Inch, LegendRight: true})
	// Crowded cases of the layout test: a CD diagram of 14 models with
	// wrapped names, and two figures of an assessment (the cost-gain map
	// with its placed labels, the p_acc boxes with turned category labels).
	rng := rand.New(rand.NewPCG(14, 2))
	ranks := make([]float64, 14)
	for i := range ranks {
		ranks[i] = 1 + 13*rng.Float64()
	}
	cd14, h14, err := CDDiagram(RankTable{Models: modelNames(14, true), AvgRanks: ranks, CD: 4.9, Alpha: 0.05}, "ranks of 14")
	if err != nil {
		return nil, err
	}
	figs = append(figs, Figure{Name: "cd14", Plot: cd14, Width: CDWidth, Height: h14})
	as, err := AssessFigures(assessCase(rng, 11, true), func(s string) string { return s })
	if err != nil {
		return nil, err
	}
	for _, f := range as[:2] { // cost-gain and p_acc
		f.Name = strings.TrimPrefix(f.Name, "figures/")
		figs = append(figs, f)
	}
	return figs, nil
}

// TestFiguresDeterministic renders every kind of figure twice, from two
// separately built plots, in every format and requires identical bytes;
// it also checks that each output is what its format says.
func TestFiguresDeterministic(t *testing.T) {
	a, b := testFigures(t), testFigures(t)
	keep := os.Getenv("FRINGE_KEEP_FIGURES") // a directory to look at the figures
	for i := range a {
		for _, format := range FigureFormats {
			x, err := a[i].Render(format)
			if err != nil {
				t.Fatal(err)
			}
			y, err := b[i].Render(format)
			if err != nil {
				t.Fatal(err)
			}
			if !bytes.Equal(x, y) {
				t.Errorf("%s.%s differs between two identical renderings", a[i].Name, format)
			}
			// Rendering the same figure again must not change it either
			// (LegendRight swaps the legend out and back).
			z, err := a[i].Render(format)
			if err != nil {
				t.Fatal(err)
			}
			if !bytes.Equal(x, z) {
				t.Errorf("%s.%s differs on a second rendering of the same figure", a[i].Name, format)
			}
			switch format {
			case "svg":
				dec := xml.NewDecoder(bytes.NewReader(x))
				for {
					_, err := dec.Token()
					if err == io.EOF {
						break
					}
					if err != nil {
						t.Errorf("%s.svg is not well-formed XML: %v", a[i].Name, err)
						break
					}
				}
			case "pdf":
				if !bytes.HasPrefix(x, []byte("%PDF-")) || !bytes.Contains(x, []byte("D:2000")) {
					t.Errorf("%s.pdf: not a PDF with the fixed creation date", a[i].Name)
				}
			case "png":
				cfg, err := png.DecodeConfig(bytes.NewReader(x))
				if err != nil {
					t.Errorf("%s.png: %v", a[i].Name, err)
					break
				}
				// Size in pixels = size in inches × PNGDPI (rounded by vgimg).
				wantW := int(math.Ceil(float64(a[i].Width/vg.Inch) * PNGDPI))
				if cfg.Width < wantW-1 || cfg.Width > wantW+1 {
					t.Errorf("%s.png is %d px wide, want %d", a[i].Name, cfg.Width, wantW)
				}
			}
			if keep != "" {
				if err := os.WriteFile(filepath.Join(keep, a[i].Name+"."+format), x, 0o644); err != nil {
					t.Fatal(err)
				}
			}
		}
	}
}

func TestFigureErrors(t *testing.T) {
	if _, _, err := CDDiagram(RankTable{Models: []string{"a"}, AvgRanks: []float64{1}}, ""); err == nil {
		t.Error("CD diagram of one model: no error")
	}
	if _, _, err := CDDiagram(RankTable{Models: []string{"a", "b"}, AvgRanks: []float64{1, 3}}, ""); err == nil {
		t.Error("CD diagram with rank 3 of 2 models: no error")
	}
	if _, err := SweepPlot(Sweep{LogX: true, Lines: []SweepLine{{Label: "x", X: []float64{0}, Mean: []float64{1}, Lo: []float64{1}, Hi: []float64{1}}}}); err == nil {
		t.Error("x = 0 on a log axis: no error")
	}
	if _, err := SweepPlot(Sweep{Lines: []SweepLine{{Label: "x", X: []float64{1, 2}, Mean: []float64{1}}}}); err == nil {
		t.Error("ragged sweep line: no error")
	}
	if _, err := KernelProfile([]KernelCurve{{"bad", -1}}); err == nil {
		t.Error("negative gamma: no error")
	}
	if _, err := BoxPlot(Boxes{Groups: []string{"a"}, Series: []BoxSeries{{Label: "s"}}}); err == nil {
		t.Error("box series without a value slice per group: no error")
	}
	if _, err := (Figure{Name: "x"}).Render("svg"); err == nil {
		t.Error("figure without plot: no error")
	}
	figs := testFigures(t)
	if _, err := figs[0].Render("gif"); err == nil || !strings.Contains(err.Error(), "gif") {
		t.Errorf("unknown format: error %v", err)
	}
}

func BenchmarkRender(b *testing.B) {
	figs, err := buildTestFigures()
	if err != nil {
		b.Fatal(err)
	}
	for _, format := range FigureFormats {
		b.Run("format="+format, func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				for _, f := range figs {
					if _, err := f.Render(format); err != nil {
						b.Fatal(err)
					}
				}
			}
			b.ReportMetric(float64(b.Elapsed().Seconds())/float64(b.N*len(figs))*1e3, "ms/figure")
		})
	}
}

// TestRenderConcurrent renders each figure from several goroutines at
// once (the bench layer renders figures concurrently); under -race it
// checks that the layout does not write to the shared plot, and the
// bytes must be those of a lone rendering.
func TestRenderConcurrent(t *testing.T) {
	figs := testFigures(t)
	for _, f := range figs {
		want, err := f.Render("svg")
		if err != nil {
			t.Fatal(err)
		}
		got := make([][]byte, 4)
		var wg sync.WaitGroup
		for i := range got {
			wg.Add(1)
			go func() {
				defer wg.Done()
				got[i], _ = f.Render("svg")
			}()
		}
		wg.Wait()
		for i := range got {
			if !bytes.Equal(got[i], want) {
				t.Errorf("%s: concurrent rendering %d differs", f.Name, i)
			}
		}
	}
}

// TestRenderFormatsConcurrent renders every format of each figure at once,
// several times over, and compares the bytes with lone renderings: the
// formats of one figure may be drawn concurrently (Render does not modify
// the figure's plot).
func TestRenderFormatsConcurrent(t *testing.T) {
	figs := testFigures(t)
	want := map[string][]byte{}
	for _, f := range figs {
		for _, format := range FigureFormats {
			b, err := f.Render(format)
			if err != nil {
				t.Fatal(err)
			}
			want[f.Name+"."+format] = b
		}
	}
	for range 3 {
		var mu sync.Mutex
		got := map[string][]byte{}
		var wg sync.WaitGroup
		for _, f := range figs {
			for _, format := range FigureFormats {
				wg.Add(1)
				go func() {
					defer wg.Done()
					b, err := f.Render(format)
					if err != nil {
						t.Error(err)
					}
					mu.Lock()
					got[f.Name+"."+format] = b
					mu.Unlock()
				}()
			}
		}
		wg.Wait()
		for name, b := range want {
			if !bytes.Equal(got[name], b) {
				t.Errorf("%s: concurrent rendering differs from a lone one", name)
			}
		}
	}
}
