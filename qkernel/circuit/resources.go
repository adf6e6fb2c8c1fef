package circuit

// Resources summarises the cost of a circuit after Decompose.
type Resources struct {
	// Qubits per register and in total.
	Ancilla, Index, Data, Class int
	Qubits                      int
	// CNOT counts the two-qubit gates, SingleQubit the H, X, RY and RZ gates,
	// Measurements the Measure operations.
	CNOT, SingleQubit, Measurements int
	// Depth is the number of gate layers of the decomposed circuit when every
	// gate is placed as early as its qubits allow (measurements excluded).
	Depth int
}

// Resources returns the register sizes and the gate counts and depth of the
// decomposed circuit (UCRY expanded as in Decompose). It does not validate
// the circuit; call Validate first on circuits not built by Compile.
func (c *Circuit) Resources() Resources {
	r := Resources{
		Ancilla: 1,
		Index:   len(c.Regs.Index),
		Data:    len(c.Regs.Data),
		Class:   len(c.Regs.Class),
		Qubits:  c.NQubits,
	}
	d := c.Decompose()
	level := make([]int, c.NQubits) // depth reached on each qubit
	for _, op := range d.Ops {
		switch op.Gate {
		case Measure:
			r.Measurements++
			continue
		case CNOT:
			r.CNOT++
		default:
			r.SingleQubit++
		}
		top := 0
		for _, q := range op.qubits() {
			top = max(top, level[q])
		}
		for _, q := range op.qubits() {
			level[q] = top + 1
		}
		r.Depth = max(r.Depth, top+1)
	}
	return r
}
