// Package circuit is the gate-level form of the interference classifier of
// Schuld, Fingerhuth & Petruccione, "Implementing a distance-based classifier
// with a quantum interference circuit", EPL 119, 60002 (2017),
// arXiv:1703.10793.
//
// # Representation
//
// A Circuit is a list of Op on NQubits qubits plus a Layout naming the qubits
// of the four registers: ancilla (1 qubit), index (ceil(log2 M)), data
// (max(1, ceil(log2 d)), features zero padded to a power of two) and class
// (ceil(log2 C)). Qubit q is bit q of a state-vector basis index (qubit 0
// least significant); within a register the first listed qubit is the least
// significant bit of the register value.
//
// The gate set is H, X, RY, RZ, CNOT and Measure, plus UCRY, a uniformly
// controlled (multiplexed) RY that records its whole angle vector so that a
// simulator can apply it in one pass. Device-native circuits (package
// qkernel/device) add SX, RX, CZ and SWAP. Expand replaces each UCRY with k
// controls by 2^k RY and 2^k CNOT in Gray-code order (Möttönen, Vartiainen,
// Bergholm & Salomaa, "Transformation of quantum states using uniformly
// controlled rotations", quant-ph/0407010, eqs. (3)-(5)); for k = 0 it is a
// single RY and no CNOT.
//
// # Dead gates
//
// The Gray-code expansion leaves rotations of angle 0 (uniform index
// weights, class rotations of 0 and pi, zero amplitudes) and CNOTs that meet
// their twin. Simplify removes them: rotations whose angle is a multiple of
// 2 pi within AngleTol (1e-12) are dropped (a global phase of +-1, which no
// measured probability sees), adjacent rotations about one axis merge,
// adjacent self-inverse pairs cancel (CNOT pairs also across CNOTs that
// share their target or control, with which they commute), SX SX becomes X;
// repeated to a fixed point. Decompose is Expand followed by Simplify, and
// it is the form that the simulators (gate-level noise), Resources and the
// OpenQASM exporters use; the measured probabilities are those of the raw
// expansion to about 1e-12. Expand and RawResources keep the published
// form reachable.
//
// # Compiling the classifier
//
// Compile prepares
//
//	|D> = sum_m sqrt(w_m) |m> (|0>_a |x~> + |1>_a |x_m>) |y_m> / sqrt(2),
//
// applies H to the ancilla and measures the ancilla and the class register,
// so that P(a=0, c=k) = sum_{m: y_m=k} w_m ||x~ + x_m||^2 / 4. Inputs are
// normalised inside; index states m >= M carry amplitude exactly 0 (they are
// never padded with zero vectors at non-zero amplitude).
//
// Gate counts of the expanded circuit (Expand, RawResources), with nm, nd,
// nc the index, data and class register sizes and [nm >= 1] = 1 if nm >= 1
// else 0:
//
//	CNOT = (2^nm - 2)[nm>=1] + 2^(1+nm) (2^nd - 1) + nc 2^nm [nm>=1]
//	RY   = (2^nm - 1)        + 2^(1+nm) (2^nd - 1) + nc 2^nm
//
// (index tree: levels with 0..nm-1 controls; data tree: levels with
// 1+nm..nm+nd controls; class: nc rotations with nm controls), plus two H.
// The decomposed circuit (Decompose, Resources) has at most these counts.
//
// # Export
//
// QASM3 writes OpenQASM 3 text with stdgates.inc gates and %.17g angles;
// QASM2 writes OpenQASM 2.0 with qelib1.inc (arXiv:1707.03429), defining
// sx and swap in the file when used. QASM with QASMOptions.Physical names
// the qubits of one register q, for device-native circuits.
//
// # Errors and panics
//
// Compile, BalancedWeights, Validate and the QASM functions return errors
// prefixed "circuit: " for bad input; nothing in the package panics on user
// input. QASM panics only if Decompose leaves a UCRY, a broken internal
// invariant. Expand, Decompose, Simplify and Resources assume a valid
// circuit (call Validate on circuits not built by Compile); they may panic
// on out-of-range qubits.
package circuit
