package qkernel

import (
	"fmt"
	"math"
)

// Kernel returns the interference kernel of the amplitude encodings of x and
// xp:
//
//	kappa(x, x') = 1 - ||x^ - x'^||^2 / 4 = (1 + <x^, x'^>) / 2
//
// where x^ = x / ||x|| (amplitude encoding normalises, so Kernel is invariant
// under positive rescaling of either argument and equals (1 + <x, x'>)/2 when
// both are unit vectors). The result lies in [0, 1]: 1 for parallel, 1/2 for
// orthogonal and 0 for antipodal vectors. The cosine is clamped to [-1, 1] to
// absorb rounding.
//
// Kernel returns NaN when either vector is zero or holds a NaN or an infinity
// (such a vector has no amplitude encoding). It panics if the lengths differ,
// like gonum's floats.Dot; that is a programming error, not bad data.
func Kernel(x, xp []float64) float64 {
	if len(x) != len(xp) {
		panic(fmt.Sprintf("qkernel: Kernel: length mismatch %d != %d", len(x), len(xp)))
	}
	mx, ok := maxAbs(x)
	if !ok || mx == 0 {
		return math.NaN()
	}
	mxp, ok := maxAbs(xp)
	if !ok || mxp == 0 {
		return math.NaN()
	}
	// Scale by the largest magnitude first so that neither the squares nor
	// the products can overflow or underflow to zero.
	var sx, sxp, dot float64
	for i, v := range x {
		a := v / mx
		b := xp[i] / mxp
		sx += a * a
		sxp += b * b
		dot += a * b
	}
	cos := dot / (math.Sqrt(sx) * math.Sqrt(sxp))
	return (1 + clampUnit(cos)) / 2
}

// Weights returns the index-register weights w_m of the training labels y
// (class indices in [0, nClass)), one per training row, summing to 1.
//
// With balance false every row gets 1/M (M = len(y)), the uniform index
// register of the published circuit; class k then carries mass M_k/M, which
// biases the classifier toward large classes. With balance true row m of class
// k gets 1/(C * M_k), where C is the number of classes present in y and M_k the
// size of class k, so every present class carries mass exactly 1/C and the
// class-size bias is removed. Amplitudes on the index register are sqrt(w_m).
//
// Weights returns an empty slice for empty y. It panics if nClass < 1 or a
// label lies outside [0, nClass): callers validate labels first (Fit does).
func Weights(y []int, nClass int, balance bool) []float64 {
	if nClass < 1 {
		panic(fmt.Sprintf("qkernel: Weights: nClass %d < 1", nClass))
	}
	w := make([]float64, len(y))
	if len(y) == 0 {
		return w
	}
	count := make([]int, nClass)
	for i, k := range y {
		if k < 0 || k >= nClass {
			panic(fmt.Sprintf("qkernel: Weights: label %d at position %d outside [0, %d)", k, i, nClass))
		}
		count[k]++
	}
	if !balance {
		u := 1 / float64(len(y))
		for i := range w {
			w[i] = u
		}
		return w
	}
	present := 0
	for _, n := range count {
		if n > 0 {
			present++
		}
	}
	for i, k := range y {
		w[i] = 1 / (float64(present) * float64(count[k]))
	}
	return w
}

// vectorFault says why a vector has no amplitude encoding.
type vectorFault int

const (
	vectorOK vectorFault = iota
	vectorZero
	vectorNonFinite
)

func (f vectorFault) String() string {
	switch f {
	case vectorZero:
		return "zero vector"
	case vectorNonFinite:
		return "non-finite value"
	}
	return "ok"
}

// unitInto writes x/||x|| into dst (len(dst) == len(x)) and reports a fault
// for a zero or non-finite x, leaving dst unspecified. When the plain sum of
// squares is safely inside the normal range it is used directly; otherwise
// (huge or tiny entries, or a NaN or infinity) the vector is first scaled by
// its largest magnitude, which keeps the norm finite and non-zero for every
// finite, non-zero x.
func unitInto(dst, x []float64) vectorFault {
	var s float64
	for _, v := range x {
		s += v * v
	}
	// 0x1p-900 leaves room for d up to 2^100 squares of subnormal size
	// without losing more than rounding; 0x1p1000 is far below overflow.
	if s > 0x1p-900 && s < 0x1p1000 {
		inv := 1 / math.Sqrt(s)
		for i, v := range x {
			dst[i] = v * inv
		}
		return vectorOK
	}
	return unitIntoScaled(dst, x)
}

// unitIntoScaled is unitInto's careful path.
func unitIntoScaled(dst, x []float64) vectorFault {
	m, ok := maxAbs(x)
	if !ok {
		return vectorNonFinite
	}
	if m == 0 {
		return vectorZero
	}
	var s float64
	for _, v := range x {
		a := v / m
		s += a * a
	}
	inv := 1 / math.Sqrt(s) // s is in [1, len(x)]
	for i, v := range x {
		dst[i] = v / m * inv
	}
	return vectorOK
}

// maxAbs returns the largest magnitude in x and false if x holds a NaN or an
// infinity.
func maxAbs(x []float64) (float64, bool) {
	var m float64
	for _, v := range x {
		a := math.Abs(v)
		if !(a <= math.MaxFloat64) { // NaN or ±Inf
			return 0, false
		}
		if a > m {
			m = a
		}
	}
	return m, true
}

// clampUnit clamps a computed cosine to [-1, 1].
func clampUnit(c float64) float64 {
	return math.Max(-1, math.Min(1, c))
}
