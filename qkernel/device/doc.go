// Package device describes quantum devices and compiles the circuits of
// package circuit to them: placement, routing with SWAP insertion, native
// gates, resource counts with durations, OpenQASM export and a calibrated
// noise model.
//
// # Device descriptions
//
// A device is a small TOML file (keys are ours; unknown keys are errors):
//
//	name = "my-device"                # required
//	note = "invented: ..."            # what the description is
//	qubits = 5                        # required, 1 to 1024
//	gates = "rz-sx-x-cx"              # required: a native family by name, or
//	                                  # its gates as a list in any order,
//	                                  # ["rz", "rx", "ry", "cz"]
//	directed = false                  # true: an edge [c, t] runs cx with control c only
//	edges = [[0, 1], [1, 2], [2, 3], [3, 4]]   # coupling; or
//	# all_to_all = true               # every pair coupled
//	virtual_rz = true                 # rz is a frame change: no time, no error (default)
//
//	[qubit]                           # one number for every qubit, or an array of one per qubit
//	t1_us = 120.0                     # relaxation time T1, microseconds (inf: none)
//	t2_us = [90.0, 85.0, 110.0, 70.0, 95.0]   # dephasing time T2 <= 2 T1, microseconds
//	readout_p01 = 0.01                # P(read 1 | 0)
//	readout_p10 = 0.02                # P(read 0 | 1)
//	gate_error = 3e-4                 # single-qubit gate error (average infidelity)
//	gate_ns = 35.0                    # single-qubit gate duration, nanoseconds
//
//	[pair]                            # two-qubit gates: one number, or one per edge in the order of edges
//	gate_error = 8e-3
//	gate_ns = 340.0
//
//	[[edge]]                          # optional overrides of one edge
//	qubits = [1, 2]
//	gate_error = 1.5e-2
//	gate_ns = 420.0
//
// The native families are "rz-sx-x-cx" (FamilyCX) and "rz-rx-ry-cz"
// (FamilyCZ); any other gate set is an error wrapping ErrFamily. Validation
// (Parse, LoadFile, Load) rejects, with an *Error naming the file, line and
// key and wrapping ErrInvalid: edges to qubits the device lacks, self-loops,
// repeated edges (an undirected [1, 0] repeats [0, 1]), T2 > 2 T1, a
// probability outside [0, 1], a single-qubit error above 1/2 or a two-qubit
// error above 3/4 (the fully depolarizing channel), non-positive or
// infinite durations, arrays of the wrong length, directed with cz (cz is
// symmetric), an [[edge]] that is not an edge, missing keys. A coupling
// graph in several parts is accepted; Compile needs as many connected
// qubits as the circuit has and otherwise fails with ErrTooSmall.
//
// Embedded devices (Names, Load by name), all invented, with values of the
// order of today's hardware: "line-16" (a line of 16 qubits, rz-sx-x-cx),
// "grid-4x4" (a 4x4 grid, rz-rx-ry-cz), "heavy-27" (27 qubits of degree at
// most 3 in cells of twelve, directed cx) and "ions-20" (20 qubits coupled
// all to all, slow gates and long coherence, rz-rx-ry-cz). Load of another
// name reads that path.
//
// # Compilation
//
// Compile decomposes the circuit (circuit.Decompose), chooses a connected
// region of as many physical qubits as the circuit has (from the qubit of
// highest degree, growing by the neighbour with the most edges into the
// region), places the logical qubits on it (most interacting first, each
// where its two-qubit gates to those placed are shortest), refines the
// initial mapping by reverse traversal (over the first
// Options.RefineGates two-qubit gates, default 16384; a circuit of at
// most TrialGates two-qubit gates is routed from five placements, refined
// by 1, 0, 2, 3 and 4 rounds, and the program with the fewest native
// two-qubit gates kept) and routes the two-qubit gates with
// the SABRE heuristic (Li, Ding & Xie, ASPLOS 2019: front layer, extended
// set of 20 with weight 0.5, decay 0.001 reset every 5 swaps; ties by a
// fixed order, so routing is deterministic; each candidate is scored by
// the change of the gates it moves, the same integers as a full
// recount). CNOT pairs that cancel are removed on the routed form (SWAPs
// written as three CNOTs) before translation, and translation runs in a
// second goroutine beside routing, on every routed gate no later one can
// cancel (the same program as the sequential passes). It then writes CNOT natively
// (reversed with four Hadamards on a directed edge, or CZ between
// RY(-pi/2) and RY(pi/2)), SWAP as three CNOTs, merges every run of
// one-qubit gates into one unitary re-synthesised in the family (at most
// five gates rz sx rz sx rz, or three rz ry rz / rz rx rz; see synth for
// the identities), cancels pairs of two-qubit gates and repeats to a fixed
// point. The routed program acts on the region as the logical circuit does,
// with logical qubit q ending on Program.Final[q] (the measured registers'
// final places are the routed circuit's Regs); this is tested on every
// embedded device and small cases of every embedded dataset (1e-10).
// Program.Logical rebuilds the decomposed logical circuit (the program
// keeps its gates in a compact form); Program.Regs are its registers.
//
// Program.Before and Program.After report qubits, two-qubit gates, SWAPs
// added, single-qubit gates, depth and duration: the critical path of the
// ASAP schedule with the device's durations (before routing, the device's
// median durations); After.Virtual counts the virtual rz among the
// single-qubit gates. Program.Fidelity estimates the probability that no
// gate or readout of the routed program fails (the product of 1 - error
// over them, with the description's rates). Program.QASM writes OpenQASM
// 3 or 2.0 on the device's qubits. Device.SHA256 is the digest of the
// description's bytes (manifests and run fingerprints name it).
//
// # Calibrated noise
//
// Program.Noisy and Program.Simulate give the device's noise on the routed
// program: each gate followed by a depolarizing channel whose strength
// makes the noisy gate's average infidelity the described error rate (net
// of the relaxation during the gate; Nielsen 2002) and by thermal
// relaxation over its duration (amplitude damping and pure dephasing from
// T1 and T2, N&C section 8.3), idle qubits relaxing while they wait, and
// readout errors per qubit; simulated with the density matrix up to
// sim.MaxDensityQubits qubits and trajectories above. The channel and a
// small noisy circuit are checked against QuTiP 4.7.1
// (scripts/ref_device_qutip.py).
//
// # Imports
//
// The package imports qkernel/circuit and qkernel/sim; its tests also use
// datasets and bench/cv (embedded data and the assess-style splits).
//
// # Errors and panics
//
// Errors are prefixed "device: "; description errors are *Error values.
// Nothing panics on user input. Load panics only if an embedded file is
// missing or invalid, and Compile if its own output fails circuit.Validate:
// broken builds or internal invariants, both caught by the tests.
package device
