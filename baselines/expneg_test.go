package baselines

import (
	"fmt"
	"math"
	"math/big"
	"math/rand/v2"
	"testing"
)

// bigExp returns exp(x) rounded to float64 from a 200-bit evaluation:
// exp(x) = exp(x/2^20)^(2^20), the small argument by 30 Taylor terms
// (|x/2^20| < 7e-4, so the first omitted term is below 1e-100).
func bigExp(x float64) float64 {
	const prec, halvings = 200, 20
	a := new(big.Float).SetPrec(prec).SetFloat64(x)
	a.SetMantExp(a, -halvings)
	sum := new(big.Float).SetPrec(prec).SetInt64(1)
	term := new(big.Float).SetPrec(prec).SetInt64(1)
	k := new(big.Float).SetPrec(prec)
	for i := 1; i <= 30; i++ {
		term.Mul(term, a)
		term.Quo(term, k.SetInt64(int64(i)))
		sum.Add(sum, term)
	}
	for range halvings {
		sum.Mul(sum, sum)
	}
	f, _ := sum.Float64()
	return f
}

// TestExpNegAccuracy compares expNeg with a 200-bit evaluation of exp (the
// reference rounds correctly: its relative error, about 2^20 squarings times
// 2^-200, is far below 2^-53). The method's bound (expneg.go) is 1 ulp; the
// test allows exactly that. Most results are correctly rounded: the share
// that is not is logged (measured 146 of 4000; math.Exp's, logged too, 541).
func TestExpNegAccuracy(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	const samples = 4000
	var worst, worstStd float64
	var off, offStd int
	for i := range samples {
		x := -5 * rng.Float64() // kernel and softmax arguments are mostly small
		if i%2 == 1 {
			x = expLow * rng.Float64()
		}
		ref := bigExp(x)
		ulp := math.Nextafter(ref, math.Inf(1)) - ref
		got := expNeg(x)
		e := math.Abs(got-ref) / ulp
		if e > 1 {
			t.Errorf("expNeg(%v) = %v, 200-bit reference %v: %.2f ulp", x, got, ref, e)
		}
		if got != ref {
			off++
		}
		if s := math.Exp(x); s != ref {
			offStd++
			worstStd = max(worstStd, math.Abs(s-ref)/ulp)
		}
		worst = max(worst, e)
	}
	t.Logf("expNeg: worst %.2f ulp, %d of %d not correctly rounded; math.Exp: worst %.2f ulp, %d", worst, off, samples, worstStd, offStd)
}

// TestExpNegSpecial checks the edges: exp(0) = 1 exactly (derived by hand:
// k = 0, r = 0, q = 0, hi = 1, lo = 0), the hand-off to math.Exp below
// expLow, above 0 and for NaN and infinities, and that expNegSlice does the
// same arithmetic as expNeg (bit-identical results, so the comparison is of
// bits).
func TestExpNegSpecial(t *testing.T) {
	if got := expNeg(0); got != 1 {
		t.Errorf("expNeg(0) = %v, want 1", got)
	}
	if got := expNeg(math.Inf(-1)); got != 0 {
		t.Errorf("expNeg(-Inf) = %v, want 0", got)
	}
	if got := expNeg(math.NaN()); !math.IsNaN(got) {
		t.Errorf("expNeg(NaN) = %v, want NaN", got)
	}
	for _, x := range []float64{1, 0.5, -708.5, -745, -746, math.Inf(1)} {
		if got, want := expNeg(x), math.Exp(x); math.Float64bits(got) != math.Float64bits(want) {
			t.Errorf("expNeg(%v) = %v, math.Exp gives %v (outside [-708, 0] it is math.Exp)", x, got, want)
		}
	}
	// Just inside the range: 2^m is still normal (m >= -1022).
	for _, x := range []float64{expLow, math.Nextafter(expLow, 0), -707.9, -1e-300, math.Copysign(0, -1)} {
		ref := bigExp(x)
		ulp := math.Nextafter(ref, math.Inf(1)) - ref
		if got := expNeg(x); math.Abs(got-ref) > ulp {
			t.Errorf("expNeg(%v) = %v, 200-bit reference %v", x, got, ref)
		}
	}
	rng := rand.New(rand.NewPCG(3, 4))
	v := make([]float64, 1000)
	for i := range v {
		v[i] = -20 * rng.Float64()
	}
	v[0], v[1], v[2] = math.NaN(), -800, 3
	w := append([]float64(nil), v...)
	expNegSlice(w)
	for i, x := range v {
		if got, want := w[i], expNeg(x); math.Float64bits(got) != math.Float64bits(want) &&
			!(math.IsNaN(got) && math.IsNaN(want)) {
			t.Errorf("expNegSlice at %v = %v, expNeg %v", x, got, want)
		}
	}
}

// BenchmarkExpNeg measures exp over 512 arguments in [-4, 0] (the range of
// RBF kernel values on L2-normalised rows), against math.Exp in the same loop.
func BenchmarkExpNeg(b *testing.B) {
	src := make([]float64, 512)
	for i := range src {
		src[i] = -4 * float64(i) / float64(len(src))
	}
	dst := make([]float64, len(src))
	for _, tc := range []struct {
		name string
		f    func()
	}{
		{"slice", func() { copy(dst, src); expNegSlice(dst) }},
		{"scalar", func() {
			for i, x := range src {
				dst[i] = expNeg(x)
			}
		}},
		{"math.Exp", func() {
			for i, x := range src {
				dst[i] = math.Exp(x)
			}
		}},
	} {
		b.Run(fmt.Sprintf("impl=%s", tc.name), func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				tc.f()
			}
			b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/float64(len(src)), "ns/exp")
		})
	}
}
