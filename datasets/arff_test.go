package datasets

import (
	"bytes"
	"compress/gzip"
	"crypto/sha256"
	"encoding/hex"
	"errors"
	"io"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"testing"

	"gonum.org/v1/gonum/mat"
)

// arffText returns the ARFF text of a fixture in testdata/arff,
// decompressed.
func arffText(t *testing.T, file string) []byte {
	t.Helper()
	raw, err := os.ReadFile(filepath.Join("testdata", "arff", file))
	if err != nil {
		t.Fatal(err)
	}
	if !strings.HasSuffix(file, ".gz") {
		return raw
	}
	zr, err := gzip.NewReader(bytes.NewReader(raw))
	if err != nil {
		t.Fatal(err)
	}
	text, err := io.ReadAll(zr)
	if err != nil {
		t.Fatal(err)
	}
	return text
}

// TestARFFMatchesEmbedded reads the ARFF files of Debian's weka 3.6.14-3
// that glass, ionosphere and segment were converted from, and checks that
// LoadFile gives exactly the embedded sets: features, classes, labels and
// every value. The files' digests are checked against the source digests
// scripts/ref_assess_datasets.py recorded in testdata/assess_datasets.json.
// Both sides parse the same decimal tokens with a correctly rounded
// ParseFloat, so the matrices must be equal bit for bit.
func TestARFFMatchesEmbedded(t *testing.T) {
	fx := readAssessFixture(t)
	sources := map[string]string{} // base name -> sha256
	for _, d := range fx.Datasets {
		for _, s := range d.SourceFiles {
			sources[filepath.Base(s.Path)] = s.SHA256
		}
	}
	sets := []struct {
		name  string
		files []string
	}{
		{"glass", []string{"glass.arff"}},
		{"ionosphere", []string{"ionosphere.arff.gz"}},
		// The embedded segment is segment-challenge then segment-test.
		{"segment", []string{"segment-challenge.arff.gz", "segment-test.arff.gz"}},
	}
	for _, s := range sets {
		want, err := Load(s.name)
		if err != nil {
			t.Fatal(err)
		}
		var parts []*Dataset
		for _, f := range s.files {
			text := arffText(t, f)
			sum := sha256.Sum256(text)
			arff := strings.TrimSuffix(f, ".gz")
			if got := hex.EncodeToString(sum[:]); got != sources[arff] {
				t.Errorf("%s: sha256 %s, but ref_assess_datasets.py converted %s with sha256 %s", f, got, arff, sources[arff])
			}
			path := filepath.Join("testdata", "arff", f)
			d, err := LoadFile(path, LoadOptions{})
			if err != nil {
				t.Fatalf("%s: %v", path, err)
			}
			if err := d.Validate(); err != nil {
				t.Error(err)
			}
			raw, _ := os.ReadFile(path)
			fileSum := sha256.Sum256(raw)
			if d.Source.SHA256 != hex.EncodeToString(fileSum[:]) || d.Source.File != path {
				t.Errorf("%s: provenance %+v", path, d.Source)
			}
			parts = append(parts, d)
		}
		got := parts[0]
		if len(parts) == 2 {
			a, b := parts[0], parts[1]
			if !slices.Equal(a.Classes, b.Classes) || !slices.Equal(a.Features, b.Features) {
				t.Fatalf("%s: the two files differ in classes or features", s.name)
			}
			X := mat.NewDense(a.Len()+b.Len(), a.Dim(), nil)
			X.Stack(a.X, b.X)
			got = &Dataset{Features: a.Features, Classes: a.Classes, X: X, Y: append(slices.Clone(a.Y), b.Y...)}
		}
		if !slices.Equal(got.Features, want.Features) {
			t.Errorf("%s: features %q, embedded %q", s.name, got.Features, want.Features)
		}
		if !slices.Equal(got.Classes, want.Classes) {
			t.Errorf("%s: classes %q, embedded %q", s.name, got.Classes, want.Classes)
		}
		if !slices.Equal(got.Y, want.Y) {
			t.Errorf("%s: labels differ from the embedded copy", s.name)
		}
		if !mat.Equal(got.X, want.X) {
			t.Errorf("%s: values differ from the embedded copy", s.name)
		}
	}
	// glass declares 'vehic wind non-float' without instances; it is left
	// out (as in the embedded copy) and named in the note. Its first data
	// row is on line 119 of glass.arff (read off the file).
	g, err := LoadFile(filepath.Join("testdata", "arff", "glass.arff"), LoadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(g.Source.Note, "vehic wind non-float") || !strings.Contains(g.Source.Note, `relation "Glass"`) {
		t.Errorf("glass note %q", g.Source.Note)
	}
	if where, ok := g.LocateRow(0); !ok || where != filepath.Join("testdata", "arff", "glass.arff")+":119" {
		t.Errorf("glass row 0 at %q", where)
	}
}

// TestARFFGood reads small ARFF texts that exercise the syntax: comments,
// case, quoting, types, the class chosen by name, CRLF, a byte order mark,
// and missing values dropped; the expected values are those written in
// the texts.
func TestARFFGood(t *testing.T) {
	in := "\xef\xbb\xbf% leading comment\r\n" +
		"@RELATION 'my data'\r\n" +
		"\r\n" +
		"@Attribute 'length, cm' NUMERIC\r\n" +
		"@attribute \"width \\\"w\\\"\" real % a comment after the type\r\n" +
		"@ATTRIBUTE kind {'setosa wild', versicolor, \"vir,ginica\"}\r\n" +
		"@attribute count INTEGER\r\n" +
		"@data\r\n" +
		"5.1, 3.5, 'setosa wild', 1\r\n" +
		"% a comment line inside the data\r\n" +
		"7.0,3.2,versicolor,2 % comment after the values\r\n" +
		"?,3.0,'setosa wild',3\r\n" +
		"6.3,3.3,\"vir,ginica\",4\r\n"
	if _, err := ReadARFF(strings.NewReader(in), "t.arff", LoadOptions{}); !errors.Is(err, ErrMissingValue) {
		t.Errorf("missing value without DropInvalid: %v", err)
	}
	// kind is the only nominal attribute: the class. count is a feature.
	d, err := ReadARFF(strings.NewReader(in), "t.arff", LoadOptions{DropInvalid: true})
	if err != nil {
		t.Fatal(err)
	}
	if !slices.Equal(d.Features, []string{"length, cm", `width "w"`, "count"}) {
		t.Errorf("features %q", d.Features)
	}
	// Declared order; all three have rows.
	if !slices.Equal(d.Classes, []string{"setosa wild", "versicolor", "vir,ginica"}) {
		t.Errorf("classes %q", d.Classes)
	}
	if !slices.Equal(d.Y, []int{0, 1, 2}) || !slices.Equal(d.Rows, []int{0, 1, 3}) || !slices.Equal(d.Lines, []int{9, 11, 12, 13}) {
		t.Errorf("Y %v Rows %v Lines %v", d.Y, d.Rows, d.Lines)
	}
	// Decimal tokens parse to the same float64 as the literals.
	if !mat.Equal(d.X, mat.NewDense(3, 3, []float64{5.1, 3.5, 1, 7.0, 3.2, 2, 6.3, 3.3, 4})) {
		t.Errorf("X = %v", mat.Formatted(d.X))
	}
	if len(d.Dropped) != 1 || d.Dropped[0].Row != 2 {
		t.Fatalf("Dropped %v", d.Dropped)
	}
	var ce *CSVError
	if !errors.As(d.Dropped[0].Err, &ce) || ce.Line != 12 || ce.Column != 1 || ce.ColumnName != "length, cm" {
		t.Errorf("dropped row error %v", d.Dropped[0].Err)
	}
	if err := d.Validate(); err != nil {
		t.Error(err)
	}

	// The class named by Label, declared in the middle; the order of its
	// values is the declared one even though 'b' appears first.
	in2 := "@relation r\n@attribute x numeric\n@attribute c {a,b}\n@attribute y numeric\n@data\n1,b,2\n3,a,4\n"
	d2, err := ReadARFF(strings.NewReader(in2), "t2.arff", LoadOptions{Label: "c"})
	if err != nil {
		t.Fatal(err)
	}
	if !slices.Equal(d2.Features, []string{"x", "y"}) || !slices.Equal(d2.Classes, []string{"a", "b"}) || !slices.Equal(d2.Y, []int{1, 0}) {
		t.Errorf("features %q classes %q Y %v", d2.Features, d2.Classes, d2.Y)
	}
	// The same text without Label: c is the last nominal attribute anyway.
	d3, err := ReadARFF(strings.NewReader(in2), "t2.arff", LoadOptions{})
	if err != nil || !slices.Equal(d3.Classes, d2.Classes) {
		t.Errorf("default class: %v %v", d3, err)
	}
}

// TestARFFBadInput checks each refusal: sentinel, line and column (read off
// the texts by hand; line 1 is the first line).
func TestARFFBadInput(t *testing.T) {
	head := "@relation r\n@attribute x numeric\n@attribute c {a,b}\n@data\n" // data from line 5
	tests := []struct {
		name    string
		in      string
		opt     LoadOptions
		want    error
		line    int
		column  int
		colName string
	}{
		{"empty", "", LoadOptions{}, ErrEmptyFile, 1, 0, ""},
		{"no data section", "@relation r\n@attribute x numeric\n", LoadOptions{}, ErrSyntax, 2, 0, ""},
		{"attribute before relation", "@attribute x numeric\n", LoadOptions{}, ErrSyntax, 1, 1, ""},
		{"second relation", "@relation r\n@relation s\n", LoadOptions{}, ErrSyntax, 2, 0, ""},
		{"string attribute", "@relation r\n@attribute name string\n", LoadOptions{}, ErrUnsupported, 2, 1, "name"},
		{"date attribute", "@relation r\n@attribute x numeric\n@attribute when date 'yyyy-MM-dd'\n", LoadOptions{}, ErrUnsupported, 3, 2, "when"},
		{"relational attribute", "@relation r\n@attribute bag relational\n", LoadOptions{}, ErrUnsupported, 2, 1, "bag"},
		{"unknown type", "@relation r\n@attribute x float\n", LoadOptions{}, ErrSyntax, 2, 1, "x"},
		{"unclosed nominal", "@relation r\n@attribute c {a,b\n", LoadOptions{}, ErrSyntax, 2, 1, "c"},
		{"duplicate attribute", "@relation r\n@attribute x numeric\n@attribute x numeric\n", LoadOptions{}, ErrDuplicateColumn, 3, 2, "x"},
		{"unterminated quote", "@relation r\n@attribute 'x numeric\n", LoadOptions{}, ErrSyntax, 2, 1, ""},
		{"bad header line", "@relation r\nx numeric\n", LoadOptions{}, ErrSyntax, 2, 0, ""},
		{"nul in a name", "@relation r\n@attribute 'a\x00' numeric\n", LoadOptions{}, ErrBadText, 2, 1, ""},
		// \t in a quoted ARFF name is a tab, which names refuse.
		{"control character in a name", "@relation r\n@attribute 'a\\tb' numeric\n", LoadOptions{}, ErrBadText, 2, 1, ""},
		{"invalid utf-8 class value", "@relation r\n@attribute x numeric\n@attribute c {a,\xffb}\n", LoadOptions{}, ErrBadText, 3, 2, "c"},
		{"second nominal attribute", "@relation r\n@attribute k {u,v}\n@attribute c {a,b}\n@data\n", LoadOptions{}, ErrUnsupported, 2, 1, "k"},
		{"no nominal attribute", "@relation r\n@attribute x numeric\n@data\n", LoadOptions{}, ErrNoFeatures, 3, 0, ""},
		{"numeric class by name", head, LoadOptions{Label: "x"}, ErrUnsupported, 2, 1, "x"},
		{"unknown class by name", head, LoadOptions{Label: "kind"}, ErrUnknownColumn, 4, 0, "kind"},
		{"no features", "@relation r\n@attribute c {a,b}\n@data\na\nb\n", LoadOptions{}, ErrNoFeatures, 3, 0, ""},
		{"no rows", head, LoadOptions{}, ErrNoRows, 4, 0, ""},
		{"ragged row", head + "1,a\n2\n", LoadOptions{}, ErrRaggedRow, 6, 0, ""},
		{"non-numeric", head + "1,a\nx1,b\n", LoadOptions{}, ErrNonNumeric, 6, 1, "x"},
		{"nan", head + "nan,a\n", LoadOptions{}, ErrNaNOrInf, 5, 1, "x"},
		{"missing value", head + "?,a\n", LoadOptions{}, ErrMissingValue, 5, 1, "x"},
		{"missing class", head + "1,?\n", LoadOptions{}, ErrMissingValue, 5, 2, "c"},
		{"undeclared class", head + "1,a\n2,z\n", LoadOptions{}, ErrUndeclaredLabel, 6, 2, "c"},
		{"undeclared class with DropInvalid", head + "1,a\n2,z\n", LoadOptions{DropInvalid: true}, ErrUndeclaredLabel, 6, 2, "c"},
		{"one class", head + "1,a\n2,a\n", LoadOptions{}, ErrTooFewClasses, 3, 2, "c"},
		{"sparse row", head + "{0 1, 1 a}\n", LoadOptions{}, ErrUnsupported, 5, 0, ""},
		{"instance weight", head + "1,a,{2}\n", LoadOptions{}, ErrUnsupported, 5, 3, ""},
		{"attribute in the data", head + "@attribute y numeric\n", LoadOptions{}, ErrSyntax, 5, 0, ""},
		{"text after a quote", head + "1,'a'b\n", LoadOptions{}, ErrSyntax, 5, 0, ""},
		{"all rows dropped", head + "?,a\n", LoadOptions{DropInvalid: true}, ErrNoRows, 4, 0, ""},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			_, err := ReadARFF(strings.NewReader(tt.in), "bad.arff", tt.opt)
			if !errors.Is(err, tt.want) {
				t.Fatalf("error %v, want %v", err, tt.want)
			}
			var ce *CSVError
			if !errors.As(err, &ce) || ce.File != "bad.arff" || ce.Line != tt.line || ce.Column != tt.column || ce.ColumnName != tt.colName {
				t.Fatalf("error %q: want bad.arff line %d column %d %q", err, tt.line, tt.column, tt.colName)
			}
			if !strings.HasPrefix(err.Error(), "datasets: bad.arff:") {
				t.Errorf("message %q lacks the file prefix", err)
			}
		})
	}
}

// TestLoadFileFormats: the format by extension or by option, gzip, the
// CSV fallback for other names, and options that do not fit the format.
func TestLoadFileFormats(t *testing.T) {
	for path, want := range map[string]Format{
		"a.csv": FormatCSV, "A.TSV": FormatCSV, "a.txt.gz": FormatCSV, "x.arff": FormatARFF, "x.ARFF.gz": FormatARFF,
		"d.svm": FormatSVMLight, "d.svmlight": FormatSVMLight, "d.libsvm": FormatSVMLight, "data.dat": FormatAuto, "noext": FormatAuto,
	} {
		if got := FormatOf(path); got != want {
			t.Errorf("FormatOf(%q) = %v, want %v", path, got, want)
		}
	}
	for _, s := range []string{"", "auto", "csv", "arff", "svmlight"} {
		f, err := ParseFormat(s)
		if err != nil || (s != "" && f.String() != s) {
			t.Errorf("ParseFormat(%q) = %v, %v", s, f, err)
		}
	}
	for s, want := range map[string]IndexBase{"": OneBased, "one": OneBased, "zero": ZeroBased, "auto": AutoBase} {
		if b, err := ParseIndexBase(s); err != nil || b != want {
			t.Errorf("ParseIndexBase(%q) = %v, %v", s, b, err)
		}
	}
	if _, err := ParseIndexBase("1"); err == nil || !strings.Contains(err.Error(), "one, zero, auto") {
		t.Errorf("ParseIndexBase(1): %v", err)
	}
	if _, err := ParseFormat("libsvm2"); !errors.Is(err, ErrUnknownFormat) || !strings.Contains(err.Error(), "csv, arff, svmlight") {
		t.Errorf("ParseFormat(libsvm2): %v", err)
	}

	dir := t.TempDir()
	arff := "@relation r\n@attribute x numeric\n@attribute c {a,b}\n@data\n1,a\n2,b\n"
	write := func(name string, data []byte) string {
		p := filepath.Join(dir, name)
		if err := os.WriteFile(p, data, 0o644); err != nil {
			t.Fatal(err)
		}
		return p
	}
	var gz bytes.Buffer
	zw := gzip.NewWriter(&gz)
	zw.Write([]byte(arff))
	zw.Close()
	for _, c := range []struct {
		path string
		opt  LoadOptions
	}{
		{write("d.arff", []byte(arff)), LoadOptions{}},
		{write("d.arff.gz", gz.Bytes()), LoadOptions{}},
		{write("d.txt", []byte(arff)), LoadOptions{Format: FormatARFF}}, // option beats extension
	} {
		d, err := LoadFile(c.path, c.opt)
		if err != nil {
			t.Fatalf("%s: %v", c.path, err)
		}
		if !slices.Equal(d.Classes, []string{"a", "b"}) || d.Len() != 2 {
			t.Errorf("%s: classes %q, %d rows", c.path, d.Classes, d.Len())
		}
		raw, _ := os.ReadFile(c.path)
		sum := sha256.Sum256(raw)
		if d.Source.SHA256 != hex.EncodeToString(sum[:]) {
			t.Errorf("%s: digest is not that of the file's bytes", c.path)
		}
	}
	// An ARFF file under a name LoadFile cannot place is read as CSV, as
	// LoadCSV always did; the format option fixes it.
	p := write("d.dat", []byte(arff))
	if _, err := LoadFile(p, LoadOptions{}); !errors.Is(err, ErrNoFeatures) {
		t.Errorf("ARFF read as CSV: %v, want the CSV loader's ErrNoFeatures", err)
	}
	// LoadFile and LoadCSV agree on a CSV file, value for value.
	csvPath := filepath.Join("testdata", "good", "quoted.csv")
	a, err1 := LoadFile(csvPath, LoadOptions{})
	b, err2 := LoadCSV(csvPath, CSVOptions{})
	if err1 != nil || err2 != nil || !mat.Equal(a.X, b.X) || !slices.Equal(a.Classes, b.Classes) || a.Source != b.Source || !slices.Equal(a.Lines, b.Lines) {
		t.Errorf("LoadFile and LoadCSV differ on %s: %v %v", csvPath, err1, err2)
	}
	for _, c := range []struct {
		name string
		opt  LoadOptions
		msg  string
	}{
		{"d.arff", LoadOptions{Delimiter: ';'}, "delimiter applies to csv files only"},
		{"d.svm", LoadOptions{Label: "y"}, "label column cannot be named"},
		{"d.csv", LoadOptions{IndexBase: ZeroBased}, "index base applies to svmlight"},
		{"d.csv", LoadOptions{MaxDenseBytes: 10}, "dense size limit applies to svmlight"},
		{"d.csv", LoadOptions{Format: Format(9)}, "unknown data format"},
		{"d.gz", LoadOptions{}, "not a gzip file"},
	} {
		_, err := ReadData(strings.NewReader("x,y\n1,a\n"), c.name, c.opt)
		if err == nil || !strings.Contains(err.Error(), c.msg) || !strings.HasPrefix(err.Error(), "datasets: "+c.name) {
			t.Errorf("%s %+v: %v, want %q", c.name, c.opt, err, c.msg)
		}
	}
	if _, err := LoadFile(filepath.Join(dir, "missing.arff"), LoadOptions{}); !errors.Is(err, os.ErrNotExist) {
		t.Errorf("missing file: %v", err)
	}
}
