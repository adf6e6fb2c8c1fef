package baselines

import (
	"math"
	"math/big"
)

// expNeg and expNegSlice compute exp(x) for x <= 0, the only arguments the
// RBF kernel (-gamma ||x - x'||^2) and the softmax (z_k - max z) need, at
// about half the cost of math.Exp on amd64 (math.Exp is an assembly routine
// with a long chain of dependent operations; these are plain Go that the
// processor can overlap from one element to the next).
//
// Method (the usual table-driven reduction, e.g. Tang, "Table-driven
// implementation of the exponential function in IEEE floating-point
// arithmetic", ACM TOMS 15 (1989) 144-157): x = (64m + j) ln2/64 + r with
// integers m, j in [0, 64) and |r| <= ln2/128, so that
//
//	exp(x) = 2^m * 2^(j/64) * exp(r).
//
// k = 64m + j is x*64/ln2 rounded to the nearest integer (by adding
// 1.5*2^52, which leaves k in the low bits of the sum); r = x - k*ln2/64 is
// formed with ln2/64 split in a high part with trailing zero bits (fdlibm's
// ln2 split, divided by 64), so k*hi is exact for |k| < 2^20 and r carries
// an error below 2^-60 |r|. exp(r) - 1 is the Taylor polynomial of degree 5,
// whose truncation error r^6/720 < 3.4e-17 is below a sixth of an ulp of 1.
// 2^(j/64) is kept as a double hi plus the rounding remainder lo (computed
// at start-up with math/big), and the result is 2^m (hi + (hi q + lo)) with
// q the polynomial. Measured against a 200-bit evaluation (expneg_test.go)
// the error is below 1 ulp; math.Exp is also a 1-ulp routine, so the two
// agree to within about 2 ulps.
//
// Arguments below -708 (where 2^m would leave the normal range; exp(x) <
// 3.3e-308 there), positive arguments and NaN go to math.Exp.

const (
	expShift = 0x1.8p52                        // adding it rounds to an integer kept in the low bits
	expBits  = 0x4338000000000000              // math.Float64bits(expShift)
	expInvL  = 64 / math.Ln2                   // 64/ln2
	expL1    = 6.93147180369123816490e-01 / 64 // ln2/64, high part (fdlibm's ln2 high word over 64)
	expL2    = 1.90821492927058770002e-10 / 64 // ln2/64 - expL1 (fdlibm's ln2 low word over 64)
	expLow   = -708.0                          // below: math.Exp
	expP2    = 1.0 / 2                         // Taylor coefficients 1/k!
	expP3    = 1.0 / 6
	expP4    = 1.0 / 24
	expP5    = 1.0 / 120
	expTable = 64 // entries of the 2^(j/64) table; k & (expTable-1) = j, k >> 6 = m
)

// expTabHi[j] + expTabLo[j] = 2^(j/64) to about 2^-106 relative.
var expTabHi, expTabLo = expTables()

func expTables() (hi, lo [expTable]float64) {
	const prec = 160
	root := new(big.Float).SetPrec(prec).SetInt64(2)
	for range 6 {
		root.Sqrt(root) // 2^(1/64) after six square roots
	}
	v := new(big.Float).SetPrec(prec).SetInt64(1)
	rest := new(big.Float).SetPrec(prec)
	for j := range expTable {
		hi[j], _ = v.Float64()
		rest.Sub(v, big.NewFloat(hi[j]))
		lo[j], _ = rest.Float64()
		v.Mul(v, root)
	}
	return hi, lo
}

// expNeg returns exp(x) for x <= 0 (within 1 ulp; see above); other
// arguments go to math.Exp.
func expNeg(x float64) float64 {
	if !(x >= expLow && x <= 0) {
		return math.Exp(x)
	}
	t := x*expInvL + expShift
	k := int64(math.Float64bits(t)) - expBits
	kf := t - expShift
	r := x - kf*expL1 - kf*expL2
	hi, lo := expTabHi[k&(expTable-1)], expTabLo[k&(expTable-1)]
	scale := math.Float64frombits(uint64(k>>6+1023) << 52) // 2^m
	q := r + r*r*(expP2+r*(expP3+r*(expP4+r*expP5)))
	return scale * (hi + (hi*q + lo))
}

// expNegSlice sets v[i] = expNeg(v[i]) for every i, with the same
// arithmetic, in one loop (no call per element).
func expNegSlice(v []float64) {
	for i, x := range v {
		if !(x >= expLow && x <= 0) {
			v[i] = math.Exp(x)
			continue
		}
		t := x*expInvL + expShift
		k := int64(math.Float64bits(t)) - expBits
		kf := t - expShift
		r := x - kf*expL1 - kf*expL2
		hi, lo := expTabHi[k&(expTable-1)], expTabLo[k&(expTable-1)]
		scale := math.Float64frombits(uint64(k>>6+1023) << 52) // 2^m
		q := r + r*r*(expP2+r*(expP3+r*(expP4+r*expP5)))
		v[i] = scale * (hi + (hi*q + lo))
	}
}
