package datasets

import (
	"bytes"
	"crypto/sha256"
	"encoding/csv"
	"encoding/hex"
	"errors"
	"fmt"
	"io"
	"math/rand/v2"
	"os"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"testing"

	"gonum.org/v1/gonum/mat"
)

// TestReadCSVBadInput reads every fixture in testdata/bad and checks the
// error: its sentinel, and that the *CSVError names the file, the 1-based
// line and the column. The expected lines and columns were read off the
// fixture files by hand (line 1 is the header).
func TestReadCSVBadInput(t *testing.T) {
	tests := []struct {
		file    string
		opt     CSVOptions
		want    error
		line    int
		column  int    // 1-based; 0 = the whole line
		colName string // header name of the column, "" if none
	}{
		{file: "empty.csv", want: ErrEmptyFile, line: 1},
		{file: "blank_lines.csv", want: ErrEmptyFile, line: 1},
		{file: "header_only.csv", want: ErrNoRows, line: 1},
		{file: "ragged_short.csv", want: ErrRaggedRow, line: 4},
		{file: "ragged_long.csv", want: ErrRaggedRow, line: 3},
		{file: "non_numeric.csv", want: ErrNonNumeric, line: 3, column: 2, colName: "width"},
		{file: "missing_empty.csv", want: ErrMissingValue, line: 4, column: 1, colName: "length"},
		{file: "missing_na.csv", want: ErrMissingValue, line: 3, column: 2, colName: "width"},
		{file: "missing_label.csv", want: ErrMissingValue, line: 3, column: 3, colName: "kind"},
		{file: "nan.csv", want: ErrNaNOrInf, line: 3, column: 1, colName: "length"},
		{file: "inf.csv", want: ErrNaNOrInf, line: 3, column: 2, colName: "width"},
		{file: "overflow.csv", want: ErrNaNOrInf, line: 3, column: 2, colName: "width"},
		{file: "hex.csv", want: ErrNonNumeric, line: 2, column: 2, colName: "width"},
		{file: "one_class.csv", want: ErrTooFewClasses, line: 1, column: 3, colName: "kind"},
		{file: "duplicate_header.csv", want: ErrDuplicateColumn, line: 1, column: 3, colName: "length"},
		{file: "empty_header.csv", want: ErrEmptyColumnName, line: 1, column: 2},
		{file: "unknown_label.csv", opt: CSVOptions{Label: "species"}, want: ErrUnknownColumn, line: 1, colName: "species"},
		{file: "single_column.csv", want: ErrNoFeatures, line: 1},
		{file: "bare_quote.csv", want: ErrCSVSyntax, line: 3},
		// encoding/csv reports where the open quote is found unterminated:
		// line 4; the record starts on line 3.
		{file: "unterminated_quote.csv", want: ErrCSVSyntax, line: 4},
		{file: "semicolon_decimal_comma.csv", want: ErrNonNumeric, line: 2, column: 1, colName: "length"},
		{file: "tab_ragged.tsv", want: ErrRaggedRow, line: 3},
		{file: "crlf_non_numeric.csv", want: ErrNonNumeric, line: 4, column: 2, colName: "width"},
		{file: "bom_duplicate_header.csv", want: ErrDuplicateColumn, line: 1, column: 3, colName: "kind"},
		// The quoted label of data row 0 spans lines 2-3, so the next row is
		// on line 4.
		{file: "quoted_multiline_nan.csv", want: ErrNaNOrInf, line: 4, column: 2, colName: "width"},
		{file: "all_invalid.csv", opt: CSVOptions{DropInvalid: true}, want: ErrNoRows, line: 1},
		{file: "all_invalid.csv", want: ErrMissingValue, line: 2, column: 1, colName: "length"},
	}
	seen := map[string]bool{}
	for _, tt := range tests {
		seen[tt.file] = true
		t.Run(tt.file, func(t *testing.T) {
			path := filepath.Join("testdata", "bad", tt.file)
			d, err := LoadCSV(path, tt.opt)
			if err == nil {
				t.Fatalf("LoadCSV(%s) = %d rows, want error %v", path, d.Len(), tt.want)
			}
			if !errors.Is(err, tt.want) {
				t.Errorf("error %q does not wrap %q", err, tt.want)
			}
			var ce *CSVError
			if !errors.As(err, &ce) {
				t.Fatalf("error %q is %T, want *CSVError", err, err)
			}
			if ce.File != path || ce.Line != tt.line || ce.Column != tt.column || ce.ColumnName != tt.colName {
				t.Errorf("CSVError{File %q, Line %d, Column %d, ColumnName %q}, want {%q, %d, %d, %q}",
					ce.File, ce.Line, ce.Column, ce.ColumnName, path, tt.line, tt.column, tt.colName)
			}
			msg := err.Error()
			if prefix := fmt.Sprintf("datasets: %s:%d: ", path, tt.line); !strings.HasPrefix(msg, prefix) {
				t.Errorf("message %q does not start with %q", msg, prefix)
			}
			if tt.colName != "" && !strings.Contains(msg, fmt.Sprintf("%q", tt.colName)) {
				t.Errorf("message %q does not name column %q", msg, tt.colName)
			}
		})
	}
	// Every fixture in testdata/bad is exercised.
	files, err := filepath.Glob(filepath.Join("testdata", "bad", "*"))
	if err != nil {
		t.Fatal(err)
	}
	for _, f := range files {
		if !seen[filepath.Base(f)] {
			t.Errorf("fixture %s has no test case", f)
		}
	}
}

// TestReadCSVGood parses the fixtures in testdata/good. All hold the same
// four instances in different dialects; the expected values are the ones
// written in the files.
func TestReadCSVGood(t *testing.T) {
	wantX := []float64{
		5.1, 3.5,
		7.0, 3.2,
		4.9, 3.0,
		6.3, 3.3,
	}
	tests := []struct {
		file     string
		opt      CSVOptions
		features []string
		classes  []string
	}{
		{file: "comma.csv"},
		{file: "semicolon.csv"},
		{file: "tab.tsv"},
		{file: "crlf.csv"},
		{file: "bom.csv"},
		{file: "blank_lines.csv"},
		{file: "semicolon.csv", opt: CSVOptions{Delimiter: ';'}},
		{file: "tab.tsv", opt: CSVOptions{Delimiter: '\t'}},
		{file: "label_first.csv", opt: CSVOptions{Label: "kind"}},
		{file: "quoted.csv",
			features: []string{"length, cm", "width"},
			classes:  []string{"setosa, wild", `versicolor "B"`, "virginica"}},
	}
	for _, tt := range tests {
		t.Run(fmt.Sprintf("%s/delim=%q", tt.file, tt.opt.Delimiter), func(t *testing.T) {
			path := filepath.Join("testdata", "good", tt.file)
			d, err := LoadCSV(path, tt.opt)
			if err != nil {
				t.Fatal(err)
			}
			features, classes := tt.features, tt.classes
			if features == nil {
				features = []string{"length", "width"}
				// First-seen order of the labels in the file.
				classes = []string{"setosa", "versicolor", "virginica"}
			}
			if !slices.Equal(d.Features, features) || !slices.Equal(d.Classes, classes) {
				t.Errorf("features %q classes %q, want %q %q", d.Features, d.Classes, features, classes)
			}
			if !slices.Equal(d.Y, []int{0, 1, 0, 2}) || !slices.Equal(d.Rows, []int{0, 1, 2, 3}) {
				t.Errorf("Y %v Rows %v, want [0 1 0 2] [0 1 2 3]", d.Y, d.Rows)
			}
			// The decimal strings parse to the same float64 as the Go
			// literals (both correctly rounded), so exact equality holds.
			if !mat.Equal(d.X, mat.NewDense(4, 2, wantX)) {
				t.Errorf("X = %v, want %v", mat.Formatted(d.X), wantX)
			}
			raw, err := os.ReadFile(path)
			if err != nil {
				t.Fatal(err)
			}
			sum := sha256.Sum256(raw)
			p := d.Source
			if d.Name != path || p.File != path || p.Origin != "user file" || p.SHA256 != hex.EncodeToString(sum[:]) || p.Synthetic {
				t.Errorf("name %q provenance %+v", d.Name, p)
			}
			if len(d.Dropped) != 0 {
				t.Errorf("Dropped = %v, want none", d.Dropped)
			}
			if err := d.Validate(); err != nil {
				t.Error(err)
			}
		})
	}
}

// TestReadCSVDropInvalid reads testdata/good/dirty.csv, whose data rows 1,
// 3, 5 and 6 (file lines 3, 5, 7 and 8) hold a missing, NaN, non-numeric
// and missing-label value; read off the file by hand.
func TestReadCSVDropInvalid(t *testing.T) {
	path := filepath.Join("testdata", "good", "dirty.csv")
	if _, err := LoadCSV(path, CSVOptions{}); !errors.Is(err, ErrMissingValue) {
		t.Errorf("without DropInvalid: error %v, want ErrMissingValue", err)
	}
	d, err := LoadCSV(path, CSVOptions{DropInvalid: true})
	if err != nil {
		t.Fatal(err)
	}
	if !slices.Equal(d.Rows, []int{0, 2, 4, 7}) {
		t.Errorf("Rows = %v, want [0 2 4 7]", d.Rows)
	}
	// Class order is first-seen among the kept rows: setosa (row 0),
	// virginica (row 4), versicolor (row 7).
	if !slices.Equal(d.Classes, []string{"setosa", "virginica", "versicolor"}) || !slices.Equal(d.Y, []int{0, 0, 1, 2}) {
		t.Errorf("classes %q Y %v", d.Classes, d.Y)
	}
	if !mat.Equal(d.X, mat.NewDense(4, 2, []float64{5.1, 3.5, 4.9, 3.0, 6.3, 3.3, 5.8, 2.7})) {
		t.Errorf("X = %v", mat.Formatted(d.X))
	}
	wantDropped := []struct {
		row, line int
		err       error
	}{
		{1, 3, ErrMissingValue},
		{3, 5, ErrNaNOrInf},
		{5, 7, ErrNonNumeric},
		{6, 8, ErrMissingValue},
	}
	if len(d.Dropped) != len(wantDropped) {
		t.Fatalf("Dropped = %v, want %d entries", d.Dropped, len(wantDropped))
	}
	for i, w := range wantDropped {
		got := d.Dropped[i]
		var ce *CSVError
		if got.Row != w.row || !errors.Is(got.Err, w.err) || !errors.As(got.Err, &ce) || ce.Line != w.line || ce.File != path {
			t.Errorf("Dropped[%d] = %v, want row %d line %d %v", i, &got, w.row, w.line, w.err)
		}
	}
}

// TestReadCSVOptions covers ReadCSV from a reader, a label column chosen by
// name in the middle, an explicit delimiter that overrides detection, and
// an invalid delimiter.
func TestReadCSVOptions(t *testing.T) {
	in := "a,kind,b\n1,x,2\n3,y,4\n"
	d, err := ReadCSV(strings.NewReader(in), "mem.csv", CSVOptions{Label: "kind"})
	if err != nil {
		t.Fatal(err)
	}
	if !slices.Equal(d.Features, []string{"a", "b"}) || !slices.Equal(d.Classes, []string{"x", "y"}) ||
		!mat.Equal(d.X, mat.NewDense(2, 2, []float64{1, 2, 3, 4})) || d.Source.File != "mem.csv" {
		t.Errorf("got features %q classes %q X %v file %q", d.Features, d.Classes, mat.Formatted(d.X), d.Source.File)
	}
	// The header has one ';' and no ','; forcing ',' makes it one column.
	_, err = ReadCSV(strings.NewReader("a;kind\n1;x\n2;y\n"), "semi.csv", CSVOptions{Delimiter: ','})
	if !errors.Is(err, ErrNoFeatures) {
		t.Errorf("forced ',' on a ';' file: %v, want ErrNoFeatures", err)
	}
	for _, r := range []rune{'"', '\n', '\r', 0x01, 0xFFFD} {
		if _, err := ReadCSV(strings.NewReader(in), "mem.csv", CSVOptions{Delimiter: r}); err == nil {
			t.Errorf("delimiter %q accepted", r)
		}
	}
	if _, err := LoadCSV(filepath.Join("testdata", "no-such-file.csv"), CSVOptions{}); !errors.Is(err, os.ErrNotExist) {
		t.Errorf("missing file: %v, want os.ErrNotExist", err)
	}
}

// TestWriteCSVRoundTrip writes embedded and synthetic sets with WriteCSV and
// reads them back: features, classes and every value must survive exactly
// (shortest round-trip formatting, strconv 'g' -1).
func TestWriteCSVRoundTrip(t *testing.T) {
	for _, name := range []string{"iris", "breast-cancer", "synth-bearings"} {
		d, err := Load(name)
		if err != nil {
			t.Fatal(err)
		}
		var buf bytes.Buffer
		if err := d.WriteCSV(&buf); err != nil {
			t.Fatal(err)
		}
		back, err := ReadCSV(&buf, name+".csv", CSVOptions{})
		if err != nil {
			t.Fatalf("%s: %v", name, err)
		}
		// Embedded sets are sorted by class, so first-seen order equals
		// the code order and Y survives unchanged.
		if !slices.Equal(back.Features, d.Features) || !slices.Equal(back.Classes, d.Classes) || !slices.Equal(back.Y, d.Y) || !mat.Equal(back.X, d.X) {
			t.Errorf("%s: round trip changed the data", name)
		}
	}
	// A feature called "class" pushes the label column name to "class_".
	d := &Dataset{Name: "t", Features: []string{"class"}, Classes: []string{"a", "b"},
		X: mat.NewDense(2, 1, []float64{1, 2}), Y: []int{0, 1}, Rows: []int{0, 1}}
	var buf bytes.Buffer
	if err := d.WriteCSV(&buf); err != nil {
		t.Fatal(err)
	}
	if want := "class,class_\n1,a\n2,b\n"; buf.String() != want {
		t.Errorf("WriteCSV = %q, want %q", buf.String(), want)
	}
}

func TestDetectDelimiter(t *testing.T) {
	tests := []struct {
		in   string
		want rune
	}{
		{"a,b,c\n1;2;3;4;5\n", ','},        // only the header line counts
		{"\n\r\na;b;c\n", ';'},             // leading blank lines skipped
		{"a\tb\tc", '\t'},                  // no trailing newline
		{`"x,y;z";b;c` + "\n", ';'},        // quoted delimiters ignored
		{"a,b;c\n", ','},                   // tie: ',' first
		{"a;b\tc\n", ';'},                  // tie: ';' before tab
		{"single\n", ','},                  // none: ','
		{`"multi` + "\nline,\"\t;\n", ';'}, // quoted newline is not the end of the header
	}
	for _, tt := range tests {
		if got := csvDetectDelimiter([]byte(tt.in)); got != tt.want {
			t.Errorf("csvDetectDelimiter(%q) = %q, want %q", tt.in, got, tt.want)
		}
	}
}

// BenchmarkReadCSV parses breast-cancer (569 x 30) in its WriteCSV form.
func BenchmarkReadCSV(b *testing.B) {
	d, err := Load("breast-cancer")
	if err != nil {
		b.Fatal(err)
	}
	var buf bytes.Buffer
	if err := d.WriteCSV(&buf); err != nil {
		b.Fatal(err)
	}
	raw := buf.Bytes()
	b.ReportAllocs()
	b.SetBytes(int64(len(raw)))
	for b.Loop() {
		if _, err := ReadCSV(bytes.NewReader(raw), "bc.csv", CSVOptions{}); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(float64(d.Len()*b.N)/b.Elapsed().Seconds(), "rows/s")
}

// BenchmarkLoad parses each embedded set from its embedded bytes.
func BenchmarkLoad(b *testing.B) {
	for _, name := range []string{"iris", "wine", "breast-cancer"} {
		b.Run("name="+name, func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				if _, err := Load(name); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

// benchCSV returns a seeded numeric CSV of n rows, d features and a label
// of three classes, in the shape of the load-memory measurement.
func benchCSV(n, d int) []byte {
	rng := rand.New(rand.NewPCG(1, 2))
	var b bytes.Buffer
	for j := range d {
		fmt.Fprintf(&b, "x%d,", j+1)
	}
	b.WriteString("label\n")
	line := make([]byte, 0, 32*d)
	for range n {
		line = line[:0]
		for range d {
			line = strconv.AppendFloat(line, rng.NormFloat64()*10, 'f', 6, 64)
			line = append(line, ',')
		}
		line = append(line, "class"...)
		line = strconv.AppendInt(line, int64(rng.IntN(3)), 10)
		b.Write(append(line, '\n'))
	}
	return b.Bytes()
}

// BenchmarkLoadCSV reads a numeric CSV of 20 features. The sub-benchmark
// reader=encoding-csv only splits the same bytes into records with
// encoding/csv (no number parsing, nothing kept): the reference the
// loader's throughput is to be read against (ratio of the MB/s columns).
func BenchmarkLoadCSV(b *testing.B) {
	for _, n := range []int{2000, 50000} {
		raw := benchCSV(n, 20)
		b.Run(fmt.Sprintf("rows=%d/reader=datasets", n), func(b *testing.B) {
			b.ReportAllocs()
			b.SetBytes(int64(len(raw)))
			for b.Loop() {
				if _, err := ReadCSV(bytes.NewReader(raw), "bench.csv", CSVOptions{}); err != nil {
					b.Fatal(err)
				}
			}
			b.ReportMetric(float64(n*b.N)/b.Elapsed().Seconds(), "rows/s")
		})
		b.Run(fmt.Sprintf("rows=%d/reader=encoding-csv", n), func(b *testing.B) {
			b.ReportAllocs()
			b.SetBytes(int64(len(raw)))
			for b.Loop() {
				cr := csv.NewReader(bytes.NewReader(raw))
				cr.ReuseRecord = true
				for {
					if _, err := cr.Read(); err == io.EOF {
						break
					} else if err != nil {
						b.Fatal(err)
					}
				}
			}
			b.ReportMetric(float64(n*b.N)/b.Elapsed().Seconds(), "rows/s")
		})
	}
}
