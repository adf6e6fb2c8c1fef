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
// simulator can apply it in one pass. Decompose expands each UCRY with k
// controls into 2^k RY and 2^k CNOT in Gray-code order (Möttönen, Vartiainen,
// Bergholm & Salomaa, "Transformation of quantum states using uniformly
// controlled rotations", quant-ph/0407010, eqs. (3)-(5)); for k = 0 it is a
// single RY and no CNOT.
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
// Gate counts of the compiled circuit, with nm, nd, nc the index, data and
// class register sizes and [nm >= 1] = 1 if nm >= 1 else 0:
//
//	CNOT = (2^nm - 2)[nm>=1] + 2^(1+nm) (2^nd - 1) + nc 2^nm [nm>=1]
//	RY   = (2^nm - 1)        + 2^(1+nm) (2^nd - 1) + nc 2^nm
//
// (index tree: levels with 0..nm-1 controls; data tree: levels with
// 1+nm..nm+nd controls; class: nc rotations with nm controls), plus two H.
//
// # Export
//
// QASM3 writes OpenQASM 3 text with stdgates.inc gates and %.17g angles.
//
// # Errors and panics
//
// Compile, BalancedWeights, Validate and QASM3 return errors prefixed
// "circuit: " for bad input; nothing in the package panics on user input.
// QASM3 panics only if Decompose leaves a UCRY, a broken internal invariant.
// Decompose and Resources assume a valid circuit (call Validate on circuits
// not built by Compile); they may panic on out-of-range qubits.
package circuit
