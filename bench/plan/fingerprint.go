package plan

import (
	"crypto/sha256"
	"encoding/binary"
	"encoding/hex"
	"math"
	"os"
)

// Fingerprint returns the hex SHA-256 of what the plan computes on: every
// dataset as loaded (names, classes, features, rows, labels, values bit
// for bit), its splits, the pipelines and the task keys. Two plans with the
// same fingerprint and spec give the same results.
func (p *Plan) Fingerprint() string {
	h := sha256.New()
	var buf [8]byte
	u64 := func(v uint64) {
		binary.LittleEndian.PutUint64(buf[:], v)
		h.Write(buf[:])
	}
	str := func(s string) {
		u64(uint64(len(s)))
		h.Write([]byte(s))
	}
	ints := func(v []int) {
		u64(uint64(len(v)))
		for _, x := range v {
			u64(uint64(x))
		}
	}
	u64(uint64(len(p.Datasets)))
	for _, d := range p.Datasets {
		str(d.Name)
		u64(uint64(len(d.Data.Classes)))
		for _, c := range d.Data.Classes {
			str(c)
		}
		u64(uint64(len(d.Data.Features)))
		for _, f := range d.Data.Features {
			str(f)
		}
		ints(d.Data.Rows)
		ints(d.Data.Y)
		r, c := d.Data.X.Dims()
		u64(uint64(r))
		u64(uint64(c))
		for i := 0; i < r; i++ {
			for _, x := range d.Data.X.RawRowView(i) {
				u64(math.Float64bits(x))
			}
		}
		u64(uint64(len(d.Splits)))
		for _, sp := range d.Splits {
			u64(uint64(sp.Repeat))
			u64(uint64(sp.Fold))
			ints(sp.Train)
			ints(sp.Test)
		}
	}
	u64(uint64(len(p.Spec.Pipelines)))
	for _, s := range p.Spec.Pipelines {
		str(s)
	}
	u64(uint64(len(p.Tasks)))
	for _, t := range p.Tasks {
		str(p.Key(t))
	}
	// Files a model reads while it runs: a counts file, and the files an
	// external program's command line names (its script, say). A change to
	// one of them between sessions must not mix old and new results.
	for _, f := range p.modelInputFiles() {
		str(f)
		if data, err := os.ReadFile(f); err == nil {
			sum := sha256.Sum256(data)
			h.Write(sum[:])
		} else {
			str("unreadable")
		}
	}
	// Devices by their descriptions' digests (an embedded device's too,
	// which a rebuilt fringe may change) and calibration files.
	for _, m := range p.Spec.Models {
		if hw, ok := m.Hardware(); ok {
			str("device\x00" + hw.Device + "\x00" + hw.DeviceSHA + "\x00" + hw.CalibrationSHA)
		}
	}
	return hex.EncodeToString(h.Sum(nil))
}

// modelInputFiles lists, in model order, the files the run's models read
// while they run (modelkit.Spec.InputFiles).
func (p *Plan) modelInputFiles() []string {
	var out []string
	for _, m := range p.Spec.Models {
		out = append(out, m.InputFiles(p.Spec.Dir)...)
	}
	return out
}
