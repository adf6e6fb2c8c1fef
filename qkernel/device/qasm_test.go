package device

import (
	"flag"
	"os"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"testing"

	"fringe/qkernel/circuit"
)

var update = flag.Bool("update", false, "rewrite golden files in testdata")

// parsePhysical reads the gate lines of an exported routed program
// (one register q) back into operations.
func parsePhysical(t *testing.T, text string) []circuit.Op {
	t.Helper()
	one := regexp.MustCompile(`^(x|sx|rx|ry|rz)(?:\(([^)]*)\))? q\[(\d+)\];$`)
	two := regexp.MustCompile(`^(cx|cz) q\[(\d+)\], ?q\[(\d+)\];$`)
	meas := regexp.MustCompile(`^(?:\w+\[\d+\] = measure q\[(\d+)\]|measure q\[(\d+)\] -> \w+\[\d+\]);$`)
	names := map[string]circuit.Gate{"x": circuit.X, "sx": circuit.SX, "rx": circuit.RX, "ry": circuit.RY, "rz": circuit.RZ, "cx": circuit.CNOT, "cz": circuit.CZ}
	atoi := func(s string) int { v, _ := strconv.Atoi(s); return v }
	var ops []circuit.Op
	for _, line := range strings.Split(text, "\n") {
		switch {
		case line == "", strings.HasPrefix(line, "//"), strings.HasPrefix(line, "OPENQASM"), strings.HasPrefix(line, "include"),
			strings.HasPrefix(line, "qubit["), strings.HasPrefix(line, "bit["), strings.HasPrefix(line, "qreg"), strings.HasPrefix(line, "creg"),
			strings.HasPrefix(line, "gate "):
		case one.MatchString(line):
			m := one.FindStringSubmatch(line)
			op := circuit.Op{Gate: names[m[1]], Target: atoi(m[3])}
			if m[2] != "" {
				a, err := strconv.ParseFloat(m[2], 64)
				if err != nil {
					t.Fatal(err)
				}
				op.Angle = a
			}
			ops = append(ops, op)
		case two.MatchString(line):
			m := two.FindStringSubmatch(line)
			ops = append(ops, circuit.Op{Gate: names[m[1]], Controls: []int{atoi(m[2])}, Target: atoi(m[3])})
		case meas.MatchString(line):
			m := meas.FindStringSubmatch(line)
			q := m[1] + m[2]
			ops = append(ops, circuit.Op{Gate: circuit.Measure, Target: atoi(q)})
		default:
			t.Fatalf("unexpected line %q", line)
		}
	}
	return ops
}

// TestProgramQASM: the OpenQASM 3 and 2.0 texts of routed programs hold
// exactly the program's operations (angles round-trip: %.17g), name the
// device and the mapping, and OpenQASM 2.0 defines sx when it is used
// (qelib1.inc of arXiv:1707.03429 has no sx). Goldens: a small cats
// instance on line-16 (OpenQASM 3) and heavy-27 (OpenQASM 2.0); run
// go test -update to rewrite them and review the diff.
func TestProgramQASM(t *testing.T) {
	for _, tc := range []struct {
		dev, golden string
		version     int
	}{
		{"line-16", "routed_line16.qasm", 3},
		{"heavy-27", "routed_heavy27_v2.qasm", 2},
		{"grid-4x4", "", 2},
		{"ions-20", "", 3},
	} {
		dev, _ := Load(tc.dev)
		c := smallCase(t, "cats", 3)
		p, err := Compile(c, dev, Options{})
		if err != nil {
			t.Fatal(err)
		}
		text, err := p.QASM(tc.version)
		if err != nil {
			t.Fatal(err)
		}
		got := parsePhysical(t, text)
		want := p.Circuit().Ops
		if len(got) != len(want) {
			t.Fatalf("%s: %d operations in the text, %d in the program", tc.dev, len(got), len(want))
		}
		for i := range want {
			g, w := got[i], want[i]
			if g.Gate != w.Gate || g.Target != w.Target || len(g.Controls) != len(w.Controls) || len(g.Controls) == 1 && g.Controls[0] != w.Controls[0] ||
				g.Angle != w.Angle { // exact: %.17g round-trips a float64
				t.Fatalf("%s: op %d = %+v in the text, %+v in the program", tc.dev, i, g, w)
			}
		}
		for _, s := range []string{"device " + tc.dev, "start: ancilla[0]=q[", "end:   ancilla[0]=q[", "routed:  "} {
			if !strings.Contains(text, s) {
				t.Errorf("%s: no %q in the header", tc.dev, s)
			}
		}
		if tc.version == 2 && dev.Family == FamilyCX && !strings.Contains(text, "gate sx a {") {
			t.Errorf("%s: OpenQASM 2.0 text without the sx definition", tc.dev)
		}
		if tc.golden == "" {
			continue
		}
		path := filepath.Join("testdata", tc.golden)
		if *update {
			if err := os.WriteFile(path, []byte(text), 0o644); err != nil {
				t.Fatal(err)
			}
		}
		wantText, err := os.ReadFile(path)
		if err != nil {
			t.Fatalf("%v (run go test -update to create it)", err)
		}
		if text != string(wantText) {
			t.Errorf("%s differs; run go test -update and review the diff", path)
		}
	}
}
