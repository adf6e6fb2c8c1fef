package device

import (
	"fmt"
	"strings"
)

// keyLines maps the key paths of a device file ("qubits", "qubit.t1_us",
// "edge[2].qubits", with 0-based indices of [[array]] tables) to their
// 1-based line numbers, for error messages. It reads the subset of TOML
// that device files use: [table] and [[array]] headers, key = value lines
// (values may span lines inside brackets), strings and comments. The TOML
// decoder's metadata reports undecoded keys but not their lines, hence
// this small scanner.
type keyLines struct {
	line  map[string]int
	table map[string]int // header line of each table path
}

func newKeyLines(data []byte) keyLines {
	kl := keyLines{line: map[string]int{}, table: map[string]int{}}
	count := map[string]int{}
	ctx := ""
	depth := 0 // bracket depth of a value spanning lines
	for n, raw := range strings.Split(string(data), "\n") {
		code, open := stripComment(raw)
		t := strings.TrimSpace(code)
		if depth > 0 {
			depth += open
			continue
		}
		switch {
		case t == "":
		case strings.HasPrefix(t, "[["):
			name := strings.TrimSpace(strings.Trim(t, "[] \t"))
			ctx = fmt.Sprintf("%s[%d]", name, count[name])
			count[name]++
			kl.table[ctx] = n + 1
		case strings.HasPrefix(t, "["):
			ctx = strings.TrimSpace(strings.Trim(t, "[] \t"))
			kl.table[ctx] = n + 1
		default:
			eq := strings.Index(t, "=")
			if eq < 0 {
				continue
			}
			key := strings.Trim(strings.TrimSpace(t[:eq]), `"'`)
			path := key
			if ctx != "" {
				path = ctx + "." + key
			}
			if _, ok := kl.line[path]; !ok {
				kl.line[path] = n + 1
			}
			depth = open
		}
	}
	return kl
}

// stripComment removes a trailing comment outside strings and returns the
// net count of opening minus closing brackets outside strings.
func stripComment(s string) (string, int) {
	open := 0
	var quote byte
	for i := 0; i < len(s); i++ {
		c := s[i]
		switch {
		case quote != 0:
			if c == '\\' && quote == '"' {
				i++
			} else if c == quote {
				quote = 0
			}
		case c == '"' || c == '\'':
			quote = c
		case c == '#':
			return s[:i], open
		case c == '[':
			open++
		case c == ']':
			open--
		}
	}
	return s, open
}

// find returns the line of a key path, trying the path without a trailing
// "[i]" element index, then its table's header; 0 if unknown.
func (kl keyLines) find(path string) int {
	if l, ok := kl.line[path]; ok {
		return l
	}
	if i := strings.LastIndex(path, "["); i > 0 && strings.HasSuffix(path, "]") {
		if l, ok := kl.line[path[:i]]; ok {
			return l
		}
	}
	if l, ok := kl.table[path]; ok {
		return l
	}
	if i := strings.LastIndex(path, "."); i > 0 {
		return kl.table[path[:i]]
	}
	return 0
}
