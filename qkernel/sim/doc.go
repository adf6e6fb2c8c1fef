// Package sim simulates circuits of package circuit, with and without noise,
// and samples measurement shots.
//
// # Simulators
//
// State is a pure state of n qubits ([]complex128 of 2^n, qubit 0 the least
// significant bit of the basis index) with in-place kernels: a dense 2x2
// gate (real matrices such as H, X and RY take a real-arithmetic path), CNOT,
// multi-controlled single-qubit gates, and a one-pass uniformly controlled
// RY. Density is an exact density matrix
// (4^n complex128) with gates and channels: single-qubit superoperators
// (any Kraus set), depolarizing on one, two or all qubits, amplitude and
// phase damping. Trajectories average Monte Carlo state-vector runs with
// stochastic Pauli and Kraus jumps.
//
// Every runner starts in |0...0> and keeps a qubit out of the register
// until the first operation touches it (an idle qubit is still |0>, and
// noise acts only on the qubits of a gate): a classifier circuit loads its
// class register last, so most of its gates run on a density matrix 4^q
// times smaller (2^q for state vectors), q the class qubits. The result is
// the same to the last bit as a run on the full register (tested).
//
// Qubit limits: the density matrix up to MaxDensityQubits (12; 256 MiB),
// state vectors and trajectories up to MaxStateQubits (26; 1 GiB). Auto
// picks the state vector for a noiseless circuit, the density matrix for a
// noisy one up to 12 qubits and trajectories above. A circuit beyond the
// chosen method's limit is an error naming the limit and the alternative.
//
// # Speed
//
// A noisy gate takes one pass over the density matrix: a single-qubit gate
// and its channels are one fused superoperator; a CNOT, its two-qubit
// depolarizing channel and the damping of both qubits are applied block by
// block in one visit of the four rows concerned. Channels that only mix
// populations and scale coherences (depolarizing, damping) skip the zero
// entries of their superoperator. scripts/bench_dm.sh reports ns per noisy
// gate as a ratio to one memory pass at the stream triad bandwidth.
//
// Shared prepares, for circuits that differ only in a middle run of
// operations (the classifier's circuits for one training set), the state
// after the common first operations and the outcome observables of the
// common last operations (evolved backwards with the adjoint channels, on
// the last operations' own qubits), so that each circuit costs its middle
// only. Its distributions agree with Simulate's within rounding (1e-12),
// not to the last bit.
//
// # Cost model
//
// Calibrate times a few gates of every simulator at two small register
// sizes (about 10 ms of thread CPU time) and fits a cost per operation of
// a fixed overhead plus a cost per register entry (2^n for state vectors
// and trajectories, 4^n for the density matrix; see CostModel). Estimate
// (a gate count on a register size), EstimateCircuit (a circuit along its
// idle-qubit schedule) and EstimateShared then predict run times, within a
// small factor of measured ones (tested at two sizes per simulator).
//
// # Cancellation
//
// Simulate, NewShared, Shared.Simulate and Calibrate check their context
// about every 10^5 register entries of work (every gate from 9 qubits on a
// density matrix, from 17 on a state vector) and between trajectories,
// and return ctx.Err() unwrapped. (Outcomes runs without a context.)
//
// # Output
//
// Outcomes and Simulate return the joint distribution of the ancilla bit a
// and the class register value k, indexed a*2^q + k with q the number of
// class qubits (length 2^(1+q)), after readout error. Values k >= C (the
// number of classes) have probability zero without noise.
//
// # Noise
//
// NoiseModel holds depolarizing strengths (p1 after single-qubit gates, p2
// after CNOTs), amplitude damping gamma, phase damping lambda (both after
// every gate on each qubit it touches) and readout assignment errors
// (p01, p10) on every measured bit; Kraus operators follow Nielsen & Chuang
// (2010), section 8.3. The depolarizing channel of strength p is
// rho -> (1-p) rho + p I/d. Noisy simulations decompose UCRY first, so that
// every elementary gate carries its noise.
//
// Closed-form channel models act directly on outcome distributions:
// GlobalDepolarizing (P' = (1-s) P + s/2^(1+q)), AncillaDephasing (phase
// damping of the ancilla before the final H) and Readout. Each is validated
// against the density-matrix simulation in the tests.
//
// # Calibrated noise
//
// A NoisyCircuit carries its own noise on every operation (TimedOp: channels
// before the gate, a depolarizing strength after it, channels after it),
// plus a final channel and readout errors per qubit; package qkernel/device
// builds one from a device description. SimulateNoisy runs it on the
// density matrix (consecutive one-qubit operations and channels on a qubit
// fused into one superoperator, which a two-qubit gate applies to both its
// qubits in the same pass as the gate and its depolarizing channel, bit
// for bit the separate passes) or by trajectories (quantum jumps), with
// the output layout of Simulate. ThermalRelaxationKraus gives relaxation
// over a time t from T1 and T2: amplitude damping gamma = 1 - exp(-t/T1)
// composed with phase damping for 1/T_phi = 1/T2 - 1/(2 T1) (N&C 2010,
// section 8.3; T2 <= 2 T1). DepolarizingForError converts an average gate
// infidelity into a depolarizing strength with Nielsen's formula for the
// average gate fidelity (quant-ph/0205035), net of the relaxation during
// the gate. The device gates SX, RX, CZ and SWAP run in every simulator.
//
// # Sampling
//
// SampleCounts draws one multinomial sample by sequential binomials whose
// cost does not grow with the number of shots.
//
// # Errors, panics, NaN
//
// Simulate, Outcomes, NoiseModel.Validate and the closed-form models return
// errors prefixed "sim: " for bad input (invalid circuit, probabilities
// outside [0,1], qubit limits, missing generator); NewShared and the
// estimates likewise, and Shared.Simulate an error wrapping ErrNotShared
// for a circuit outside its family. The low-level kernels
// (State and Density methods, SampleCounts) panic on out-of-range qubits,
// mismatched angle vectors or invalid probabilities: these are broken
// invariants of callers that validate first. No function returns NaN for
// valid input.
package sim
