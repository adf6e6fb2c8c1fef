package sim

// Qubit limits per method. A density matrix of n qubits holds 4^n complex128
// values (16 * 4^n bytes: 256 MiB at 12 qubits); a state vector holds 2^n
// (1 GiB at 26 qubits). Trajectories run state vectors, so they share the
// state-vector limit.
const (
	MaxDensityQubits = 12
	MaxStateQubits   = 26
)
