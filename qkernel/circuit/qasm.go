package circuit

import (
	"fmt"
	"strconv"
	"strings"
)

// QASMOptions selects the dialect and the qubit names of QASM.
type QASMOptions struct {
	// Version is 3 (OpenQASM 3 with stdgates.inc; 0 means 3) or 2
	// (OpenQASM 2.0 with qelib1.inc).
	Version int
	// Physical names the qubits q[0] ... q[NQubits-1] of one register q
	// (the qubits of a device) instead of the ancilla, index, data and
	// class registers.
	Physical bool
	// Comment replaces the default header comment (a one-line resource
	// summary); each entry becomes one "// " line.
	Comment []string
}

// QASM3 returns the circuit as OpenQASM 3 text using the gates of
// stdgates.inc (h, x, ry, rz, cx, and sx, rx, cz, swap in device-native
// circuits); see QASM. It is QASM(c, QASMOptions{}).
func QASM3(c *Circuit) (string, error) { return QASM(c, QASMOptions{}) }

// QASM2 returns the circuit as OpenQASM 2.0 text (Cross, Bishop, Smolin &
// Gambetta, "Open Quantum Assembly Language", arXiv:1707.03429) using the
// gates of its qelib1.inc; see QASM. It is QASM(c, QASMOptions{Version: 2}).
func QASM2(c *Circuit) (string, error) { return QASM(c, QASMOptions{Version: 2}) }

// QASM returns the circuit as OpenQASM text. The circuit is decomposed
// first (Decompose: UCRY expanded, then Simplify), so the text holds only
// elementary gates.
//
// Registers: quantum registers ancilla, index, data and class (qubits in
// no register go to a register named work; a register of size zero is
// omitted), or, with Physical, one register q of NQubits qubits. Each
// register with a measured qubit gets a bit register of its size named
// <register>_out, and Measure on qubit i of a register writes bit i of its
// bit register. With Physical the measured qubits of c.Regs.Ancilla and
// c.Regs.Class write ancilla_out and class_out (bit i of class_out is
// c.Regs.Class[i]); any other measured qubit writes bit j of q_out.
//
// OpenQASM 2.0: qelib1.inc of arXiv:1707.03429 holds h, x, rx, ry, rz, cx
// and cz but neither sx nor swap; when the circuit uses them the text
// defines them from qelib1's u3 and cx:
//
//	gate sx a { u3(pi/2,-pi/2,pi/2) a; }    // = rx(pi/2) in qelib1, SX up to the phase exp(i pi/4)
//	gate swap a,b { cx a,b; cx b,a; cx a,b; }
//
// OpenQASM 2.0 defines gates up to a global phase (its rz is u1), which no
// measured probability sees. Measurement is "measure q -> c;".
//
// Angles are printed with 17 significant digits, so the text round-trips
// every float64 exactly and is byte-identical across runs; OpenQASM 2.0's
// grammar wants a decimal point in a real with an exponent, which is
// added (1.0e-05). An invalid circuit yields an error.
func QASM(c *Circuit, opt QASMOptions) (string, error) {
	if err := c.Validate(); err != nil {
		return "", err
	}
	v := opt.Version
	if v == 0 {
		v = 3
	}
	if v != 2 && v != 3 {
		return "", fmt.Errorf("circuit: OpenQASM version %d, want 2 or 3", opt.Version)
	}
	d := c.Decompose()
	type reg struct {
		name     string
		qubits   []int
		measured bool
	}
	owner := make([]*reg, d.NQubits)
	pos := make([]int, d.NQubits)
	var regs []*reg
	if opt.Physical {
		q := &reg{name: "q"}
		for i := range d.NQubits {
			owner[i], pos[i] = q, i
			q.qubits = append(q.qubits, i)
		}
		regs = []*reg{q}
	} else {
		regs = []*reg{
			{name: "ancilla", qubits: []int{d.Regs.Ancilla}},
			{name: "index", qubits: d.Regs.Index},
			{name: "data", qubits: d.Regs.Data},
			{name: "class", qubits: d.Regs.Class},
		}
		for _, r := range regs {
			for i, q := range r.qubits {
				owner[q], pos[q] = r, i
			}
		}
		work := &reg{name: "work"}
		for q := range owner {
			if owner[q] == nil {
				owner[q], pos[q] = work, len(work.qubits)
				work.qubits = append(work.qubits, q)
			}
		}
		regs = append(regs, work)
	}
	name := func(q int) string { return fmt.Sprintf("%s[%d]", owner[q].name, pos[q]) }

	// Bit registers: by quantum register, or (Physical) ancilla_out,
	// class_out and q_out.
	type bitReg struct {
		name string
		size int
	}
	var bitRegs []bitReg
	bitOf := make(map[int]string, 8) // measured qubit -> "reg_out[i]"
	if opt.Physical {
		var anc, cls, other bool
		for _, op := range d.Ops {
			if op.Gate != Measure {
				continue
			}
			switch q := op.Target; {
			case q == d.Regs.Ancilla:
				bitOf[q], anc = "ancilla_out[0]", true
			case indexOf(d.Regs.Class, q) >= 0:
				bitOf[q], cls = fmt.Sprintf("class_out[%d]", indexOf(d.Regs.Class, q)), true
			default:
				bitOf[q], other = fmt.Sprintf("q_out[%d]", q), true
			}
		}
		if anc {
			bitRegs = append(bitRegs, bitReg{"ancilla_out", 1})
		}
		if cls {
			bitRegs = append(bitRegs, bitReg{"class_out", len(d.Regs.Class)})
		}
		if other {
			bitRegs = append(bitRegs, bitReg{"q_out", d.NQubits})
		}
	} else {
		for _, op := range d.Ops {
			if op.Gate == Measure {
				owner[op.Target].measured = true
				bitOf[op.Target] = fmt.Sprintf("%s_out[%d]", owner[op.Target].name, pos[op.Target])
			}
		}
		for _, r := range regs {
			if r.measured {
				bitRegs = append(bitRegs, bitReg{r.name + "_out", len(r.qubits)})
			}
		}
	}

	angle := formatAngle
	if v == 2 {
		angle = formatAngle2
	}
	var b strings.Builder
	if v == 3 {
		b.WriteString("OPENQASM 3.0;\n")
		b.WriteString("include \"stdgates.inc\";\n\n")
	} else {
		b.WriteString("OPENQASM 2.0;\n")
		b.WriteString("include \"qelib1.inc\";\n\n")
	}
	if len(opt.Comment) > 0 {
		for _, line := range opt.Comment {
			fmt.Fprintf(&b, "// %s\n", line)
		}
	} else {
		res := d.Count(d.Regs)
		fmt.Fprintf(&b, "// interference classifier: %d qubits, %d cx, %d single-qubit gates, depth %d\n",
			res.Qubits, res.CNOT, res.SingleQubit, res.Depth)
	}
	if v == 2 {
		var sx, swap bool
		for _, op := range d.Ops {
			sx = sx || op.Gate == SX
			swap = swap || op.Gate == SWAP
		}
		if sx {
			b.WriteString("gate sx a { u3(pi/2,-pi/2,pi/2) a; }\n")
		}
		if swap {
			b.WriteString("gate swap a,b { cx a,b; cx b,a; cx a,b; }\n")
		}
	}
	for _, r := range regs {
		if len(r.qubits) > 0 {
			if v == 3 {
				fmt.Fprintf(&b, "qubit[%d] %s;\n", len(r.qubits), r.name)
			} else {
				fmt.Fprintf(&b, "qreg %s[%d];\n", r.name, len(r.qubits))
			}
		}
	}
	for _, r := range bitRegs {
		if v == 3 {
			fmt.Fprintf(&b, "bit[%d] %s;\n", r.size, r.name)
		} else {
			fmt.Fprintf(&b, "creg %s[%d];\n", r.name, r.size)
		}
	}
	b.WriteString("\n")
	sep := ", "
	if v == 2 {
		sep = ","
	}
	for _, op := range d.Ops {
		switch op.Gate {
		case H, X, SX:
			fmt.Fprintf(&b, "%s %s;\n", op.Gate, name(op.Target))
		case RX, RY, RZ:
			fmt.Fprintf(&b, "%s(%s) %s;\n", op.Gate, angle(op.Angle), name(op.Target))
		case CNOT, CZ, SWAP:
			fmt.Fprintf(&b, "%s %s%s%s;\n", op.Gate, name(op.Controls[0]), sep, name(op.Target))
		case Measure:
			if v == 3 {
				fmt.Fprintf(&b, "%s = measure %s;\n", bitOf[op.Target], name(op.Target))
			} else {
				fmt.Fprintf(&b, "measure %s -> %s;\n", name(op.Target), bitOf[op.Target])
			}
		default:
			// Decompose leaves no UCRY and Validate rejects unknown gates.
			panic(fmt.Sprintf("circuit: gate %s left after Decompose", op.Gate))
		}
	}
	return b.String(), nil
}

func indexOf(s []int, v int) int {
	for i, x := range s {
		if x == v {
			return i
		}
	}
	return -1
}

// formatAngle prints an angle with 17 significant digits (%.17g); negative
// zero prints as 0.
func formatAngle(a float64) string {
	if a == 0 { // exact test: only to print -0 as 0
		return "0"
	}
	return strconv.FormatFloat(a, 'g', 17, 64)
}

// formatAngle2 is formatAngle with a decimal point before any exponent, as
// the OpenQASM 2.0 grammar's real literal requires (arXiv:1707.03429,
// appendix: real := ([0-9]+\.[0-9]*|[0-9]*\.[0-9]+)([eE][-+]?[0-9]+)?).
func formatAngle2(a float64) string {
	s := formatAngle(a)
	if i := strings.IndexByte(s, 'e'); i >= 0 && !strings.Contains(s[:i], ".") {
		s = s[:i] + ".0" + s[i:]
	}
	return s
}
