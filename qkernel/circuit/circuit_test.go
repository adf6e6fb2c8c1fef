package circuit

import (
	"errors"
	"flag"
	"math"
	"math/cmplx"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
)

var update = flag.Bool("update", false, "rewrite golden files in testdata")

// naiveApply applies one elementary or multiplexed op to a state vector by
// looping over all basis states (a slow, obviously correct reference used
// only here; the fast kernels live in package sim).
func naiveApply(psi []complex128, op Op) {
	bit := func(i, q int) int { return i >> q & 1 }
	switch op.Gate {
	case CNOT:
		c, t := op.Controls[0], op.Target
		for i := range psi {
			if bit(i, c) == 1 && bit(i, t) == 0 {
				j := i | 1<<t
				psi[i], psi[j] = psi[j], psi[i]
			}
		}
		return
	case CZ:
		a, b := op.Controls[0], op.Target
		for i := range psi {
			if bit(i, a) == 1 && bit(i, b) == 1 {
				psi[i] = -psi[i]
			}
		}
		return
	case SWAP:
		a, b := op.Controls[0], op.Target
		for i := range psi {
			if bit(i, a) == 1 && bit(i, b) == 0 {
				j := i&^(1<<a) | 1<<b
				psi[i], psi[j] = psi[j], psi[i]
			}
		}
		return
	case Measure:
		return
	}
	for i := range psi {
		if bit(i, op.Target) != 0 {
			continue
		}
		var u [2][2]complex128
		switch op.Gate {
		case H:
			s := complex(1/math.Sqrt2, 0)
			u = [2][2]complex128{{s, s}, {s, -s}}
		case X:
			u = [2][2]complex128{{0, 1}, {1, 0}}
		case RY, UCRY:
			a := op.Angle
			if op.Gate == UCRY {
				j := 0
				for k, q := range op.Controls {
					j |= bit(i, q) << k
				}
				a = op.Angles[j]
			}
			c, s := complex(math.Cos(a/2), 0), complex(math.Sin(a/2), 0)
			u = [2][2]complex128{{c, -s}, {s, c}}
		case RZ:
			u = [2][2]complex128{{cmplx.Exp(complex(0, -op.Angle/2)), 0}, {0, cmplx.Exp(complex(0, op.Angle/2))}}
		case RX:
			c, s := complex(math.Cos(op.Angle/2), 0), complex(0, -math.Sin(op.Angle/2))
			u = [2][2]complex128{{c, s}, {s, c}}
		case SX:
			// (1/2)[[1+i, 1-i], [1-i, 1+i]] (the matrix stated in the Gate docs).
			u = [2][2]complex128{{(1 + 1i) / 2, (1 - 1i) / 2}, {(1 - 1i) / 2, (1 + 1i) / 2}}
		}
		j := i | 1<<op.Target
		a0, a1 := psi[i], psi[j]
		psi[i] = u[0][0]*a0 + u[0][1]*a1
		psi[j] = u[1][0]*a0 + u[1][1]*a1
	}
}

func naiveRun(c *Circuit, ops []Op) []complex128 {
	psi := make([]complex128, 1<<c.NQubits)
	psi[0] = 1
	for _, op := range ops {
		naiveApply(psi, op)
	}
	return psi
}

func randomState(rng *rand.Rand, n int) []complex128 {
	psi := make([]complex128, 1<<n)
	norm := 0.0
	for i := range psi {
		psi[i] = complex(rng.NormFloat64(), rng.NormFloat64())
		norm += real(psi[i])*real(psi[i]) + imag(psi[i])*imag(psi[i])
	}
	for i := range psi {
		psi[i] /= complex(math.Sqrt(norm), 0)
	}
	return psi
}

// TestDecomposeUCRY checks that the Gray-code sequence of quant-ph/0407010
// acts like the multiplexed rotation on random states, for 0..5 controls in
// scrambled order, and that it uses 2^k RY and 2^k CNOT (k >= 1; one RY and
// no CNOT for k = 0), the counts stated in quant-ph/0407010 for a uniformly
// controlled rotation with k controls.
func TestDecomposeUCRY(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	for k := 0; k <= 5; k++ {
		n := k + 2 // one spectator qubit
		perm := rng.Perm(n)
		op := Op{Gate: UCRY, Target: perm[0], Controls: perm[1 : k+1], Angles: make([]float64, 1<<k)}
		for j := range op.Angles {
			op.Angles[j] = rng.Float64()*8*math.Pi - 4*math.Pi
		}
		c := &Circuit{NQubits: n, Ops: []Op{op}, Regs: Layout{Ancilla: perm[n-1]}}
		if err := c.Validate(); err != nil {
			t.Fatal(err)
		}
		d := c.Expand()
		var nry, ncx int
		for _, o := range d.Ops {
			switch o.Gate {
			case RY:
				nry++
			case CNOT:
				ncx++
			default:
				t.Fatalf("k=%d: unexpected gate %s after Expand", k, o.Gate)
			}
		}
		wantCX := 1 << k
		if k == 0 {
			wantCX = 0
		}
		if nry != 1<<k || ncx != wantCX {
			t.Errorf("k=%d: %d RY, %d CNOT, want %d and %d", k, nry, ncx, 1<<k, wantCX)
		}
		for trial := 0; trial < 3; trial++ {
			psi := randomState(rng, n)
			a := append([]complex128(nil), psi...)
			b := append([]complex128(nil), psi...)
			naiveApply(a, op)
			for _, o := range d.Ops {
				naiveApply(b, o)
			}
			for i := range a {
				// 1e-12: 2^k rotations of angles up to 4pi, each exact to ~1e-16.
				if cmplx.Abs(a[i]-b[i]) > 1e-12 {
					t.Fatalf("k=%d: amplitude %d multiplexed %v decomposed %v", k, i, a[i], b[i])
				}
			}
		}
	}
}

type instance struct {
	test   []float64
	train  [][]float64
	y      []int
	nClass int
	w      []float64
}

func randomInstance(rng *rand.Rand, M, d, nClass int, balanced bool) instance {
	in := instance{test: make([]float64, d), train: make([][]float64, M), y: make([]int, M), nClass: nClass}
	for i := range in.test {
		in.test[i] = rng.NormFloat64()
	}
	for m := range in.train {
		in.train[m] = make([]float64, d)
		for i := range in.train[m] {
			in.train[m][i] = rng.NormFloat64()
		}
		in.y[m] = m % nClass // every class present
		if m >= nClass {
			in.y[m] = rng.IntN(nClass)
		}
	}
	if balanced {
		var err error
		if in.w, err = BalancedWeights(in.y, nClass); err != nil {
			panic(err)
		}
	}
	return in
}

func unit(x []float64) []float64 {
	s := 0.0
	for _, v := range x {
		s += v * v
	}
	out := make([]float64, len(x))
	for i, v := range x {
		out[i] = v / math.Sqrt(s)
	}
	return out
}

// TestCompileState checks the state just before the final H against the
// definition of |D> (Schuld et al. 2017, eq. for |D> with index weights
// sqrt(w_m), as stated in Compile's doc): every amplitude, including the
// zero amplitude of unused index states.
func TestCompileState(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 4))
	for _, tc := range []struct{ M, d, C int }{
		{1, 1, 1}, {1, 3, 2}, {2, 2, 2}, {3, 4, 2}, {5, 3, 3}, {7, 5, 3}, {8, 8, 2}, {6, 1, 2},
	} {
		for _, balanced := range []bool{false, true} {
			in := randomInstance(rng, tc.M, tc.d, tc.C, balanced)
			c, err := Compile(in.test, in.train, in.y, in.nClass, in.w)
			if err != nil {
				t.Fatalf("%+v: %v", tc, err)
			}
			if err := c.Validate(); err != nil {
				t.Fatalf("%+v: %v", tc, err)
			}
			// Drop the final H and measurements.
			last := len(c.Ops) - 2 - len(c.Regs.Class)
			if c.Ops[last].Gate != H {
				t.Fatalf("%+v: op %d is %s, want the final h", tc, last, c.Ops[last].Gate)
			}
			for _, ops := range [][]Op{c.Ops[:last], c.Expand().Ops[:len(c.Expand().Ops)-2-len(c.Regs.Class)]} {
				psi := naiveRun(c, ops)
				want := make([]complex128, len(psi))
				w := in.w
				if w == nil {
					w = make([]float64, tc.M)
					for m := range w {
						w[m] = 1 / float64(tc.M)
					}
				}
				xt := unit(in.test)
				for m := range in.train {
					xm := unit(in.train[m])
					for a, x := range [][]float64{xt, xm} {
						for i, v := range x {
							b := a << c.Regs.Ancilla
							b |= regBits(c.Regs.Index, m)
							b |= regBits(c.Regs.Data, i)
							b |= regBits(c.Regs.Class, in.y[m])
							want[b] += complex(math.Sqrt(w[m]/2)*v, 0)
						}
					}
				}
				for i := range psi {
					// 1e-12: a few dozen rotations, each exact to rounding (~1e-16).
					if cmplx.Abs(psi[i]-want[i]) > 1e-12 {
						t.Fatalf("%+v balanced=%v: amplitude %d = %v, want %v", tc, balanced, i, psi[i], want[i])
					}
				}
			}
		}
	}
}

func regBits(reg []int, v int) int {
	b := 0
	for j, q := range reg {
		b |= (v >> j & 1) << q
	}
	return b
}

// TestCompileResources checks the register sizes and gate counts against
// the formula in doc.go, derived by hand from quant-ph/0407010 (2^k CNOT
// and 2^k RY per rotation with k >= 1 controls) summed over the trees: the
// raw expansion (RawResources) equals it, the simplified circuit
// (Resources) stays within it.
func TestCompileResources(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 6))
	pow := func(k int) int { return 1 << k }
	for _, tc := range []struct{ M, d, C, nm, nd, nc int }{
		{1, 1, 1, 0, 1, 0}, {2, 2, 2, 1, 1, 1}, {3, 3, 3, 2, 2, 2}, {5, 4, 2, 3, 2, 1},
		{16, 8, 3, 4, 3, 2}, {100, 4, 3, 7, 2, 2}, {9, 13, 2, 4, 4, 1},
	} {
		in := randomInstance(rng, tc.M, tc.d, tc.C, false)
		c, err := Compile(in.test, in.train, in.y, in.nClass, nil)
		if err != nil {
			t.Fatal(err)
		}
		r := c.RawResources()
		if r.Index != tc.nm || r.Data != tc.nd || r.Class != tc.nc || r.Ancilla != 1 || r.Qubits != 1+tc.nm+tc.nd+tc.nc {
			t.Errorf("%+v: registers %+v", tc, r)
		}
		ge1 := 0
		if tc.nm >= 1 {
			ge1 = 1
		}
		wantCX := (pow(tc.nm)-2)*ge1 + pow(1+tc.nm)*(pow(tc.nd)-1) + tc.nc*pow(tc.nm)*ge1
		wantRY := (pow(tc.nm) - 1) + pow(1+tc.nm)*(pow(tc.nd)-1) + tc.nc*pow(tc.nm)
		if r.CNOT != wantCX || r.SingleQubit != wantRY+2 || r.Measurements != 1+tc.nc {
			t.Errorf("%+v: cx %d single %d meas %d, want %d, %d, %d", tc, r.CNOT, r.SingleQubit, r.Measurements, wantCX, wantRY+2, 1+tc.nc)
		}
		if r.Depth < 1 || r.Depth > r.CNOT+r.SingleQubit {
			t.Errorf("%+v: depth %d outside [1, %d]", tc, r.Depth, r.CNOT+r.SingleQubit)
		}
		s := c.Resources()
		if s.CNOT > wantCX || s.SingleQubit > wantRY+2 || s.Depth > r.Depth || s.Measurements != 1+tc.nc || s.Qubits != r.Qubits {
			t.Errorf("%+v: simplified %+v exceeds the formula (cx %d, single %d) or the raw depth %d", tc, s, wantCX, wantRY+2, r.Depth)
		}
	}
}

// TestDepth checks Depth on a hand-made circuit: derived by hand, the layers
// are {h q0, h q2}, {cx q0->q1}, {ry q1, cx q2 -> q0}.
func TestDepth(t *testing.T) {
	c := &Circuit{NQubits: 3, Regs: Layout{Ancilla: 0}, Ops: []Op{
		{Gate: H, Target: 0}, {Gate: H, Target: 2},
		{Gate: CNOT, Controls: []int{0}, Target: 1},
		{Gate: RY, Target: 1, Angle: 0.3}, {Gate: CNOT, Controls: []int{2}, Target: 0},
		{Gate: Measure, Target: 0},
	}}
	if r := c.Resources(); r.Depth != 3 || r.CNOT != 2 || r.SingleQubit != 3 || r.Measurements != 1 {
		t.Errorf("resources %+v, want depth 3, 2 cx, 3 single, 1 measurement", r)
	}
}

func TestCompileErrors(t *testing.T) {
	good := [][]float64{{1, 0}, {0, 1}}
	for _, tc := range []struct {
		name   string
		test   []float64
		train  [][]float64
		y      []int
		nClass int
		w      []float64
		want   string
	}{
		{"no train", []float64{1, 0}, nil, nil, 2, nil, "no training vectors"},
		{"empty test", nil, good, []int{0, 1}, 2, nil, "empty test vector"},
		{"labels", []float64{1, 0}, good, []int{0}, 2, nil, "1 labels for 2"},
		{"classes", []float64{1, 0}, good, []int{0, 0}, 0, nil, "0 classes"},
		{"label range", []float64{1, 0}, good, []int{0, 2}, 2, nil, "label 2 of training vector 1"},
		{"ragged", []float64{1, 0}, [][]float64{{1, 0}, {1}}, []int{0, 1}, 2, nil, "training vector 1 has 1 features"},
		{"zero test", []float64{0, 0}, good, []int{0, 1}, 2, nil, "test vector: zero vector"},
		{"zero train", []float64{1, 0}, [][]float64{{1, 0}, {0, 0}}, []int{0, 1}, 2, nil, "training vector 1: zero vector"},
		{"nan", []float64{math.NaN(), 0}, good, []int{0, 1}, 2, nil, "feature 0 = NaN"},
		{"weights len", []float64{1, 0}, good, []int{0, 1}, 2, []float64{1}, "1 weights for 2"},
		{"weights neg", []float64{1, 0}, good, []int{0, 1}, 2, []float64{1.5, -0.5}, "weight 1 = -0.5"},
		{"weights sum", []float64{1, 0}, good, []int{0, 1}, 2, []float64{0.5, 0.6}, "weights sum to"},
	} {
		_, err := Compile(tc.test, tc.train, tc.y, tc.nClass, tc.w)
		if err == nil || !strings.Contains(err.Error(), tc.want) || !strings.HasPrefix(err.Error(), "circuit: ") {
			t.Errorf("%s: error %v, want one containing %q", tc.name, err, tc.want)
		}
	}
	_, err := Compile([]float64{0, 0}, good, []int{0, 1}, 2, nil)
	if !errors.Is(err, ErrZeroVector) {
		t.Errorf("zero test vector: %v does not wrap ErrZeroVector", err)
	}
}

func TestValidateErrors(t *testing.T) {
	for _, tc := range []struct {
		name string
		c    Circuit
		want string
	}{
		{"qubits", Circuit{NQubits: 0}, "0 qubits"},
		{"overlap", Circuit{NQubits: 2, Regs: Layout{Ancilla: 0, Index: []int{0}}}, "qubit 0 in both"},
		{"range", Circuit{NQubits: 2, Ops: []Op{{Gate: H, Target: 2}}}, "qubit 2 outside"},
		{"cx controls", Circuit{NQubits: 2, Ops: []Op{{Gate: CNOT, Target: 1}}}, "0 controls, want 1"},
		{"cx self", Circuit{NQubits: 2, Ops: []Op{{Gate: CNOT, Target: 1, Controls: []int{1}}}}, "equals target"},
		{"angles", Circuit{NQubits: 3, Ops: []Op{{Gate: UCRY, Target: 0, Controls: []int{1, 2}, Angles: []float64{1}}}}, "1 angles for 2 controls"},
		{"nan", Circuit{NQubits: 1, Ops: []Op{{Gate: RY, Target: 0, Angle: math.NaN()}}}, "not finite"},
		{"after measure", Circuit{NQubits: 1, Ops: []Op{{Gate: Measure}, {Gate: H}}}, "after its measurement"},
		{"unknown", Circuit{NQubits: 1, Ops: []Op{{Gate: Gate(99)}}}, "unknown gate"},
	} {
		err := tc.c.Validate()
		if err == nil || !strings.Contains(err.Error(), tc.want) {
			t.Errorf("%s: error %v, want one containing %q", tc.name, err, tc.want)
		}
	}
}

// TestBalancedWeights: derived by hand, labels {0,0,0,1} give
// w = 1/(2*3) for class 0 and 1/(2*1) for class 1.
func TestBalancedWeights(t *testing.T) {
	w, err := BalancedWeights([]int{0, 0, 0, 1}, 2)
	if err != nil {
		t.Fatal(err)
	}
	want := []float64{1.0 / 6, 1.0 / 6, 1.0 / 6, 0.5}
	for i := range w {
		// 1e-15: one division each.
		if !scalar.EqualWithinAbsOrRel(w[i], want[i], 1e-15, 1e-15) {
			t.Errorf("w[%d] = %v, want %v", i, w[i], want[i])
		}
	}
	if _, err := BalancedWeights([]int{0, 3}, 2); err == nil {
		t.Error("label 3 with 2 classes: no error")
	}
}

// TestQASM3Golden compares the export of fixed small instances with the
// files in testdata byte for byte; run `go test -update` to rewrite them
// and review the diff. compile_m4*.qasm has four training vectors with
// uniform weights, whose index tree and class rotations leave dead
// rotations and cancelling CNOTs that Decompose removes.
func TestQASM3Golden(t *testing.T) {
	// Invented instances: training vectors in 3 features, 2 classes.
	test := []float64{0.6, -0.8, 0.1}
	train := [][]float64{{1, 0.2, 0}, {-0.3, 0.9, 0.4}, {0.5, 0.5, -0.5}, {0.1, -0.7, 0.2}}
	for _, tc := range []struct {
		file    string
		m       int
		version int
	}{
		{"compile.qasm", 3, 3},
		{"compile_m4.qasm", 4, 3},
		{"compile_m4_v2.qasm", 4, 2},
	} {
		c, err := Compile(test, train[:tc.m], []int{0, 1, 0, 1}[:tc.m], 2, nil)
		if err != nil {
			t.Fatal(err)
		}
		got, err := QASM(c, QASMOptions{Version: tc.version})
		if err != nil {
			t.Fatal(err)
		}
		path := filepath.Join("testdata", tc.file)
		if *update {
			if err := os.WriteFile(path, []byte(got), 0o644); err != nil {
				t.Fatal(err)
			}
		}
		want, err := os.ReadFile(path)
		if err != nil {
			t.Fatalf("%v (run go test -update to create it)", err)
		}
		if got != string(want) {
			t.Errorf("QASM output differs from %s; run go test -update and review the diff\ngot:\n%s", path, got)
		}
		again, _ := QASM(c, QASMOptions{Version: tc.version})
		if again != got {
			t.Error("QASM not deterministic")
		}
		meas := "ancilla_out[0] = measure ancilla[0];"
		if tc.version == 2 {
			meas = "measure ancilla[0] -> ancilla_out[0];"
		}
		if strings.Contains(got, "ucry") || strings.Contains(got, "(0)") || !strings.Contains(got, meas) {
			t.Errorf("unexpected QASM text:\n%s", got)
		}
	}
}

func TestFormatAngle(t *testing.T) {
	for _, tc := range []struct {
		a    float64
		want string
	}{
		{math.Copysign(0, -1), "0"},
		{math.Pi, "3.1415926535897931"}, // %.17g of float64(pi), common practice
		{-0.5, "-0.5"},
		{0.125, "0.125"}, // exact binary fraction, shortest form
	} {
		if got := formatAngle(tc.a); got != tc.want {
			t.Errorf("formatAngle(%v) = %q, want %q", tc.a, got, tc.want)
		}
	}
}
