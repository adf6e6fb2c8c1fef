package sim

import (
	"context"
	"fmt"
	"math"
	"math/cmplx"
	"math/rand/v2"
	"strings"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"

	"fringe/qkernel/circuit"
)

// krausSets lists the channels with their Kraus operators as in Nielsen &
// Chuang (2010): depolarizing (section 8.3.4), amplitude damping (8.3.5),
// phase damping (8.3.6); section numbers recalled from memory. The readout
// channel is ours (see ReadoutKraus).
func krausSets() []struct {
	name string
	ks   []Matrix
	s    Superop
} {
	return []struct {
		name string
		ks   []Matrix
		s    Superop
	}{
		{"depolarizing p=0.37", DepolarizingKraus(0.37), DepolarizingSuperop(0.37)},
		{"depolarizing p=1", DepolarizingKraus(1), DepolarizingSuperop(1)},
		{"amplitude damping 0.21", AmplitudeDampingKraus(0.21), AmplitudeDampingSuperop(0.21)},
		{"amplitude damping 1", AmplitudeDampingKraus(1), AmplitudeDampingSuperop(1)},
		{"phase damping 0.44", PhaseDampingKraus(0.44), PhaseDampingSuperop(0.44)},
		{"readout 0.03 0.08", ReadoutKraus(0.03, 0.08), KrausSuperop(ReadoutKraus(0.03, 0.08))},
	}
}

// TestKrausCompleteness checks sum_K K^dagger K = I (Nielsen & Chuang 2010,
// section 8.2, completeness relation) and that the closed-form
// superoperators equal the Kraus sums.
func TestKrausCompleteness(t *testing.T) {
	for _, ch := range krausSets() {
		var sum Matrix
		for _, k := range ch.ks {
			for i := range 2 {
				for j := range 2 {
					for r := range 2 {
						sum[i][j] += cmplx.Conj(k[r][i]) * k[r][j]
					}
				}
			}
		}
		for i := range 2 {
			for j := range 2 {
				want := complex(0, 0)
				if i == j {
					want = 1
				}
				// 1e-15: sums of squared square roots.
				if cmplx.Abs(sum[i][j]-want) > 1e-15 {
					t.Errorf("%s: (sum K^dagger K)[%d][%d] = %v", ch.name, i, j, sum[i][j])
				}
			}
		}
		ks := KrausSuperop(ch.ks)
		for i := range 4 {
			for j := range 4 {
				if cmplx.Abs(ks[i][j]-ch.s[i][j]) > 1e-15 {
					t.Errorf("%s: superop[%d][%d] = %v, Kraus sum gives %v", ch.name, i, j, ch.s[i][j], ks[i][j])
				}
			}
		}
	}
}

// TestDensityAgainstDense applies gates and channels to random 3-qubit
// density matrices and compares with dense K rho K^dagger products, checking
// after every step that rho stays Hermitian with unit trace.
func TestDensityAgainstDense(t *testing.T) {
	rng := rand.New(rand.NewPCG(21, 22))
	const n = 3
	const tol = 1e-13 // dense products of 8x8 matrices, entries O(1)
	compare := func(what string, d *Density, want dense) {
		t.Helper()
		for r := range want {
			for c := range want {
				if cmplx.Abs(d.At(r, c)-want[r][c]) > tol {
					t.Fatalf("%s: rho[%d][%d] = %v, want %v", what, r, c, d.At(r, c), want[r][c])
				}
			}
		}
		checkDensity(t, d, tol, what)
	}
	for q := range n {
		rho := randomDensity(rng, n)
		u := randomUnitary(rng)
		d := densityFromDense(n, rho)
		d.Apply1(q, u)
		U := embed1(n, q, u)
		compare(fmt.Sprintf("gate q=%d", q), d, U.mul(rho).mul(U.adjoint()))

		ry, _ := GateMatrix(circuit.RY, 0.77)
		d = densityFromDense(n, rho)
		d.Apply1(q, ry)
		U = embed1(n, q, ry)
		compare(fmt.Sprintf("ry q=%d", q), d, U.mul(rho).mul(U.adjoint()))

		for _, ch := range krausSets() {
			d := densityFromDense(n, rho)
			d.ApplySuperop1(q, ch.s)
			compare(fmt.Sprintf("%s q=%d", ch.name, q), d, applyKrausDense(rho, n, q, ch.ks))
		}
		d = densityFromDense(n, rho)
		d.Depolarize1(q, 0.3)
		d.AmplitudeDamp(q, 0.2)
		d.PhaseDamp(q, 0.1)
		want := applyKrausDense(applyKrausDense(applyKrausDense(rho, n, q, DepolarizingKraus(0.3)), n, q, AmplitudeDampingKraus(0.2)), n, q, PhaseDampingKraus(0.1))
		compare(fmt.Sprintf("chain q=%d", q), d, want)
		// Then composes superoperators in application order.
		d = densityFromDense(n, rho)
		d.ApplySuperop1(q, DepolarizingSuperop(0.3).Then(AmplitudeDampingSuperop(0.2)).Then(PhaseDampingSuperop(0.1)))
		compare(fmt.Sprintf("fused chain q=%d", q), d, want)
	}
	for c := range n {
		for tq := range n {
			if c == tq {
				continue
			}
			rho := randomDensity(rng, n)
			d := densityFromDense(n, rho)
			d.ApplyCNOT(c, tq)
			U := cnotMatrix(n, c, tq)
			compare(fmt.Sprintf("cnot %d->%d", c, tq), d, U.mul(rho).mul(U.adjoint()))

			// Two-qubit depolarizing as a Pauli sum: (1 - 15p/16) rho +
			// p/16 sum_{P != I} P rho P, equal to (1-p) rho + p I/4 ⊗ Tr
			// (Nielsen & Chuang 2010, section 8.3.4, generalised to d = 4).
			const p = 0.45
			d = densityFromDense(n, rho)
			d.Depolarize2(c, tq, p)
			want := newDense(len(rho))
			for k := range 16 {
				P := embed1(n, c, pauli[k&3]).mul(embed1(n, tq, pauli[k>>2]))
				w := p / 16
				if k == 0 {
					w = 1 - 15*p/16
				}
				term := P.mul(rho).mul(P.adjoint())
				for i := range want {
					for j := range want {
						want[i][j] += complex(w, 0) * term[i][j]
					}
				}
			}
			compare(fmt.Sprintf("depolarize2 %d,%d", c, tq), d, want)
		}
	}
	// UCRY on rows and columns equals the decomposition.
	rho := randomDensity(rng, n)
	a := densityFromDense(n, rho)
	a.ApplyUCRY(1, []int{2, 0}, []float64{0.3, -1.1, 2.2, 4.0})
	want := dense(nil)
	{
		c := &circuit.Circuit{NQubits: n, Ops: []circuit.Op{{Gate: circuit.UCRY, Target: 1, Controls: []int{2, 0}, Angles: []float64{0.3, -1.1, 2.2, 4.0}}}}
		b := densityFromDense(n, rho)
		for _, op := range c.Decompose().Ops {
			b.ApplyOp(op)
		}
		want = newDense(1 << n)
		for r := range want {
			for cc := range want {
				want[r][cc] = b.At(r, cc)
			}
		}
	}
	compare("ucry", a, want)
}

// TestAmplitudeDampingByHand: RY(theta)|0> has P(1) = sin^2(theta/2);
// amplitude damping leaves (1-gamma) sin^2(theta/2) and scales the
// coherence cos sin by sqrt(1-gamma) (derived by hand from the Kraus
// operators of Nielsen & Chuang 2010, section 8.3.5).
func TestAmplitudeDampingByHand(t *testing.T) {
	const theta, gamma, lambda = 1.1, 0.3, 0.25
	d, _ := NewDensity(1)
	ry, _ := GateMatrix(circuit.RY, theta)
	d.Apply1(0, ry)
	d.AmplitudeDamp(0, gamma)
	s2 := math.Pow(math.Sin(theta/2), 2)
	coh := math.Sin(theta/2) * math.Cos(theta/2)
	// 1e-15: a few rounded operations.
	if !scalar.EqualWithinAbsOrRel(real(d.At(1, 1)), (1-gamma)*s2, 1e-15, 1e-15) ||
		!scalar.EqualWithinAbsOrRel(real(d.At(0, 1)), math.Sqrt(1-gamma)*coh, 1e-15, 1e-15) {
		t.Errorf("after damping: rho = [[%v %v] [%v %v]]", d.At(0, 0), d.At(0, 1), d.At(1, 0), d.At(1, 1))
	}
	// Phase damping (section 8.3.6) scales the coherence by sqrt(1-lambda).
	d.PhaseDamp(0, lambda)
	if !scalar.EqualWithinAbsOrRel(real(d.At(0, 1)), math.Sqrt(1-gamma)*math.Sqrt(1-lambda)*coh, 1e-15, 1e-15) ||
		!scalar.EqualWithinAbsOrRel(real(d.At(1, 1)), (1-gamma)*s2, 1e-15, 1e-15) {
		t.Errorf("after dephasing: rho = [[%v %v] [%v %v]]", d.At(0, 0), d.At(0, 1), d.At(1, 0), d.At(1, 1))
	}
}

// TestNoisyDensityStaysPhysical runs a compiled circuit gate by gate under
// every kind of noise and checks Hermiticity, unit trace and non-negative
// populations after every operation and channel.
func TestNoisyDensityStaysPhysical(t *testing.T) {
	rng := rand.New(rand.NewPCG(23, 24))
	c := randomInstance(rng, 3, 3, 2, false).compile(t).Decompose()
	d, _ := NewDensity(c.NQubits)
	for i, op := range c.Ops {
		d.ApplyOp(op)
		what := fmt.Sprintf("op %d (%s)", i, op.Gate)
		checkDensity(t, d, 1e-12, what) // 1e-12: accumulated rounding over ~60 passes
		if op.Gate == circuit.CNOT {
			d.Depolarize2(op.Controls[0], op.Target, 0.05)
			checkDensity(t, d, 1e-12, what+" depolarize2")
		} else if op.Gate != circuit.Measure {
			d.Depolarize1(op.Target, 0.01)
			checkDensity(t, d, 1e-12, what+" depolarize1")
		}
		d.AmplitudeDamp(op.Target, 0.02)
		checkDensity(t, d, 1e-12, what+" amplitude damping")
		d.PhaseDamp(op.Target, 0.03)
		checkDensity(t, d, 1e-12, what+" phase damping")
	}
	d.DepolarizeAll(0.2)
	checkDensity(t, d, 1e-12, "global depolarizing")
}

// TestNoiseValidate checks that out-of-range parameters are errors naming
// their key.
func TestNoiseValidate(t *testing.T) {
	if err := (NoiseModel{Depolarizing: [2]float64{0.01, 0.02}, AmplitudeDamping: 1, Readout: [2]float64{0, 0.5}}).Validate(); err != nil {
		t.Errorf("valid model: %v", err)
	}
	for _, tc := range []struct {
		m   NoiseModel
		key string
	}{
		{NoiseModel{Depolarizing: [2]float64{-0.1, 0}}, "depolarizing"},
		{NoiseModel{Depolarizing: [2]float64{0, 1.5}}, "depolarizing"},
		{NoiseModel{AmplitudeDamping: math.NaN()}, "amplitude_damping"},
		{NoiseModel{PhaseDamping: 2}, "phase_damping"},
		{NoiseModel{Readout: [2]float64{0, -1e-9}}, "readout"},
	} {
		err := tc.m.Validate()
		if err == nil || !strings.Contains(err.Error(), tc.key) || !strings.HasPrefix(err.Error(), "sim: ") {
			t.Errorf("%+v: error %v, want one naming %q", tc.m, err, tc.key)
		}
	}
}

// noisyRun simulates c on a density matrix: ops up to (not including) op
// index cut, then extra(d), then the rest; returns the (a, k) distribution.
func noisyRun(t *testing.T, c *circuit.Circuit, cut int, extra func(d *Density)) []float64 {
	t.Helper()
	d, err := NewDensity(c.NQubits)
	if err != nil {
		t.Fatal(err)
	}
	for _, op := range c.Ops[:cut] {
		d.ApplyOp(op)
	}
	extra(d)
	for _, op := range c.Ops[cut:] {
		d.ApplyOp(op)
	}
	return marginal(d.Diag(), c.Regs)
}

// TestClosedFormChannels validates the outcome-level models against the
// gate-level density matrix:
//   - GlobalDepolarizing(s) = a full-register depolarizing channel before
//     measurement, built from single-qubit depolarizing channels of strength
//     1 on every qubit (their product is rho -> I/2^n, Nielsen & Chuang 2010,
//     section 8.3.4) mixed with weight s;
//   - AncillaDephasing(lambda) = phase damping on the ancilla just before
//     the final H;
//   - Readout(p01, p10) = ReadoutKraus on every measured qubit before
//     measurement.
//
// It also checks p_acc' = (1-s) p_acc + s/2, derived by hand from the
// global depolarizing formula (sum over the 2^q class values of s/2^(1+q)).
func TestClosedFormChannels(t *testing.T) {
	rng := rand.New(rand.NewPCG(25, 26))
	for _, tc := range []struct{ M, d, C int }{{3, 2, 2}, {4, 3, 3}, {5, 4, 2}} {
		in := randomInstance(rng, tc.M, tc.d, tc.C, true)
		c := in.compile(t)
		end := len(c.Ops) - 1 - len(c.Regs.Class) // first Measure
		finalH := end - 1
		if c.Ops[finalH].Gate != circuit.H {
			t.Fatalf("op %d is %s, want the final h", finalH, c.Ops[finalH].Gate)
		}
		p := noisyRun(t, c, end, func(*Density) {})
		q := len(c.Regs.Class)
		// 1e-12: exact simulations that differ only in rounding.
		const tol = 1e-12
		cmp := func(what string, got, want []float64) {
			t.Helper()
			for i := range want {
				if !scalar.EqualWithinAbsOrRel(got[i], want[i], tol, tol) {
					t.Errorf("%+v %s: P[%d] closed form %.15g, density matrix %.15g", tc, what, i, got[i], want[i])
				}
			}
		}

		const s = 0.27
		dm := noisyRun(t, c, end, func(d *Density) {
			full := &Density{N: d.N, Rho: append([]complex128(nil), d.Rho...)}
			for qb := range d.N {
				full.Depolarize1(qb, 1)
			}
			for i := range d.Rho {
				d.Rho[i] = complex(1-s, 0)*d.Rho[i] + complex(s, 0)*full.Rho[i]
			}
		})
		gd, err := GlobalDepolarizing(p, s)
		if err != nil {
			t.Fatal(err)
		}
		cmp("global depolarizing", gd, dm)
		dm2 := noisyRun(t, c, end, func(d *Density) { d.DepolarizeAll(s) })
		cmp("DepolarizeAll", gd, dm2)
		acc, acc2 := 0.0, 0.0
		for k := 0; k < 1<<q; k++ {
			acc += p[k]
			acc2 += gd[k]
		}
		if !scalar.EqualWithinAbsOrRel(acc2, (1-s)*acc+s/2, tol, tol) {
			t.Errorf("%+v: p_acc' = %v, want (1-s) p_acc + s/2 = %v", tc, acc2, (1-s)*acc+s/2)
		}

		const lambda = 0.36
		dm = noisyRun(t, c, finalH, func(d *Density) { d.PhaseDamp(c.Regs.Ancilla, lambda) })
		ad, err := AncillaDephasing(p, lambda)
		if err != nil {
			t.Fatal(err)
		}
		cmp("ancilla dephasing", ad, dm)

		const p01, p10 = 0.04, 0.11
		dm = noisyRun(t, c, end, func(d *Density) {
			d.ApplyKraus1(c.Regs.Ancilla, ReadoutKraus(p01, p10))
			for _, cq := range c.Regs.Class {
				d.ApplyKraus1(cq, ReadoutKraus(p01, p10))
			}
		})
		ro, err := Readout(p, p01, p10)
		if err != nil {
			t.Fatal(err)
		}
		cmp("readout", ro, dm)
		// Simulate applies the same readout error.
		sim, err := Outcomes(c, Options{Noise: NoiseModel{Readout: [2]float64{p01, p10}}})
		if err != nil {
			t.Fatal(err)
		}
		cmp("Outcomes readout", sim, ro)
	}
	for _, bad := range []func() error{
		func() error { _, err := GlobalDepolarizing([]float64{0.5, 0.5}, 1.2); return err },
		func() error { _, err := GlobalDepolarizing([]float64{0.5, 0.2, 0.3}, 0.1); return err },
		func() error { _, err := AncillaDephasing([]float64{0.5, -0.5}, 0.1); return err },
		func() error { _, err := Readout([]float64{1, 0}, 0.1, math.NaN()); return err },
	} {
		if err := bad(); err == nil || !strings.HasPrefix(err.Error(), "sim: ") {
			t.Errorf("bad input: error %v", err)
		}
	}
}

// TestNoisyMethodsAgree compares the full noisy simulation (density matrix)
// with readout applied, for a model with every channel, against itself
// through Auto, and checks that the distribution sums to 1 and that gate
// noise moves it away from the noiseless one.
func TestNoisyMethodsAgree(t *testing.T) {
	rng := rand.New(rand.NewPCG(27, 28))
	c := randomInstance(rng, 4, 3, 2, false).compile(t)
	m := NoiseModel{Depolarizing: [2]float64{0.01, 0.03}, AmplitudeDamping: 0.01, PhaseDamping: 0.02, Readout: [2]float64{0.02, 0.05}}
	auto, err := Simulate(context.Background(), c, Options{Noise: m})
	if err != nil {
		t.Fatal(err)
	}
	if auto.Method != DensityMatrix {
		t.Errorf("auto chose %s for %d noisy qubits, want density", auto.Method, c.NQubits)
	}
	clean, _ := Outcomes(c, Options{})
	sum, diff := 0.0, 0.0
	for i, v := range auto.P {
		sum += v
		diff += math.Abs(v - clean[i])
	}
	if !scalar.EqualWithinAbsOrRel(sum, 1, 1e-12, 0) || diff < 1e-3 {
		t.Errorf("noisy P = %v (sum %v, distance from noiseless %v)", auto.P, sum, diff)
	}
}
