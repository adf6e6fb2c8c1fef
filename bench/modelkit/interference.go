package modelkit

import (
	"errors"
	"fmt"
	"strings"

	"fringe/qkernel"
	"fringe/qkernel/sim"
)

// NoiseKeys lists the keys of an interference model's noise table, for
// `fringe list` and error messages.
var NoiseKeys = []struct{ Key, Meaning string }{
	{"depolarizing = [p1, p2]", "gate level: depolarizing channel of strength p1 after each single-qubit gate and p2 after each CNOT (Nielsen & Chuang 8.3)"},
	{"amplitude_damping = gamma", "gate level: amplitude damping after every gate on the qubits it touches"},
	{"phase_damping = lambda", "gate level: phase damping after every gate on the qubits it touches"},
	{"readout = [p01, p10]", "assignment error of every measured qubit: P(read 1 | 0), P(read 0 | 1)"},
	{"global_depolarizing = p", "closed form: depolarizing channel of strength p on the whole register before measurement"},
	{"ancilla_dephasing = lambda", "closed form: phase damping of the ancilla before the final Hadamard"},
}

// parseInterference reads the keys of an interference model and returns the
// configured classifier (without seed), its default label and the raw noise
// table (nil without one); the device keys go to ms.hw. Problems are
// recorded in p.
func parseInterference(p *params, ms *Spec) (qkernel.Classifier, string, map[string]any) {
	var q qkernel.Classifier
	modeS := p.str("mode", "exact")
	q.Balance = p.boolean("balance", false)
	q.Shots = p.integer("shots", 0)
	q.TrainSubset = p.integer("train_subset", 0)
	simS := p.str("simulator", sim.Auto.String())
	q.Trajectories = p.integer("trajectories", 0)
	noise := p.table("noise")
	if p.err != nil {
		return q, "", noise // reported by p.finish
	}
	mode, err := qkernel.ParseMode(modeS)
	if err != nil {
		p.fail("mode", "unknown mode %q (want exact, circuit, shots or noisy)", modeS)
		return q, "", noise
	}
	q.Mode = mode
	q.Method, err = sim.ParseMethod(simS)
	if err != nil {
		p.fail("simulator", "unknown simulator %q (want auto, density-matrix, trajectories or state-vector)", simS)
		return q, "", noise
	}
	if p.has("shots") && q.Shots <= 0 {
		p.fail("shots", "shots must be positive, got %d", q.Shots)
		return q, "", noise
	}
	if p.has("train_subset") && q.TrainSubset <= 0 {
		p.fail("train_subset", "train_subset must be positive, got %d", q.TrainSubset)
		return q, "", noise
	}
	if p.has("trajectories") && q.Trajectories <= 0 {
		p.fail("trajectories", "trajectories must be positive, got %d", q.Trajectories)
		return q, "", noise
	}
	noiseLabel, ok := parseNoise(p, &q, noise, modeS)
	if !ok {
		return q, "", noise
	}
	ms.hw = parseHardware(p, false, mode, modeS, noise)
	if p.err != nil {
		return q, "", noise
	}
	if err := q.Validate(); err != nil {
		key := "mode"
		var oe *qkernel.OptionError
		if errors.As(err, &oe) {
			key = oe.Key
			switch key {
			case "depolarizing", "amplitude_damping", "phase_damping", "readout", "global_depolarizing", "ancilla_dephasing":
				key = "noise." + key
			}
		}
		p.fail(key, "%v", err)
		return q, "", noise
	}
	label := "interference"
	if mode != qkernel.ModeExact && mode != qkernel.ModeShots {
		label += "-" + mode.String()
	}
	label += ms.hw.labelDevice()
	label += strings.Join(append([]string{""}, noiseLabel...), "-")
	if q.Shots > 0 {
		label += fmt.Sprintf("-shots%d", q.Shots)
	}
	if q.TrainSubset > 0 {
		label += fmt.Sprintf("-k%d", q.TrainSubset)
	}
	if q.Method != sim.Auto {
		label += "-" + q.Method.String()
	}
	if q.Balance {
		label += "-balanced"
	}
	label += ms.hw.labelMitigate()
	return q, label, noise
}

// parseNoise reads an interference model's noise table (nil: no noise)
// into q and returns the label parts of its channels in a fixed order
// (depolarizing, amplitude and phase damping, readout, then the closed-form
// channels). Problems are recorded in p (ok false); modeS
// is the mode as written, for the message that noise needs mode "noisy".
func parseNoise(p *params, q *qkernel.Classifier, noise map[string]any, modeS string) (noiseLabel []string, ok bool) {
	if noise == nil {
		return nil, true
	}
	np := newParams(noise)
	np.used = map[string]bool{}
	pair := func(key, short string) [2]float64 {
		np.used[key] = true
		v, ok := noise[key]
		if !ok {
			return [2]float64{}
		}
		arr, ok := v.([]any)
		if !ok || len(arr) != 2 {
			np.fail(key, "want a pair [a, b] of probabilities, got %v", v)
			return [2]float64{}
		}
		var out [2]float64
		for i, x := range arr {
			switch f := x.(type) {
			case float64:
				out[i] = f
			case int64:
				out[i] = float64(f)
			default:
				np.fail(key, "want numbers, got %v", x)
			}
		}
		noiseLabel = append(noiseLabel, short+fmtNum(out[0])+"_"+fmtNum(out[1]))
		return out
	}
	one := func(key, short string) float64 {
		if !np.has(key) {
			np.used[key] = true
			return 0
		}
		v := np.number(key, 0)
		noiseLabel = append(noiseLabel, short+fmtNum(v))
		return v
	}
	q.Noise.Depolarizing = pair("depolarizing", "dep")
	q.Noise.AmplitudeDamping = one("amplitude_damping", "ad")
	q.Noise.PhaseDamping = one("phase_damping", "pd")
	q.Channels.Readout = pair("readout", "ro")
	q.Channels.GlobalDepolarizing = one("global_depolarizing", "gdep")
	q.Channels.AncillaDephasing = one("ancilla_dephasing", "adeph")
	if err := np.finish("noise"); err != nil {
		var ke *KeyError
		if errors.As(err, &ke) {
			p.fail("noise."+ke.Key, "%v", ke.Err)
		} else {
			p.fail("noise", "%v", err)
		}
		return nil, false
	}
	if q.Mode != qkernel.ModeNoisy {
		p.fail("noise", "noise applies to mode = \"noisy\" only (mode is %q)", modeS)
		return nil, false
	}
	return noiseLabel, true
}
