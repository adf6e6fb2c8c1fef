package device

import (
	"errors"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// TestEmbeddedDevices checks the shape of every embedded device against its
// description in Names (derived by hand from the layouts in the files: a
// line of 16 has 15 edges, a 4x4 grid 2*4*3 = 24, the lattice of 27 28
// edges of degree at most 3, 20 all to all 20*19/2 = 190) and that every
// value is in the range the format admits.
func TestEmbeddedDevices(t *testing.T) {
	want := map[string]struct {
		n, edges, maxDeg int
		fam              Family
		directed         bool
	}{
		"line-16":  {16, 15, 2, FamilyCX, false},
		"grid-4x4": {16, 24, 4, FamilyCZ, false},
		"heavy-27": {27, 28, 3, FamilyCX, true},
		"ions-20":  {20, 190, 19, FamilyCZ, false},
	}
	names := Names()
	if len(names) != 4 || names[0] != "line-16" || names[3] != "ions-20" {
		t.Fatalf("Names() = %v", names)
	}
	for _, name := range names {
		d, err := Load(name)
		if err != nil {
			t.Fatal(err)
		}
		w := want[name]
		if d.Name != name || d.N() != w.n || len(d.Edges) != w.edges || d.Family != w.fam || d.Directed != w.directed || d.Source != "embedded" {
			t.Errorf("%s: %d qubits, %d edges, %s, directed %v, source %q", name, d.N(), len(d.Edges), d.Family, d.Directed, d.Source)
		}
		if !strings.HasPrefix(d.Note, "invented") {
			t.Errorf("%s: note %q does not say the device is invented", name, d.Note)
		}
		if c := d.Components(); len(c) != 1 {
			t.Errorf("%s: %d connected parts", name, len(c))
		}
		deg := 0
		for q := range d.N() {
			deg = max(deg, len(d.neighbours(q)))
			if key, msg := validQubit(d.Qubits[q]); key != "" {
				t.Errorf("%s qubit %d: %s", name, q, msg)
			}
		}
		if deg != w.maxDeg {
			t.Errorf("%s: largest degree %d, want %d", name, deg, w.maxDeg)
		}
		for _, e := range d.Edges {
			if e.Error <= 0 || e.Error > 0.05 || e.NS <= 0 {
				t.Errorf("%s: edge %+v has an implausible calibration", name, e)
			}
		}
	}
	// heavy-27: the [[edge]]-free per-edge arrays and directedness.
	d, _ := Load("heavy-27")
	if !d.Native(1, 0) || d.Native(0, 1) || d.Distance(0, 26) < 5 {
		t.Errorf("heavy-27: native(1,0) %v native(0,1) %v distance(0,26) %d", d.Native(1, 0), d.Native(0, 1), d.Distance(0, 26))
	}
	// line-16: the [[edge]] override of [6, 7].
	d, _ = Load("line-16")
	if e := d.Edges[d.EdgeIndex(7, 6)]; e.Error != 1.9e-2 || e.NS != 420 { // exact: copied from the file
		t.Errorf("line-16 edge [6, 7] = %+v, want the override 0.019, 420 ns", e)
	}
	if e := d.Edges[d.EdgeIndex(12, 13)]; e.Error != 1.3e-2 || e.NS != 340 { // exact: copied from the file
		t.Errorf("line-16 edge [12, 13] = %+v, want error 0.013 and the default 340 ns", e)
	}
}

const goodFile = `name = "tiny"
note = "a test device"
qubits = 3
gates = ["cx", "rz", "sx", "x"]
edges = [
  [0, 1],
  [1, 2],
]

[qubit]
t1_us = [100, 80.5, 90]
t2_us = 70
readout_p01 = 0.01
readout_p10 = 0.02
gate_error = 3e-4
gate_ns = 35

[pair]
gate_error = 0.01
gate_ns = 300

[[edge]]
qubits = [2, 1]
gate_ns = 410
`

func TestParseGood(t *testing.T) {
	d, err := Parse([]byte(goodFile), "tiny.toml")
	if err != nil {
		t.Fatal(err)
	}
	if d.Family != FamilyCX || d.N() != 3 || !d.VirtualRZ || d.Qubits[1].T1 != 80.5 || d.Qubits[2].T2 != 70 ||
		d.Edges[1].NS != 410 || d.Edges[1].Error != 0.01 || d.Edges[0].NS != 300 { // exact: copied from the text
		t.Errorf("parsed %+v", d)
	}
	if !d.Native(0, 1) || !d.Native(1, 0) || d.Distance(0, 2) != 2 || d.EdgeIndex(0, 2) != -1 {
		t.Errorf("coupling of tiny: native %v %v distance %d", d.Native(0, 1), d.Native(1, 0), d.Distance(0, 2))
	}
}

// TestParseErrors: every error names the file, the line and the key, and
// wraps the right sentinel. Lines are counted by hand in goodFile (edges
// at 5, [qubit] at 10 with t1_us at 11 to gate_ns at 16, [pair] at 18,
// [[edge]] at 22); an error in an array points at the array's key.
func TestParseErrors(t *testing.T) {
	edit := func(old, new string) string {
		if !strings.Contains(goodFile, old) {
			t.Fatalf("test text lacks %q", old)
		}
		return strings.Replace(goodFile, old, new, 1)
	}
	for _, tc := range []struct {
		name, text string
		line       int
		key        string
		sentinel   error
		msg        string
	}{
		{"edge to a missing qubit", edit("[1, 2],", "[1, 3],"), 5, "edges[1]", ErrInvalid, "names qubit 3"},
		{"self-loop", edit("[1, 2],", "[2, 2],"), 5, "edges[1]", ErrInvalid, "to itself"},
		{"duplicate edge", edit("[1, 2],", "[1, 0],"), 5, "edges[1]", ErrInvalid, "repeats edge 0"},
		{"T2 > 2 T1", edit("t2_us = 70", "t2_us = [70, 170, 70]"), 12, "qubit.t2_us[1]", ErrInvalid, "exceeds 2 T1"},
		{"probability", edit("readout_p10 = 0.02", "readout_p10 = 1.5"), 14, "qubit.readout_p10[0]", ErrInvalid, "outside [0, 1]"},
		{"negative probability", edit("readout_p01 = 0.01", "readout_p01 = -0.01"), 13, "qubit.readout_p01[0]", ErrInvalid, "outside [0, 1]"},
		{"gate error", edit("gate_error = 0.01", "gate_error = 0.9"), 19, "pair.gate_error[0]", ErrInvalid, "outside [0, 0.75]"},
		{"duration", edit("gate_ns = 35", "gate_ns = 0"), 16, "qubit.gate_ns[0]", ErrInvalid, "want positive"},
		{"edge duration", edit("gate_ns = 410", "gate_ns = -4"), 24, "edge[0].gate_ns", ErrInvalid, "want positive"},
		{"family", edit(`gates = ["cx", "rz", "sx", "x"]`, `gates = ["cx", "rz", "h"]`), 4, "gates", ErrFamily, "the compiler reaches"},
		{"family name", edit(`gates = ["cx", "rz", "sx", "x"]`, `gates = "rz-ry-cx"`), 4, "gates", ErrFamily, "rz-sx-x-cx"},
		{"unknown key", edit("gate_ns = 300", "gate_ns = 300\nspeed = 3"), 21, "pair.speed", ErrInvalid, "unknown key"},
		{"array length", edit("t1_us = [100, 80.5, 90]", "t1_us = [100, 80.5]"), 11, "qubit.t1_us", ErrInvalid, "2 values for 3 qubits"},
		{"not a number", edit("t2_us = 70", `t2_us = "long"`), 12, "qubit.t2_us", ErrInvalid, "not a number"},
		{"missing key", edit("gate_error = 3e-4\n", ""), 10, "qubit.gate_error", ErrInvalid, "missing"},
		{"override not an edge", edit("qubits = [2, 1]", "qubits = [0, 2]"), 23, "edge[0].qubits", ErrInvalid, "not among the edges"},
		{"directed cz", edit(`gates = ["cx", "rz", "sx", "x"]`, "gates = \"rz-rx-ry-cz\"\ndirected = true"), 5, "directed", ErrInvalid, "symmetric"},
		{"all to all and edges", edit("qubits = 3", "qubits = 3\nall_to_all = true"), 4, "all_to_all", ErrInvalid, "together with edges"},
		{"qubits", edit("qubits = 3", "qubits = 0"), 3, "qubits", ErrInvalid, "0 qubits"},
		{"syntax", edit("qubits = 3", "qubits = = 3"), 3, "qubits", ErrInvalid, "expected value"},
		{"wrong type", edit("qubits = 3", `qubits = "three"`), 3, "qubits", ErrInvalid, "incompatible types"},
	} {
		_, err := Parse([]byte(tc.text), "dev.toml")
		var de *Error
		if !errors.As(err, &de) {
			t.Errorf("%s: error %v is not an *Error", tc.name, err)
			continue
		}
		if !errors.Is(err, tc.sentinel) || de.File != "dev.toml" || de.Line != tc.line || de.Key != tc.key ||
			!strings.Contains(err.Error(), tc.msg) || !strings.HasPrefix(err.Error(), "device: dev.toml:") {
			t.Errorf("%s: %v (line %d key %q), want line %d key %q containing %q", tc.name, err, de.Line, de.Key, tc.line, tc.key, tc.msg)
		}
	}
}

func TestLoadFile(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, "tiny.toml")
	if err := os.WriteFile(path, []byte(goodFile), 0o644); err != nil {
		t.Fatal(err)
	}
	for _, load := range []func(string) (*Device, error){LoadFile, Load} {
		d, err := load(path)
		if err != nil {
			t.Fatal(err)
		}
		if d.Name != "tiny" || d.Source != path {
			t.Errorf("loaded %q from %q", d.Name, d.Source)
		}
	}
	if _, err := Load("no-such-device"); !errors.Is(err, ErrUnknownDevice) || !strings.Contains(err.Error(), "line-16") {
		t.Errorf("unknown name: %v", err)
	}
	if _, err := LoadFile(filepath.Join(dir, "missing.toml")); err == nil || !strings.HasPrefix(err.Error(), "device: ") {
		t.Errorf("missing file: %v", err)
	}
}

func TestKeyLines(t *testing.T) {
	text := `a = 1 # [not a table]
b = [
  [1, 2], # comment ]
  [3, "x]"],
]
[t]
c = 2
[[arr]]
d = 3
[[arr]]
d = 4
`
	kl := newKeyLines([]byte(text))
	for path, want := range map[string]int{"a": 1, "b": 2, "b[1]": 2, "t.c": 7, "arr[0].d": 9, "arr[1].d": 11, "arr[1].e": 10, "t": 6, "zz": 0} {
		if got := kl.find(path); got != want {
			t.Errorf("find(%q) = %d, want %d", path, got, want)
		}
	}
}

// TestDocExample parses the example description of the package
// documentation (doc.go), so that the manual stays a valid file.
func TestDocExample(t *testing.T) {
	src, err := os.ReadFile("doc.go")
	if err != nil {
		t.Fatal(err)
	}
	var b strings.Builder
	in := false
	for _, line := range strings.Split(string(src), "\n") {
		switch {
		case strings.HasPrefix(line, "//\tname = "):
			in = true
		case in && !strings.HasPrefix(line, "//\t") && line != "//":
			in = false
		}
		if in {
			b.WriteString(strings.TrimPrefix(strings.TrimPrefix(line, "//"), "\t") + "\n")
		}
	}
	d, err := Parse([]byte(b.String()), "doc.go")
	if err != nil {
		t.Fatalf("%v\n%s", err, b.String())
	}
	if d.N() != 5 || len(d.Edges) != 4 || d.Edges[1].NS != 420 || d.Qubits[4].T2 != 95 { // exact: copied from the text
		t.Errorf("example parsed as %+v", d)
	}
}
