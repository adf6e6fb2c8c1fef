package datasets

import (
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"strings"

	"gonum.org/v1/gonum/mat"
)

// Synthetic data for the demo and for tests. Both sets are invented (their
// Provenance says so); they exist to show, on data whose structure is known
// by construction, when normalising vectors to unit length helps the
// interference classifier and when it throws the class information away.
//
// synth-cullet: a glass-recycling line sorts broken glass (cullet) into
// flint (clear), green and amber by a five-channel photometer that reads the
// light passing through each piece at 450, 500, 550, 600 and 650 nm. Lamp
// drift and the size of the piece scale all five readings of a piece by one
// common factor (log-normal, sigma 0.8 in log units, about a factor 2.2 up
// or down), while the colour of the glass sets the shape of the spectrum.
// The class information is in the direction of the vector; its norm is a
// nuisance. Readings are whole counts.
//
// synth-bearings: condition monitoring of rolling bearings by the RMS
// vibration velocity (mm/s) in four frequency bands. Worn bearings vibrate
// about twice as strongly in every band (log-normal amplitude, sigma 0.3 in
// log units, medians 0.7 and 1.4 mm/s) and only slightly more at high
// frequencies, so a large share of the class information is in the norm of
// the vector, which unit-norm scaling discards; a step that keeps the norm
// ("lift") recovers it. One bearing in three is worn, so the classes are
// unbalanced (2:1). Readings are rounded to 0.001 mm/s.

// synthSets lists the built-in generators in the order of Names.
var synthSets = []*synthEntry{
	{
		name:  "synth-cullet",
		title: "Glass cullet colour sorting (invented)",
		note: "invented data: five-channel photometer readings of broken glass (flint, green, amber); " +
			"a common brightness factor per piece, so the class is in the vector's direction",
		n:    210,
		seed: [2]uint64{0x6672696e6765, 1},
		gen:  genCullet,
	},
	{
		name:  "synth-bearings",
		title: "Bearing wear from band vibration levels (invented)",
		note: "invented data: RMS vibration velocity in four bands of sound and worn bearings (2:1); " +
			"worn bearings vibrate about twice as strongly, so much of the class information is in the vector's norm",
		n:    270,
		seed: [2]uint64{0x6672696e6765, 2},
		gen:  genBearings,
	},
}

// Limits on the size Synthetic accepts.
const (
	synthMinPerClass = 2
	synthMaxRows     = 1 << 20
)

// errSynthSize marks a size Synthetic cannot honour.
var errSynthSize = errors.New("invalid size")

// Synthetic generates the synthetic dataset name ("synth-...", see Names)
// with n rows drawn from rng, for other seeds or sizes than Load's. Classes
// are split in fixed proportions (synth-cullet: thirds; synth-bearings: one
// row in three worn), with the rounding remainder going to the first class;
// rows are grouped by class in class order. n must give every class at
// least 2 rows and be at most 1<<20. The result depends only on name, n and
// the state of rng.
func Synthetic(name string, n int, rng *rand.Rand) (*Dataset, error) {
	for _, s := range synthSets {
		if s.name == name {
			return synthGenerate(s, n, rng)
		}
	}
	var known []string
	for _, s := range synthSets {
		known = append(known, s.name)
	}
	return nil, fmt.Errorf("datasets: %w %q (synthetic sets: %s)", ErrUnknownDataset, name, strings.Join(known, ", "))
}

// synthSizes splits n rows into classes with the given weights (the
// remainder goes to class 0) and checks the limits.
func synthSizes(n int, weights []int) ([]int, error) {
	if n > synthMaxRows {
		return nil, fmt.Errorf("%w: n = %d exceeds %d", errSynthSize, n, synthMaxRows)
	}
	total := 0
	for _, w := range weights {
		total += w
	}
	sizes := make([]int, len(weights))
	used := 0
	for k, w := range weights {
		sizes[k] = n * w / total
		used += sizes[k]
	}
	sizes[0] += n - used
	for k, s := range sizes {
		if s < synthMinPerClass {
			return nil, fmt.Errorf("%w: n = %d gives class %d only %d rows, need %d", errSynthSize, n, k, s, synthMinPerClass)
		}
	}
	return sizes, nil
}

// synthFill builds a dataset whose rows are grouped by class; draw writes
// one row of class k into dst.
func synthFill(features, classes []string, sizes []int, draw func(dst []float64, k int)) *Dataset {
	n := 0
	for _, s := range sizes {
		n += s
	}
	X := mat.NewDense(n, len(features), nil)
	Y := make([]int, 0, n)
	rows := make([]int, n)
	i := 0
	for k, s := range sizes {
		for range s {
			draw(X.RawRowView(i), k)
			Y = append(Y, k)
			rows[i] = i
			i++
		}
	}
	return &Dataset{
		Features: append([]string(nil), features...),
		Classes:  append([]string(nil), classes...),
		X:        X,
		Y:        Y,
		Rows:     rows,
	}
}

// Spectral shapes of the cullet classes (relative transmission in the five
// channels), invented.
var culletShapes = [][]float64{
	{0.80, 0.84, 0.86, 0.86, 0.85}, // flint: nearly flat
	{0.40, 0.62, 0.78, 0.60, 0.45}, // green: peak at 550 nm
	{0.22, 0.36, 0.55, 0.72, 0.80}, // amber: rising toward red
}

func genCullet(n int, rng *rand.Rand) (*Dataset, error) {
	sizes, err := synthSizes(n, []int{1, 1, 1})
	if err != nil {
		return nil, err
	}
	const (
		counts     = 1500.0 // median full-scale reading
		sigmaScale = 0.8    // common brightness factor, log units
		sigmaChan  = 0.2    // independent channel noise, log units
	)
	features := []string{"ch-450nm", "ch-500nm", "ch-550nm", "ch-600nm", "ch-650nm"}
	classes := []string{"flint", "green", "amber"}
	return synthFill(features, classes, sizes, func(dst []float64, k int) {
		scale := counts * math.Exp(sigmaScale*rng.NormFloat64())
		for j, s := range culletShapes[k] {
			v := math.Round(scale * s * math.Exp(sigmaChan*rng.NormFloat64()))
			dst[j] = math.Max(v, 1) // a photometer count is at least 1
		}
	}), nil
}

// Band profiles of sound and worn bearings (relative RMS per band), invented.
var bearingShapes = [][]float64{
	{1.0, 0.8, 0.60, 0.40}, // sound
	{1.0, 0.8, 0.68, 0.50}, // worn: a little more high-frequency energy
}

func genBearings(n int, rng *rand.Rand) (*Dataset, error) {
	sizes, err := synthSizes(n, []int{2, 1})
	if err != nil {
		return nil, err
	}
	const (
		sigmaAmp  = 0.3 // bearing amplitude, log units
		sigmaBand = 0.2 // independent band noise, log units
	)
	median := []float64{0.7, 1.4} // mm/s, sound and worn
	features := []string{"rms-0-1kHz", "rms-1-3kHz", "rms-3-6kHz", "rms-6-10kHz"}
	classes := []string{"sound", "worn"}
	return synthFill(features, classes, sizes, func(dst []float64, k int) {
		amp := median[k] * math.Exp(sigmaAmp*rng.NormFloat64())
		for j, s := range bearingShapes[k] {
			v := math.Round(1000*amp*s*math.Exp(sigmaBand*rng.NormFloat64())) / 1000
			dst[j] = math.Max(v, 0.001) // sensor resolution
		}
	}), nil
}
