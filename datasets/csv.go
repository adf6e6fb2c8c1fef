package datasets

import (
	"bytes"
	"crypto/sha256"
	"encoding/csv"
	"encoding/hex"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
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

// CSVError reports a problem in a CSV file. Line is the 1-based line of the
// file (for a quoted field spanning lines, the line where the field
// starts); errors about the whole file (empty, too few classes) name the
// header line. Column is the 1-based column (field) number and ColumnName
// its header name; Column is 0 when the problem is the whole line.
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
// the digest of the file's bytes and Provenance.Origin "user file".
func LoadCSV(path string, opt CSVOptions) (*Dataset, error) {
	raw, err := os.ReadFile(path)
	if err != nil {
		return nil, fmt.Errorf("datasets: %w", err)
	}
	return parseCSV(raw, path, opt)
}

// ReadCSV reads a dataset from r; name stands for the file in messages and
// becomes the dataset's Name and Provenance.File.
//
// The first record is the header and names every column; names are trimmed
// of surrounding white space and must be non-empty and distinct. Every
// other column than the label column holds numbers (Go/C syntax, e.g. 5.1,
// -2e-3; hexadecimal and digit separators are not accepted). Fields are
// trimmed of surrounding white space; a field that is empty, "NA", "N/A",
// "?" or "null" (any case) is a missing value. Labels are strings; the class
// order is the order in which labels first appear in the file (among the
// rows kept). Double-quoted fields (RFC 4180), CRLF line endings and a
// leading UTF-8 byte order mark are accepted; blank lines are skipped.
// Rows holds the 0-based index of each kept data row among all data rows
// (the header is not counted), so with DropInvalid it has gaps.
//
// Problems are reported as a *CSVError wrapping one of the Err... sentinels
// of this file.
func ReadCSV(r io.Reader, name string, opt CSVOptions) (*Dataset, error) {
	raw, err := io.ReadAll(r)
	if err != nil {
		return nil, fmt.Errorf("datasets: read %s: %w", name, err)
	}
	return parseCSV(raw, name, opt)
}

// csvMissing lists the spellings of a missing value (compared in lower case).
var csvMissing = []string{"", "na", "n/a", "?", "null"}

func parseCSV(raw []byte, name string, opt CSVOptions) (*Dataset, error) {
	sum := sha256.Sum256(raw)
	text := bytes.TrimPrefix(raw, []byte("\xef\xbb\xbf"))
	fail := func(line, col int, colName string, err error) error {
		return &CSVError{File: name, Line: line, Column: col, ColumnName: colName, Err: err}
	}

	delim := opt.Delimiter
	if delim == 0 {
		delim = csvDetectDelimiter(text)
	} else if delim == '"' || delim == '\r' || delim == '\n' || delim == utf8.RuneError || !utf8.ValidRune(delim) || unicode.IsControl(delim) && delim != '\t' {
		return nil, fmt.Errorf("datasets: %s: invalid delimiter %q", name, delim)
	}
	cr := csv.NewReader(bytes.NewReader(text))
	cr.Comma = delim
	cr.FieldsPerRecord = -1 // ragged rows are reported below, with the column count
	cr.TrimLeadingSpace = !unicode.IsSpace(delim)
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

	var (
		vals    []float64
		labels  []string
		rowIDs  []int
		dropped []RowError
	)
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
		vals = append(vals, row...)
		labels = append(labels, strings.TrimSpace(rec[label]))
		rowIDs = append(rowIDs, dataRow)
	}
	if len(labels) == 0 {
		err := ErrNoRows
		if len(dropped) > 0 {
			err = fmt.Errorf("%w: all %d rows dropped as invalid, first: %v", ErrNoRows, len(dropped), dropped[0].Err)
		}
		return nil, fail(headLine, 0, "", err)
	}
	var classes []string
	Y := make([]int, len(labels))
	for i, s := range labels {
		k := indexOf(classes, s)
		if k < 0 {
			k = len(classes)
			classes = append(classes, s)
		}
		Y[i] = k
	}
	if len(classes) < 2 {
		return nil, fail(headLine, label+1, names[label], fmt.Errorf("%w: every one of the %d rows has label %q", ErrTooFewClasses, len(labels), classes[0]))
	}
	return &Dataset{
		Name:     name,
		Features: features,
		Classes:  classes,
		X:        mat.NewDense(len(labels), len(features), vals),
		Y:        Y,
		Rows:     rowIDs,
		Source: Provenance{
			Name:   name,
			Title:  filepath.Base(name),
			Origin: "user file",
			File:   name,
			SHA256: hex.EncodeToString(sum[:]),
		},
		Dropped: dropped,
	}, nil
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
func csvParseValue(field string, delim rune) (float64, error) {
	s := strings.TrimSpace(field)
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
