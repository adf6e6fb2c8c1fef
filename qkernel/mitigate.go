package qkernel

import (
	"errors"
	"fmt"
	"math"
	"slices"

	"fringe/qkernel/circuit"
	"fringe/qkernel/device"
)

// Readout mitigation.
//
// A measured qubit with readout assignment errors p01 = P(read 1 | 0) and
// p10 = P(read 0 | 1) reports the distribution C p of its true
// distribution p, with the column-stochastic confusion matrix
//
//	C = [[1-p01, p10 ],     C[i][j] = P(read i | prepared j)
//	     [p01,   1-p10]]
//
// and independent qubits report (C_{n-1} ⊗ ... ⊗ C_0) p, with qubit b the
// bit b of the outcome index. Mitigation inverts that map qubit by qubit
// (the inverse of a tensor product is the tensor product of the inverses;
// the 2^n x 2^n matrix is never formed: each C_b^{-1} acts on the pairs of
// entries that differ in bit b, O(n 2^n) in all), which gives an unbiased
// estimate of p that may have negative entries, and then takes the nearest
// probability vector in the Euclidean norm: the projection onto the
// probability simplex (least squares on the simplex), computed exactly by
// sorting (Wang & Carreira-Perpiñán, "Projection onto the probability
// simplex: an efficient algorithm with a simple proof, and an
// application", arXiv:1309.1541 (2013), Algorithm 1; the same projection
// as Duchi, Shalev-Shwartz, Singer & Chandra, ICML 2008, Fig. 1). A vector
// that is already a distribution is left as it is (up to rounding).

// ErrConfusion marks a confusion matrix that is not a valid, invertible
// readout model: entries outside [0, 1], columns not summing to 1, or
// p01 + p10 >= 1 (the reading carries no information about the state, or
// is inverted).
var ErrConfusion = errors.New("invalid confusion matrix")

// Confusion is the readout confusion matrix of one measured qubit,
// column-stochastic: Confusion[i][j] = P(read i | prepared j), so
// Confusion{{1-p01, p10}, {p01, 1-p10}} for the assignment errors
// p01 = P(read 1 | 0) and p10 = P(read 0 | 1).
type Confusion [2][2]float64

// ReadoutConfusion returns the confusion matrix of the assignment errors
// p01 = P(read 1 | 0) and p10 = P(read 0 | 1) (the orientation of
// sim.NoiseModel.Readout and Channels.Readout).
func ReadoutConfusion(p01, p10 float64) Confusion {
	return Confusion{{1 - p01, p10}, {p01, 1 - p10}}
}

// ConfusionFromCounts estimates one qubit's confusion matrix from
// calibration counts: prep0[i] is the number of shots that read i after
// the qubit was prepared in |0>, prep1[i] likewise after |1>. The estimate
// is the observed frequencies, P(read i | j) = prep_j[i] / (prep_j[0] +
// prep_j[1]) (the maximum-likelihood estimate of a binomial proportion).
// Negative counts, or a preparation without shots, are an error wrapping
// ErrCounts.
func ConfusionFromCounts(prep0, prep1 [2]int) (Confusion, error) {
	var c Confusion
	for j, n := range [2][2]int{prep0, prep1} {
		if n[0] < 0 || n[1] < 0 {
			return c, fmt.Errorf("qkernel: confusion from counts: prepared %d: negative count %v: %w", j, n, ErrCounts)
		}
		tot := n[0] + n[1]
		if tot == 0 {
			return c, fmt.Errorf("qkernel: confusion from counts: prepared %d: no shots: %w", j, ErrCounts)
		}
		c[0][j] = float64(n[0]) / float64(tot)
		c[1][j] = float64(n[1]) / float64(tot)
	}
	return c, nil
}

// Validate checks c as an invertible readout model: entries in [0, 1],
// columns summing to 1 (within 1e-9), p01 + p10 < 1. The error wraps
// ErrConfusion.
func (c Confusion) Validate() error {
	_, err := c.check()
	return err
}

// check validates c as an invertible readout model and returns its
// determinant 1 - p01 - p10.
func (c Confusion) check() (float64, error) {
	for i := range 2 {
		for j := range 2 {
			if v := c[i][j]; math.IsNaN(v) || v < 0 || v > 1 {
				return 0, fmt.Errorf("entry [%d][%d] = %v outside [0, 1]: %w", i, j, v, ErrConfusion)
			}
		}
	}
	for j := range 2 {
		// 1e-9: columns estimated from counts or written with a few digits.
		if s := c[0][j] + c[1][j]; math.Abs(s-1) > 1e-9 {
			return 0, fmt.Errorf("column %d sums to %v, want 1: %w", j, s, ErrConfusion)
		}
	}
	det := c[0][0]*c[1][1] - c[0][1]*c[1][0]
	if !(det > 1e-9) {
		return 0, fmt.Errorf("p01 + p10 = %v >= 1 (determinant %v): %w", c[1][0]+c[0][1], det, ErrConfusion)
	}
	return det, nil
}

// MitigateReadout returns the readout-mitigated distribution of p, a
// distribution (or counts) over the outcomes of n independently read bits
// (len(p) = 2^n, bit b of the index is bit b's reading). conf holds one
// confusion matrix per bit, conf[b] for bit b, or a single one for every
// bit. p is normalised by its sum, multiplied qubit by qubit by the
// inverse confusion matrices, and projected onto the probability simplex
// (see the comment at the top of this file); the result is a distribution
// (non-negative, summing to 1 up to rounding). Errors wrap ErrConfusion
// for an invalid matrix or ErrCounts for a p that is not a non-empty
// distribution of a power-of-two length.
func MitigateReadout(p []float64, conf []Confusion) ([]float64, error) {
	n := 0
	for 1<<n < len(p) {
		n++
	}
	if len(p) < 2 || 1<<n != len(p) {
		return nil, fmt.Errorf("qkernel: mitigate readout: %d outcomes, want a power of two >= 2: %w", len(p), ErrCounts)
	}
	if len(conf) != 1 && len(conf) != n {
		return nil, fmt.Errorf("qkernel: mitigate readout: %d confusion matrices for %d bits (want 1 or %d): %w", len(conf), n, n, ErrConfusion)
	}
	total := 0.0
	for i, v := range p {
		if math.IsNaN(v) || math.IsInf(v, 0) || v < 0 {
			return nil, fmt.Errorf("qkernel: mitigate readout: outcome %d = %v: %w", i, v, ErrCounts)
		}
		total += v
	}
	if !(total > 0) {
		return nil, fmt.Errorf("qkernel: mitigate readout: no shots or probability: %w", ErrCounts)
	}
	out := make([]float64, len(p))
	for i, v := range p {
		out[i] = v / total
	}
	if err := invertReadout(out, conf); err != nil {
		return nil, fmt.Errorf("qkernel: mitigate readout: %w", err)
	}
	projectSimplex(out)
	return out, nil
}

// invertReadout multiplies p (len 2^n) in place by the inverse of the
// tensor product of the confusion matrices, bit by bit: conf[b] (or
// conf[0] for every bit) on the pairs of entries that differ in bit b.
func invertReadout(p []float64, conf []Confusion) error {
	for b := 0; 1<<b < len(p); b++ {
		c := conf[0]
		if len(conf) > 1 {
			c = conf[b]
		}
		det, err := c.check()
		if err != nil {
			return fmt.Errorf("bit %d: %w", b, err)
		}
		// C^{-1} = [[c11, -c01], [-c10, c00]] / det.
		a, bb, cc, d := c[1][1]/det, -c[0][1]/det, -c[1][0]/det, c[0][0]/det
		m := 1 << b
		for i := range p {
			if i&m != 0 {
				continue
			}
			v0, v1 := p[i], p[i|m]
			p[i], p[i|m] = a*v0+bb*v1, cc*v0+d*v1
		}
	}
	return nil
}

// projectSimplex replaces y by its Euclidean projection onto the
// probability simplex {x : x >= 0, sum x = 1} (Wang & Carreira-Perpiñán
// 2013, Algorithm 1): with u the entries sorted in decreasing order, rho
// the largest j such that u_j + (1 - sum_{i<=j} u_i)/j > 0, and
// lambda = (1 - sum_{i<=rho} u_i)/rho, x_i = max(y_i + lambda, 0).
func projectSimplex(y []float64) {
	u := slices.Clone(y)
	slices.SortFunc(u, func(a, b float64) int {
		switch {
		case a > b:
			return -1
		case a < b:
			return 1
		}
		return 0
	})
	var sum, lambda float64
	for j, v := range u {
		sum += v
		if l := (1 - sum) / float64(j+1); v+l > 0 {
			lambda = l
		}
	}
	for i, v := range y {
		y[i] = max(v+lambda, 0)
	}
}

// Mitigation configures readout-error mitigation (see MitigateReadout). The
// zero value mitigates nothing.
type Mitigation struct {
	// Readout inverts the readout confusion of the measured bits (the
	// class register and the ancilla) before the decision.
	Readout bool
	// Confusion holds the confusion matrices of the measured bits in the
	// order of the outcome index a*2^q + k: the class qubits first, least
	// significant first (Layout.Class order), then the ancilla, so 1 + q
	// matrices; or a single matrix for every bit. Nil takes them from the
	// classifier's own readout error (Noise.Readout or Channels.Readout,
	// the same for every bit) or, on a device, from the physical qubits
	// (see Physical). PredictCounts needs them or a Device (imported
	// counts come with their device's matrices, e.g. from
	// ConfusionFromCounts).
	Confusion []Confusion
	// Physical holds one confusion matrix per physical qubit of a device
	// (len Device.N()): each row's measured bits take the matrices of the
	// physical qubits that hold them when they are measured (the final
	// places of the row's routed program, device.Program.Final), since
	// routing may choose other qubits for other rows. It needs a device:
	// Classifier.Device in ModeNoisy, Mitigation.Device for
	// PredictCounts. Nil on a device takes every qubit's own readout
	// errors from the description (device.Qubit.ReadoutP01, P10). Setting
	// both Confusion and Physical is an error.
	Physical []Confusion
	// Device is, for PredictCounts, the device the rows' circuits were
	// compiled for (fringe circuit -export -device): each row's circuit is
	// compiled again (device.Compile is deterministic) to find the
	// physical qubits that measured its bits. In ModeNoisy the
	// classifier's own Device is used; a different one here is an error.
	Device *device.Device
}

// IsZero reports whether no mitigation is configured.
func (m Mitigation) IsZero() bool {
	return !m.Readout && m.Confusion == nil && m.Physical == nil && m.Device == nil
}

// mitigationDevice returns the device whose physical qubits the
// mitigation reads: the classifier's in ModeNoisy, else Mitigate.Device.
func (c *Classifier) mitigationDevice() *device.Device {
	if c.Mode == ModeNoisy && c.Device != nil {
		return c.Device
	}
	return c.Mitigate.Device
}

// validate checks the mitigation options of c (Validate calls it).
func (c *Classifier) validateMitigation() error {
	m := c.Mitigate
	if !m.Readout {
		if m.Confusion != nil || m.Physical != nil || m.Device != nil {
			return optErr("mitigate", "confusion matrices or a device given without readout mitigation")
		}
		return nil
	}
	for i, cf := range m.Confusion {
		if _, err := cf.check(); err != nil {
			return optErr("mitigate", "confusion matrix %d: %v", i, err)
		}
	}
	dev := c.mitigationDevice()
	if m.Device != nil && c.Mode == ModeNoisy && c.Device != nil && m.Device != c.Device {
		return optErr("mitigate", "mitigation device %s differs from the classifier's device %s", m.Device.Name, c.Device.Name)
	}
	if m.Physical != nil {
		switch {
		case m.Confusion != nil:
			return optErr("mitigate", "confusion matrices given both per measured bit and per physical qubit; give one")
		case dev == nil:
			return optErr("mitigate", "confusion matrices per physical qubit need a device")
		case len(m.Physical) != dev.N():
			return optErr("mitigate", "%d confusion matrices for the %d physical qubits of device %s", len(m.Physical), dev.N(), dev.Name)
		}
		for i, cf := range m.Physical {
			if _, err := cf.check(); err != nil {
				return optErr("mitigate", "confusion matrix of physical qubit %d: %v", i, err)
			}
		}
	}
	if m.Confusion == nil && dev != nil {
		if m.Physical == nil {
			for i, q := range dev.Qubits {
				if _, err := ReadoutConfusion(q.ReadoutP01, q.ReadoutP10).check(); err != nil {
					return optErr("mitigate", "device %s qubit %d: its readout errors (%v, %v): %v", dev.Name, i, q.ReadoutP01, q.ReadoutP10, err)
				}
			}
		}
		return nil
	}
	if m.Confusion == nil {
		if c.Mode != ModeNoisy {
			return optErr("mitigate", "readout mitigation in mode %v needs confusion matrices (it has no readout error of its own)", c.Mode)
		}
		ro := c.Noise.Readout
		if ro == [2]float64{} {
			ro = c.Channels.Readout
		}
		if ro == [2]float64{} {
			return optErr("mitigate", "readout mitigation without readout error or confusion matrices")
		}
		if _, err := ReadoutConfusion(ro[0], ro[1]).check(); err != nil {
			return optErr("mitigate", "the readout error (%v, %v): %v", ro[0], ro[1], err)
		}
	}
	return nil
}

// confusion returns the confusion matrices that mitigate outcomes of q
// class qubits: the configured ones, or the classifier's own readout
// error. It errors (an *OptionError, key "mitigate") on a count other than
// 1 or 1+q. On a device without per-bit matrices it returns nil: the
// matrices depend on the row (physicalConfusion).
func (c *Classifier) confusion(q int) ([]Confusion, error) {
	m := c.Mitigate
	if m.Confusion == nil {
		if c.mitigationDevice() != nil {
			return nil, nil
		}
		ro := c.Noise.Readout
		if ro == [2]float64{} {
			ro = c.Channels.Readout
		}
		return []Confusion{ReadoutConfusion(ro[0], ro[1])}, nil
	}
	if len(m.Confusion) != 1 && len(m.Confusion) != 1+q {
		return nil, optErr("mitigate", "%d confusion matrices for %d measured bits (1 ancilla + %d class qubits); give 1 or %d", len(m.Confusion), 1+q, q, 1+q)
	}
	return m.Confusion, nil
}

// physicalConfusion returns the confusion matrices of a row's measured
// bits on a device (class qubits first, least significant first, then the
// ancilla): those of the physical qubits that hold them at the end of the
// routed program, from Mitigate.Physical or the device's own readout
// errors. regs is the logical circuit's layout.
func (c *Classifier) physicalConfusion(dev *device.Device, prog *device.Program, regs circuit.Layout) []Confusion {
	bits := append(slices.Clone(regs.Class), regs.Ancilla)
	out := make([]Confusion, len(bits))
	for i, lq := range bits {
		pq := prog.Final[lq]
		if c.Mitigate.Physical != nil {
			out[i] = c.Mitigate.Physical[pq]
		} else {
			out[i] = ReadoutConfusion(dev.Qubits[pq].ReadoutP01, dev.Qubits[pq].ReadoutP10)
		}
	}
	return out
}
