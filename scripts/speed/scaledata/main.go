// Command scaledata writes the invented dataset of the scaling measurement
// (scripts/speed/scale.sh) as a CSV file: near-infrared reflectance of
// plastic flakes on a recycling line's sorting belt, 16 bands from 1000 to
// 2500 nm, labelled by polymer.
//
// Scenario (invented; no real spectra): each polymer has a smooth
// reflectance curve, a plateau between 0.45 and 0.8 with two to four
// absorption dips at its own band positions, widths and depths, drawn once
// from a generator seeded with the polymer's index (so polymer k looks the
// same whatever -classes is). A flake's reading is its polymer's curve
// times a brightness factor (log-normal, sigma 0.25: flake thickness,
// distance to the lamp), plus independent noise in each band (normal,
// sigma 0.04, a dirty or labelled surface), plus a small offset common to
// all bands (normal, sigma 0.02, stray light). Classes overlap: a flake
// is not always sorted right from its spectrum alone.
//
// The ten polymers take shares 5:4:4:3:3:2:2:2:1:1 of the rows, the
// rounding remainder going to the first; rows come in a shuffled order.
// With -classes K below 10 the label names the first K-1 polymers and
// calls the others "other" (-classes 2: PET or not, the belt's first
// sorting decision); the spectra do not change with K. Values are written
// with 5 decimals. The file depends only on -rows, -classes and -seed.
//
//	go run ./scripts/speed/scaledata -rows 50000 -classes 10 -out flakes.csv
package main

import (
	"bufio"
	"flag"
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"strconv"
)

// polymers names the classes, most common first.
var polymers = []string{"PET", "HDPE", "PP", "LDPE", "PS", "PVC", "PA", "PC", "PMMA", "ABS"}

// shares are the relative class sizes, in the order of polymers.
var shares = []int{5, 4, 4, 3, 3, 2, 2, 2, 1, 1}

const bands = 16

func main() {
	rows := flag.Int("rows", 50000, "rows to write")
	classes := flag.Int("classes", 10, "polymers (2 to 10)")
	seed := flag.Uint64("seed", 1, "seed of the flakes (the polymer curves do not depend on it)")
	out := flag.String("out", "", "output CSV file (default: standard output)")
	flag.Parse()
	if *classes < 2 || *classes > len(polymers) {
		fail(fmt.Errorf("-classes must be 2 to %d, got %d", len(polymers), *classes))
	}
	sizes, err := classSizes(*rows, shares)
	if err != nil {
		fail(err)
	}
	w := os.Stdout
	if *out != "" {
		f, err := os.Create(*out)
		if err != nil {
			fail(err)
		}
		defer func() {
			if err := f.Close(); err != nil {
				fail(err)
			}
		}()
		w = f
	}
	bw := bufio.NewWriter(w)
	names := append([]string(nil), polymers...)
	for k := *classes - 1; k < len(names) && *classes < len(polymers); k++ {
		names[k] = "other"
	}
	if err := write(bw, sizes, names, rand.New(rand.NewPCG(*seed, 0xf1a4e5))); err != nil {
		fail(err)
	}
	if err := bw.Flush(); err != nil {
		fail(err)
	}
}

func fail(err error) {
	fmt.Fprintln(os.Stderr, "scaledata:", err)
	os.Exit(2)
}

// classSizes splits n rows by the shares, the remainder to class 0; every
// class needs at least 10 rows (two per fold of a 5-fold split).
func classSizes(n int, shares []int) ([]int, error) {
	total := 0
	for _, s := range shares {
		total += s
	}
	sizes := make([]int, len(shares))
	used := 0
	for k, s := range shares {
		sizes[k] = n * s / total
		used += sizes[k]
	}
	sizes[0] += n - used
	for k, s := range sizes {
		if s < 10 {
			return nil, fmt.Errorf("-rows %d gives %s only %d rows, need 10", n, polymers[k], s)
		}
	}
	return sizes, nil
}

// curve is polymer k's reflectance in each band.
func curve(k int) [bands]float64 {
	rng := rand.New(rand.NewPCG(uint64(k), 0x9017))
	var c [bands]float64
	level := 0.45 + 0.35*rng.Float64()
	slope := 0.1 * (rng.Float64() - 0.5)
	dips := 2 + rng.IntN(3)
	type dip struct{ at, width, depth float64 }
	ds := make([]dip, dips)
	for i := range ds {
		ds[i] = dip{at: 15 * rng.Float64(), width: 0.6 + 1.4*rng.Float64(), depth: 0.05 + 0.15*rng.Float64()}
	}
	for b := range c {
		x := float64(b)
		v := level + slope*(x/15-0.5)
		for _, d := range ds {
			z := (x - d.at) / d.width
			v -= d.depth * math.Exp(-z*z/2)
		}
		c[b] = math.Max(v, 0.02)
	}
	return c
}

// write writes the header and the rows: the labels are dealt in class
// order and shuffled, then each row drawn.
func write(w *bufio.Writer, sizes []int, names []string, rng *rand.Rand) error {
	curves := make([][bands]float64, len(sizes))
	for k := range curves {
		curves[k] = curve(k)
	}
	for b := range bands {
		fmt.Fprintf(w, "r%dnm,", 1000+100*b)
	}
	w.WriteString("polymer\n")
	var labels []int
	for k, s := range sizes {
		for range s {
			labels = append(labels, k)
		}
	}
	rng.Shuffle(len(labels), func(i, j int) { labels[i], labels[j] = labels[j], labels[i] })
	buf := make([]byte, 0, 256)
	for _, k := range labels {
		bright := math.Exp(0.25 * rng.NormFloat64())
		offset := 0.02 * rng.NormFloat64()
		buf = buf[:0]
		for b := range bands {
			v := curves[k][b]*bright + offset + 0.06*rng.NormFloat64()
			buf = strconv.AppendFloat(buf, v, 'f', 5, 64)
			buf = append(buf, ',')
		}
		buf = append(buf, names[k]...)
		buf = append(buf, '\n')
		if _, err := w.Write(buf); err != nil {
			return err
		}
	}
	return nil
}
