package device

import (
	"embed"
	"errors"
	"fmt"
	"math"
	"os"
	"path"
	"slices"
	"strings"

	"fringe/qkernel/circuit"
)

// Sentinel errors; errors of this package wrap one of them.
var (
	// ErrUnknownDevice marks a name that is neither an embedded device nor
	// a readable file.
	ErrUnknownDevice = errors.New("unknown device")
	// ErrInvalid marks a device description with a bad key or value (an
	// *Error locates it).
	ErrInvalid = errors.New("invalid device description")
	// ErrFamily marks a native gate set the compiler cannot reach (an
	// *Error locates it).
	ErrFamily = errors.New("unsupported native gate set")
	// ErrTooSmall marks a circuit with more qubits than the largest
	// connected part of the device.
	ErrTooSmall = errors.New("device too small for the circuit")
)

// Error is a problem in a device description. File is the file name (the
// embedded file's name for an embedded device), Line the 1-based line (0
// when unknown) and Key the key path ("qubit.t2_us[3]": element 3 of the
// array; "edge[1].qubits": the second [[edge]] table). Err wraps ErrInvalid
// or ErrFamily.
type Error struct {
	File string
	Line int
	Key  string
	Err  error
}

func (e *Error) Error() string {
	var b strings.Builder
	b.WriteString("device: ")
	if e.File != "" {
		b.WriteString(e.File)
		if e.Line > 0 {
			fmt.Fprintf(&b, ":%d", e.Line)
		}
		b.WriteString(": ")
	}
	if e.Key != "" {
		fmt.Fprintf(&b, "key %s: ", e.Key)
	}
	b.WriteString(e.Err.Error())
	return b.String()
}

// Unwrap returns the wrapped error (which wraps ErrInvalid or ErrFamily).
func (e *Error) Unwrap() error { return e.Err }

// Family is a native gate set.
type Family uint8

const (
	// FamilyCX is {rz, sx, x, cx}: virtual Z rotations, the square root of
	// X, X and CNOT (written "rz-sx-x-cx").
	FamilyCX Family = iota + 1
	// FamilyCZ is {rz, rx, ry, cz}: Z, X and Y rotations and CZ (written
	// "rz-rx-ry-cz").
	FamilyCZ
)

var familyGates = map[Family][]string{
	FamilyCX: {"rz", "sx", "x", "cx"},
	FamilyCZ: {"rz", "rx", "ry", "cz"},
}

// String returns "rz-sx-x-cx" or "rz-rx-ry-cz".
func (f Family) String() string {
	if g, ok := familyGates[f]; ok {
		return strings.Join(g, "-")
	}
	return fmt.Sprintf("family(%d)", int(f))
}

// TwoQubit returns the family's two-qubit gate, circuit.CNOT or circuit.CZ.
func (f Family) TwoQubit() circuit.Gate {
	if f == FamilyCZ {
		return circuit.CZ
	}
	return circuit.CNOT
}

// Families returns the native gate sets the compiler reaches.
func Families() []Family { return []Family{FamilyCX, FamilyCZ} }

// parseFamily reads a family from its joined name or a list of gate names
// in any order.
func parseFamily(names []string) (Family, bool) {
	got := slices.Clone(names)
	for i := range got {
		got[i] = strings.ToLower(strings.TrimSpace(got[i]))
	}
	slices.Sort(got)
	for _, f := range Families() {
		want := slices.Clone(familyGates[f])
		slices.Sort(want)
		if slices.Equal(got, want) {
			return f, true
		}
	}
	return 0, false
}

// Qubit holds the calibration of one physical qubit.
type Qubit struct {
	// T1 and T2 are the relaxation and dephasing times in microseconds
	// (+Inf: none); T2 <= 2 T1.
	T1, T2 float64
	// ReadoutP01 = P(read 1 | 0), ReadoutP10 = P(read 0 | 1).
	ReadoutP01, ReadoutP10 float64
	// Error is the average gate infidelity of a single-qubit native gate
	// (sx, x, rx, ry; rz too unless virtual), NS its duration in
	// nanoseconds.
	Error, NS float64
}

// Edge is a coupling between two physical qubits, on which the family's
// two-qubit gate runs. With Device.Directed, cx runs natively with control
// A and target B only (the other orientation costs four extra Hadamards).
type Edge struct {
	A, B int
	// Error is the average gate infidelity of the two-qubit gate, NS its
	// duration in nanoseconds.
	Error, NS float64
}

// Device is a described quantum device: physical qubits with their
// calibration, a coupling graph and a native gate family. Build it with
// Load, LoadFile or Parse (which validate it); a Device is read-only
// afterwards and safe for concurrent use.
type Device struct {
	Name string
	// Note says what the description is (embedded devices: "invented ...").
	Note   string
	Family Family
	Qubits []Qubit
	Edges  []Edge
	// Directed: an edge (A, B) runs cx with control A and target B only.
	// Always false for FamilyCZ (cz is symmetric).
	Directed bool
	// VirtualRZ: rz is a frame change of duration 0 and no error (the
	// default); false gives it the single-qubit error and duration.
	VirtualRZ bool
	// Source is "embedded" or the path of the file read.
	Source string
	// SHA256 is the hex SHA-256 of the description's bytes as read (of the
	// embedded file for an embedded device), for run manifests and
	// fingerprints: a changed file is told from the one a run used.
	SHA256 string

	edgeAt [][]int32 // edgeAt[a][b]: index of edge (a, b) or (b, a), -1 none
	dist   [][]int32 // hop distances on the coupling graph (undirected), -1 unreachable
}

// N returns the number of physical qubits.
func (d *Device) N() int { return len(d.Qubits) }

// EdgeIndex returns the index in Edges of the coupling between a and b in
// either orientation, or -1.
func (d *Device) EdgeIndex(a, b int) int { return int(d.edgeAt[a][b]) }

// Native reports whether the two-qubit gate with control a and target b
// runs natively: an edge joins them and, for a directed device, it is
// (a, b).
func (d *Device) Native(a, b int) bool {
	i := d.edgeAt[a][b]
	if i < 0 {
		return false
	}
	return !d.Directed || d.Edges[i].A == a
}

// Distance returns the number of edges on a shortest path between a and b
// (orientation ignored), or -1 when they are not connected.
func (d *Device) Distance(a, b int) int { return int(d.dist[a][b]) }

// Components returns the connected parts of the coupling graph, each
// ascending, in order of their smallest qubit.
func (d *Device) Components() [][]int {
	seen := make([]bool, d.N())
	var out [][]int
	for s := range d.N() {
		if seen[s] {
			continue
		}
		var comp []int
		for q := range d.N() {
			if d.dist[s][q] >= 0 {
				comp = append(comp, q)
				seen[q] = true
			}
		}
		out = append(out, comp)
	}
	return out
}

// neighbours returns the qubits coupled to q, ascending.
func (d *Device) neighbours(q int) []int {
	var out []int
	for r, e := range d.edgeAt[q] {
		if e >= 0 {
			out = append(out, r)
		}
	}
	return out
}

// index builds the edge lookup and the distance matrix (BFS from every
// qubit).
func (d *Device) index() {
	n := d.N()
	d.edgeAt = make([][]int32, n)
	for a := range d.edgeAt {
		d.edgeAt[a] = make([]int32, n)
		for b := range d.edgeAt[a] {
			d.edgeAt[a][b] = -1
		}
	}
	for i, e := range d.Edges {
		if d.edgeAt[e.A][e.B] < 0 {
			d.edgeAt[e.A][e.B] = int32(i)
			d.edgeAt[e.B][e.A] = int32(i)
		}
	}
	adj := make([][]int, n)
	for q := range n {
		adj[q] = d.neighbours(q)
	}
	d.dist = make([][]int32, n)
	queue := make([]int, 0, n)
	for s := range n {
		row := make([]int32, n)
		for i := range row {
			row[i] = -1
		}
		row[s] = 0
		queue = append(queue[:0], s)
		for len(queue) > 0 {
			q := queue[0]
			queue = queue[1:]
			for _, r := range adj[q] {
				if row[r] < 0 {
					row[r] = row[q] + 1
					queue = append(queue, r)
				}
			}
		}
		d.dist[s] = row
	}
}

//go:embed devices/*.toml
var embedded embed.FS

// embeddedNames lists the embedded devices in the order Names returns.
var embeddedNames = []string{"line-16", "grid-4x4", "heavy-27", "ions-20"}

// Names returns the names of the embedded devices: "line-16" (a line of 16
// qubits, rz-sx-x-cx), "grid-4x4" (a 4x4 grid, rz-rx-ry-cz), "heavy-27" (a
// lattice of 27 qubits of degree at most 3, directed cx) and "ions-20" (20
// qubits coupled all to all, rz-rx-ry-cz). Every one is invented, with
// values of the order of today's hardware.
func Names() []string { return slices.Clone(embeddedNames) }

// Load returns the embedded device called name, or, if name is not one,
// the device described by the file at path name (LoadFile). An unknown
// name that is no readable file is an error wrapping ErrUnknownDevice.
func Load(name string) (*Device, error) {
	if slices.Contains(embeddedNames, name) {
		file := "devices/" + name + ".toml"
		data, err := embedded.ReadFile(file)
		if err != nil {
			panic("device: embedded file missing: " + err.Error()) // broken build
		}
		d, err := Parse(data, path.Base(file))
		if err != nil {
			panic("device: embedded device invalid: " + err.Error()) // checked by the tests
		}
		d.Source = "embedded"
		return d, nil
	}
	if _, err := os.Stat(name); err != nil {
		return nil, fmt.Errorf("device: %q: %w (embedded: %s; or the path of a device file)", name, ErrUnknownDevice, strings.Join(embeddedNames, ", "))
	}
	return LoadFile(name)
}

// LoadFile reads and validates the device description at path.
func LoadFile(path string) (*Device, error) {
	data, err := os.ReadFile(path)
	if err != nil {
		return nil, fmt.Errorf("device: %w", err)
	}
	d, err := Parse(data, path)
	if err != nil {
		return nil, err
	}
	d.Source = path
	return d, nil
}

// twoQubitMaxError is the largest average infidelity a depolarizing
// channel of strength at most 1 reaches on d levels: (d-1)/d (Nielsen
// 2002, quant-ph/0205035: F_avg = 1 - p (d-1)/d).
func maxError(d int) float64 { return float64(d-1) / float64(d) }

// validQubit checks one qubit's calibration, returning the offending key
// and message.
func validQubit(q Qubit) (key, msg string) {
	bad := func(v float64) bool { return math.IsNaN(v) }
	switch {
	case bad(q.T1) || q.T1 <= 0:
		return "t1_us", fmt.Sprintf("T1 = %v us, want positive", q.T1)
	case bad(q.T2) || q.T2 <= 0:
		return "t2_us", fmt.Sprintf("T2 = %v us, want positive", q.T2)
	case q.T2 > 2*q.T1*(1+1e-12):
		return "t2_us", fmt.Sprintf("T2 = %v us exceeds 2 T1 = %v us (T2 <= 2 T1 always holds: 1/T2 = 1/(2 T1) + 1/T_phi)", q.T2, 2*q.T1)
	case bad(q.ReadoutP01) || q.ReadoutP01 < 0 || q.ReadoutP01 > 1:
		return "readout_p01", fmt.Sprintf("probability %v outside [0, 1]", q.ReadoutP01)
	case bad(q.ReadoutP10) || q.ReadoutP10 < 0 || q.ReadoutP10 > 1:
		return "readout_p10", fmt.Sprintf("probability %v outside [0, 1]", q.ReadoutP10)
	case bad(q.Error) || q.Error < 0 || q.Error > maxError(2):
		return "gate_error", fmt.Sprintf("single-qubit error %v outside [0, %v] (an average infidelity; 1/2 is the fully depolarizing channel)", q.Error, maxError(2))
	case bad(q.NS) || q.NS <= 0 || math.IsInf(q.NS, 0):
		return "gate_ns", fmt.Sprintf("duration %v ns, want positive and finite", q.NS)
	}
	return "", ""
}
