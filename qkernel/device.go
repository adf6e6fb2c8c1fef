package qkernel

import (
	"context"
	"fmt"
	"math/rand/v2"

	"fringe/qkernel/circuit"
	"fringe/qkernel/device"
	"fringe/qkernel/sim"
)

// This file runs ModeNoisy on a described device (Classifier.Device): each
// row's circuit is compiled to the device (device.Compile: placement,
// SABRE routing, native gates) and simulated under the device's calibrated
// noise (device.Program.Simulate: depolarizing per gate from its error
// rate, thermal relaxation during gates and idling, per-qubit readout).

// validateDevice checks the Device option against the others: it needs
// ModeNoisy, and it brings its own noise, so the gate-level Noise and the
// Channels must be zero, and the state-vector method cannot run it.
func (c *Classifier) validateDevice() error {
	if c.Device == nil {
		return nil
	}
	switch {
	case c.Mode != ModeNoisy:
		return optErr("device", "set in mode %v, which ignores it (a device's noise needs mode noisy)", c.Mode)
	case !c.Noise.IsZero():
		return optErr("device", "set together with gate-level noise (depolarizing, amplitude_damping, phase_damping or readout); the device's calibration is the noise model, set one of them")
	case !c.Channels.IsZero():
		return optErr("device", "set together with closed-form channels (global_depolarizing, ancilla_dephasing or readout); the device's calibration is the noise model, set one of them")
	case c.Method == sim.StateVector:
		return optErr("simulator", "the state-vector simulator is noiseless; a device's noise needs \"density-matrix\" or \"trajectories\" (or \"auto\")")
	}
	return nil
}

// devicePlan checks that the circuit fits the device's largest connected
// part.
func (c *Classifier) devicePlan(p *plan) error {
	if c.Device == nil || c.Mode != ModeNoisy {
		return nil
	}
	big := 0
	for _, comp := range c.Device.Components() {
		big = max(big, len(comp))
	}
	if p.qubits > big {
		return fmt.Errorf("circuit needs %d qubits; device %s has %d connected qubits; set train_subset or use fewer features: %w",
			p.qubits, c.Device.Name, big, ErrTooLarge)
	}
	return nil
}

// deviceSimulate runs a row's compiled circuit on the device under its
// calibrated noise; it also returns the routed program (whose final
// places say which physical qubits measured the registers).
func (c *Classifier) deviceSimulate(ctx context.Context, circ *circuit.Circuit, p *plan, rng *rand.Rand) (sim.Result, *device.Program, error) {
	prog, err := device.Compile(circ, c.Device, device.Options{})
	if err != nil {
		return sim.Result{}, nil, err
	}
	res, err := prog.Simulate(ctx, sim.Options{Method: p.method, Trajectories: c.Trajectories, Rng: rng})
	return res, prog, err
}
