package sim

import (
	"context"
	"fmt"
	"math"
	"math/cmplx"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"

	"fringe/qkernel/circuit"
)

// TestGateMatricesUnitary checks U^dagger U = I for every single-qubit gate
// (property check, common practice) and spot values of the conventions
// stated in GateMatrix (Nielsen & Chuang 2010, eqs. (4.5)-(4.6), recalled
// from memory): RY(pi)|0> = |1>, RZ(pi) = diag(-i, i).
func TestGateMatricesUnitary(t *testing.T) {
	for _, g := range []circuit.Gate{circuit.H, circuit.X, circuit.RY, circuit.RZ} {
		for _, a := range []float64{0, 0.3, -2.1, math.Pi, 7.5} {
			u, err := GateMatrix(g, a)
			if err != nil {
				t.Fatal(err)
			}
			for i := range 2 {
				for j := range 2 {
					var v complex128
					for k := range 2 {
						v += cmplx.Conj(u[k][i]) * u[k][j]
					}
					want := complex(0, 0)
					if i == j {
						want = 1
					}
					// 1e-15: products of two rounded trigonometric values.
					if cmplx.Abs(v-want) > 1e-15 {
						t.Errorf("%s(%v): (U^dagger U)[%d][%d] = %v", g, a, i, j, v)
					}
				}
			}
		}
	}
	u, _ := GateMatrix(circuit.RY, math.Pi)
	if cmplx.Abs(u[1][0]-1) > 1e-15 || cmplx.Abs(u[0][0]) > 1e-15 {
		t.Errorf("RY(pi)|0> = (%v, %v), want (0, 1)", u[0][0], u[1][0])
	}
	u, _ = GateMatrix(circuit.RZ, math.Pi)
	if cmplx.Abs(u[0][0]+1i) > 1e-15 || cmplx.Abs(u[1][1]-1i) > 1e-15 {
		t.Errorf("RZ(pi) = %v, want diag(-i, i)", u)
	}
	if _, err := GateMatrix(circuit.CNOT, 0); err == nil {
		t.Error("GateMatrix(cx): no error")
	}
}

// TestKernels compares the in-place kernels with dense matrix products on
// random states: every qubit, complex and real matrices, CNOT on every
// ordered pair, and UCRY against the block-diagonal definition.
func TestKernels(t *testing.T) {
	rng := rand.New(rand.NewPCG(11, 12))
	const n = 4
	const tol = 1e-14 // a handful of rounded products per amplitude
	check := func(what string, got []complex128, want []complex128) {
		t.Helper()
		for i := range got {
			if cmplx.Abs(got[i]-want[i]) > tol {
				t.Fatalf("%s: amplitude %d = %v, want %v", what, i, got[i], want[i])
			}
		}
	}
	matVec := func(m dense, v []complex128) []complex128 {
		out := make([]complex128, len(v))
		for i := range m {
			for j, x := range v {
				out[i] += m[i][j] * x
			}
		}
		return out
	}
	for q := range n {
		for _, u := range []Matrix{randomUnitary(rng), {{0.8, -0.6}, {0.6, 0.8}}} {
			psi := randomAmps(rng, n)
			s := &State{N: n, Amp: append([]complex128(nil), psi...)}
			s.Apply1(q, u)
			check(fmt.Sprintf("apply1 q=%d", q), s.Amp, matVec(embed1(n, q, u), psi))
		}
	}
	for c := range n {
		for tq := range n {
			if c == tq {
				continue
			}
			psi := randomAmps(rng, n)
			s := &State{N: n, Amp: append([]complex128(nil), psi...)}
			s.ApplyCNOT(c, tq)
			check(fmt.Sprintf("cnot %d->%d", c, tq), s.Amp, matVec(cnotMatrix(n, c, tq), psi))
		}
	}
	// Multi-controlled gate: u on qubit 1 where qubits 0 and 3 are 1.
	{
		u := randomUnitary(rng)
		psi := randomAmps(rng, n)
		want := append([]complex128(nil), psi...)
		for b := range psi {
			if b>>1&1 == 0 && b&1 == 1 && b>>3&1 == 1 {
				b1 := b | 1<<1
				want[b] = u[0][0]*psi[b] + u[0][1]*psi[b1]
				want[b1] = u[1][0]*psi[b] + u[1][1]*psi[b1]
			}
		}
		s := &State{N: n, Amp: append([]complex128(nil), psi...)}
		s.ApplyControlled([]int{3, 0}, 1, u)
		check("controlled", s.Amp, want)
		// With one control and X it is CNOT.
		a := &State{N: n, Amp: append([]complex128(nil), psi...)}
		b := &State{N: n, Amp: append([]complex128(nil), psi...)}
		a.ApplyControlled([]int{2}, 0, pauli[1])
		b.ApplyCNOT(2, 0)
		check("controlled X", a.Amp, b.Amp)
	}
	// UCRY on target 2 with controls (3, 0): the block for control value j
	// (bit 0 from qubit 3, bit 1 from qubit 0) is RY(angles[j]).
	angles := []float64{0.4, -1.3, 2.9, 5.5}
	psi := randomAmps(rng, n)
	want := make([]complex128, len(psi))
	for b := range psi {
		if b>>2&1 == 1 {
			continue
		}
		j := (b>>3&1)<<0 | (b>>0&1)<<1
		u, _ := GateMatrix(circuit.RY, angles[j])
		b1 := b | 1<<2
		want[b] = u[0][0]*psi[b] + u[0][1]*psi[b1]
		want[b1] = u[1][0]*psi[b] + u[1][1]*psi[b1]
	}
	s := &State{N: n, Amp: append([]complex128(nil), psi...)}
	s.ApplyUCRY(2, []int{3, 0}, angles)
	check("ucry", s.Amp, want)
}

// TestDecomposedEqualsMultiplexed runs compiled circuits with the one-pass
// UCRY kernel and with the Gray-code decomposition (quant-ph/0407010) and
// compares the final states within 1e-12.
func TestDecomposedEqualsMultiplexed(t *testing.T) {
	rng := rand.New(rand.NewPCG(13, 14))
	for _, tc := range []struct{ M, d, C int }{{3, 3, 2}, {5, 4, 3}, {8, 2, 2}, {6, 7, 3}} {
		c := randomInstance(rng, tc.M, tc.d, tc.C, tc.M%2 == 0).compile(t)
		a, _ := NewState(c.NQubits)
		b, _ := NewState(c.NQubits)
		for _, op := range c.Ops {
			a.ApplyOp(op)
		}
		for _, op := range c.Decompose().Ops {
			b.ApplyOp(op)
		}
		for i := range a.Amp {
			// 1e-12: up to a few hundred rotations, each exact to ~1e-16.
			if cmplx.Abs(a.Amp[i]-b.Amp[i]) > 1e-12 {
				t.Fatalf("%+v: amplitude %d multiplexed %v, decomposed %v", tc, i, a.Amp[i], b.Amp[i])
			}
		}
	}
}

// TestCompiledMatchesClosedForm checks the noiseless (a, k) distribution of
// the compiled circuit against the closed form of Schuld et al. (2017)
// (P(a=0,k) = sum_{m in k} w_m ||x~ + x_m||^2 / 4) on random instances,
// with M and d powers of two or not, C = 2 and 3, uniform and balanced
// weights, through the state vector (multiplexed and decomposed) and the
// density matrix.
func TestCompiledMatchesClosedForm(t *testing.T) {
	rng := rand.New(rand.NewPCG(15, 16))
	for _, tc := range []struct{ M, d, C int }{
		{1, 2, 2}, {2, 2, 2}, {3, 3, 2}, {4, 4, 3}, {5, 2, 3}, {7, 5, 2}, {12, 3, 3}, {16, 8, 2}, {9, 1, 2},
	} {
		for _, balanced := range []bool{false, true} {
			in := randomInstance(rng, tc.M, tc.d, tc.C, balanced)
			c := in.compile(t)
			want := in.closedForm(len(c.Regs.Class))
			runs := []struct {
				name string
				c    *circuit.Circuit
				opt  Options
			}{
				{"statevector", c, Options{}},
				{"decomposed", c.Decompose(), Options{}},
			}
			if c.NQubits <= 8 {
				runs = append(runs, struct {
					name string
					c    *circuit.Circuit
					opt  Options
				}{"density", c, Options{Method: DensityMatrix}})
			}
			for _, r := range runs {
				res, err := Simulate(context.Background(), r.c, r.opt)
				if err != nil {
					t.Fatal(err)
				}
				sum := 0.0
				for i := range want {
					sum += res.P[i]
					// 1e-12: the state preparation is exact up to rounding of
					// a few hundred rotations.
					if !scalar.EqualWithinAbsOrRel(res.P[i], want[i], 1e-12, 1e-12) {
						t.Errorf("%+v balanced=%v %s: P[%d] = %.15g, closed form %.15g", tc, balanced, r.name, i, res.P[i], want[i])
					}
				}
				if !scalar.EqualWithinAbsOrRel(sum, 1, 1e-12, 0) {
					t.Errorf("%+v %s: probabilities sum to %v", tc, r.name, sum)
				}
			}
		}
	}
}

// TestSignedFeatures: a training vector equal to minus the test vector
// gives ||x~ + x_m||^2 = 0 (derived by hand), so with one training vector
// P(a=0) = 0 exactly; with d = 1 the sign lives on the single data qubit.
func TestSignedFeatures(t *testing.T) {
	for _, x := range [][]float64{{0.3, -0.4, 1.2}, {-2}} {
		neg := make([]float64, len(x))
		for i, v := range x {
			neg[i] = -v
		}
		c, err := circuit.Compile(x, [][]float64{neg}, []int{0}, 2, nil)
		if err != nil {
			t.Fatal(err)
		}
		p, err := Outcomes(c, Options{})
		if err != nil {
			t.Fatal(err)
		}
		// 1e-15: rounding of one rotation.
		if p[0] > 1e-15 || !scalar.EqualWithinAbsOrRel(p[2], 1, 1e-15, 0) {
			t.Errorf("x=%v: P = %v, want P(1,0) = 1", x, p)
		}
	}
}
