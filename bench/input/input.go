package input

import (
	"encoding/csv"
	"errors"
	"fmt"
	"strings"
)

// ErrBad marks every error caused by the user's input: the spec, a data
// file, a data value or a parameter that does not fit the data.
var ErrBad = errors.New("bad input")

// Error is an error in the user's input. File, Line and Key locate it
// where known (Line 0 and Key "" mean unknown).
type Error struct {
	File string
	Line int
	Key  string
	Err  error
}

func (e *Error) Error() string {
	var b strings.Builder
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
	return OneLine(b.String())
}

// Unwrap returns ErrBad and the underlying error, so that errors.Is and
// errors.As see both.
func (e *Error) Unwrap() []error { return []error{ErrBad, e.Err} }

// OneLine escapes line breaks, which can reach a message by quoting the
// user's input, so that every input error stays on one line.
func OneLine(s string) string {
	if !strings.ContainsAny(s, "\r\n") {
		return s
	}
	return strings.NewReplacer("\r\n", `\n`, "\n", `\n`, "\r", `\r`).Replace(s)
}

// CSV turns an error of encoding/csv while reading file into an input
// error that names the file and, for a *csv.ParseError, its line and
// column.
func CSV(file string, err error) error {
	var pe *csv.ParseError
	if errors.As(err, &pe) {
		return &Error{File: file, Line: pe.Line, Err: fmt.Errorf("column %d: %w", pe.Column, pe.Err)}
	}
	return &Error{File: file, Err: err}
}
