package qkernel

import (
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/floats"
	"gonum.org/v1/gonum/floats/scalar"
)

// TestKernelIdentity checks, on random unit vectors, that Kernel equals both
// forms of the interference kernel, 1 - ||x - x'||^2/4 and (1 + <x, x'>)/2
// (equal on unit vectors since ||x - x'||^2 = 2 - 2<x, x'>; DESIGN.md, "The
// method in brief"), and that it ignores positive rescaling.
func TestKernelIdentity(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 4))
	for trial := range 200 {
		d := 1 + rng.IntN(16)
		x, xp := make([]float64, d), make([]float64, d)
		for i := range d {
			x[i], xp[i] = rng.NormFloat64(), rng.NormFloat64()
		}
		if trial%10 == 0 { // nearly parallel and nearly antipodal pairs too
			s := 1.0
			if trial%20 == 0 {
				s = -1
			}
			for i := range d {
				xp[i] = s*x[i] + 1e-6*rng.NormFloat64()
			}
		}
		ux, uxp := make([]float64, d), make([]float64, d)
		unitInto(ux, x)
		unitInto(uxp, xp)
		diff := make([]float64, d)
		floats.SubTo(diff, ux, uxp)
		dist := 1 - floats.Dot(diff, diff)/4
		inner := (1 + floats.Dot(ux, uxp)) / 2
		k := Kernel(x, xp)
		// At most 16 products of unit-vector entries: rounding error
		// below ~16 * 2^-52 ~ 4e-15; 1e-14 absolute.
		if !scalar.EqualWithinAbs(dist, inner, 1e-14) || !scalar.EqualWithinAbs(k, inner, 1e-14) {
			t.Errorf("d=%d: Kernel %.17g, 1-||x-x'||^2/4 %.17g, (1+<x,x'>)/2 %.17g", d, k, dist, inner)
		}
		if k < 0 || k > 1 {
			t.Errorf("Kernel %v outside [0, 1]", k)
		}
		a, b := math.Exp(rng.NormFloat64()*5), math.Exp(rng.NormFloat64()*5)
		floats.Scale(a, x)
		floats.Scale(b, xp)
		if ks := Kernel(x, xp); !scalar.EqualWithinAbs(ks, k, 1e-14) {
			t.Errorf("rescaled by %g, %g: Kernel %.17g, want %.17g", a, b, ks, k)
		}
	}
}

// TestKernelValues checks the special values of kappa = (1 + cos)/2 (derived
// by hand: cos = 1, 0, -1, 1/2) and the NaN and overflow cases.
func TestKernelValues(t *testing.T) {
	for _, tc := range []struct {
		x, xp []float64
		want  float64
	}{
		{[]float64{1, 2}, []float64{2, 4}, 1},
		{[]float64{1, 0}, []float64{0, 3}, 0.5},
		{[]float64{1, -1}, []float64{-2, 2}, 0},
		{[]float64{1, 0}, []float64{0.5, math.Sqrt(3) / 2}, 0.75},
		// Entries whose squares overflow or underflow float64.
		{[]float64{1e300, 1e300}, []float64{1e300, 0}, (1 + math.Sqrt2/2) / 2},
		{[]float64{1e-300, 1e-300}, []float64{1e-310, 0}, (1 + math.Sqrt2/2) / 2},
	} {
		// Four rounded operations on values ~1: 1e-15.
		if got := Kernel(tc.x, tc.xp); !scalar.EqualWithinAbs(got, tc.want, 1e-15) {
			t.Errorf("Kernel(%v, %v) = %.17g, want %.17g", tc.x, tc.xp, got, tc.want)
		}
	}
	for _, tc := range [][2][]float64{
		{{0, 0}, {1, 0}},
		{{1, 0}, {0, 0}},
		{{math.NaN(), 0}, {1, 0}},
		{{1, 0}, {math.Inf(1), 0}},
		{{}, {}},
	} {
		if got := Kernel(tc[0], tc[1]); !math.IsNaN(got) {
			t.Errorf("Kernel(%v, %v) = %v, want NaN", tc[0], tc[1], got)
		}
	}
	defer func() {
		if recover() == nil {
			t.Error("Kernel on lengths 2 and 3 did not panic")
		}
	}()
	Kernel([]float64{1, 0}, []float64{1, 0, 0})
}

// TestUnitInto checks normalisation over the whole float64 range.
func TestUnitInto(t *testing.T) {
	for _, x := range [][]float64{
		{3, 4},
		{1e308, 1e308, -1e308},
		{5e-324, 0},
		{1e-200, -3e-200},
		{-7},
	} {
		u := make([]float64, len(x))
		if f := unitInto(u, x); f != vectorOK {
			t.Fatalf("unitInto(%v): %v", x, f)
		}
		// A handful of rounded operations per entry: 1e-15.
		if n := floats.Norm(u, 2); !scalar.EqualWithinAbs(n, 1, 1e-15) {
			t.Errorf("unitInto(%v) = %v, norm %.17g", x, u, n)
		}
		for i := range x {
			if math.Signbit(u[i]) != math.Signbit(x[i]) && x[i] != 0 {
				t.Errorf("unitInto(%v) = %v: sign changed", x, u)
			}
		}
	}
	u := make([]float64, 2)
	for _, tc := range []struct {
		x    []float64
		want vectorFault
	}{
		{[]float64{0, 0}, vectorZero},
		{[]float64{0, math.Copysign(0, -1)}, vectorZero},
		{[]float64{1, math.NaN()}, vectorNonFinite},
		{[]float64{math.Inf(-1), 1}, vectorNonFinite},
	} {
		if f := unitInto(u, tc.x); f != tc.want {
			t.Errorf("unitInto(%v) = %v, want %v", tc.x, f, tc.want)
		}
	}
}

// TestWeights checks that both weightings sum to 1, that plain weights are
// 1/M and that balanced weights give every present class mass 1/C and absent
// classes none.
func TestWeights(t *testing.T) {
	for _, tc := range []struct {
		y      []int
		nClass int
	}{
		{[]int{0, 1}, 2},
		{[]int{0, 0, 0, 1}, 2},
		{[]int{2, 0, 2, 2, 2, 0, 3}, 5}, // classes 1 and 4 absent
		{[]int{1, 1, 1, 1, 1, 1, 1, 1, 1, 0}, 2},
		{[]int{4}, 5},
	} {
		count := make([]int, tc.nClass)
		for _, k := range tc.y {
			count[k]++
		}
		C := 0
		for _, n := range count {
			if n > 0 {
				C++
			}
		}
		for _, balance := range []bool{false, true} {
			w := Weights(tc.y, tc.nClass, balance)
			mass := make([]float64, tc.nClass)
			for i, k := range tc.y {
				mass[k] += w[i]
				if !balance && !scalar.EqualWithinAbsOrRel(w[i], 1/float64(len(tc.y)), 0, 1e-15) {
					t.Errorf("plain weights %v of %v: want 1/%d", w, tc.y, len(tc.y))
				}
			}
			// Sums of at most 10 terms: 1e-15 relative.
			if s := floats.Sum(w); !scalar.EqualWithinAbsOrRel(s, 1, 1e-15, 1e-15) {
				t.Errorf("Weights(%v, %v) sum to %.17g", tc.y, balance, s)
			}
			for k, m := range mass {
				want := 0.0
				switch {
				case count[k] == 0:
				case balance:
					want = 1 / float64(C)
				default:
					want = float64(count[k]) / float64(len(tc.y))
				}
				if !scalar.EqualWithinAbsOrRel(m, want, 1e-15, 1e-15) {
					t.Errorf("Weights(%v, balance=%v): class %d mass %.17g, want %.17g", tc.y, balance, k, m, want)
				}
			}
		}
	}
	if w := Weights(nil, 2, true); len(w) != 0 {
		t.Errorf("Weights(nil) = %v", w)
	}
	for _, tc := range []struct {
		y      []int
		nClass int
	}{{[]int{0, 2}, 2}, {[]int{-1}, 2}, {[]int{0}, 0}} {
		func() {
			defer func() {
				if recover() == nil {
					t.Errorf("Weights(%v, %d) did not panic", tc.y, tc.nClass)
				}
			}()
			Weights(tc.y, tc.nClass, false)
		}()
	}
}
