package qkernel

import (
	"fmt"
	"math"

	"fringe/qkernel/sim"
)

// Mode selects how the classifier is run.
type Mode int

const (
	// ModeExact evaluates the closed form: infinite shots, no noise. It is
	// the zero value.
	ModeExact Mode = iota
	// ModeCircuit compiles the circuit for every test row and simulates it
	// without noise on a state vector (one pass per uniformly controlled
	// rotation); it reproduces ModeExact to rounding.
	ModeCircuit
	// ModeShots samples Classifier.Shots measurement shots from the
	// closed-form outcome distribution and post-selects on a = 0.
	ModeShots
	// ModeNoisy applies Classifier.Noise (gate by gate) and
	// Classifier.Channels (closed form), then samples Classifier.Shots
	// shots if Shots > 0.
	ModeNoisy
)

var modeNames = [...]string{ModeExact: "exact", ModeCircuit: "circuit", ModeShots: "shots", ModeNoisy: "noisy"}

// String returns the mode's name as written in experiment specs: "exact",
// "circuit", "shots" or "noisy".
func (m Mode) String() string {
	if m >= 0 && int(m) < len(modeNames) {
		return modeNames[m]
	}
	return fmt.Sprintf("Mode(%d)", int(m))
}

// ParseMode returns the Mode named s ("exact", "circuit", "shots" or
// "noisy"). An unknown name is an error wrapping ErrMode.
func ParseMode(s string) (Mode, error) {
	for m, name := range modeNames {
		if s == name {
			return Mode(m), nil
		}
	}
	return 0, fmt.Errorf("qkernel: mode %q: %w (known: exact, circuit, shots, noisy)", s, ErrMode)
}

// Channels are closed-form noise models applied to the outcome distribution
// P(a, k) (see package sim: GlobalDepolarizing, AncillaDephasing, Readout).
// They cost O(2^(1+q)) per test row, q the number of class qubits. The zero
// value is noiseless. Only ModeNoisy uses them.
type Channels struct {
	// GlobalDepolarizing is the strength p of a depolarizing channel on the
	// whole register just before measurement:
	// P'(a,k) = (1-p) P(a,k) + p / 2^(1+q).
	GlobalDepolarizing float64
	// AncillaDephasing is the phase-damping parameter lambda of the ancilla
	// just before the final Hadamard: the coherence between the two
	// branches shrinks by sqrt(1 - lambda).
	AncillaDephasing float64
	// Readout holds the assignment errors p01 = P(read 1 | 0) and
	// p10 = P(read 0 | 1) of every measured qubit.
	Readout [2]float64
}

// IsZero reports whether no channel is set.
func (ch Channels) IsZero() bool { return ch == Channels{} }

// OptionError reports a bad classifier option found by Validate (and hence
// by Fit). Key is the option's name as written in experiment specs: "mode",
// "shots", "train_subset", "depolarizing", "amplitude_damping",
// "phase_damping", "readout", "global_depolarizing", "ancilla_dephasing",
// "simulator" (Method), "trajectories" or "device". It unwraps to ErrOption, or to
// ErrMode for an unknown mode.
type OptionError struct {
	Key    string
	Reason string
	err    error
}

func (e *OptionError) Error() string {
	return fmt.Sprintf("qkernel: option %q: %s: %v", e.Key, e.Reason, e.err)
}

// Unwrap returns ErrOption (ErrMode for an unknown mode).
func (e *OptionError) Unwrap() error { return e.err }

func optErr(key, format string, args ...any) error {
	return &OptionError{Key: key, Reason: fmt.Sprintf(format, args...), err: ErrOption}
}

// hasGateNoise reports whether the gate-level model acts on the quantum
// state (anything but readout).
func hasGateNoise(m sim.NoiseModel) bool {
	return m.Depolarizing != [2]float64{} || m.AmplitudeDamping != 0 || m.PhaseDamping != 0
}

// gateLevel reports whether ModeNoisy simulates the compiled circuit gate by
// gate: with gate noise, or when a simulator is named explicitly.
func (c *Classifier) gateLevel() bool {
	return c.Mode == ModeNoisy && (hasGateNoise(c.Noise) || c.Method != sim.Auto || c.Device != nil)
}

// Validate checks the options alone (no data) and returns an *OptionError
// (wrapping ErrOption, or ErrMode for an unknown mode) for the first
// problem found:
//
//   - an unknown Mode;
//   - Shots < 0, or Shots == 0 in ModeShots;
//   - TrainSubset < 0;
//   - a noise probability outside [0, 1] or NaN (the key names the field:
//     "depolarizing", "amplitude_damping", "phase_damping", "readout",
//     "global_depolarizing", "ancilla_dephasing");
//   - readout error set both in Noise and in Channels (the two are the same
//     model: set one);
//   - Trajectories < 0, or an unknown Method;
//   - Method StateVector with gate noise (a state vector is noiseless);
//   - Trajectories > 0 with Method DensityMatrix or StateVector;
//   - Device outside ModeNoisy, or with Noise, Channels or Method
//     StateVector (key "device", or "simulator");
//   - an option set in a mode that ignores it: Shots > 0 in ModeExact or
//     ModeCircuit; Noise, Channels, Method or Trajectories outside
//     ModeNoisy;
//   - readout mitigation (key "mitigate") with an invalid confusion matrix,
//     with confusion matrices or a device but Readout false, with
//     matrices both per bit and per physical qubit, per physical qubit
//     without a device or not one per qubit, or without confusion
//     matrices and without a device outside ModeNoisy or without readout
//     error to invert (Fit also checks their count against the measured
//     bits).
//
// Fit calls Validate first. Limits that depend on the data (TrainSubset
// versus the training set, the qubit count) are checked by Fit.
func (c *Classifier) Validate() error {
	if c.Mode < 0 || int(c.Mode) >= len(modeNames) {
		return &OptionError{Key: "mode", Reason: c.Mode.String(), err: ErrMode}
	}
	if err := c.validateDevice(); err != nil {
		return err
	}
	switch {
	case c.Shots < 0:
		return optErr("shots", "%d shots, want a positive number", c.Shots)
	case c.Shots == 0 && c.Mode == ModeShots:
		return optErr("shots", "mode shots needs a positive number of shots")
	case c.TrainSubset < 0:
		return optErr("train_subset", "%d, want a positive subset size (or 0 for the whole training set)", c.TrainSubset)
	case c.Trajectories < 0:
		return optErr("trajectories", "%d, want a positive number (or 0 for %d)", c.Trajectories, sim.DefaultTrajectories)
	case c.Method > sim.Trajectories:
		return optErr("simulator", "unknown simulator %v", c.Method)
	}
	for _, p := range []struct {
		key string
		v   float64
	}{
		{"depolarizing", c.Noise.Depolarizing[0]}, {"depolarizing", c.Noise.Depolarizing[1]},
		{"amplitude_damping", c.Noise.AmplitudeDamping}, {"phase_damping", c.Noise.PhaseDamping},
		{"readout", c.Noise.Readout[0]}, {"readout", c.Noise.Readout[1]},
		{"global_depolarizing", c.Channels.GlobalDepolarizing},
		{"ancilla_dephasing", c.Channels.AncillaDephasing},
		{"readout", c.Channels.Readout[0]}, {"readout", c.Channels.Readout[1]},
	} {
		if math.IsNaN(p.v) || p.v < 0 || p.v > 1 {
			return optErr(p.key, "probability %v outside [0, 1]", p.v)
		}
	}
	if c.Noise.Readout != [2]float64{} && c.Channels.Readout != [2]float64{} {
		return optErr("readout", "set both as gate-level noise and as a channel; both are the same readout model, set it once")
	}
	if err := c.validateMitigation(); err != nil {
		return err
	}
	if c.Mode == ModeShots || c.Mode == ModeExact || c.Mode == ModeCircuit {
		if c.Shots > 0 && c.Mode != ModeShots {
			return optErr("shots", "%d shots in mode %v, which ignores them (use mode shots or noisy)", c.Shots, c.Mode)
		}
		for _, o := range []struct {
			key string
			set bool
		}{
			{"depolarizing", c.Noise.Depolarizing != [2]float64{}},
			{"amplitude_damping", c.Noise.AmplitudeDamping != 0},
			{"phase_damping", c.Noise.PhaseDamping != 0},
			{"readout", c.Noise.Readout != [2]float64{} || c.Channels.Readout != [2]float64{}},
			{"global_depolarizing", c.Channels.GlobalDepolarizing != 0},
			{"ancilla_dephasing", c.Channels.AncillaDephasing != 0},
			{"simulator", c.Method != sim.Auto},
			{"trajectories", c.Trajectories != 0},
		} {
			if o.set {
				return optErr(o.key, "set in mode %v, which ignores it (noise options need mode noisy)", c.Mode)
			}
		}
		return nil
	}
	// ModeNoisy.
	if c.Method == sim.StateVector && hasGateNoise(c.Noise) {
		return optErr("simulator", "the state-vector simulator is noiseless; use \"density-matrix\" or \"trajectories\" (or \"auto\") with gate noise")
	}
	if c.Trajectories > 0 && (c.Method == sim.DensityMatrix || c.Method == sim.StateVector) {
		return optErr("trajectories", "set with simulator %q, which ignores it", c.Method)
	}
	return nil
}
