package plan

import (
	"errors"
	"fmt"

	"fringe/bench/input"
	"fringe/bench/modelkit"
	"fringe/datasets"
	"fringe/qkernel"
	"fringe/qkernel/circuit"
)

// resolveModels loads the device and calibration files of the spec's
// models (modelkit.Spec.Resolve, paths relative to the spec's folder),
// locating their errors at the model's key.
func (p *Plan) resolveModels() error {
	for mi := range p.Spec.Models {
		if err := p.Spec.Models[mi].Resolve(p.Spec.Dir); err != nil {
			key := fmt.Sprintf("model[%d]", mi+1)
			var ke *modelkit.KeyError
			if errors.As(err, &ke) {
				key += "." + ke.Key
				err = ke.Err
			}
			return &input.Error{File: p.Spec.File, Line: p.Spec.LineOf(key), Key: key, Err: err}
		}
	}
	return nil
}

// onDevice reports whether the interference configuration m runs on a
// device (mode noisy with the key device).
func onDevice(m modelkit.Spec) bool {
	hw, ok := m.Hardware()
	return ok && hw.Device != "" && m.Interference != nil && m.Interference.Mode == qkernel.ModeNoisy
}

// checkHardware checks the models' devices and calibrations against the
// data: every circuit (the largest training part or train_subset, the
// features after each pipeline) must fit the device's largest connected
// part (key device), and a calibration by register bits must cover the
// class register of every dataset (key calibration).
func (p *Plan) checkHardware() error {
	for mi, mm := range p.Spec.Models {
		for _, m := range mm.Configs() {
			hw, ok := m.Hardware()
			if !ok {
				continue
			}
			bad := func(key string, err error) error {
				full := fmt.Sprintf("model[%d].%s", mi+1, key)
				return &input.Error{File: p.Spec.File, Line: p.Spec.LineOf(full), Key: full, Err: err}
			}
			subset := modelkit.ParamInt(m.Params["train_subset"])
			for _, d := range p.Datasets {
				nClass := len(d.Data.Classes)
				if hw.CalibrationBits >= 0 {
					if _, _, q := circuit.RegisterSizes(1, 1, nClass); q > hw.CalibrationBits {
						return bad("calibration", fmt.Errorf("%s calibrates %d class bit(s); dataset %s has %d classes, whose class register has %d bit(s): add lines for class[%d] up to class[%d]",
							hw.Calibration, hw.CalibrationBits, d.Name, nClass, q, hw.CalibrationBits, q-1))
					}
				}
				if hw.Device == "" {
					continue
				}
				for _, ps := range p.Spec.Pipelines {
					pipe, err := datasets.ParsePipeline(ps)
					if err != nil {
						return &input.Error{File: p.Spec.File, Line: p.Spec.LineOf("pipelines"), Key: "pipelines", Err: err}
					}
					mTrain := 0
					for _, sp := range d.Splits {
						mTrain = max(mTrain, len(sp.Train))
					}
					dim, err := pipe.CheckDims(mTrain, d.Data.Dim())
					if err != nil {
						return &input.Error{File: p.Spec.File, Line: p.Spec.LineOf("pipelines"), Key: "pipelines", Err: err}
					}
					if subset > 0 {
						mTrain = min(mTrain, subset)
					}
					ni, nd, nc := circuit.RegisterSizes(mTrain, dim, nClass)
					if n := 1 + ni + nd + nc; n > hw.Connected {
						return bad("device", fmt.Errorf("model %s on dataset %s, pipeline %s: the circuit needs %d qubits (%d training vectors, %d features, %d classes); device %s has %d qubits, at most %d of them connected: set train_subset, use fewer features or a larger device",
							m.Name, d.Name, ps, n, mTrain, dim, nClass, hw.Device, hw.Qubits, hw.Connected))
					}
				}
			}
		}
	}
	return nil
}
