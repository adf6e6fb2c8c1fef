package modelkit

import (
	"crypto/sha256"
	"encoding/hex"
	"fmt"
	"os"
	"path/filepath"
	"slices"
	"strings"

	"gonum.org/v1/gonum/mat"

	"fringe/baselines"
	"fringe/qkernel"
	"fringe/qkernel/circuit"
	"fringe/qkernel/device"
)

// The device keys of an interference or counts model:
//
//	device = "heavy-27"          # an embedded device, or the path of a device file
//	mitigate = "readout"         # readout-error mitigation of the measured bits
//	calibration = "cal.csv"      # calibration counts for the mitigation
//
// An interference model with a device runs in mode "noisy" (required):
// every test row's circuit is compiled to the device and simulated under
// its calibrated noise (qkernel.Classifier.Device); the device replaces
// the noise table, which must be absent. Mode "shots" takes no device: its
// shots are drawn from the noiseless distribution, and a device's readout
// errors alone are noise.readout = [p01, p10] in mode "noisy". mitigate =
// "readout" needs readout noise to invert: noise.readout, or a device;
// its confusion matrices are the model's own readout error, the readout
// errors of the physical qubits each row is measured on (device), or the
// calibration file's. A counts model takes device (the device its circuits
// were exported for with fringe circuit -export -device) and calibration
// only for mitigate = "readout", and mitigation needs one of them.
//
// Paths (device files, calibration files) are relative to the spec's
// folder. Files are read when the plan is made (Resolve); their SHA-256
// enters the run's fingerprint and manifest.

// hardware is what a model knows of its device and calibration: the keys
// as written and, after Resolve, what they name.
type hardware struct {
	device, calibration string // as written ("" for none)
	mitigate            bool

	dir      string // the folder Resolve resolved against
	resolved bool
	dev      *device.Device
	devPath  string // the device file read ("" for an embedded device)
	cal      *Calibration
	calPath  string
}

// Hardware describes a model's device and calibration for manifests and
// messages, after Resolve.
type Hardware struct {
	Device     string // the device's name ("" for none)
	DeviceFile string // the device file read, "" for an embedded device
	DeviceSHA  string // SHA-256 of the device description
	// Qubits is the device's qubit count and Connected the size of its
	// largest connected part (0 without a device).
	Qubits, Connected int
	Mitigate          bool
	Calibration       string // the calibration file read ("" for none)
	CalibrationSHA    string
	// CalibrationBits is the number of class-register bits a calibration
	// by register bits covers (-1 for a calibration by physical qubit or
	// none).
	CalibrationBits int
}

// Hardware returns the model's device and calibration after Resolve (ok
// false for a model without any, or before Resolve).
func (m Spec) Hardware() (Hardware, bool) {
	hw := m.hw
	if hw == nil || !hw.resolved || (hw.device == "" && hw.calibration == "" && !hw.mitigate) {
		return Hardware{}, false
	}
	out := Hardware{Mitigate: hw.mitigate, CalibrationBits: -1}
	if hw.dev != nil {
		out.Device, out.DeviceFile, out.DeviceSHA = hw.dev.Name, hw.devPath, hw.dev.SHA256
		out.Qubits = hw.dev.N()
		for _, c := range hw.dev.Components() {
			out.Connected = max(out.Connected, len(c))
		}
	}
	if hw.cal != nil {
		out.Calibration, out.CalibrationSHA = hw.calPath, hw.cal.SHA256
		if hw.cal.Physical == nil {
			out.CalibrationBits = len(hw.cal.Class)
		}
	}
	return out, true
}

// parseHardware reads the keys device, mitigate and calibration of an
// interference (counts false) or counts model and checks them against the
// model's mode (interference) and noise table; problems are recorded in p.
// It returns nil when none of the keys is given.
func parseHardware(p *params, counts bool, mode qkernel.Mode, modeS string, noise map[string]any) *hardware {
	hw := &hardware{device: p.str("device", ""), calibration: p.str("calibration", "")}
	mit := p.str("mitigate", "")
	if p.err != nil {
		return nil
	}
	switch mit {
	case "":
		if p.has("mitigate") {
			p.fail("mitigate", "want \"readout\" (or leave the key out)")
			return nil
		}
	case "readout":
		hw.mitigate = true
	default:
		p.fail("mitigate", "unknown mitigation %q (want \"readout\": inversion of the readout confusion of the measured bits)", mit)
		return nil
	}
	if p.has("device") && strings.TrimSpace(hw.device) == "" {
		p.fail("device", "empty device name (embedded: %s; or the path of a device file)", strings.Join(device.Names(), ", "))
		return nil
	}
	if p.has("calibration") && strings.TrimSpace(hw.calibration) == "" {
		p.fail("calibration", "empty calibration file name")
		return nil
	}
	if hw.device == "" && hw.calibration == "" && !hw.mitigate {
		return nil
	}
	if hw.calibration != "" && !hw.mitigate {
		p.fail("calibration", "a calibration file applies with mitigate = \"readout\" only")
		return nil
	}
	if counts {
		switch {
		case hw.device != "" && !hw.mitigate:
			p.fail("device", "a counts model reads measured outcomes; its device only names the qubits that measured them for mitigate = \"readout\"")
			return nil
		case hw.mitigate && hw.device == "" && hw.calibration == "":
			p.fail("mitigate", "readout mitigation of imported counts needs their confusion matrices: calibration = \"file.csv\" (calibration counts) or device = \"NAME\" (the device the circuits were exported for)")
			return nil
		}
		return hw
	}
	if hw.device != "" {
		switch {
		case mode != qkernel.ModeNoisy:
			p.fail("device", "a device's calibrated noise needs mode = \"noisy\" (mode is %q; add shots = N for finite shots on top of it)", modeS)
			return nil
		case noise != nil:
			p.fail("device", "set together with a noise table; the device's calibration is the noise model: remove noise or device")
			return nil
		}
	}
	if hw.mitigate {
		readout := false
		if noise != nil {
			_, readout = noise["readout"]
		}
		switch {
		case mode != qkernel.ModeNoisy:
			p.fail("mitigate", "readout mitigation needs readout noise: mode = \"noisy\" with noise.readout = [p01, p10] or a device (mode is %q)", modeS)
			return nil
		case !readout && hw.device == "":
			p.fail("mitigate", "readout mitigation without readout noise: set noise.readout = [p01, p10] or device = \"NAME\"")
			return nil
		}
	}
	return hw
}

// label returns the label parts of the device and mitigation.
func (hw *hardware) labelDevice() string {
	if hw == nil || hw.device == "" {
		return ""
	}
	if slices.Contains(device.Names(), hw.device) {
		return "-" + hw.device
	}
	return "-" + labelSafe(fileBase(hw.device))
}

func (hw *hardware) labelMitigate() string {
	if hw == nil || !hw.mitigate {
		return ""
	}
	return "-mitigated"
}

// fileBase is a file name without folder and extension.
func fileBase(path string) string {
	base := filepath.Base(path)
	if ext := filepath.Ext(base); ext != "" && ext != base {
		base = strings.TrimSuffix(base, ext)
	}
	return base
}

// setParams records the keys in the model's params.
func (hw *hardware) setParams(ps map[string]any) {
	if hw == nil {
		return
	}
	if hw.device != "" {
		ps["device"] = hw.device
	}
	if hw.mitigate {
		ps["mitigate"] = "readout"
	}
	if hw.calibration != "" {
		ps["calibration"] = hw.calibration
	}
}

// resolvePath resolves a path of the spec against dir.
func resolvePath(dir, file string) string {
	if !filepath.IsAbs(file) && dir != "" {
		return filepath.Join(dir, file)
	}
	return file
}

// devicePath is the file a device key names, or "" for an embedded device.
func (hw *hardware) devicePath(dir string) string {
	if hw.device == "" || slices.Contains(device.Names(), hw.device) {
		return ""
	}
	return resolvePath(dir, hw.device)
}

// inputFiles lists the device and calibration files the model reads.
func (hw *hardware) inputFiles(dir string) []string {
	if hw == nil {
		return nil
	}
	var out []string
	if f := hw.devicePath(dir); f != "" {
		out = append(out, f)
	}
	if hw.calibration != "" {
		out = append(out, resolvePath(dir, hw.calibration))
	}
	return out
}

// Resolve loads the model's device and calibration files (relative paths
// against dir, the spec's folder) and checks them against each other: a
// calibration by physical qubit needs a device and one entry for each of
// its qubits. A grid's points are resolved too. It does nothing for a
// model without device keys, and again for the same dir. Errors are
// *KeyError values naming "device" or "calibration"; the message of a
// device file's error names its file, line and key.
func (m *Spec) Resolve(dir string) error {
	if m.Grid != nil {
		for i := range m.Grid.Points {
			if err := m.Grid.Points[i].Spec.Resolve(dir); err != nil {
				return err
			}
		}
	}
	hw := m.hw
	if hw == nil || (hw.resolved && hw.dir == dir) {
		return nil
	}
	hw.resolved, hw.dir, hw.dev, hw.devPath, hw.cal, hw.calPath = false, dir, nil, "", nil, ""
	if hw.device != "" {
		if path := hw.devicePath(dir); path == "" {
			dev, err := device.Load(hw.device)
			if err != nil {
				return keyErr("device", "%v", err)
			}
			hw.dev = dev
		} else {
			if _, err := os.Stat(path); err != nil {
				return keyErr("device", "%q is neither an embedded device (%s) nor a readable device file: %v", hw.device, strings.Join(device.Names(), ", "), err)
			}
			dev, err := device.LoadFile(path)
			if err != nil {
				return keyErr("device", "%v", err)
			}
			hw.dev, hw.devPath = dev, path
		}
	}
	if hw.calibration != "" {
		path := resolvePath(dir, hw.calibration)
		cal, err := ReadCalibration(path)
		if err != nil {
			return keyErr("calibration", "%v", err)
		}
		if cal.Physical != nil {
			if hw.dev == nil {
				return keyErr("calibration", "%s gives physical qubits (%d of them), which need a device: set device = \"NAME\", or name the measured bits (ancilla, class[0], ...)", path, len(cal.Physical))
			}
			if len(cal.Physical) != hw.dev.N() {
				return keyErr("calibration", "%s calibrates qubits 0 to %d; device %s has %d qubits and every one needs its preparations 0 and 1", path, len(cal.Physical)-1, hw.dev.Name, hw.dev.N())
			}
		}
		hw.cal, hw.calPath = cal, path
	}
	hw.resolved = true
	return nil
}

// unresolvedModel stands for a model whose device keys were not resolved:
// every call fails (a planner that forgot Resolve).
type unresolvedModel struct{ name string }

func (u unresolvedModel) Fit(*mat.Dense, []int, int) error {
	return fmt.Errorf("modelkit: model %s: its device and calibration were not loaded (Spec.Resolve was not called)", u.name)
}

func (u unresolvedModel) Predict(*mat.Dense) ([]int, error) {
	return nil, fmt.Errorf("modelkit: model %s: %w", u.name, baselines.ErrNotFitted)
}

// Costed returns the interference configuration as its tasks run it, for
// the estimates of cost and memory made before a run: Interference with
// the resolved device (nil for other kinds). Readout mitigation is left
// out: it costs a few small matrix products per row, and confusion
// matrices from a calibration file by register bit are only picked at
// Fit, when the class count is known.
func (m Spec) Costed() *qkernel.Classifier {
	if m.Interference == nil {
		return nil
	}
	c := *m.Interference
	if m.hw != nil && m.hw.resolved {
		c.Device = m.hw.dev
	}
	return &c
}

// configure sets the device and the mitigation of a classifier from the
// resolved hardware; perBit reports whether the confusion matrices come
// per register bit from a calibration file (they are set at Fit, when
// the class-register size is known: calibrated).
func (hw *hardware) configure(c *qkernel.Classifier) (perBit bool) {
	if hw == nil {
		return false
	}
	c.Device = hw.dev
	if !hw.mitigate {
		return false
	}
	c.Mitigate = qkernel.Mitigation{Readout: true}
	if hw.cal != nil {
		if hw.cal.Physical != nil {
			c.Mitigate.Physical = hw.cal.Physical
		} else {
			return true
		}
	}
	return false
}

// calibrated is an interference classifier whose readout mitigation takes
// its confusion matrices per register bit from a calibration file: Fit
// picks those of the ancilla and of as many class bits as the data has
// classes, in the order qkernel.Mitigation.Confusion wants.
type calibrated struct {
	*qkernel.Classifier
	cal *Calibration
}

// Fit sets the confusion matrices of the measured bits, then fits.
func (m *calibrated) Fit(X *mat.Dense, y []int, nClass int) error {
	conf, err := m.cal.Bits(nClass)
	if err != nil {
		return err
	}
	m.Mitigate.Confusion = conf
	return m.Classifier.Fit(X, y, nClass)
}

// Calibration is a calibration counts file read: the confusion matrix of
// every measured register bit (Ancilla, Class), or of every physical qubit
// of a device (Physical), estimated from the counts
// (qkernel.ConfusionFromCounts).
type Calibration struct {
	File     string
	SHA256   string
	Ancilla  qkernel.Confusion
	Class    []qkernel.Confusion // class_out[0], class_out[1], ...
	Physical []qkernel.Confusion // by physical qubit; nil for a calibration by register bit
}

// Bits returns the confusion matrices of the measured bits of a circuit
// with nClass classes in the order of qkernel.Mitigation.Confusion (the
// class bits, least significant first, then the ancilla). A calibration by
// physical qubit has none (nil); one that covers fewer class bits than the
// data needs is an error.
func (c *Calibration) Bits(nClass int) ([]qkernel.Confusion, error) {
	if c.Physical != nil {
		return nil, nil
	}
	_, _, q := circuit.RegisterSizes(1, 1, nClass)
	if q > len(c.Class) {
		return nil, fmt.Errorf("modelkit: calibration %s covers %d class bit(s); %d classes need %d (class[0] to class[%d])", c.File, len(c.Class), nClass, q, q-1)
	}
	return append(slices.Clone(c.Class[:q]), c.Ancilla), nil
}

// sha256File is the hex SHA-256 of data.
func sha256Hex(data []byte) string {
	sum := sha256.Sum256(data)
	return hex.EncodeToString(sum[:])
}
