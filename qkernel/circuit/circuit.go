package circuit

import (
	"fmt"
	"math"
)

// Gate names one kind of operation in a Circuit.
type Gate uint8

// The gate set. H, X, RY, RZ and CNOT are the elementary gates of the
// decomposed circuit (all in OpenQASM 3 stdgates.inc); UCRY is the
// multiplexed rotation that Compile emits and Decompose expands; Measure reads
// one qubit in the computational basis. SX, RX, CZ and SWAP are the extra
// gates of device-native circuits (package qkernel/device); Compile never
// emits them. Constants keep their values: new gates are appended.
const (
	// H is the Hadamard gate (1/sqrt2)[[1, 1], [1, -1]].
	H Gate = iota
	// X is the Pauli X (NOT) gate [[0, 1], [1, 0]].
	X
	// RY is exp(-i Angle Y/2) = [[cos(Angle/2), -sin(Angle/2)], [sin(Angle/2), cos(Angle/2)]].
	RY
	// RZ is exp(-i Angle Z/2) = diag(exp(-i Angle/2), exp(i Angle/2)).
	RZ
	// CNOT flips Target when its single control (Controls[0]) is 1.
	CNOT
	// Measure reads Target in the computational basis. Simulators defer
	// every measurement to the end of the circuit; no gate may act on a
	// qubit after it has been measured.
	Measure
	// UCRY is a uniformly controlled RY (a multiplexed rotation): when the
	// control qubits read the integer j (Controls[0] is bit 0 of j), RY(Angles[j])
	// acts on Target. len(Angles) == 1 << len(Controls). With no controls it
	// is a plain RY(Angles[0]).
	UCRY
	// SX is the square root of X, (1/2)[[1+i, 1-i], [1-i, 1+i]]
	// = exp(i pi/4) RX(pi/2); SX SX = X exactly. A native gate of devices.
	SX
	// RX is exp(-i Angle X/2) = [[cos(Angle/2), -i sin(Angle/2)], [-i sin(Angle/2), cos(Angle/2)]].
	RX
	// CZ multiplies the basis states with both Controls[0] and Target at 1
	// by -1; it is symmetric in its two qubits.
	CZ
	// SWAP exchanges the states of Controls[0] and Target. Routing inserts
	// it; device translation expands it into three two-qubit native gates.
	SWAP
)

var gateNames = [...]string{H: "h", X: "x", RY: "ry", RZ: "rz", CNOT: "cx", Measure: "measure", UCRY: "ucry",
	SX: "sx", RX: "rx", CZ: "cz", SWAP: "swap"}

// String returns the lower-case name of the gate, its OpenQASM 3
// stdgates.inc name where it has one ("h", "x", "ry", "rz", "cx",
// "measure", "ucry", "sx", "rx", "cz", "swap").
func (g Gate) String() string {
	if int(g) < len(gateNames) {
		return gateNames[g]
	}
	return fmt.Sprintf("gate(%d)", int(g))
}

// Op is one operation of a Circuit.
//
// Target is the qubit acted on (the target of CNOT and UCRY, the measured
// qubit of Measure). Controls holds the single control of CNOT, the other
// qubit of CZ and SWAP, or the multiplexing qubits of UCRY, least
// significant first; it is empty for the other gates. Angle is the rotation
// angle of RY, RZ and RX in radians; Angles the angle vector of UCRY.
type Op struct {
	Gate     Gate
	Target   int
	Controls []int
	Angle    float64
	Angles   []float64
}

// Layout gives the qubit of each register. Register values are read with the
// first listed qubit as the least significant bit: the index register holds
// m = sum_j bit(Index[j]) << j, and likewise for Data (the feature position)
// and Class (the class label k).
//
// A state vector over n qubits is indexed by b = sum_q bit_q << q: qubit 0
// is the least significant bit of the basis index. Compile places the
// ancilla on qubit 0, then the index, data and class registers in that order
// on consecutive qubits.
type Layout struct {
	Ancilla int
	Index   []int
	Data    []int
	Class   []int
}

// Circuit is a list of operations on NQubits qubits with a register layout.
type Circuit struct {
	NQubits int
	Regs    Layout
	Ops     []Op
}

// Validate checks that every qubit is in range, that the registers do not
// overlap, that every operation has the right number of distinct qubits and
// finite angles, and that no gate acts on a qubit after it was measured.
// Simulators and QASM3 call it; an error names the offending operation.
func (c *Circuit) Validate() error {
	if c == nil {
		return fmt.Errorf("circuit: nil circuit")
	}
	if c.NQubits < 1 {
		return fmt.Errorf("circuit: %d qubits, need at least 1", c.NQubits)
	}
	used := make([]string, c.NQubits)
	claim := func(name string, q int) error {
		if q < 0 || q >= c.NQubits {
			return fmt.Errorf("circuit: register %s qubit %d outside [0,%d)", name, q, c.NQubits)
		}
		if used[q] != "" {
			return fmt.Errorf("circuit: qubit %d in both register %s and %s", q, used[q], name)
		}
		used[q] = name
		return nil
	}
	if err := claim("ancilla", c.Regs.Ancilla); err != nil {
		return err
	}
	for _, r := range []struct {
		name string
		qs   []int
	}{{"index", c.Regs.Index}, {"data", c.Regs.Data}, {"class", c.Regs.Class}} {
		for _, q := range r.qs {
			if err := claim(r.name, q); err != nil {
				return err
			}
		}
	}
	measured := make([]bool, c.NQubits)
	for i, op := range c.Ops {
		if err := c.validateOp(op); err != nil {
			return fmt.Errorf("circuit: op %d (%s): %w", i, op.Gate, err)
		}
		if op.Gate == Measure {
			measured[op.Target] = true
			continue
		}
		var buf [2]int
		for _, q := range op.appendQubits(buf[:0]) {
			if measured[q] {
				return fmt.Errorf("circuit: op %d (%s): qubit %d used after its measurement", i, op.Gate, q)
			}
		}
	}
	return nil
}

func (c *Circuit) validateOp(op Op) error {
	inRange := func(q int) error {
		if q < 0 || q >= c.NQubits {
			return fmt.Errorf("qubit %d outside [0,%d)", q, c.NQubits)
		}
		return nil
	}
	if err := inRange(op.Target); err != nil {
		return err
	}
	for _, q := range op.Controls {
		if err := inRange(q); err != nil {
			return err
		}
		if q == op.Target {
			return fmt.Errorf("control %d equals target", q)
		}
	}
	for i, q := range op.Controls {
		for _, r := range op.Controls[:i] {
			if q == r {
				return fmt.Errorf("control %d repeated", q)
			}
		}
	}
	switch op.Gate {
	case H, X, SX, Measure:
		if len(op.Controls) != 0 {
			return fmt.Errorf("%d controls, want 0", len(op.Controls))
		}
	case RY, RZ, RX:
		if len(op.Controls) != 0 {
			return fmt.Errorf("%d controls, want 0", len(op.Controls))
		}
		if math.IsNaN(op.Angle) || math.IsInf(op.Angle, 0) {
			return fmt.Errorf("angle %v not finite", op.Angle)
		}
	case CNOT, CZ, SWAP:
		if len(op.Controls) != 1 {
			return fmt.Errorf("%d controls, want 1", len(op.Controls))
		}
	case UCRY:
		if len(op.Controls) > 30 {
			return fmt.Errorf("%d controls, at most 30", len(op.Controls))
		}
		if len(op.Angles) != 1<<len(op.Controls) {
			return fmt.Errorf("%d angles for %d controls, want %d", len(op.Angles), len(op.Controls), 1<<len(op.Controls))
		}
		for j, a := range op.Angles {
			if math.IsNaN(a) || math.IsInf(a, 0) {
				return fmt.Errorf("angle %d = %v not finite", j, a)
			}
		}
	default:
		return fmt.Errorf("unknown gate %d", int(op.Gate))
	}
	return nil
}

// qubits returns the qubits an operation touches, target first.
func (op Op) qubits() []int {
	qs := make([]int, 0, 1+len(op.Controls))
	qs = append(qs, op.Target)
	return append(qs, op.Controls...)
}

// appendQubits appends the qubits of op, target first, to dst (pass a
// slice of a local array to avoid an allocation in loops).
func (op Op) appendQubits(dst []int) []int {
	dst = append(dst, op.Target)
	return append(dst, op.Controls...)
}

// Qubits returns the qubits the operation acts on: the target followed by
// the controls.
func (op Op) Qubits() []int { return op.qubits() }

// Clone returns a deep copy of the circuit. The copies of the control and
// angle lists share two backing arrays (one allocation each, however many
// operations), each list capped at its length so that appending to one
// never writes into another.
func (c *Circuit) Clone() *Circuit {
	d := &Circuit{NQubits: c.NQubits, Regs: Layout{
		Ancilla: c.Regs.Ancilla,
		Index:   append([]int(nil), c.Regs.Index...),
		Data:    append([]int(nil), c.Regs.Data...),
		Class:   append([]int(nil), c.Regs.Class...),
	}}
	nc, na := 0, 0
	for _, op := range c.Ops {
		nc += len(op.Controls)
		na += len(op.Angles)
	}
	ctl := make([]int, 0, nc)
	ang := make([]float64, 0, na)
	d.Ops = make([]Op, len(c.Ops))
	for i, op := range c.Ops {
		if len(op.Controls) > 0 {
			k := len(ctl)
			ctl = append(ctl, op.Controls...)
			op.Controls = ctl[k:len(ctl):len(ctl)]
		} else {
			op.Controls = nil
		}
		if len(op.Angles) > 0 {
			k := len(ang)
			ang = append(ang, op.Angles...)
			op.Angles = ang[k:len(ang):len(ang)]
		} else {
			op.Angles = nil
		}
		d.Ops[i] = op
	}
	return d
}

func (op Op) clone() Op {
	op.Controls = append([]int(nil), op.Controls...)
	op.Angles = append([]float64(nil), op.Angles...)
	if len(op.Controls) == 0 {
		op.Controls = nil
	}
	if len(op.Angles) == 0 {
		op.Angles = nil
	}
	return op
}
