package plan

import (
	"fmt"

	"fringe/baselines"
	"fringe/bench/input"
	"fringe/datasets"
)

// Memory is the estimated peak memory of one task of a model: the
// model's own estimate on the plan's largest training part (for each
// dataset and pipeline; the largest counts) plus the prepared data of the
// task's unit.
type Memory struct {
	Bytes int64 // the task: Model + Data
	Model int64 // the model's estimate (baselines, qkernel MemoryBytes)
	Data  int64 // the unit's prepared data (pipeline fitted and applied)
	// Where names the dataset, pipeline and sizes of the estimate.
	Where string
	// Key is the spec key that lowers the model's part, with Remedy the
	// advice that goes with it: model[i].cache_mib for an SVM,
	// model[i].train_subset for an interference model simulated gate by
	// gate, model[i] otherwise.
	Key, Remedy string
}

// preparedBytes estimates the prepared data of a unit of nTrain and nTest
// rows with dIn features in and w out of the pipeline: the gathered rows
// (8·(nTrain+nTest)·dIn), the output of the last step and of the one
// before it, which is garbage only once the last has run (2·8·(nTrain +
// nTest)·w), doubled for the garbage collector's headroom (GOGC = 100).
func preparedBytes(nTrain, nTest, dIn, w int) int64 {
	rows := int64(nTrain + nTest)
	return 2 * 8 * rows * int64(dIn+2*w)
}

// TaskMemory estimates the peak memory of one task of model mi on the
// plan's largest training part after each pipeline (see Memory). Models
// without an estimate (external commands) count their prepared data
// only.
func (p *Plan) TaskMemory(mi int) (Memory, error) {
	key := fmt.Sprintf("model[%d]", mi+1)
	best := Memory{Key: key}
	for _, ps := range p.Spec.Pipelines {
		pipe, err := datasets.ParsePipeline(ps)
		if err != nil {
			return Memory{}, err
		}
		for _, d := range p.Datasets {
			nTrain, nTest := 0, 0
			for _, sp := range d.Splits {
				nTrain = max(nTrain, len(sp.Train))
				nTest = max(nTest, len(sp.Test))
			}
			width, err := pipe.CheckDims(nTrain, d.Data.Dim())
			if err != nil {
				return Memory{}, err
			}
			nClass := len(d.Data.Classes)
			for _, m := range p.Spec.Models[mi].Configs() {
				est := Memory{Key: key, Data: preparedBytes(nTrain, nTest, d.Data.Dim(), width)}
				var b int64
				switch {
				case m.Interference != nil:
					var q int
					b, q, err = m.Costed().MemoryBytes(nTrain, nTest, width, nClass)
					if q > 0 {
						est.Key = key + ".train_subset"
						est.Remedy = fmt.Sprintf("set or lower train_subset (fewer index qubits; the circuit of %d qubits is simulated gate by gate)", q)
					}
				default:
					switch mod := m.New(0).(type) {
					case *baselines.SVM:
						b, err = mod.MemoryBytes(nTrain, width, nClass)
						cache := mod.CacheMiB
						if cache == 0 {
							cache = baselines.DefaultCacheMiB
						}
						// The cache matters when it is smaller than the
						// whole kernel matrix it serves.
						if gram := 8 * float64(nTrain) * float64(nTrain); gram > cache*(1<<20) {
							est.Key = key + ".cache_mib"
							est.Remedy = fmt.Sprintf("lower cache_mib (now %g MiB; the whole kernel matrix of a two-class task takes up to %s)", cache, sizeText(int64(gram)))
						}
					case *baselines.TunedSVM:
						b, err = mod.MemoryBytes(nTrain, width, nClass)
					case *baselines.KNN:
						b, err = mod.MemoryBytes(nTrain, width)
					case *baselines.LogReg:
						b, err = mod.MemoryBytes(nTrain, width, nClass)
					}
				}
				if err != nil {
					return Memory{}, err
				}
				est.Model = b
				est.Bytes = b + est.Data
				est.Where = fmt.Sprintf("dataset %s, pipeline %s (%d training and %d test rows, %d features)", d.Name, ps, nTrain, nTest, width)
				if est.Bytes > best.Bytes {
					best = est
				}
			}
		}
	}
	return best, nil
}

// MemoryBytes is TaskMemory's estimate in bytes and where it is reached.
func (p *Plan) MemoryBytes(mi int) (bytes int64, where string, err error) {
	m, err := p.TaskMemory(mi)
	return m.Bytes, m.Where, err
}

// DataBytes estimates the memory the loaded datasets hold for the whole
// run: their values (8 bytes per value), labels, row ids and source lines
// (24 bytes per row), and the index lists of their splits (8 bytes per row
// of each split's training and test parts).
func (p *Plan) DataBytes() int64 {
	var b int64
	for _, d := range p.Datasets {
		n := int64(d.Data.Len())
		b += 8*n*int64(d.Data.Dim()) + 24*n
		for _, sp := range d.Splits {
			b += 8 * int64(len(sp.Train)+len(sp.Test))
		}
	}
	return b
}

// MemoryNeed estimates the peak memory of the run with workers tasks at
// once: the loaded data (DataBytes) and workers times the largest task
// (TaskMemory), in bytes. Models whose estimate fails count nothing (their
// error is reported, located, when the split is prepared).
func (p *Plan) MemoryNeed(workers int) int64 {
	var worst int64
	for mi := range p.Spec.Models {
		if m, err := p.TaskMemory(mi); err == nil {
			worst = max(worst, m.Bytes)
		}
	}
	return p.DataBytes() + int64(max(1, workers))*worst
}

// CheckMemory refuses a plan whose tasks would need more than limit bytes
// when workers of them run at once, each as large as the largest
// (TaskMemory), beside the loaded datasets (DataBytes): an input error
// with the estimate, the limit, the key that lowers the model's part and
// the other remedies (fewer workers or rows, a larger -memory).
func (p *Plan) CheckMemory(workers int, limit int64) error {
	workers = max(1, workers)
	data := p.DataBytes()
	worst, at := Memory{}, -1
	for mi := range p.Spec.Models {
		m, err := p.TaskMemory(mi)
		if err != nil {
			continue // reported, located, when the split is prepared
		}
		if at < 0 || m.Bytes > worst.Bytes {
			worst, at = m, mi
		}
	}
	if at < 0 {
		return nil
	}
	need := data + int64(workers)*worst.Bytes
	if need <= limit {
		return nil
	}
	remedy := "use fewer workers or rows, or raise -memory"
	if worst.Remedy != "" && worst.Model >= worst.Data {
		remedy = worst.Remedy + "; or " + remedy
	}
	return &input.Error{File: p.Spec.File, Line: p.Spec.LineOf(worst.Key), Key: worst.Key,
		Err: fmt.Errorf("model %s needs about %s per task on %s (%s the model, %s the prepared data); %d workers at once and the loaded data (%s) need about %s, above the memory limit of %s: %s",
			p.Spec.Models[at].Name, sizeText(worst.Bytes), worst.Where, sizeText(worst.Model), sizeText(worst.Data),
			workers, sizeText(data), sizeText(need), sizeText(limit), remedy)}
}

// sizeText writes a byte count in GiB from 1 GiB on, else in MiB.
func sizeText(b int64) string {
	if b >= 1<<30 {
		return fmt.Sprintf("%.2f GiB", float64(b)/(1<<30))
	}
	return fmt.Sprintf("%.1f MiB", float64(b)/(1<<20))
}
