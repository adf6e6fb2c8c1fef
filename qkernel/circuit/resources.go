package circuit

// Resources summarises the cost of a circuit after Decompose.
type Resources struct {
	// Qubits per register and in total.
	Ancilla, Index, Data, Class int
	Qubits                      int
	// CNOT counts the two-qubit gates CNOT and CZ, SWAP the SWAP gates
	// (each three CNOTs on a device), SingleQubit the one-qubit gates (H,
	// X, SX, RX, RY, RZ), Measurements the Measure operations.
	CNOT, SWAP, SingleQubit, Measurements int
	// Depth is the number of gate layers of the decomposed circuit when every
	// gate is placed as early as its qubits allow (measurements excluded).
	Depth int
}

// Resources returns the register sizes and the gate counts and depth of the
// decomposed circuit (Decompose: UCRY expanded, then Simplify). The counts
// are at most those of the formula in the package documentation, which
// RawResources reproduces. It does not validate the circuit; call Validate
// first on circuits not built by Compile.
func (c *Circuit) Resources() Resources { return c.Decompose().Count(c.Regs) }

// RawResources is Resources of the expanded circuit without Simplify (the
// Gray-code decomposition as published, dead rotations included): its
// counts equal the formula in the package documentation.
func (c *Circuit) RawResources() Resources { return c.Expand().Count(c.Regs) }

// Count returns the resources of c as it stands (UCRY counted as one
// single-qubit gate: call it on decomposed circuits), with register sizes
// from regs.
func (c *Circuit) Count(regs Layout) Resources {
	r := Resources{
		Ancilla: 1,
		Index:   len(regs.Index),
		Data:    len(regs.Data),
		Class:   len(regs.Class),
		Qubits:  c.NQubits,
	}
	level := make([]int, c.NQubits) // depth reached on each qubit
	for _, op := range c.Ops {
		switch op.Gate {
		case Measure:
			r.Measurements++
			continue
		case CNOT, CZ:
			r.CNOT++
		case SWAP:
			r.SWAP++
		default:
			r.SingleQubit++
		}
		var buf [2]int
		qs := op.appendQubits(buf[:0])
		top := 0
		for _, q := range qs {
			top = max(top, level[q])
		}
		for _, q := range qs {
			level[q] = top + 1
		}
		r.Depth = max(r.Depth, top+1)
	}
	return r
}
