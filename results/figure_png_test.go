package results

import (
	"bytes"
	"fmt"
	"image"
	"image/color"
	"image/png"
	"testing"

	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgimg"
)

// figureImage draws f on a PNG canvas and returns the image.
func figureImage(f Figure) *image.RGBA {
	c := vgimg.NewWith(vgimg.UseWH(f.Width, f.Height), vgimg.UseDPI(PNGDPI))
	f.draw(draw.New(c))
	return c.Image().(*image.RGBA)
}

// TestWritePNG checks that writePNG is lossless: image/png decodes what it
// writes to the pixels it was given, for every test figure (opaque: the
// RGB path) and for an image with transparent and translucent pixels (the
// image/png path, which stores non-premultiplied alpha: compared as
// NRGBA). The same image gives the same bytes twice.
func TestWritePNG(t *testing.T) {
	imgs := map[string]*image.RGBA{}
	var names []string
	for _, f := range testFigures(t) {
		imgs[f.Name] = figureImage(f)
		names = append(names, f.Name)
	}
	alpha := image.NewRGBA(image.Rect(0, 0, 7, 5))
	for y := range 5 {
		for x := range 7 {
			alpha.Set(x, y, color.NRGBA{uint8(30 * x), uint8(40 * y), 200, uint8(40 * (x + y))})
		}
	}
	imgs["alpha"] = alpha
	names = append(names, "alpha")
	for _, name := range names {
		img := imgs[name]
		var a, b bytes.Buffer
		if err := writePNG(&a, img); err != nil {
			t.Fatal(err)
		}
		if err := writePNG(&b, img); err != nil {
			t.Fatal(err)
		}
		if !bytes.Equal(a.Bytes(), b.Bytes()) {
			t.Errorf("%s: two encodings differ", name)
		}
		got, err := png.Decode(bytes.NewReader(a.Bytes()))
		if err != nil {
			t.Fatalf("%s: %v", name, err)
		}
		if got.Bounds() != img.Bounds() {
			t.Fatalf("%s: bounds %v, want %v", name, got.Bounds(), img.Bounds())
		}
		bad := 0
		for y := img.Bounds().Min.Y; y < img.Bounds().Max.Y; y++ {
			for x := img.Bounds().Min.X; x < img.Bounds().Max.X; x++ {
				want := color.NRGBAModel.Convert(img.At(x, y))
				if have := color.NRGBAModel.Convert(got.At(x, y)); have != want {
					bad++
				}
			}
		}
		if bad > 0 {
			t.Errorf("%s: %d pixels differ after decoding", name, bad)
		}
	}
}

// BenchmarkPNG encodes the test figures' PNG images (drawn once, before
// the loop) with writePNG and, as references in the same run, with
// image/png at its default and at its fastest level. Metrics: ms per
// image and the mean file size in KiB.
func BenchmarkPNG(b *testing.B) {
	figs, err := buildTestFigures()
	if err != nil {
		b.Fatal(err)
	}
	var imgs []*image.RGBA
	for _, f := range figs {
		imgs = append(imgs, figureImage(f))
	}
	for _, c := range []struct {
		name string
		enc  func(*bytes.Buffer, *image.RGBA) error
	}{
		{"fringe", writePNG},
		{"image-png-default", func(w *bytes.Buffer, img *image.RGBA) error { return png.Encode(w, img) }},
		{"image-png-bestspeed", func(w *bytes.Buffer, img *image.RGBA) error {
			return (&png.Encoder{CompressionLevel: png.BestSpeed}).Encode(w, img)
		}},
	} {
		b.Run(fmt.Sprintf("impl=%s", c.name), func(b *testing.B) {
			b.ReportAllocs()
			var size int
			for b.Loop() {
				size = 0
				for _, img := range imgs {
					var buf bytes.Buffer
					if err := c.enc(&buf, img); err != nil {
						b.Fatal(err)
					}
					size += buf.Len()
				}
			}
			b.ReportMetric(b.Elapsed().Seconds()*1e3/float64(b.N*len(imgs)), "ms/image")
			b.ReportMetric(float64(size)/1024/float64(len(imgs)), "KiB/image")
		})
	}
}
