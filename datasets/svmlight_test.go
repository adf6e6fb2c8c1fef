package datasets

import (
	"encoding/json"
	"errors"
	"os"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"testing"

	"gonum.org/v1/gonum/mat"
)

// TestSVMLightMatchesSklearn reads testdata/svmlight/sample.svm with each
// index base and compares the dense matrix and the labels with
// scikit-learn 1.2.1's load_svmlight_file(path, zero_based=False / True /
// "auto"), .toarray(). Both parse the same decimal text correctly rounded
// (and the fixture stores repr floats), so values must agree exactly.
func TestSVMLightMatchesSklearn(t *testing.T) {
	raw, err := os.ReadFile(filepath.Join("testdata", "svmlight_sklearn.json"))
	if err != nil {
		t.Fatal(err)
	}
	// Written by scripts/ref_svmlight.py, which also wrote the file.
	var fx struct {
		Versions  map[string]string `json:"versions"`
		OneBased  json.RawMessage   `json:"one_based"`
		ZeroBased json.RawMessage   `json:"zero_based"`
		Auto      json.RawMessage   `json:"auto"`
	}
	if err := json.Unmarshal(raw, &fx); err != nil {
		t.Fatal(err)
	}
	if fx.Versions["sklearn"] != "1.2.1" {
		t.Errorf("fixture made with scikit-learn %q, want 1.2.1", fx.Versions["sklearn"])
	}
	path := filepath.Join("testdata", "svmlight", "sample.svm")
	for _, m := range []struct {
		name string
		raw  json.RawMessage
		base IndexBase
	}{
		{"one_based", fx.OneBased, OneBased},
		{"zero_based", fx.ZeroBased, ZeroBased},
		{"auto", fx.Auto, AutoBase},
	} {
		var want struct {
			Call  string      `json:"call"`
			Shape []int       `json:"shape"`
			X     [][]float64 `json:"X"`
			Y     []float64   `json:"y"`
		}
		if err := json.Unmarshal(m.raw, &want); err != nil {
			t.Fatal(err)
		}
		d, err := LoadFile(path, LoadOptions{IndexBase: m.base})
		if err != nil {
			t.Fatalf("%s: %v", m.name, err)
		}
		if err := d.Validate(); err != nil {
			t.Error(err)
		}
		if d.Len() != want.Shape[0] || d.Dim() != want.Shape[1] {
			t.Fatalf("%s: %dx%d, %s gives %v", m.name, d.Len(), d.Dim(), want.Call, want.Shape)
		}
		if !mat.Equal(d.X, pipeDense(want.X)) {
			t.Errorf("%s: dense matrix differs from %s", m.name, want.Call)
		}
		for i, c := range d.Y {
			// Class names are the labels as written; scikit-learn parses
			// them as numbers.
			v, err := strconv.ParseFloat(d.Classes[c], 64)
			if err != nil || v != want.Y[i] {
				t.Errorf("%s: row %d label %q, %s gives %v", m.name, i, d.Classes[c], want.Call, want.Y[i])
			}
		}
		if d.Features[0] != "f1" || d.Features[d.Dim()-1] != "f"+strconv.Itoa(d.Dim()) {
			t.Errorf("%s: features %v", m.name, d.Features)
		}
	}
	// Class order is the order of first appearance: the first data line
	// has -1, the second 1, the seventh 2 (read off the file); the first
	// data row is on line 2, the row without features (row 7) on line 9.
	d, err := LoadFile(path, LoadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if !slices.Equal(d.Classes, []string{"-1", "1", "2"}) {
		t.Errorf("classes %q", d.Classes)
	}
	if d.Lines[0] != 2 || d.Lines[7] != 9 {
		t.Errorf("lines %v", d.Lines[:8])
	}
	for j := range d.Len() {
		if d.X.At(j, 8) != 0 {
			t.Fatalf("column f9 (index 9 never occurs) has %v in row %d", d.X.At(j, 8), j)
		}
	}
}

func TestSVMLightBadInput(t *testing.T) {
	tests := []struct {
		name   string
		in     string
		opt    LoadOptions
		want   error
		line   int
		column int
		msg    string
	}{
		{"empty", "", LoadOptions{}, ErrEmptyFile, 1, 0, ""},
		{"only comments", "# x\n\n", LoadOptions{}, ErrEmptyFile, 1, 0, ""},
		{"query id", "1 qid:3 1:2\n", LoadOptions{}, ErrUnsupported, 1, 2, "query ids"},
		{"multi-label", "1,2 1:2\n", LoadOptions{}, ErrUnsupported, 1, 1, "multi-label"},
		{"no label", "1:2 3:4\n", LoadOptions{}, ErrSyntax, 1, 1, "not a label"},
		{"no colon", "1 1:2 3\n", LoadOptions{}, ErrSyntax, 1, 3, "INDEX:VALUE"},
		{"index 0 one-based", "1 1:2\n2 0:1 1:2\n", LoadOptions{}, ErrBadIndex, 2, 2, "zero-based"},
		{"decreasing", "1 3:2 2:1\n", LoadOptions{}, ErrBadIndex, 1, 3, "index 2 after 3"},
		{"repeated", "1 3:2 3:1\n", LoadOptions{}, ErrBadIndex, 1, 3, "index 3 after 3"},
		{"non-numeric index", "1 a:2\n", LoadOptions{}, ErrBadIndex, 1, 2, `"a"`},
		{"negative index", "1 -1:2\n", LoadOptions{IndexBase: ZeroBased}, ErrBadIndex, 1, 2, `"-1"`},
		{"huge index", "1 99999999999:1\n", LoadOptions{}, ErrTooLarge, 1, 2, "too large"},
		{"nan value", "1 1:nan\n2 1:1\n", LoadOptions{}, ErrNaNOrInf, 1, 2, "index 1"},
		{"non-numeric value", "1 1:abc\n", LoadOptions{}, ErrNonNumeric, 1, 2, "index 1"},
		{"one class", "1 1:2\n1 2:3\n", LoadOptions{}, ErrTooFewClasses, 2, 1, ""},
		{"no features", "1\n2\n", LoadOptions{}, ErrNoFeatures, 2, 0, ""},
		{"bad text label", "a\x00 1:1\nb 1:2\n", LoadOptions{}, ErrBadText, 1, 1, "NUL"},
		{"all dropped", "1 1:nan\n", LoadOptions{DropInvalid: true}, ErrNoRows, 1, 0, ""},
		// 3 rows x 10 columns x 8 bytes = 240 > 200: refused on line 3 at
		// the token 10:1 (token 2) that widens the matrix.
		{"too large", "1 1:1\n2 5:1\n1 10:1\n", LoadOptions{MaxDenseBytes: 200}, ErrTooLarge, 3, 2, "3 rows x 10 columns of float64 would take 240 bytes, above the limit of 200 bytes"},
		// A single row wider than the limit is refused at its index; and
		// a new row that makes the matrix too tall, on its line.
		{"too tall", "1 1:1 4:1\n2 4:1\n1 3:1\n2 1:1\n", LoadOptions{MaxDenseBytes: 100}, ErrTooLarge, 4, 0, "4 rows x 4 columns of float64 would take 128 bytes"},
		{"too wide", "1 1:1 30:1\n", LoadOptions{MaxDenseBytes: 200}, ErrTooLarge, 1, 3, "1 rows x 30 columns"},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			_, err := ReadSVMLight(strings.NewReader(tt.in), "t.svm", tt.opt)
			if !errors.Is(err, tt.want) {
				t.Fatalf("error %v, want %v", err, tt.want)
			}
			var ce *CSVError
			if !errors.As(err, &ce) || ce.File != "t.svm" || ce.Line != tt.line || ce.Column != tt.column {
				t.Fatalf("error %q: want t.svm line %d column %d", err, tt.line, tt.column)
			}
			if !strings.Contains(err.Error(), tt.msg) || !strings.HasPrefix(err.Error(), "datasets: t.svm:") {
				t.Errorf("message %q: want prefix and %q", err, tt.msg)
			}
		})
	}
	// With DropInvalid the NaN row is dropped and listed.
	d, err := ReadSVMLight(strings.NewReader("1 1:nan\n2 1:1\n1 2:5\n"), "t.svm", LoadOptions{DropInvalid: true})
	if err != nil {
		t.Fatal(err)
	}
	if !slices.Equal(d.Rows, []int{1, 2}) || len(d.Dropped) != 1 || d.Dropped[0].Row != 0 || !slices.Equal(d.Classes, []string{"2", "1"}) {
		t.Errorf("rows %v dropped %v classes %q", d.Rows, d.Dropped, d.Classes)
	}
	// Auto base: a file with an index 0 is zero-based.
	z, err := ReadSVMLight(strings.NewReader("1 0:3\n2 2:4\n"), "z.svm", LoadOptions{IndexBase: AutoBase})
	if err != nil {
		t.Fatal(err)
	}
	if !mat.Equal(z.X, mat.NewDense(2, 3, []float64{3, 0, 0, 0, 0, 4})) || !strings.Contains(z.Source.Note, "zero-based") {
		t.Errorf("auto base: X %v note %q", mat.Formatted(z.X), z.Source.Note)
	}
}
