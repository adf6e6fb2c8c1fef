package datasets

import (
	"bytes"
	"errors"
	"io"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"testing/iotest"

	"gonum.org/v1/gonum/mat"
)

func TestTextProblem(t *testing.T) {
	tests := []struct {
		in   string
		bad  bool
		at   int // 0-based byte offset of the problem
		desc string
	}{
		{"setosa", false, 0, ""},
		{"Ünïcødé ✓ 猫", false, 0, ""}, // valid UTF-8, no controls
		{"a b", false, 0, ""},         // space is not a control character
		{"a\x00b", true, 1, "NUL character"},
		{"a\tb", true, 1, "control character U+0009"},
		{"x\ny", true, 1, "control character U+000A"},
		{"x\x7f", true, 1, "control character U+007F"},
		{"ab\u0085", true, 2, "C1 control character U+0085"},
		{"\xffy", true, 0, "byte 0xff is not valid UTF-8"},
		{"ok\xc3", true, 2, "byte 0xc3 is not valid UTF-8"},       // truncated sequence
		{"\xed\xa0\x80", true, 0, "byte 0xed is not valid UTF-8"}, // UTF-16 surrogate encoded in UTF-8
	}
	for _, tt := range tests {
		desc, at, bad := textProblem(tt.in)
		if bad != tt.bad || at != tt.at || desc != tt.desc {
			t.Errorf("textProblem(%q) = %q, %d, %v; want %q, %d, %v", tt.in, desc, at, bad, tt.desc, tt.at, tt.bad)
		}
	}
}

// TestCSVBadText refuses names and labels with invalid UTF-8 or control
// characters, naming the line and column (read off the inputs by hand).
func TestCSVBadText(t *testing.T) {
	tests := []struct {
		name     string
		in       string
		line     int
		column   int
		colName  string
		mentions string
	}{
		{"nul in header", "len\x00gth,kind\n1,a\n2,b\n", 1, 1, "", `"len\x00gth"`},
		{"tab inside a quoted header name", "\"a\tb\",kind\n1,a\n2,b\n", 1, 1, "", "U+0009"},
		{"invalid utf-8 label", "x,kind\n1,a\n2,\xffb\n3,a\n", 3, 2, "kind", "0xff"},
		{"nul label", "x,kind\n1,a\x00\n2,b\n", 2, 2, "kind", "NUL"},
		{"del label", "x,kind\n1,a\n2,b\x7f\n", 3, 2, "kind", "U+007F"},
		// U+0085 is also white space, which trimming removes at either
		// end; inside a label it stays and is refused.
		{"c1 label", "x,kind\n1,a\n2,b\u0085b\n", 3, 2, "kind", "U+0085"},
		// A quoted label across two lines holds a line feed; the row starts
		// on line 3 and so does the field.
		{"line break in a quoted label", "x,kind\n1,a\n2,\"b\nc\"\n3,a\n", 3, 2, "kind", "U+000A"},
		// The first bad class is reported at its first row, even when a
		// later class is bad too.
		{"first bad class", "x,kind\n1,a\n2,b\x01\n3,c\x02\n4,b\x01\n", 3, 2, "kind", "U+0001"},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			_, err := ReadCSV(strings.NewReader(tt.in), "t.csv", CSVOptions{})
			if !errors.Is(err, ErrBadText) {
				t.Fatalf("error %v, want ErrBadText", err)
			}
			var ce *CSVError
			if !errors.As(err, &ce) || ce.File != "t.csv" || ce.Line != tt.line || ce.Column != tt.column || ce.ColumnName != tt.colName {
				t.Fatalf("error %q: want t.csv line %d column %d %q", err, tt.line, tt.column, tt.colName)
			}
			msg := err.Error()
			if !strings.Contains(msg, tt.mentions) {
				t.Errorf("message %q does not mention %q", msg, tt.mentions)
			}
			if _, _, bad := textProblem(msg); bad {
				t.Errorf("message %q is itself not clean text", msg)
			}
		})
	}
	// Clean non-ASCII labels and names load unchanged.
	d, err := ReadCSV(strings.NewReader("Länge,Art\n1,Süß\n2,✓\n"), "u.csv", CSVOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if d.Features[0] != "Länge" || d.Classes[0] != "Süß" || d.Classes[1] != "✓" {
		t.Errorf("features %q classes %q", d.Features, d.Classes)
	}
	// Labels are checked after the rows: a bad value is reported first
	// (line 4), though the bad label comes earlier (line 2).
	_, err = ReadCSV(strings.NewReader("x,kind\n1,a\x00\n2,b\nnan,a\n"), "t.csv", CSVOptions{})
	var ce *CSVError
	if !errors.Is(err, ErrNaNOrInf) || !errors.As(err, &ce) || ce.Line != 4 {
		t.Errorf("bad value after a bad label: %v, want ErrNaNOrInf on line 4", err)
	}
}

// TestCSVLinesAndLocate checks the source line of every row (read off the
// input by hand: a blank line, a quoted field over two lines and dropped
// rows), and LocateRow/LocateError through Subset and Select.
func TestCSVLinesAndLocate(t *testing.T) {
	in := "x,kind\n" + // line 1
		"1,a\n" + // 2: row 0
		"\n" + // 3: blank, skipped
		"2,\"b\"\n" + // 4: row 1
		"NA,a\n" + // 5: row 2, dropped
		"3,\"multi\"\n" + // 6: row 3
		"4,b\n" // 7: row 4
	d, err := ReadCSV(strings.NewReader(in), "lines.csv", CSVOptions{DropInvalid: true})
	if err != nil {
		t.Fatal(err)
	}
	wantLines := []int{2, 4, 5, 6, 7}
	if !equalInts(d.Lines, wantLines) || !equalInts(d.Rows, []int{0, 1, 3, 4}) {
		t.Fatalf("Lines %v Rows %v, want %v and [0 1 3 4]", d.Lines, d.Rows, wantLines)
	}
	if where, ok := d.LocateRow(3); !ok || where != "lines.csv:6" {
		t.Errorf("LocateRow(3) = %q, %v; want lines.csv:6", where, ok)
	}
	if where, ok := d.LocateRow(2); !ok || where != "lines.csv:5" { // the dropped row
		t.Errorf("LocateRow(2) = %q, %v; want lines.csv:5", where, ok)
	}
	for _, bad := range []int{-1, 5, 100} {
		if where, ok := d.LocateRow(bad); ok {
			t.Errorf("LocateRow(%d) = %q, want not found", bad, where)
		}
	}
	sub, err := d.Subset([]string{"b"}, nil)
	if err != nil {
		t.Fatal(err)
	}
	sel := sub.Select([]int{1})
	if sel.Rows[0] != 4 {
		t.Fatalf("selected row id %d, want 4", sel.Rows[0])
	}
	if where, ok := sel.LocateRow(sel.Rows[0]); !ok || where != "lines.csv:7" {
		t.Errorf("after Subset and Select: LocateRow = %q, %v; want lines.csv:7", where, ok)
	}
	if err := sel.Validate(); err != nil {
		t.Error(err)
	}
	wrapped := errors.Join(errors.New("context"), &RowError{Row: 1, Err: ErrZeroVector})
	if where, ok := d.LocateError(wrapped); !ok || where != "lines.csv:4" {
		t.Errorf("LocateError = %q, %v; want lines.csv:4", where, ok)
	}
	if _, ok := d.LocateError(errors.New("no row")); ok {
		t.Error("LocateError found a row in an error without one")
	}
	// Synthetic sets have no source lines.
	syn, err := Load("synth-cullet")
	if err != nil {
		t.Fatal(err)
	}
	if where, ok := syn.LocateRow(0); ok || syn.Lines != nil {
		t.Errorf("synthetic set located row 0 at %q", where)
	}
}

// TestEmbeddedLines checks the line of a few rows in the embedded files,
// read off the files by hand: iris.csv and segment.csv have the
// "n,d,classes" first line, so row i is on line i+2; digits.csv.gz has
// none, so row i is on line i+1.
func TestEmbeddedLines(t *testing.T) {
	tests := []struct {
		name  string
		row   int
		where string
	}{
		{"iris", 0, "iris.csv:2"},
		{"iris", 56, "iris.csv:58"},
		{"iris", 149, "iris.csv:151"},
		{"segment", 2309, "segment.csv:2311"},
		{"digits", 0, "digits.csv.gz:1"},
	}
	for _, tt := range tests {
		d, err := Load(tt.name)
		if err != nil {
			t.Fatal(err)
		}
		if where, ok := d.LocateRow(tt.row); !ok || where != tt.where {
			t.Errorf("%s: LocateRow(%d) = %q, %v; want %q", tt.name, tt.row, where, ok, tt.where)
		}
		if err := d.Validate(); err != nil {
			t.Error(err)
		}
	}
	// The first value on line 58 of iris.csv (row 56) is 6.3 (read off the
	// file); ParseFloat is correctly rounded, so == is exact here.
	d, _ := Load("iris")
	if d.X.At(56, 0) != 6.3 {
		t.Errorf("iris row 56 starts with %v, want 6.3 (line 58 of iris.csv)", d.X.At(56, 0))
	}
}

// TestReadCSVStreaming reads the same bytes through readers that deliver
// one byte, or half a buffer, at a time, and through a reader that hides
// its size: the result must not depend on how the input arrives.
func TestReadCSVStreaming(t *testing.T) {
	raw := benchCSV(3000, 7)
	want, err := ReadCSV(bytes.NewReader(raw), "s.csv", CSVOptions{})
	if err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct {
		name string
		r    io.Reader
	}{
		{"one byte", iotest.OneByteReader(bytes.NewReader(raw))},
		{"half", iotest.HalfReader(bytes.NewReader(raw))},
		{"sizeless", struct{ io.Reader }{bytes.NewReader(raw)}},
	} {
		name := c.name
		got, err := ReadCSV(c.r, "s.csv", CSVOptions{})
		if err != nil {
			t.Fatalf("%s: %v", name, err)
		}
		// Same bytes through the same parser: exact equality.
		if !mat.Equal(got.X, want.X) || !equalInts(got.Y, want.Y) || !equalInts(got.Lines, want.Lines) ||
			got.Source.SHA256 != want.Source.SHA256 || strings.Join(got.Classes, ",") != strings.Join(want.Classes, ",") {
			t.Errorf("%s: result differs from reading all at once", name)
		}
	}
}

// TestLoadCSVSizeEstimate loads a file larger than the 4 MiB after which
// LoadCSV sizes its slices from the file size, and compares with reading
// the same bytes from a reader of unknown size (no estimate).
func TestLoadCSVSizeEstimate(t *testing.T) {
	if testing.Short() {
		t.Skip("writes a 5 MB file")
	}
	raw := benchCSV(70000, 7)
	if len(raw) < 5<<20 {
		t.Fatalf("test file is %d bytes, want > 5 MiB", len(raw))
	}
	path := filepath.Join(t.TempDir(), "big.csv")
	if err := os.WriteFile(path, raw, 0o644); err != nil {
		t.Fatal(err)
	}
	got, err := LoadCSV(path, CSVOptions{})
	if err != nil {
		t.Fatal(err)
	}
	want, err := ReadCSV(struct{ io.Reader }{bytes.NewReader(raw)}, path, CSVOptions{})
	if err != nil {
		t.Fatal(err)
	}
	// Same bytes, same parser: exact equality.
	if !mat.Equal(got.X, want.X) || !equalInts(got.Y, want.Y) || !equalInts(got.Rows, want.Rows) || got.Source != want.Source {
		t.Error("LoadCSV with the size estimate differs from ReadCSV without it")
	}
	if got.Len() != 70000 {
		t.Errorf("%d rows, want 70000", got.Len())
	}
}

func equalInts(a, b []int) bool {
	if len(a) != len(b) {
		return false
	}
	for i := range a {
		if a[i] != b[i] {
			return false
		}
	}
	return true
}
