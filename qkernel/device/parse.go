package device

import (
	"crypto/sha256"
	"encoding/hex"
	"errors"
	"fmt"
	"math"
	"regexp"
	"strconv"
	"strings"

	"github.com/BurntSushi/toml"
)

// decodeErr matches the decoder's located type errors.
var decodeErr = regexp.MustCompile(`^toml: line (\d+) \(last key "([^"]*)"\): (.*)$`)

// MaxQubits is the largest device Parse accepts.
const MaxQubits = 1024

// fileDevice mirrors the TOML keys. Values that may be a number or an
// array are decoded as any and converted with located errors.
type fileDevice struct {
	Name      string     `toml:"name"`
	Note      string     `toml:"note"`
	Qubits    int        `toml:"qubits"`
	Gates     any        `toml:"gates"`
	Directed  bool       `toml:"directed"`
	AllToAll  bool       `toml:"all_to_all"`
	Edges     [][]int    `toml:"edges"`
	VirtualRZ *bool      `toml:"virtual_rz"`
	Qubit     fileQubit  `toml:"qubit"`
	Pair      filePair   `toml:"pair"`
	Edge      []fileEdge `toml:"edge"`
}

type fileQubit struct {
	T1  any `toml:"t1_us"`
	T2  any `toml:"t2_us"`
	P01 any `toml:"readout_p01"`
	P10 any `toml:"readout_p10"`
	Err any `toml:"gate_error"`
	NS  any `toml:"gate_ns"`
}

type filePair struct {
	Err any `toml:"gate_error"`
	NS  any `toml:"gate_ns"`
}

type fileEdge struct {
	Qubits []int    `toml:"qubits"`
	Err    *float64 `toml:"gate_error"`
	NS     *float64 `toml:"gate_ns"`
}

// parser carries the file name and key lines for located errors.
type parser struct {
	file  string
	lines keyLines
}

func (p *parser) errf(key string, sentinel error, format string, args ...any) error {
	return &Error{File: p.file, Line: p.lines.find(key), Key: key, Err: fmt.Errorf("%s: %w", fmt.Sprintf(format, args...), sentinel)}
}

// Parse reads a device description (see the package documentation for
// the format) from data; file names it in errors. Every error is an
// *Error naming the file, line and key and wrapping ErrInvalid (or
// ErrFamily for a gate set the compiler cannot reach); unknown keys are
// errors.
func Parse(data []byte, file string) (*Device, error) {
	p := &parser{file: file, lines: newKeyLines(data)}
	var fd fileDevice
	md, err := toml.Decode(string(data), &fd)
	if err != nil {
		var pe toml.ParseError
		if errors.As(err, &pe) {
			return nil, &Error{File: file, Line: pe.Position.Line, Key: pe.LastKey, Err: fmt.Errorf("%s: %w", pe.Message, ErrInvalid)}
		}
		// Type mismatches come as "toml: line N (last key "k"): message".
		if m := decodeErr.FindStringSubmatch(err.Error()); m != nil {
			line, _ := strconv.Atoi(m[1])
			return nil, &Error{File: file, Line: line, Key: m[2], Err: fmt.Errorf("%s: %w", m[3], ErrInvalid)}
		}
		return nil, &Error{File: file, Err: fmt.Errorf("%v: %w", strings.TrimPrefix(err.Error(), "toml: "), ErrInvalid)}
	}
	if und := md.Undecoded(); len(und) > 0 {
		k := und[0].String()
		return nil, p.errf(k, ErrInvalid, "unknown key (known: name, note, qubits, gates, directed, edges, all_to_all, virtual_rz, [qubit] t1_us t2_us readout_p01 readout_p10 gate_error gate_ns, [pair] gate_error gate_ns, [[edge]] qubits gate_error gate_ns)")
	}
	for _, k := range []string{"name", "qubits", "gates"} {
		if !md.IsDefined(k) {
			return nil, p.errf(k, ErrInvalid, "missing")
		}
	}
	d := &Device{Name: fd.Name, Note: fd.Note, Directed: fd.Directed, VirtualRZ: true, SHA256: sha256Hex(data)}
	if strings.TrimSpace(fd.Name) == "" {
		return nil, p.errf("name", ErrInvalid, "empty name")
	}
	if fd.VirtualRZ != nil {
		d.VirtualRZ = *fd.VirtualRZ
	}
	n := fd.Qubits
	if n < 1 || n > MaxQubits {
		return nil, p.errf("qubits", ErrInvalid, "%d qubits, want 1 to %d", n, MaxQubits)
	}
	if d.Family, err = p.family(fd.Gates); err != nil {
		return nil, err
	}
	if d.Directed && d.Family == FamilyCZ {
		return nil, p.errf("directed", ErrInvalid, "cz is symmetric; directed = true applies to the rz-sx-x-cx family only")
	}

	// Coupling.
	switch {
	case fd.AllToAll && md.IsDefined("edges"):
		return nil, p.errf("all_to_all", ErrInvalid, "set together with edges; give one of them")
	case fd.AllToAll:
		if d.Directed {
			return nil, p.errf("all_to_all", ErrInvalid, "all_to_all couples every pair in both orientations; drop directed")
		}
		for a := range n {
			for b := a + 1; b < n; b++ {
				d.Edges = append(d.Edges, Edge{A: a, B: b})
			}
		}
	case !md.IsDefined("edges") && n > 1:
		return nil, p.errf("edges", ErrInvalid, "missing: a device of %d qubits needs edges = [[a, b], ...] or all_to_all = true", n)
	}
	seen := map[[2]int]int{}
	for i, e := range fd.Edges {
		key := fmt.Sprintf("edges[%d]", i)
		if len(e) != 2 {
			return nil, p.errf(key, ErrInvalid, "edge %v has %d qubits, want a pair [a, b]", e, len(e))
		}
		a, b := e[0], e[1]
		for _, q := range e {
			if q < 0 || q >= n {
				return nil, p.errf(key, ErrInvalid, "edge [%d, %d] names qubit %d, but the device has qubits 0 to %d", a, b, q, n-1)
			}
		}
		if a == b {
			return nil, p.errf(key, ErrInvalid, "edge [%d, %d] couples a qubit to itself", a, b)
		}
		k := [2]int{a, b}
		if !d.Directed {
			k = [2]int{min(a, b), max(a, b)}
		}
		if j, dup := seen[k]; dup {
			return nil, p.errf(key, ErrInvalid, "edge [%d, %d] repeats edge %d (%v)", a, b, j, fd.Edges[j])
		}
		seen[k] = i
		d.Edges = append(d.Edges, Edge{A: a, B: b})
	}

	// Qubits.
	d.Qubits = make([]Qubit, n)
	for _, f := range []struct {
		key string
		v   any
		set func(q *Qubit, x float64)
	}{
		{"t1_us", fd.Qubit.T1, func(q *Qubit, x float64) { q.T1 = x }},
		{"t2_us", fd.Qubit.T2, func(q *Qubit, x float64) { q.T2 = x }},
		{"readout_p01", fd.Qubit.P01, func(q *Qubit, x float64) { q.ReadoutP01 = x }},
		{"readout_p10", fd.Qubit.P10, func(q *Qubit, x float64) { q.ReadoutP10 = x }},
		{"gate_error", fd.Qubit.Err, func(q *Qubit, x float64) { q.Error = x }},
		{"gate_ns", fd.Qubit.NS, func(q *Qubit, x float64) { q.NS = x }},
	} {
		vals, err := p.values("qubit."+f.key, f.v, n, "qubit")
		if err != nil {
			return nil, err
		}
		for q := range d.Qubits {
			f.set(&d.Qubits[q], vals[q])
		}
	}
	for i, q := range d.Qubits {
		if key, msg := validQubit(q); key != "" {
			return nil, p.errf(fmt.Sprintf("qubit.%s[%d]", key, i), ErrInvalid, "qubit %d: %s", i, msg)
		}
	}

	// Two-qubit gates: [pair] defaults or arrays, then [[edge]] overrides.
	if len(d.Edges) > 0 {
		for _, f := range []struct {
			key string
			v   any
			set func(e *Edge, x float64)
		}{
			{"gate_error", fd.Pair.Err, func(e *Edge, x float64) { e.Error = x }},
			{"gate_ns", fd.Pair.NS, func(e *Edge, x float64) { e.NS = x }},
		} {
			vals, err := p.values("pair."+f.key, f.v, len(d.Edges), "edge")
			if err != nil {
				return nil, err
			}
			for i := range d.Edges {
				f.set(&d.Edges[i], vals[i])
			}
		}
	}
	d.index()
	overridden := map[int]int{}
	for i, fe := range fd.Edge {
		key := fmt.Sprintf("edge[%d].qubits", i)
		if len(fe.Qubits) != 2 {
			return nil, p.errf(key, ErrInvalid, "want a pair [a, b], got %v", fe.Qubits)
		}
		a, b := fe.Qubits[0], fe.Qubits[1]
		if a < 0 || a >= n || b < 0 || b >= n || a == b {
			return nil, p.errf(key, ErrInvalid, "[%d, %d] is not a pair of distinct qubits of 0 to %d", a, b, n-1)
		}
		j := d.EdgeIndex(a, b)
		if j < 0 || d.Directed && d.Edges[j].A != a {
			return nil, p.errf(key, ErrInvalid, "[%d, %d] is not among the edges", a, b)
		}
		if prev, dup := overridden[j]; dup {
			return nil, p.errf(key, ErrInvalid, "[%d, %d] repeats [[edge]] %d", a, b, prev)
		}
		overridden[j] = i
		if fe.Err != nil {
			d.Edges[j].Error = *fe.Err
		}
		if fe.NS != nil {
			d.Edges[j].NS = *fe.NS
		}
		if fe.Err == nil && fe.NS == nil {
			return nil, p.errf(key, ErrInvalid, "[[edge]] [%d, %d] sets neither gate_error nor gate_ns", a, b)
		}
	}
	for i, e := range d.Edges {
		key := fmt.Sprintf("pair.gate_error[%d]", i)
		if j, ok := overridden[i]; ok {
			key = fmt.Sprintf("edge[%d].gate_error", j)
		}
		if math.IsNaN(e.Error) || e.Error < 0 || e.Error > maxError(4) {
			return nil, p.errf(key, ErrInvalid, "edge [%d, %d]: two-qubit error %v outside [0, %v] (an average infidelity; 3/4 is the fully depolarizing channel)", e.A, e.B, e.Error, maxError(4))
		}
		key = strings.Replace(key, "gate_error", "gate_ns", 1)
		if math.IsNaN(e.NS) || e.NS <= 0 || math.IsInf(e.NS, 0) {
			return nil, p.errf(key, ErrInvalid, "edge [%d, %d]: duration %v ns, want positive and finite", e.A, e.B, e.NS)
		}
	}
	return d, nil
}

// family reads the gates key: a joined name ("rz-sx-x-cx") or a list of
// gate names in any order.
func (p *parser) family(v any) (Family, error) {
	var names []string
	switch g := v.(type) {
	case string:
		names = strings.Split(g, "-")
	case []any:
		for _, x := range g {
			s, ok := x.(string)
			if !ok {
				return 0, p.errf("gates", ErrInvalid, "list entry %v is not a gate name", x)
			}
			names = append(names, s)
		}
	default:
		return 0, p.errf("gates", ErrInvalid, "want a family name or a list of gate names, got %v", v)
	}
	f, ok := parseFamily(names)
	if !ok {
		known := make([]string, 0, 2)
		for _, f := range Families() {
			known = append(known, fmt.Sprintf("%q", f))
		}
		return 0, p.errf("gates", ErrFamily, "%v: the compiler reaches the native families %s (as a name or a list of their gates)", v, strings.Join(known, " and "))
	}
	return f, nil
}

// values reads a key that is one number (for every element) or an array
// of exactly n numbers (one per qubit or edge, named by what).
func (p *parser) values(key string, v any, n int, what string) ([]float64, error) {
	if v == nil {
		return nil, p.errf(key, ErrInvalid, "missing: one number for every %s, or an array of %d", what, n)
	}
	num := func(x any, k string) (float64, error) {
		switch x := x.(type) {
		case int64:
			return float64(x), nil
		case float64:
			return x, nil
		}
		return 0, p.errf(k, ErrInvalid, "%v is not a number", x)
	}
	out := make([]float64, n)
	if arr, ok := v.([]any); ok {
		if len(arr) != n {
			return nil, p.errf(key, ErrInvalid, "%d values for %d %ss", len(arr), n, what)
		}
		for i, x := range arr {
			f, err := num(x, fmt.Sprintf("%s[%d]", key, i))
			if err != nil {
				return nil, err
			}
			out[i] = f
		}
		return out, nil
	}
	f, err := num(v, key)
	if err != nil {
		return nil, err
	}
	for i := range out {
		out[i] = f
	}
	return out, nil
}

// sha256Hex is the hex SHA-256 of a description's bytes (Device.SHA256).
func sha256Hex(data []byte) string {
	sum := sha256.Sum256(data)
	return hex.EncodeToString(sum[:])
}
