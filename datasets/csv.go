package datasets

import (
	"bufio"
	"bytes"
	"crypto/sha256"
	"encoding/csv"
	"encoding/hex"
	"errors"
	"fmt"
	"hash"
	"io"
	"math"
	"os"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"unicode"
	"unicode/utf8"

	"gonum.org/v1/gonum/mat"
)

// Sentinel errors of the CSV import. They travel inside a *CSVError, which
// names the file, line and column; test for them with errors.Is.
var (
	ErrEmptyFile       = errors.New("empty file, expected a header row")
	ErrNoRows          = errors.New("no data rows")
	ErrRaggedRow       = errors.New("wrong number of fields")
	ErrNonNumeric      = errors.New("non-numeric value")
	ErrMissingValue    = errors.New("missing value")
	ErrNaNOrInf        = errors.New("value is NaN or infinite")
	ErrDuplicateColumn = errors.New("duplicate column name")
	ErrEmptyColumnName = errors.New("empty column name")
	ErrUnknownColumn   = errors.New("no such column")
	ErrNoFeatures      = errors.New("no feature columns besides the label")
	ErrTooFewClasses   = errors.New("fewer than two classes")
	ErrCSVSyntax       = errors.New("malformed CSV")
)

// CSVOptions configures LoadCSV and ReadCSV. The zero value reads a
// comma-, semicolon- or tab-separated file whose last column is the label
// and rejects the file at the first bad value.
type CSVOptions struct {
	// Label is the name of the label column; "" means the last column.
	Label string
	// Delimiter separates fields; 0 detects it from the header line: the
	// most frequent of ',', ';' and '\t' outside double quotes (ties in
	// that order; ',' if none occurs).
	Delimiter rune
	// DropInvalid drops rows with a missing, non-numeric, NaN or infinite
	// feature value, or a missing label, instead of failing; the dropped
	// rows are listed in Dataset.Dropped. Structural problems (ragged rows,
	// malformed quoting, bad header) still fail.
	DropInvalid bool
}

// CSVError reports a problem in a data file: CSV, and also ARFF and
// svmlight (the name is historical). Line is the 1-based line of the file
// (for a quoted field spanning lines, the line where the field starts);
// errors about the whole file (empty, too few classes) name the header
// line (the @data line for ARFF, the last line for svmlight). Column is
// the 1-based column (field) number and ColumnName its header name (for
// ARFF the attribute's position and name; for svmlight the token's
// position on the line, 1 being the label); Column is 0 when the problem
// is the whole line.
type CSVError struct {
	File       string
	Line       int
	Column     int
	ColumnName string
	Err        error
}

func (e *CSVError) Error() string {
	var b strings.Builder
	fmt.Fprintf(&b, "datasets: %s:%d: ", e.File, e.Line)
	if e.Column > 0 {
		fmt.Fprintf(&b, "column %d", e.Column)
		if e.ColumnName != "" {
			fmt.Fprintf(&b, " %q", e.ColumnName)
		}
		b.WriteString(": ")
	} else if e.ColumnName != "" {
		fmt.Fprintf(&b, "column %q: ", e.ColumnName)
	}
	b.WriteString(e.Err.Error())
	return b.String()
}

func (e *CSVError) Unwrap() error { return e.Err }

// LoadCSV reads a dataset from the CSV file at path (see ReadCSV). The
// dataset's Name and Provenance.File are path as given, Provenance.SHA256
// the digest of the file's bytes and Provenance.Origin "user file". The
// file is read as a stream; the size of a regular file is used to size the
// feature matrix once, early, instead of growing it step by step.
func LoadCSV(path string, opt CSVOptions) (*Dataset, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, fmt.Errorf("datasets: %w", err)
	}
	defer f.Close()
	return readCSV(f, path, opt, regularSize(f))
}

// regularSize returns the size of f if it is a regular file, else 0.
func regularSize(f *os.File) int64 {
	if st, err := f.Stat(); err == nil && st.Mode().IsRegular() {
		return st.Size()
	}
	return 0
}

// ReadCSV reads a dataset from r; name stands for the file in messages and
// becomes the dataset's Name and Provenance.File.
//
// The first record is the header and names every column; names are trimmed
// of surrounding white space and must be non-empty, distinct and clean
// text (ErrBadText: valid UTF-8 without control characters). Every other
// column than the label column holds numbers (Go/C syntax, e.g. 5.1,
// -2e-3; hexadecimal and digit separators are not accepted). Fields are
// trimmed of surrounding white space; a field that is empty, "NA", "N/A",
// "?" or "null" (any case) is a missing value. Labels are strings and must
// be clean text too; the class order is the order in which labels first
// appear in the file (among the rows kept). Labels are checked once all
// rows are read, so a file with a bad value and a bad label reports the
// value. Double-quoted fields (RFC 4180), CRLF line endings and a leading
// UTF-8 byte order mark are accepted; blank lines are skipped. Rows holds
// the 0-based index of each kept data row among all data rows (the header
// is not counted), so with DropInvalid it has gaps; Lines the line on which
// each data row starts.
//
// The text is read as a stream: values are parsed as they come into one
// growing slice, labels are kept once per class, and neither the whole
// text nor a table of fields is ever held.
//
// Problems are reported as a *CSVError wrapping one of the Err... sentinels
// of this file.
func ReadCSV(r io.Reader, name string, opt CSVOptions) (*Dataset, error) {
	return readCSV(r, name, opt, readerSize(r))
}

// readerSize returns the number of bytes r will deliver when r knows it
// (a regular *os.File, or a reader with a Size method such as
// *bytes.Reader and *strings.Reader), else 0.
func readerSize(r io.Reader) int64 {
	switch v := r.(type) {
	case *os.File:
		return regularSize(v)
	case interface{ Size() int64 }:
		return v.Size()
	}
	return 0
}

// csvMissing lists the spellings of a missing value (compared in lower case).
var csvMissing = []string{"", "na", "n/a", "?", "null"}

// utf8BOM is the UTF-8 byte order mark a file may start with.
var utf8BOM = []byte("\xef\xbb\xbf")

// digestReader hashes and counts the bytes read through it.
type digestReader struct {
	r io.Reader
	h hash.Hash
	n int64
}

func (d *digestReader) Read(p []byte) (int, error) {
	n, err := d.r.Read(p)
	d.h.Write(p[:n])
	d.n += int64(n)
	return n, err
}

// newDigestReader returns a reader over r that hashes with SHA-256.
func newDigestReader(r io.Reader) *digestReader { return &digestReader{r: r, h: sha256.New()} }

// sum returns the hex SHA-256 of the bytes read so far.
func (d *digestReader) sum() string { return hex.EncodeToString(d.h.Sum(nil)) }

// drain reads r to its end, so that the digest covers the whole input.
func (d *digestReader) drain(r io.Reader) error {
	_, err := io.Copy(io.Discard, r)
	return err
}

// rowTable accumulates the rows of a loader: the feature values row after
// row in one slice, the class of each row (labels interned in first-seen
// order), the row ids and the line of every data row.
type rowTable struct {
	d       int
	vals    []float64
	y       []int
	rows    []int
	lines   []int // by row id, dropped rows included
	classes []string
	classOf map[string]int
	first   []CSVError // where each class first appears (File, Line, Column, ColumnName)
	grown   bool
}

func newRowTable(d int) *rowTable { return &rowTable{d: d, classOf: map[string]int{}} }

// add appends a kept row: its values (copied), label and row id. where is
// the location of the label, kept for the first row of each class.
func (t *rowTable) add(row []float64, label string, id int, where CSVError) {
	k, ok := t.classOf[label]
	if !ok {
		k = len(t.classes)
		label = strings.Clone(label) // do not pin the record the label was cut from
		t.classOf[label] = k
		t.classes = append(t.classes, label)
		t.first = append(t.first, where)
	}
	t.vals = append(t.vals, row...)
	t.y = append(t.y, k)
	t.rows = append(t.rows, id)
}

// reserve grows the slices once to hold about n rows in all, from an
// estimate taken early in the file, so that they are not reallocated
// (and briefly held twice) while the rest of the file is read.
func (t *rowTable) reserve(n int) {
	if t.grown || n <= len(t.y) {
		return
	}
	t.grown = true
	t.vals = slices.Grow(t.vals, (n-len(t.y))*t.d)
	t.y = slices.Grow(t.y, n-len(t.y))
	t.rows = slices.Grow(t.rows, n-len(t.rows))
	t.lines = slices.Grow(t.lines, n-len(t.lines))
}

// estimateRows reserves room for the rows of a file of size total bytes
// once consumed bytes hold seen data rows: after the first 4 MiB (or the
// whole file, if smaller) so that buffering ahead skews the estimate by
// under 2%, with 3% to spare.
func (t *rowTable) estimateRows(total, consumed int64, seen int) {
	if t.grown || total <= 0 || seen < 64 || consumed < min(total, 4<<20) {
		return
	}
	t.reserve(int(float64(total) / float64(consumed) * float64(seen) * 1.03))
}

// checkLabels refuses class labels that are not clean text (ErrBadText),
// naming the first row of the first bad class.
func (t *rowTable) checkLabels() error {
	for k, c := range t.classes {
		if err := checkText("label", c); err != nil {
			e := t.first[k]
			e.Err = err
			return &e
		}
	}
	return nil
}

func readCSV(r io.Reader, name string, opt CSVOptions, sizeHint int64) (*Dataset, error) {
	fail := func(line, col int, colName string, err error) error {
		return &CSVError{File: name, Line: line, Column: col, ColumnName: colName, Err: err}
	}
	delim := opt.Delimiter
	if delim != 0 && (delim == '"' || delim == '\r' || delim == '\n' || delim == utf8.RuneError || !utf8.ValidRune(delim) || unicode.IsControl(delim) && delim != '\t') {
		return nil, fmt.Errorf("datasets: %s: invalid delimiter %q", name, delim)
	}
	dr := newDigestReader(r)
	br := bufio.NewReaderSize(dr, 64<<10)
	if b, _ := br.Peek(len(utf8BOM)); bytes.Equal(b, utf8BOM) {
		br.Discard(len(utf8BOM))
	}
	var src io.Reader = br
	if delim == 0 {
		head, err := csvReadHead(br)
		if err != nil {
			return nil, fmt.Errorf("datasets: read %s: %w", name, err)
		}
		delim = csvDetectDelimiter(head)
		src = io.MultiReader(bytes.NewReader(head), br)
	}
	cr := csv.NewReader(src)
	cr.Comma = delim
	cr.FieldsPerRecord = -1 // ragged rows are reported below, with the column count
	cr.TrimLeadingSpace = !unicode.IsSpace(delim)
	cr.ReuseRecord = true
	read := func() ([]string, int, error) {
		rec, err := cr.Read()
		if err != nil {
			var pe *csv.ParseError
			if errors.As(err, &pe) {
				where := fmt.Sprintf("at byte %d of the line", pe.Column)
				if pe.StartLine != pe.Line {
					where += fmt.Sprintf(", in the record starting on line %d", pe.StartLine)
				}
				return nil, 0, fail(pe.Line, 0, "", fmt.Errorf("%w: %v (%s)", ErrCSVSyntax, pe.Err, where))
			}
			if err == io.EOF {
				return nil, 0, err
			}
			return nil, 0, fmt.Errorf("datasets: %s: %w", name, err)
		}
		line, _ := cr.FieldPos(0)
		return rec, line, nil
	}

	header, headLine, err := read()
	if err == io.EOF {
		return nil, fail(1, 0, "", ErrEmptyFile)
	}
	if err != nil {
		return nil, err
	}
	names := make([]string, len(header))
	for j, h := range header {
		names[j] = strings.TrimSpace(h)
		if names[j] == "" {
			return nil, fail(headLine, j+1, "", ErrEmptyColumnName)
		}
		if err := checkText("column name", names[j]); err != nil {
			return nil, fail(headLine, j+1, "", err)
		}
		if k := indexOf(names[:j], names[j]); k >= 0 {
			return nil, fail(headLine, j+1, names[j], fmt.Errorf("%w (also column %d)", ErrDuplicateColumn, k+1))
		}
	}
	label := len(names) - 1
	if opt.Label != "" {
		label = indexOf(names, strings.TrimSpace(opt.Label))
		if label < 0 {
			return nil, fail(headLine, 0, opt.Label, fmt.Errorf("label column: %w (columns: %s)", ErrUnknownColumn, strings.Join(names, ", ")))
		}
	}
	if len(names) < 2 {
		hint := ""
		if opt.Delimiter == 0 {
			hint = " (no ',', ';' or tab found in the header line)"
		}
		return nil, fail(headLine, 0, "", fmt.Errorf("%w%s", ErrNoFeatures, hint))
	}
	var featCols []int
	var features []string
	for j, n := range names {
		if j != label {
			featCols = append(featCols, j)
			features = append(features, n)
		}
	}

	tab := newRowTable(len(featCols))
	var dropped []RowError
	row := make([]float64, len(featCols))
	for dataRow := 0; ; dataRow++ {
		rec, line, err := read()
		if err == io.EOF {
			break
		}
		if err != nil {
			return nil, err
		}
		if len(rec) != len(names) {
			return nil, fail(line, 0, "", fmt.Errorf("%w: row has %d, header has %d", ErrRaggedRow, len(rec), len(names)))
		}
		tab.lines = append(tab.lines, line)
		bad := func() error {
			for q, j := range featCols {
				v, err := csvParseValue(rec[j], delim)
				if err != nil {
					l, _ := cr.FieldPos(j)
					return fail(l, j+1, names[j], err)
				}
				row[q] = v
			}
			if csvIsMissing(strings.TrimSpace(rec[label])) {
				l, _ := cr.FieldPos(label)
				return fail(l, label+1, names[label], fmt.Errorf("%w (label)", ErrMissingValue))
			}
			return nil
		}()
		if bad != nil {
			if !opt.DropInvalid {
				return nil, bad
			}
			dropped = append(dropped, RowError{Row: dataRow, Err: bad})
			continue
		}
		l, _ := cr.FieldPos(label)
		tab.add(row, strings.TrimSpace(rec[label]), dataRow, CSVError{File: name, Line: l, Column: label + 1, ColumnName: names[label]})
		tab.estimateRows(sizeHint, dr.n-int64(br.Buffered()), dataRow+1)
	}
	if len(tab.y) == 0 {
		err := ErrNoRows
		if len(dropped) > 0 {
			err = fmt.Errorf("%w: all %d rows dropped as invalid, first: %v", ErrNoRows, len(dropped), dropped[0].Err)
		}
		return nil, fail(headLine, 0, "", err)
	}
	if err := tab.checkLabels(); err != nil {
		return nil, err
	}
	if len(tab.classes) < 2 {
		return nil, fail(headLine, label+1, names[label], fmt.Errorf("%w: every one of the %d rows has label %q", ErrTooFewClasses, len(tab.y), tab.classes[0]))
	}
	if err := dr.drain(br); err != nil {
		return nil, fmt.Errorf("datasets: read %s: %w", name, err)
	}
	return &Dataset{
		Name:     name,
		Features: features,
		Classes:  tab.classes,
		X:        mat.NewDense(len(tab.y), len(features), tab.vals),
		Y:        tab.y,
		Rows:     tab.rows,
		Source: Provenance{
			Name:   name,
			Title:  filepath.Base(name),
			Origin: "user file",
			File:   name,
			SHA256: dr.sum(),
		},
		Dropped: dropped,
		Lines:   tab.lines,
	}, nil
}

// csvReadHead reads from br the bytes up to and including the end of the
// header line, as csvDetectDelimiter delimits it: leading line breaks, then
// everything up to the first '\n' or '\r' outside double quotes (or the
// end of the input).
func csvReadHead(br *bufio.Reader) ([]byte, error) {
	var head []byte
	started, inQuote := false, false
	for {
		c, err := br.ReadByte()
		if err == io.EOF {
			return head, nil
		}
		if err != nil {
			return head, err
		}
		head = append(head, c)
		if !started {
			if c == '\r' || c == '\n' {
				continue
			}
			started = true
		}
		switch {
		case c == '"':
			inQuote = !inQuote
		case inQuote:
		case c == '\n' || c == '\r':
			return head, nil
		}
	}
}

// csvIsMissing reports whether a trimmed field denotes a missing value.
func csvIsMissing(s string) bool {
	for _, m := range csvMissing {
		if strings.EqualFold(s, m) {
			return true
		}
	}
	return false
}

// csvParseValue parses one feature field.
//
// The common case, a plain decimal number, is tried first: none of the
// missing-value spellings parses as a number, so parsing first and then
// refusing hexadecimal and digit separators gives the same values as the
// checks below in their original order; every failure goes through them,
// so messages are unchanged.
func csvParseValue(field string, delim rune) (float64, error) {
	s := strings.TrimSpace(field)
	if v, err := strconv.ParseFloat(s, 64); err == nil && !math.IsNaN(v) && !math.IsInf(v, 0) && !hasHexOrSeparator(s) {
		return v, nil
	}
	if s == "" {
		return 0, ErrMissingValue
	}
	if csvIsMissing(s) {
		return 0, fmt.Errorf("%w (%q)", ErrMissingValue, s)
	}
	if strings.ContainsAny(s, "xX_") {
		return 0, fmt.Errorf("%w %q", ErrNonNumeric, s)
	}
	v, err := strconv.ParseFloat(s, 64)
	if err != nil {
		if errors.Is(err, strconv.ErrRange) {
			return 0, fmt.Errorf("%w: %q is out of the float64 range", ErrNaNOrInf, s)
		}
		if delim != ',' && strings.Count(s, ",") == 1 {
			if _, err := strconv.ParseFloat(strings.Replace(s, ",", ".", 1), 64); err == nil {
				return 0, fmt.Errorf("%w %q (decimal commas are not accepted; write %q)", ErrNonNumeric, s, strings.Replace(s, ",", ".", 1))
			}
		}
		return 0, fmt.Errorf("%w %q", ErrNonNumeric, s)
	}
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return 0, fmt.Errorf("%w: %q", ErrNaNOrInf, s)
	}
	return v, nil
}

// hasHexOrSeparator reports whether s holds 'x', 'X' or '_' (the marks of
// hexadecimal numbers and digit separators, which ParseFloat accepts and
// the loaders do not).
func hasHexOrSeparator(s string) bool {
	for i := 0; i < len(s); i++ {
		if c := s[i]; c == 'x' || c == 'X' || c == '_' {
			return true
		}
	}
	return false
}

// csvDetectDelimiter picks the most frequent of ',', ';' and '\t' outside
// double quotes on the first non-blank line (ties in that order), or ','.
// All candidates are ASCII, so scanning bytes is exact in UTF-8.
func csvDetectDelimiter(text []byte) rune {
	cands := []byte{',', ';', '\t'}
	counts := make([]int, len(cands))
	text = bytes.TrimLeft(text, "\r\n")
	inQuote := false
	for _, c := range text {
		switch {
		case c == '"':
			inQuote = !inQuote
		case inQuote:
		case c == '\n' || c == '\r':
			return csvBest(cands, counts)
		default:
			if i := bytes.IndexByte(cands, c); i >= 0 {
				counts[i]++
			}
		}
	}
	return csvBest(cands, counts)
}

// csvBest returns the candidate with the highest count, the first on ties.
func csvBest(cands []byte, counts []int) rune {
	best := 0
	for i := range cands {
		if counts[i] > counts[best] {
			best = i
		}
	}
	return rune(cands[best])
}

// WriteCSV writes d as a comma-separated file that ReadCSV reads back to the
// same features, classes and values: a header of the feature names and a
// label column, then one line per row with the values in the shortest
// decimal form that parses back to the same float64 and the class name.
// The label column is called "class" (with "_" appended until it differs
// from every feature name). Rows (the original row ids) are not written.
func (d *Dataset) WriteCSV(w io.Writer) error {
	labelName := "class"
	for indexOf(d.Features, labelName) >= 0 {
		labelName += "_"
	}
	cw := csv.NewWriter(w)
	rec := append(append([]string(nil), d.Features...), labelName)
	if err := cw.Write(rec); err != nil {
		return fmt.Errorf("datasets: write %s: %w", d.Name, err)
	}
	for i, y := range d.Y {
		for j := range d.Features {
			rec[j] = strconv.FormatFloat(d.X.At(i, j), 'g', -1, 64)
		}
		rec[len(d.Features)] = d.Classes[y]
		if err := cw.Write(rec); err != nil {
			return fmt.Errorf("datasets: write %s: %w", d.Name, err)
		}
	}
	cw.Flush()
	if err := cw.Error(); err != nil {
		return fmt.Errorf("datasets: write %s: %w", d.Name, err)
	}
	return nil
}
