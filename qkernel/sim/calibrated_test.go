package sim

import (
	"context"
	"math"
	"math/cmplx"
	"math/rand/v2"
	"strings"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"

	"fringe/qkernel/circuit"
)

// czMatrix and swapMatrix are the 2^n matrices of CZ and SWAP on (a, b).
func czMatrix(n, a, b int) dense {
	m := newDense(1 << n)
	for i := range m {
		m[i][i] = 1
		if i>>a&1 == 1 && i>>b&1 == 1 {
			m[i][i] = -1
		}
	}
	return m
}

func swapMatrix(n, a, b int) dense {
	m := newDense(1 << n)
	for i := range m {
		j := i
		if i>>a&1 != i>>b&1 {
			j = i ^ (1<<a | 1<<b)
		}
		m[j][i] = 1
	}
	return m
}

// TestDeviceGates checks SX and RX (unitary, SX^2 = X, SX = exp(i pi/4)
// RX(pi/2), RX(pi) = -i X, all by hand from the matrices in their docs) and
// the CZ and SWAP kernels of State and Density against dense matrices
// (rho -> U rho U^dagger) on random states. 1e-13: a few products of
// entries of modulus <= 1.
func TestDeviceGates(t *testing.T) {
	sx, _ := GateMatrix(circuit.SX, 0)
	x, _ := GateMatrix(circuit.X, 0)
	rx := func(a float64) Matrix { m, _ := GateMatrix(circuit.RX, a); return m }
	mul := func(a, b Matrix) Matrix {
		var c Matrix
		for i := range 2 {
			for j := range 2 {
				for k := range 2 {
					c[i][j] += a[i][k] * b[k][j]
				}
			}
		}
		return c
	}
	near := func(a, b Matrix, what string) {
		t.Helper()
		for i := range 2 {
			for j := range 2 {
				if cmplx.Abs(a[i][j]-b[i][j]) > 1e-13 {
					t.Fatalf("%s: %v vs %v", what, a, b)
				}
			}
		}
	}
	near(mul(sx, sx), x, "SX^2 = X")
	ph := cmplx.Exp(complex(0, math.Pi/4))
	r2 := rx(math.Pi / 2)
	near(sx, Matrix{{ph * r2[0][0], ph * r2[0][1]}, {ph * r2[1][0], ph * r2[1][1]}}, "SX = e^{i pi/4} RX(pi/2)")
	near(rx(math.Pi), Matrix{{0, -1i}, {-1i, 0}}, "RX(pi) = -i X")
	for _, u := range []Matrix{sx, rx(0.7), rx(-2.9)} {
		var ud Matrix
		for i := range 2 {
			for j := range 2 {
				ud[i][j] = cmplx.Conj(u[j][i])
			}
		}
		near(mul(ud, u), Matrix{{1, 0}, {0, 1}}, "unitary")
	}

	rng := rand.New(rand.NewPCG(51, 52))
	const n = 3
	for _, tc := range []struct {
		gate circuit.Gate
		a, b int
		m    dense
	}{
		{circuit.CZ, 0, 2, czMatrix(n, 0, 2)}, {circuit.CZ, 2, 1, czMatrix(n, 2, 1)},
		{circuit.SWAP, 0, 2, swapMatrix(n, 0, 2)}, {circuit.SWAP, 1, 0, swapMatrix(n, 1, 0)},
	} {
		op := circuit.Op{Gate: tc.gate, Controls: []int{tc.a}, Target: tc.b}
		psi := randomAmps(rng, n)
		s := &State{N: n, Amp: append([]complex128(nil), psi...)}
		s.ApplyOp(op)
		for r := range psi {
			var want complex128
			for c := range psi {
				want += tc.m[r][c] * psi[c]
			}
			if cmplx.Abs(s.Amp[r]-want) > 1e-13 {
				t.Fatalf("state %s(%d,%d): amp %d = %v, want %v", tc.gate, tc.a, tc.b, r, s.Amp[r], want)
			}
		}
		rho := randomDensity(rng, n)
		d := densityFromDense(n, rho)
		d.ApplyOp(op)
		want := tc.m.mul(rho).mul(tc.m.adjoint())
		for r := range want {
			for c := range want {
				if cmplx.Abs(d.At(r, c)-want[r][c]) > 1e-13 {
					t.Fatalf("density %s(%d,%d): rho[%d][%d] = %v, want %v", tc.gate, tc.a, tc.b, r, c, d.At(r, c), want[r][c])
				}
			}
		}
	}
}

// TestThermalRelaxationByHand checks the channel on a general density
// matrix against its defining decay laws (derived by hand from
// RelaxationParams: rho11 -> exp(-t/T1) rho11, rho01 -> exp(-t/T2) rho01,
// trace kept), and the parameter errors.
func TestThermalRelaxationByHand(t *testing.T) {
	for _, tc := range []struct{ t, T1, T2 float64 }{
		{0.3, 100, 80}, {50, 100, 200}, {50, 100, 20}, {0, 10, 5}, {7, math.Inf(1), 30}, {7, 40, math.Inf(1)},
	} {
		T2 := tc.T2
		if math.IsInf(T2, 1) && !math.IsInf(tc.T1, 1) {
			continue // T2 = Inf needs T1 = Inf (T2 <= 2 T1)
		}
		s, err := ThermalRelaxationSuperop(tc.t, tc.T1, T2)
		if err != nil {
			t.Fatalf("%+v: %v", tc, err)
		}
		rho := [4]complex128{0.35, 0.2 - 0.15i, 0.2 + 0.15i, 0.65} // (rho00, rho01, rho10, rho11)
		var out [4]complex128
		for i := range 4 {
			for j := range 4 {
				out[i] += s[i][j] * rho[j]
			}
		}
		p1 := 0.65 * math.Exp(-tc.t/tc.T1)
		coh := (0.2 - 0.15i) * complex(math.Exp(-tc.t/T2), 0)
		// 1e-15: one exponential and a few products.
		if !scalar.EqualWithinAbs(real(out[3]), p1, 1e-15) || !scalar.EqualWithinAbs(real(out[0]), 1-p1, 1e-15) ||
			cmplx.Abs(out[1]-coh) > 1e-15 || cmplx.Abs(out[2]-cmplx.Conj(coh)) > 1e-15 {
			t.Errorf("%+v: rho' = %v, want p1 %v, rho01 %v", tc, out, p1, coh)
		}
		ks, _ := ThermalRelaxationKraus(tc.t, tc.T1, T2)
		if _, err := NewChannel(ks); err != nil {
			t.Errorf("%+v: %v", tc, err)
		}
	}
	for _, tc := range []struct {
		t, T1, T2 float64
		want      string
	}{
		{-1, 10, 10, "time span"}, {1, 0, 10, "T1"}, {1, 10, -1, "T2"}, {1, 10, 20.001, "exceeds 2 T1"}, {math.NaN(), 1, 1, "time span"},
	} {
		if _, _, err := RelaxationParams(tc.t, tc.T1, tc.T2); err == nil || !strings.Contains(err.Error(), tc.want) {
			t.Errorf("%+v: error %v, want %q", tc, err, tc.want)
		}
	}
	if _, _, err := RelaxationParams(1, 10, 20*(1+1e-13)); err != nil {
		t.Errorf("T2 = 2 T1 up to rounding: %v", err)
	}
}

// TestDepolarizingForError: without other noise p = r d/(d-1) (Nielsen
// 2002, quant-ph/0205035, for the depolarizing channel); with relaxation
// the composed channel has average gate fidelity 1 - r by AverageFidelity
// (checked on the composed superoperator, one and two qubits); too much
// relaxation gives p = 0.
func TestDepolarizingForError(t *testing.T) {
	for _, d := range []int{2, 4} {
		p, ok := DepolarizingForError(0.01, float64(d*d), d)
		// 1e-15: a few divisions.
		if !ok || !scalar.EqualWithinAbs(p, 0.01*float64(d)/float64(d-1), 1e-15) {
			t.Errorf("d=%d: p = %v, want %v", d, p, 0.01*float64(d)/float64(d-1))
		}
	}
	relax, _ := ThermalRelaxationSuperop(35, 80e3, 60e3) // 35 ns on a 80 us / 60 us qubit
	r := 3e-4
	p, ok := DepolarizingForError(r, relax.ProcessTrace(), 2)
	if !ok {
		t.Fatal("relaxation alone exceeds the error")
	}
	comp := relax.Then(DepolarizingSuperop(p))
	// 1e-14: the trace of a product of 4x4 matrices near identity.
	if f := AverageFidelity(comp.ProcessTrace(), 2); !scalar.EqualWithinAbs(f, 1-r, 1e-14) {
		t.Errorf("one qubit: composed F_avg = %v, want %v", f, 1-r)
	}
	// Two qubits: the relaxation superoperator is a tensor product, whose
	// trace is the product; the two-qubit depolarizing channel's trace is
	// (1-p) tr + p (derived by hand: the completely depolarizing channel
	// rho -> I/4 Tr rho has trace 1).
	tr2 := relax.ProcessTrace() * relax.ProcessTrace()
	p2, ok := DepolarizingForError(0.01, tr2, 4)
	if f := AverageFidelity((1-p2)*tr2+p2, 4); !ok || !scalar.EqualWithinAbs(f, 0.99, 1e-14) {
		t.Errorf("two qubits: F_avg = %v, want 0.99", f)
	}
	long, _ := ThermalRelaxationSuperop(1e4, 20e3, 10e3)
	if p, ok := DepolarizingForError(1e-4, long.ProcessTrace(), 2); ok || p != 0 {
		t.Errorf("relaxation above the error: p = %v ok %v, want 0 false", p, ok)
	}
}

// noisyFromModel builds the NoisyCircuit that carries the gate-level
// NoiseModel m (depolarizing, then amplitude damping, then phase damping
// after every gate, as NoiseModel documents) on the decomposed circuit.
func noisyFromModel(t *testing.T, c *circuit.Circuit, m NoiseModel) *NoisyCircuit {
	t.Helper()
	d := c.Decompose()
	ks := AmplitudeDampingKraus(m.AmplitudeDamping)
	var pd []Matrix
	for _, a := range PhaseDampingKraus(m.PhaseDamping) {
		for _, b := range ks {
			var p Matrix
			for i := range 2 {
				for j := range 2 {
					for k := range 2 {
						p[i][j] += a[i][k] * b[k][j]
					}
				}
			}
			pd = append(pd, p)
		}
	}
	damp, err := NewChannel(pd)
	if err != nil {
		t.Fatal(err)
	}
	nc := &NoisyCircuit{NQubits: d.NQubits, Regs: d.Regs}
	ro := make([][2]float64, d.NQubits)
	for q := range ro {
		ro[q] = m.Readout
	}
	nc.Readout = ro
	for _, op := range d.Ops {
		to := TimedOp{Op: op}
		switch {
		case op.Gate == circuit.Measure:
		case len(op.Controls) == 1:
			to.Depolarizing = m.Depolarizing[1]
			to.After = [2]*Channel{damp, damp}
		default:
			to.Depolarizing = m.Depolarizing[0]
			to.After[0] = damp
		}
		nc.Ops = append(nc.Ops, to)
	}
	return nc
}

// TestSimulateNoisyMatchesModel: a NoisyCircuit that carries the
// gate-level NoiseModel gives the distribution of Simulate with that model
// (density matrix, 1e-12: the same channels composed in another grouping,
// rounding only), and the trajectories agree with it within 5 standard
// errors.
func TestSimulateNoisyMatchesModel(t *testing.T) {
	rng := rand.New(rand.NewPCG(53, 54))
	c := randomInstance(rng, 4, 3, 2, false).compile(t)
	m := NoiseModel{Depolarizing: [2]float64{0.01, 0.03}, AmplitudeDamping: 0.01, PhaseDamping: 0.02, Readout: [2]float64{0.02, 0.05}}
	want, err := Simulate(context.Background(), c, Options{Noise: m, Method: DensityMatrix})
	if err != nil {
		t.Fatal(err)
	}
	nc := noisyFromModel(t, c, m)
	got, err := SimulateNoisy(context.Background(), nc, Options{})
	if err != nil {
		t.Fatal(err)
	}
	if got.Method != DensityMatrix {
		t.Errorf("auto chose %s", got.Method)
	}
	for i := range want.P {
		if !scalar.EqualWithinAbs(got.P[i], want.P[i], 1e-12) {
			t.Errorf("P[%d] = %v, Simulate %v", i, got.P[i], want.P[i])
		}
	}
	tr, err := SimulateNoisy(context.Background(), nc, Options{Method: Trajectories, Trajectories: 2000, Rng: rand.New(rand.NewPCG(1, 2))})
	if err != nil {
		t.Fatal(err)
	}
	for i := range want.P {
		if se := tr.StdErr[i]; math.Abs(tr.P[i]-want.P[i]) > 5*se+1e-12 {
			t.Errorf("trajectories P[%d] = %v +- %v, density %v", i, tr.P[i], se, want.P[i])
		}
	}
}

// TestSimulateNoisyChannels checks Before, After and Final channels and
// per-qubit readout against a slow dense reference (rho as a 2^n matrix,
// every channel applied as sum K rho K^dagger, readout as a confusion
// matrix per measured bit), 1e-12 (rounding only).
func TestSimulateNoisyChannels(t *testing.T) {
	const n = 3
	relax := func(tt, T1, T2 float64) *Channel {
		ks, err := ThermalRelaxationKraus(tt, T1, T2)
		if err != nil {
			t.Fatal(err)
		}
		ch, _ := NewChannel(ks)
		return ch
	}
	a, b, c := relax(0.5, 10, 7), relax(2, 5, 9), relax(1, 3, 1)
	ops := []TimedOp{
		{Op: circuit.Op{Gate: circuit.H, Target: 0}, Depolarizing: 0.02, After: [2]*Channel{a}},
		{Op: circuit.Op{Gate: circuit.SX, Target: 1}, Before: [2]*Channel{b}},
		{Op: circuit.Op{Gate: circuit.CZ, Controls: []int{1}, Target: 0}, Before: [2]*Channel{nil, c}, Depolarizing: 0.05, After: [2]*Channel{b, a}},
		{Op: circuit.Op{Gate: circuit.RX, Target: 2, Angle: 0.9}},
		{Op: circuit.Op{Gate: circuit.CNOT, Controls: []int{2}, Target: 1}, Depolarizing: 0.01, After: [2]*Channel{c, nil}},
		{Op: circuit.Op{Gate: circuit.RZ, Target: 0, Angle: -1.3}, Before: [2]*Channel{c}},
		{Op: circuit.Op{Gate: circuit.SWAP, Controls: []int{0}, Target: 2}, Depolarizing: 0.03},
		{Op: circuit.Op{Gate: circuit.Measure, Target: 1}},
		{Op: circuit.Op{Gate: circuit.Measure, Target: 2}},
	}
	nc := &NoisyCircuit{NQubits: n, Regs: circuit.Layout{Ancilla: 1, Class: []int{2}}, Ops: ops,
		Final:   []*Channel{nil, a, b},
		Readout: [][2]float64{{0.3, 0.3}, {0.02, 0.04}, {0.01, 0.07}}}
	got, err := SimulateNoisy(context.Background(), nc, Options{})
	if err != nil {
		t.Fatal(err)
	}

	rho := newDense(1 << n)
	rho[0][0] = 1
	kraus := func(q int, ch *Channel) {
		if ch != nil {
			rho = applyKrausDense(rho, n, q, ch.Kraus)
		}
	}
	unitary := func(u dense) { rho = u.mul(rho).mul(u.adjoint()) }
	depol := func(qs []int, p float64) {
		if p == 0 {
			return
		}
		// (1-p) rho + p/d^2 sum_P P rho P over all Paulis on qs (the
		// Pauli twirl form of rho -> (1-p) rho + p I/d Tr_qs rho, N&C 8.3.4).
		out := newDense(1 << n)
		d2 := 1 << (2 * len(qs))
		for k := range d2 {
			u := embed1(n, qs[0], pauli[k&3])
			if len(qs) == 2 {
				u = u.mul(embed1(n, qs[1], pauli[k>>2]))
			}
			term := u.mul(rho).mul(u.adjoint())
			for i := range out {
				for j := range out {
					out[i][j] += complex(p/float64(d2), 0) * term[i][j]
				}
			}
		}
		for i := range out {
			for j := range out {
				out[i][j] += complex(1-p, 0) * rho[i][j]
			}
		}
		rho = out
	}
	for _, o := range ops {
		op := o.Op
		if op.Gate == circuit.Measure {
			continue
		}
		qs := op.Qubits()
		for j, q := range qs {
			kraus(q, o.Before[j])
		}
		switch op.Gate {
		case circuit.CZ:
			unitary(czMatrix(n, qs[0], qs[1]))
		case circuit.SWAP:
			unitary(swapMatrix(n, qs[0], qs[1]))
		case circuit.CNOT:
			unitary(cnotMatrix(n, op.Controls[0], op.Target))
		default:
			u, _ := GateMatrix(op.Gate, op.Angle)
			unitary(embed1(n, op.Target, u))
		}
		depol(qs, o.Depolarizing)
		for j, q := range qs {
			kraus(q, o.After[j])
		}
	}
	for q, ch := range nc.Final {
		kraus(q, ch)
	}
	// Joint (ancilla = qubit 1, class = qubit 2), then confusion matrices.
	want := make([]float64, 4)
	for bb := range rho {
		want[(bb>>1&1)<<1|bb>>2&1] += real(rho[bb][bb])
	}
	conf := func(p []float64, bit int, p01, p10 float64) []float64 {
		out := append([]float64(nil), p...)
		m := 1 << bit
		for i := range out {
			if i&m == 0 {
				out[i] = (1-p01)*p[i] + p10*p[i|m]
				out[i|m] = p01*p[i] + (1-p10)*p[i|m]
			}
		}
		return out
	}
	want = conf(want, 1, 0.02, 0.04) // ancilla bit: qubit 1
	want = conf(want, 0, 0.01, 0.07) // class bit: qubit 2
	for i := range want {
		if !scalar.EqualWithinAbs(got.P[i], want[i], 1e-12) {
			t.Errorf("P[%d] = %v, dense reference %v", i, got.P[i], want[i])
		}
	}
}

func TestSimulateNoisyErrors(t *testing.T) {
	ok := &NoisyCircuit{NQubits: 2, Ops: []TimedOp{{Op: circuit.Op{Gate: circuit.H, Target: 0}}}}
	a, _ := NewChannel(AmplitudeDampingKraus(0.1))
	for _, tc := range []struct {
		name string
		nc   *NoisyCircuit
		opt  Options
		want string
	}{
		{"nil", nil, Options{}, "nil noisy circuit"},
		{"depol", &NoisyCircuit{NQubits: 1, Ops: []TimedOp{{Op: circuit.Op{Gate: circuit.H}, Depolarizing: 1.5}}}, Options{}, "depolarizing strength of op 0"},
		{"second channel", &NoisyCircuit{NQubits: 1, Ops: []TimedOp{{Op: circuit.Op{Gate: circuit.H}, After: [2]*Channel{nil, a}}}}, Options{}, "second qubit"},
		{"ucry", &NoisyCircuit{NQubits: 1, Ops: []TimedOp{{Op: circuit.Op{Gate: circuit.UCRY, Angles: []float64{1}}}}}, Options{}, "elementary gates"},
		{"readout", &NoisyCircuit{NQubits: 1, Readout: [][2]float64{{0, 2}}}, Options{}, "readout p10 of qubit 0"},
		{"readout len", &NoisyCircuit{NQubits: 2, Readout: [][2]float64{{0, 0}}}, Options{}, "1 readout pairs"},
		{"final len", &NoisyCircuit{NQubits: 2, Final: []*Channel{a}}, Options{}, "1 final channels"},
		{"model", ok, Options{Noise: NoiseModel{PhaseDamping: 0.1}}, "Options.Noise must be zero"},
		{"state vector", ok, Options{Method: StateVector}, "density-matrix or trajectories"},
		{"no rng", ok, Options{Method: Trajectories}, "needs Options.Rng"},
		{"bad qubit", &NoisyCircuit{NQubits: 1, Ops: []TimedOp{{Op: circuit.Op{Gate: circuit.H, Target: 4}}}}, Options{}, "outside"},
	} {
		_, err := SimulateNoisy(context.Background(), tc.nc, tc.opt)
		if err == nil || !strings.Contains(err.Error(), tc.want) || !strings.HasPrefix(err.Error(), "sim: ") && !strings.HasPrefix(err.Error(), "circuit: ") {
			t.Errorf("%s: error %v, want one containing %q", tc.name, err, tc.want)
		}
	}
	if _, err := NewChannel([]Matrix{{{1, 0}, {0, 0.5}}}); err == nil {
		t.Error("non-trace-preserving channel accepted")
	}
}
