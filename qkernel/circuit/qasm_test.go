package circuit

import (
	"fmt"
	"math"
	"math/cmplx"
	"math/rand/v2"
	"regexp"
	"strconv"
	"strings"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
)

// parseQASM reads back the subset of OpenQASM 3 and 2.0 that QASM writes:
// qubit register declarations (laid out in declaration order), h, x, sx,
// rx, ry, rz, cx, cz, swap and measure. It returns the ops, the total qubit
// count and the qubit offset of each register. Gate definitions of the
// OpenQASM 2.0 text (sx, swap) are skipped: the parser applies its own
// matrices, and TestQASM2Definitions checks the definitions.
func parseQASM(t *testing.T, text string) ([]Op, int, map[string]int) {
	t.Helper()
	decl := regexp.MustCompile(`^(?:qubit\[(\d+)\] (\w+)|qreg (\w+)\[(\d+)\]);$`)
	gate := regexp.MustCompile(`^(h|x|sx|rx|ry|rz)(?:\(([^)]*)\))? (\w+)\[(\d+)\];$`)
	two := regexp.MustCompile(`^(cx|cz|swap) (\w+)\[(\d+)\], ?(\w+)\[(\d+)\];$`)
	meas3 := regexp.MustCompile(`^(\w+)_out\[(\d+)\] = measure (\w+)\[(\d+)\];$`)
	meas2 := regexp.MustCompile(`^measure (\w+)\[(\d+)\] -> (\w+)_out\[(\d+)\];$`)
	offset := map[string]int{}
	n := 0
	var ops []Op
	qubit := func(reg, idx string) int {
		o, ok := offset[reg]
		if !ok {
			t.Fatalf("undeclared register %q", reg)
		}
		i, _ := strconv.Atoi(idx)
		return o + i
	}
	names := map[string]Gate{"h": H, "x": X, "sx": SX, "rx": RX, "ry": RY, "rz": RZ, "cx": CNOT, "cz": CZ, "swap": SWAP}
	for _, line := range strings.Split(text, "\n") {
		switch {
		case line == "", strings.HasPrefix(line, "//"), strings.HasPrefix(line, "OPENQASM"),
			strings.HasPrefix(line, "include"), strings.HasPrefix(line, "bit["), strings.HasPrefix(line, "creg "),
			strings.HasPrefix(line, "gate "):
		case decl.MatchString(line):
			m := decl.FindStringSubmatch(line)
			sz, reg := m[1], m[2]
			if sz == "" {
				sz, reg = m[4], m[3]
			}
			size, _ := strconv.Atoi(sz)
			offset[reg] = n
			n += size
		case gate.MatchString(line):
			m := gate.FindStringSubmatch(line)
			op := Op{Gate: names[m[1]], Target: qubit(m[3], m[4])}
			if m[2] != "" {
				a, err := strconv.ParseFloat(m[2], 64)
				if err != nil {
					t.Fatalf("angle in %q: %v", line, err)
				}
				op.Angle = a
			}
			ops = append(ops, op)
		case two.MatchString(line):
			m := two.FindStringSubmatch(line)
			ops = append(ops, Op{Gate: names[m[1]], Controls: []int{qubit(m[2], m[3])}, Target: qubit(m[4], m[5])})
		case meas3.MatchString(line):
			m := meas3.FindStringSubmatch(line)
			if m[1] != m[3] || m[2] != m[4] {
				if m[3] != "q" { // physical register: bits named after the logical registers
					t.Fatalf("measurement into another register: %q", line)
				}
			}
			ops = append(ops, Op{Gate: Measure, Target: qubit(m[3], m[4])})
		case meas2.MatchString(line):
			m := meas2.FindStringSubmatch(line)
			if (m[1] != m[3] || m[2] != m[4]) && m[1] != "q" {
				t.Fatalf("measurement into another register: %q", line)
			}
			ops = append(ops, Op{Gate: Measure, Target: qubit(m[1], m[2])})
		default:
			t.Fatalf("unexpected line %q", line)
		}
	}
	return ops, n, offset
}

// TestQASM3RoundTrip parses the exported text, simulates it with the naive
// reference, and compares the distribution of (ancilla, class) with the
// closed form of Schuld et al. (2017): P(a=0,k) = sum_{m in k} w_m
// ||x~ + x_m||^2/4 and (derived by hand) P(a=1,k) = sum_{m in k} w_m
// ||x~ - x_m||^2/4. Registers are located only from the declarations in
// the text, so this checks the export independently of Layout.
func TestQASM3RoundTrip(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 8))
	for _, version := range []int{3, 2} {
		for _, tc := range []struct{ M, d, C int }{{3, 3, 2}, {5, 4, 3}, {2, 1, 2}, {4, 4, 2}} {
			in := randomInstance(rng, tc.M, tc.d, tc.C, true)
			c, err := Compile(in.test, in.train, in.y, in.nClass, in.w)
			if err != nil {
				t.Fatal(err)
			}
			text, err := QASM(c, QASMOptions{Version: version})
			if err != nil {
				t.Fatal(err)
			}
			ops, n, offset := parseQASM(t, text)
			psi := naiveRun(&Circuit{NQubits: n}, ops)
			nc := len(c.Regs.Class)
			got := make([]float64, 2<<nc)
			for b, a := range psi {
				anc := b >> offset["ancilla"] & 1
				k := 0
				if nc > 0 {
					k = b >> offset["class"] & (1<<nc - 1)
				}
				got[anc<<nc|k] += real(a)*real(a) + imag(a)*imag(a)
			}
			want := make([]float64, 2<<nc)
			xt := unit(in.test)
			for m := range in.train {
				xm := unit(in.train[m])
				plus, minus := 0.0, 0.0
				for i := range xt {
					plus += (xt[i] + xm[i]) * (xt[i] + xm[i])
					minus += (xt[i] - xm[i]) * (xt[i] - xm[i])
				}
				want[in.y[m]] += in.w[m] * plus / 4
				want[1<<nc+in.y[m]] += in.w[m] * minus / 4
			}
			for i := range want {
				// 1e-12: %.17g angles round-trip exactly; the rest is
				// rounding and the dropped dead angles (<= AngleTol).
				if !scalar.EqualWithinAbsOrRel(got[i], want[i], 1e-12, 1e-12) {
					t.Errorf("OpenQASM %d %+v: P[%d] from QASM %v, closed form %v", version, tc, i, got[i], want[i])
				}
			}
		}
	}
}

// TestQASMPhysical exports a circuit with device gates under one physical
// register and reads it back: every gate line names q[i], the measured
// ancilla and class qubits write ancilla_out and class_out, and the text
// simulates to the same distribution as the circuit (1e-12: rounding only).
func TestQASMPhysical(t *testing.T) {
	c := &Circuit{NQubits: 4, Regs: Layout{Ancilla: 2, Class: []int{0}}, Ops: []Op{
		{Gate: SX, Target: 2}, {Gate: RZ, Target: 2, Angle: 0.7}, {Gate: SX, Target: 2},
		{Gate: RX, Target: 1, Angle: -1.1}, {Gate: CZ, Controls: []int{2}, Target: 1},
		{Gate: SWAP, Controls: []int{1}, Target: 0}, {Gate: CNOT, Controls: []int{0}, Target: 3},
		{Gate: RY, Target: 3, Angle: 1e-5},
		{Gate: Measure, Target: 2}, {Gate: Measure, Target: 0},
	}}
	for _, version := range []int{3, 2} {
		text, err := QASM(c, QASMOptions{Version: version, Physical: true, Comment: []string{"device test", "second line"}})
		if err != nil {
			t.Fatal(err)
		}
		for _, want := range []string{"// device test\n// second line\n", "ancilla_out", "class_out"} {
			if !strings.Contains(text, want) {
				t.Errorf("OpenQASM %d: no %q in\n%s", version, want, text)
			}
		}
		if version == 2 && (!strings.Contains(text, "gate sx a {") || !strings.Contains(text, "gate swap a,b {") ||
			!strings.Contains(text, "ry(1.0000000000000001e-05) q[3];") || !strings.Contains(text, "measure q[2] -> ancilla_out[0];")) {
			t.Errorf("OpenQASM 2 text lacks the sx/swap definitions, the 2.0 real form or the measurement:\n%s", text)
		}
		if version == 3 && (!strings.Contains(text, "ry(1.0000000000000001e-05) q[3];") || !strings.Contains(text, "class_out[0] = measure q[0];")) {
			t.Errorf("OpenQASM 3 text:\n%s", text)
		}
		ops, n, _ := parseQASM(t, text)
		checkSameProbs(t, "physical", n, c.Ops, ops)
	}
	if _, err := QASM(c, QASMOptions{Version: 4}); err == nil {
		t.Error("version 4: no error")
	}
}

// TestQASM2Definitions checks the gates that the OpenQASM 2.0 text defines
// against the matrices of package circuit, up to a global phase, with the
// definitions of arXiv:1707.03429: U(theta, phi, lambda) =
// Rz(phi) Ry(theta) Rz(lambda) (eq. (2) of the paper, up to phase) and
// u3 = U.
func TestQASM2Definitions(t *testing.T) {
	// u3(pi/2, -pi/2, pi/2) applied as rz(pi/2), ry(pi/2), rz(-pi/2).
	u3 := []Op{{Gate: RZ, Angle: math.Pi / 2}, {Gate: RY, Angle: math.Pi / 2}, {Gate: RZ, Angle: -math.Pi / 2}}
	rng := rand.New(rand.NewPCG(9, 10))
	for range 5 {
		psi := randomState(rng, 1)
		a := append([]complex128(nil), psi...)
		b := append([]complex128(nil), psi...)
		naiveApply(a, Op{Gate: SX})
		for _, op := range u3 {
			naiveApply(b, op)
		}
		var ip complex128
		for i := range a {
			ip += cmplx.Conj(a[i]) * b[i]
		}
		// 1e-14: three rotations, rounding only.
		if !scalar.EqualWithinAbs(cmplx.Abs(ip), 1, 1e-14) {
			t.Fatalf("sx and u3(pi/2,-pi/2,pi/2) differ beyond a phase: |<a|b>| = %v", cmplx.Abs(ip))
		}
	}
	psi := randomState(rng, 3)
	a := append([]complex128(nil), psi...)
	b := append([]complex128(nil), psi...)
	naiveApply(a, Op{Gate: SWAP, Controls: []int{2}, Target: 0})
	for _, op := range []Op{{Gate: CNOT, Controls: []int{2}, Target: 0}, {Gate: CNOT, Controls: []int{0}, Target: 2}, {Gate: CNOT, Controls: []int{2}, Target: 0}} {
		naiveApply(b, op)
	}
	for i := range a {
		// 1e-15: permutations only.
		if cmplx.Abs(a[i]-b[i]) > 1e-15 {
			t.Fatalf("swap differs from cx a,b; cx b,a; cx a,b at %d", i)
		}
	}
	for _, tc := range []struct {
		a    float64
		want string
	}{
		{1e22, "1.0e+22"},   // exact in float64, so %.17g trims it to one digit
		{-1e22, "-1.0e+22"}, // likewise
		{1e-5, "1.0000000000000001e-05"},
		{0.5, "0.5"}, {3, "3"}, // nninteger is an OpenQASM 2.0 expression too
	} {
		if got := formatAngle2(tc.a); got != tc.want {
			t.Errorf("formatAngle2(%v) = %q, want %q", tc.a, got, tc.want)
		}
	}
}

func TestQASM3Invalid(t *testing.T) {
	_, err := QASM3(&Circuit{NQubits: 1, Ops: []Op{{Gate: H, Target: 3}}})
	if err == nil || !strings.HasPrefix(err.Error(), "circuit: ") {
		t.Errorf("invalid circuit: error %v", err)
	}
	// A qubit outside every register goes to the work register.
	text, err := QASM3(&Circuit{NQubits: 2, Ops: []Op{{Gate: RZ, Target: 1, Angle: -math.Pi / 4}}})
	if err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(text, "qubit[1] work;") || !strings.Contains(text, fmt.Sprintf("rz(%s) work[0];", formatAngle(-math.Pi/4))) {
		t.Errorf("unexpected text:\n%s", text)
	}
}
