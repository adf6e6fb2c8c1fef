package circuit

import (
	"fmt"
	"math"
	"math/rand/v2"
	"regexp"
	"strconv"
	"strings"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
)

// parseQASM reads back the subset of OpenQASM 3 that QASM3 writes: qubit
// register declarations (laid out in declaration order), h, x, ry, rz, cx
// and measure. It returns the ops, the total qubit count and the qubit
// offset of each register.
func parseQASM(t *testing.T, text string) ([]Op, int, map[string]int) {
	t.Helper()
	decl := regexp.MustCompile(`^qubit\[(\d+)\] (\w+);$`)
	gate := regexp.MustCompile(`^(h|x|ry|rz)(?:\(([^)]*)\))? (\w+)\[(\d+)\];$`)
	cx := regexp.MustCompile(`^cx (\w+)\[(\d+)\], (\w+)\[(\d+)\];$`)
	meas := regexp.MustCompile(`^(\w+)_out\[(\d+)\] = measure (\w+)\[(\d+)\];$`)
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
	for _, line := range strings.Split(text, "\n") {
		switch {
		case line == "", strings.HasPrefix(line, "//"), strings.HasPrefix(line, "OPENQASM"),
			strings.HasPrefix(line, "include"), strings.HasPrefix(line, "bit["):
		case decl.MatchString(line):
			m := decl.FindStringSubmatch(line)
			size, _ := strconv.Atoi(m[1])
			offset[m[2]] = n
			n += size
		case gate.MatchString(line):
			m := gate.FindStringSubmatch(line)
			op := Op{Target: qubit(m[3], m[4])}
			switch m[1] {
			case "h":
				op.Gate = H
			case "x":
				op.Gate = X
			case "ry", "rz":
				op.Gate = RY
				if m[1] == "rz" {
					op.Gate = RZ
				}
				a, err := strconv.ParseFloat(m[2], 64)
				if err != nil {
					t.Fatalf("angle in %q: %v", line, err)
				}
				op.Angle = a
			}
			ops = append(ops, op)
		case cx.MatchString(line):
			m := cx.FindStringSubmatch(line)
			ops = append(ops, Op{Gate: CNOT, Controls: []int{qubit(m[1], m[2])}, Target: qubit(m[3], m[4])})
		case meas.MatchString(line):
			m := meas.FindStringSubmatch(line)
			if m[1] != m[3] || m[2] != m[4] {
				t.Fatalf("measurement into another register: %q", line)
			}
			ops = append(ops, Op{Gate: Measure, Target: qubit(m[3], m[4])})
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
	for _, tc := range []struct{ M, d, C int }{{3, 3, 2}, {5, 4, 3}, {2, 1, 2}} {
		in := randomInstance(rng, tc.M, tc.d, tc.C, true)
		c, err := Compile(in.test, in.train, in.y, in.nClass, in.w)
		if err != nil {
			t.Fatal(err)
		}
		text, err := QASM3(c)
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
			// 1e-12: %.17g angles round-trip exactly; the rest is rounding.
			if !scalar.EqualWithinAbsOrRel(got[i], want[i], 1e-12, 1e-12) {
				t.Errorf("%+v: P[%d] from QASM %v, closed form %v", tc, i, got[i], want[i])
			}
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
