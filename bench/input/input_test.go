package input

import (
	"encoding/csv"
	"errors"
	"fmt"
	"io/fs"
	"strings"
	"testing"
)

func TestErrorMessage(t *testing.T) {
	base := errors.New("want a number")
	cases := []struct {
		err  *Error
		want string
	}{
		{&Error{Err: base}, "want a number"},
		{&Error{File: "spec.toml", Err: base}, "spec.toml: want a number"},
		{&Error{File: "spec.toml", Line: 7, Err: base}, "spec.toml:7: want a number"},
		{&Error{File: "spec.toml", Line: 7, Key: "model[2].C", Err: base}, "spec.toml:7: key model[2].C: want a number"},
		{&Error{Key: "alpha", Err: base}, "key alpha: want a number"},
		// A line break quoted from the input stays on one line.
		{&Error{File: "a.csv", Err: fmt.Errorf("label %q", "x\ny")}, `a.csv: label "x\ny"`},
		{&Error{File: "a.csv", Err: errors.New("one\r\ntwo\nthree\rfour")}, `a.csv: one\ntwo\nthree\rfour`},
	}
	for _, c := range cases {
		if got := c.err.Error(); got != c.want {
			t.Errorf("%#v: Error() = %q, want %q", c.err, got, c.want)
		}
		if !errors.Is(c.err, ErrBad) {
			t.Errorf("%q does not satisfy errors.Is(err, ErrBad)", c.want)
		}
	}
}

func TestErrorUnwrap(t *testing.T) {
	err := fmt.Errorf("load: %w", &Error{File: "x", Err: fmt.Errorf("open: %w", fs.ErrNotExist)})
	if !errors.Is(err, ErrBad) || !errors.Is(err, fs.ErrNotExist) {
		t.Fatalf("%v: want both ErrBad and fs.ErrNotExist in the chain", err)
	}
	var ie *Error
	if !errors.As(err, &ie) || ie.File != "x" {
		t.Fatalf("errors.As found %+v, want the *Error naming file x", ie)
	}
}

func TestCSV(t *testing.T) {
	r := csv.NewReader(strings.NewReader("a,b\n1,\"2\n"))
	var err error
	for err == nil {
		_, err = r.Read()
	}
	got := CSV("scores.csv", err)
	var ie *Error
	if !errors.As(got, &ie) || ie.File != "scores.csv" || ie.Line != 2 {
		t.Fatalf("CSV(%v) = %#v, want file scores.csv line 2", err, got)
	}
	if !strings.Contains(got.Error(), "scores.csv:2: column ") || !errors.Is(got, csv.ErrQuote) {
		t.Errorf("message %q: want file:line, the column and csv.ErrQuote in the chain", got)
	}
	plain := CSV("f.csv", errors.New("boom"))
	if plain.Error() != "f.csv: boom" || !errors.Is(plain, ErrBad) {
		t.Errorf("CSV of a plain error = %q", plain)
	}
}
