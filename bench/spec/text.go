package spec

import (
	"bytes"
	"fmt"
	"sort"
	"strings"
	"unicode"
	"unicode/utf8"

	"github.com/BurntSushi/toml"

	"fringe/results"
)

// checkText refuses, in every string of the spec, what no name or path
// may hold: invalid UTF-8 and control characters (C0, DEL, C1; a TOML
// "a\b" is a backspace), which would reach output files raw and make them
// disagree with each other. The error names the key, in the form the
// other spec errors use ("model[2].name", "dataset[1].classes").
func checkText(data []byte, bad func(key, format string, args ...any) error) error {
	var doc map[string]any
	if _, err := toml.NewDecoder(bytes.NewReader(data)).Decode(&doc); err != nil {
		return nil // reported by the typed decode
	}
	return walkText("", doc, bad)
}

func walkText(key string, v any, bad func(key, format string, args ...any) error) error {
	switch x := v.(type) {
	case string:
		if msg := textProblem(x); msg != "" {
			return bad(key, "%q %s", x, msg)
		}
	case map[string]any:
		keys := make([]string, 0, len(x))
		for k := range x {
			keys = append(keys, k)
		}
		sort.Strings(keys)
		for _, k := range keys {
			sub := k
			if key != "" {
				sub = key + "." + k
			}
			if msg := textProblem(k); msg != "" {
				return bad(sub, "key %q %s", k, msg)
			}
			if err := walkText(sub, x[k], bad); err != nil {
				return err
			}
		}
	case []map[string]any:
		for i, e := range x {
			if err := walkText(fmt.Sprintf("%s[%d]", key, i+1), e, bad); err != nil {
				return err
			}
		}
	case []any:
		for _, e := range x {
			if err := walkText(key, e, bad); err != nil {
				return err
			}
		}
	}
	return nil
}

// textProblem says what makes s unusable as text in fringe's outputs, or
// "".
func textProblem(s string) string {
	if !utf8.ValidString(s) {
		return "is not valid UTF-8"
	}
	for _, r := range s {
		if unicode.IsControl(r) {
			return fmt.Sprintf("holds the control character U+%04X", r)
		}
	}
	return ""
}

// checkName refuses a name that a spreadsheet would read as a formula
// when it opens a CSV file of the run (results.FormulaLike: it starts with
// '=', '+', '-', '@' and is not a plain number); names read from data
// files are neutralised in the CSV files instead (results.EscapeCSVCell),
// but a name the user chooses in the spec can simply be another.
func checkName(what, name string) string {
	if results.FormulaLike(name) {
		return fmt.Sprintf("%s %q starts with %q, which a spreadsheet opening the CSV files would read as a formula; choose a name that starts otherwise", what, name, strings.TrimSpace(name[:1]))
	}
	return ""
}
