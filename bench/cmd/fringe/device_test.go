package main

import (
	"path/filepath"
	"strings"
	"testing"
)

// badDeviceCases are the device, mitigation and calibration fixtures of
// testdata/bad (TestBadInput checks that every fixture has a case here or
// in its own table).
var badDeviceCases = []struct {
	spec string
	want []string // substrings of the message
}{
	{"device_unknown.toml", []string{"device_unknown.toml:8", "model[1].device", "no-such-device", "line-16"}},
	{"device_mode.toml", []string{"device_mode.toml:8", "model[1].device", "mode = \"noisy\""}},
	{"device_noise.toml", []string{"device_noise.toml:8", "model[1].device", "noise table"}},
	{"device_small.toml", []string{"device_small.toml:8", "model[1].device", "needs 8 qubits", "device four has 4 qubits"}},
	{"device_file_bad.toml", []string{"device_file_bad.toml:8", "model[1].device", "device_edge.toml:5", "edges"}},
	{"device_t2_spec.toml", []string{"device_t2_spec.toml:8", "device_t2.toml:8", "t2_us", "2 T1"}},
	{"device_list.toml", []string{"device_list.toml:8", "model[1].device", "compared, not tuned"}},
	{"mitigate_no_readout.toml", []string{"mitigate_no_readout.toml:8", "model[1].mitigate", "without readout noise"}},
	{"mitigate_value.toml", []string{"mitigate_value.toml:8", "model[1].mitigate", "extrapolate"}},
	{"mitigate_shots.toml", []string{"mitigate_shots.toml:8", "model[1].mitigate", "mode is \"shots\""}},
	{"calibration_alone.toml", []string{"calibration_alone.toml:8", "model[1].calibration", "mitigate = \"readout\""}},
	{"calibration_bits.toml", []string{"calibration_bits.toml:9", "model[1].calibration", "1 class bit", "class[1]"}},
	{"calibration_prepared.toml", []string{"calibration_prepared.toml:9", "model[1].calibration", "cal_prepared.csv:3", "prepared"}},
	{"calibration_half.toml", []string{"calibration_half.toml:9", "cal_half.csv", "ancilla has no line prepared in 1"}},
	{"calibration_flat.toml", []string{"calibration_flat.toml:9", "cal_flat.csv:3", "no information"}},
	{"calibration_physical.toml", []string{"calibration_physical.toml:9", "model[1].calibration", "physical qubits", "need a device"}},
	{"calibration_qubits.toml", []string{"calibration_qubits.toml:10", "model[1].calibration", "qubits 0 to 2", "line-16 has 16 qubits"}},
	{"counts_device.toml", []string{"counts_device.toml:7", "model[1].device", "mitigate = \"readout\""}},
	{"counts_mitigate.toml", []string{"counts_mitigate.toml:7", "model[1].mitigate", "calibration"}},
}

// TestBadDeviceInput checks the bad-input corpus of device targets
// (testdata/bad: device_*, mitigate_*, calibration_*, counts_*): every
// case exits with status 2, prints a one-line message naming the spec's
// file and line and the key at fault (and the device or calibration file's
// line where the fault is there), and leaves no run directory behind.
func TestBadDeviceInput(t *testing.T) {
	bad, err := filepath.Abs("testdata/bad")
	if err != nil {
		t.Fatal(err)
	}
	cases := badDeviceCases
	for _, c := range cases {
		t.Run(c.spec, func(t *testing.T) {
			checkRefused(t, []string{"run", filepath.Join(bad, c.spec), "-workers", "2"}, c.want)
		})
	}
}

// TestCircuitDeviceUsage: bad -device arguments of fringe circuit exit
// with status 2 and a one-line message; a good one prints both resource
// tables, and -qasm / -qasm2 the native program in either version.
func TestCircuitDeviceUsage(t *testing.T) {
	bad, err := filepath.Abs("testdata/bad")
	if err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct {
		args []string
		want []string
	}{
		{[]string{"circuit", "-device", "no-such"}, []string{"-device", "no-such", "embedded"}},
		{[]string{"circuit", "-device", filepath.Join(bad, "device_edge.toml")}, []string{"device_edge.toml:5", "edges"}},
		{[]string{"circuit", "-train", "8", "-device", filepath.Join(bad, "device_four.toml")}, []string{"-device", "8 qubits", "largest connected part has 4"}},
		{[]string{"circuit", "-device", "line-16", "-qasm", "-qasm2"}, []string{"-qasm", "-qasm2"}},
	} {
		code, _, stderr := runCmd(t, t.TempDir(), c.args...)
		msg := strings.TrimSpace(stderr)
		if code != 2 || strings.Count(msg, "\n") != 0 {
			t.Errorf("%v: exit %d, message %q; want 2 and one line", c.args, code, msg)
		}
		for _, w := range c.want {
			if !strings.Contains(msg, w) {
				t.Errorf("%v: message %q lacks %q", c.args, msg, w)
			}
		}
	}
	code, out, stderr := runCmd(t, t.TempDir(), "circuit", "-train", "8", "-device", "heavy-27")
	if code != 0 {
		t.Fatalf("circuit -device heavy-27: exit %d: %s", code, stderr)
	}
	for _, w := range []string{"routed native on heavy-27", "two-qubit gates", "SWAPs added", "duration (us)", "end (measured)"} {
		if !strings.Contains(out, w) {
			t.Errorf("resources lack %q:\n%s", w, out)
		}
	}
	for version, head := range map[string]string{"-qasm": "OPENQASM 3.0;", "-qasm2": "OPENQASM 2.0;"} {
		code, out, stderr := runCmd(t, t.TempDir(), "circuit", "-train", "8", "-device", "grid-4x4", version)
		if code != 0 || !strings.Contains(out, head) || !strings.Contains(out, "cz q[") || strings.Contains(out, "cx q[") {
			t.Errorf("circuit -device grid-4x4 %s: exit %d (%s), want native cz text under %s:\n%.400s", version, code, stderr, head, out)
		}
	}
}
