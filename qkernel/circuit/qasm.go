package circuit

import (
	"fmt"
	"strconv"
	"strings"
)

// QASM3 returns the circuit as OpenQASM 3 text using the gates of
// stdgates.inc (h, x, ry, rz, cx). UCRY operations are decomposed first.
// Quantum registers are named ancilla, index, data and class (qubits not in
// any register go to a register named work); a register of size zero is
// omitted. Each register with a measured qubit gets a bit register of the
// same size named <register>_out, and Measure on qubit i of a register writes
// bit i of its bit register. Angles are printed with %.17g, so the text
// round-trips every float64 exactly and is byte-identical across runs.
// An invalid circuit yields an error.
func QASM3(c *Circuit) (string, error) {
	if err := c.Validate(); err != nil {
		return "", err
	}
	d := c.Decompose()
	type reg struct {
		name     string
		qubits   []int
		measured bool
	}
	regs := []*reg{
		{name: "ancilla", qubits: []int{d.Regs.Ancilla}},
		{name: "index", qubits: d.Regs.Index},
		{name: "data", qubits: d.Regs.Data},
		{name: "class", qubits: d.Regs.Class},
	}
	owner := make([]*reg, d.NQubits)
	pos := make([]int, d.NQubits)
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
	for _, op := range d.Ops {
		if op.Gate == Measure {
			owner[op.Target].measured = true
		}
	}
	name := func(q int) string { return fmt.Sprintf("%s[%d]", owner[q].name, pos[q]) }

	res := c.Resources()
	var b strings.Builder
	b.WriteString("OPENQASM 3.0;\n")
	b.WriteString("include \"stdgates.inc\";\n\n")
	fmt.Fprintf(&b, "// interference classifier: %d qubits, %d cx, %d single-qubit gates, depth %d\n",
		res.Qubits, res.CNOT, res.SingleQubit, res.Depth)
	for _, r := range regs {
		if len(r.qubits) > 0 {
			fmt.Fprintf(&b, "qubit[%d] %s;\n", len(r.qubits), r.name)
		}
	}
	for _, r := range regs {
		if r.measured {
			fmt.Fprintf(&b, "bit[%d] %s_out;\n", len(r.qubits), r.name)
		}
	}
	b.WriteString("\n")
	for _, op := range d.Ops {
		switch op.Gate {
		case H, X:
			fmt.Fprintf(&b, "%s %s;\n", op.Gate, name(op.Target))
		case RY, RZ:
			fmt.Fprintf(&b, "%s(%s) %s;\n", op.Gate, formatAngle(op.Angle), name(op.Target))
		case CNOT:
			fmt.Fprintf(&b, "cx %s, %s;\n", name(op.Controls[0]), name(op.Target))
		case Measure:
			fmt.Fprintf(&b, "%s_out[%d] = measure %s;\n", owner[op.Target].name, pos[op.Target], name(op.Target))
		default:
			// Decompose leaves no UCRY and Validate rejects unknown gates.
			panic(fmt.Sprintf("circuit: gate %s left after Decompose", op.Gate))
		}
	}
	return b.String(), nil
}

// formatAngle prints an angle with 17 significant digits (%.17g); negative
// zero prints as 0.
func formatAngle(a float64) string {
	if a == 0 { // exact test: only to print -0 as 0
		return "0"
	}
	return strconv.FormatFloat(a, 'g', 17, 64)
}
