package datasets

import (
	"bufio"
	"bytes"
	"compress/gzip"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strings"
)

// Sentinel errors of the ARFF and svmlight readers (the CSV sentinels
// apply to them too). They travel inside a *CSVError.
var (
	// ErrUnsupported marks a construct of a format that fringe does not
	// read: string, date and relational ARFF attributes, nominal ARFF
	// attributes other than the class, sparse ARFF rows and instance
	// weights, svmlight query ids (qid:) and multi-label rows.
	ErrUnsupported = errors.New("not supported")
	// ErrSyntax marks a malformed ARFF header or data line, or a
	// malformed svmlight token.
	ErrSyntax = errors.New("malformed line")
	// ErrUndeclaredLabel marks an ARFF class value that the class
	// attribute does not declare.
	ErrUndeclaredLabel = errors.New("class value not declared")
	// ErrBadIndex marks a svmlight feature index that is not a whole
	// number, is 0 in a one-based file, or does not increase along the
	// line.
	ErrBadIndex = errors.New("bad feature index")
	// ErrTooLarge marks a svmlight file whose dense matrix would exceed
	// LoadOptions.MaxDenseBytes.
	ErrTooLarge = errors.New("dense matrix too large")
	// ErrUnknownFormat marks a format name ParseFormat does not know.
	ErrUnknownFormat = errors.New("unknown data format")
)

// Format is a data file format.
type Format int

// The formats LoadFile and ReadData read. FormatAuto, the zero value,
// picks the format from the file name (see FormatOf).
const (
	FormatAuto Format = iota
	FormatCSV
	FormatARFF
	FormatSVMLight
)

var formatNames = []string{"auto", "csv", "arff", "svmlight"}

// String returns "auto", "csv", "arff" or "svmlight".
func (f Format) String() string {
	if f < 0 || int(f) >= len(formatNames) {
		return fmt.Sprintf("Format(%d)", int(f))
	}
	return formatNames[f]
}

// ParseFormat returns the format named s: "csv", "arff", "svmlight", or
// "auto" (or "") for FormatAuto. Anything else is an error wrapping
// ErrUnknownFormat that lists the names.
func ParseFormat(s string) (Format, error) {
	if s == "" {
		return FormatAuto, nil
	}
	for i, n := range formatNames {
		if s == n {
			return Format(i), nil
		}
	}
	return 0, fmt.Errorf("datasets: %w %q (known: %s)", ErrUnknownFormat, s, strings.Join(formatNames, ", "))
}

// FormatOf returns the format of a file named path by its extension, case
// ignored, after removing a final ".gz": ".csv", ".tsv" and ".txt" are
// FormatCSV, ".arff" FormatARFF, ".svm", ".svmlight" and ".libsvm"
// FormatSVMLight. Any other name gives FormatAuto, which LoadFile reads as
// CSV (as LoadCSV always has).
func FormatOf(path string) Format {
	base := strings.ToLower(filepath.Base(path))
	base = strings.TrimSuffix(base, ".gz")
	switch filepath.Ext(base) {
	case ".csv", ".tsv", ".txt":
		return FormatCSV
	case ".arff":
		return FormatARFF
	case ".svm", ".svmlight", ".libsvm":
		return FormatSVMLight
	}
	return FormatAuto
}

// IndexBase says how svmlight feature indices are counted.
type IndexBase int

const (
	// OneBased indices start at 1 (LIBSVM's convention, the default):
	// index i is column i, and an index 0 is an error.
	OneBased IndexBase = iota
	// ZeroBased indices start at 0: index i is column i+1.
	ZeroBased
	// AutoBase is ZeroBased if any index in the file is 0 and OneBased
	// otherwise (scikit-learn's zero_based="auto").
	AutoBase
)

var indexBaseNames = []string{"one", "zero", "auto"}

// String returns "one", "zero" or "auto".
func (b IndexBase) String() string {
	if b < 0 || int(b) >= len(indexBaseNames) {
		return fmt.Sprintf("IndexBase(%d)", int(b))
	}
	return indexBaseNames[b]
}

// ParseIndexBase returns the index base named s: "one" (or ""), "zero" or
// "auto"; anything else is an error that lists the names.
func ParseIndexBase(s string) (IndexBase, error) {
	if s == "" {
		return OneBased, nil
	}
	for i, n := range indexBaseNames {
		if s == n {
			return IndexBase(i), nil
		}
	}
	return 0, fmt.Errorf("datasets: unknown index base %q (known: %s)", s, strings.Join(indexBaseNames, ", "))
}

// DefaultMaxDenseBytes is the default bound on the dense float64 matrix a
// svmlight file may expand to: 2 GiB.
const DefaultMaxDenseBytes = 2 << 30

// LoadOptions configures LoadFile and ReadData. The zero value picks the
// format from the file name, takes the last column (CSV) or the last
// nominal attribute (ARFF) as the label, and fails at the first bad value.
type LoadOptions struct {
	// Format is the file format; FormatAuto picks it by FormatOf.
	Format Format
	// Label names the label column (CSV) or the nominal class attribute
	// (ARFF); "" means the last column or the last nominal attribute.
	// Not allowed for svmlight (the label is the first token).
	Label string
	// Delimiter is the CSV field separator (0: detected from the header,
	// see CSVOptions). CSV only.
	Delimiter rune
	// DropInvalid drops rows with a missing, non-numeric, NaN or infinite
	// value, or a missing label, and lists them in Dataset.Dropped (all
	// formats).
	DropInvalid bool
	// IndexBase counts svmlight feature indices (default OneBased).
	// svmlight only.
	IndexBase IndexBase
	// MaxDenseBytes bounds the size of the dense matrix a svmlight file
	// expands to, 8 bytes per cell; 0 means DefaultMaxDenseBytes.
	// svmlight only.
	MaxDenseBytes int64
}

// LoadFile reads a dataset from the file at path in the format of
// opt.Format, or by its name (FormatOf; unknown extensions are read as
// CSV). A name ending in ".gz" is decompressed (gzip) as it is read (and
// Lines count lines of the decompressed text). The dataset's Name and
// Provenance.File are path as given, Provenance.SHA256
// the digest of the file's bytes (as stored, compressed or not) and
// Provenance.Origin "user file". Every problem with the contents is a
// *CSVError naming the file, line and column (see ReadCSV, ReadData).
func LoadFile(path string, opt LoadOptions) (*Dataset, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, fmt.Errorf("datasets: %w", err)
	}
	defer f.Close()
	return readData(f, path, opt, regularSize(f))
}

// ReadData reads a dataset from r in the format of opt.Format, or by the
// extension of name (FormatOf; unknown extensions are read as CSV); name
// stands for the file in messages and becomes the dataset's Name and
// Provenance.File. A name ending in ".gz" means r is gzip-compressed.
//
// CSV is read as ReadCSV reads it. ARFF and svmlight: see ReadARFF and
// ReadSVMLight. Options that do not apply to the format are an error.
func ReadData(r io.Reader, name string, opt LoadOptions) (*Dataset, error) {
	return readData(r, name, opt, readerSize(r))
}

func readData(r io.Reader, name string, opt LoadOptions, sizeHint int64) (*Dataset, error) {
	format := opt.Format
	if format == FormatAuto {
		format = FormatOf(name)
		if format == FormatAuto {
			format = FormatCSV
		}
	}
	if format < FormatCSV || format > FormatSVMLight {
		return nil, fmt.Errorf("datasets: %s: %w %v", name, ErrUnknownFormat, format)
	}
	if err := opt.check(name, format); err != nil {
		return nil, err
	}
	dr := newDigestReader(r)
	var src io.Reader = dr
	if strings.HasSuffix(strings.ToLower(name), ".gz") {
		zr, err := gzip.NewReader(bufio.NewReader(dr))
		if err != nil {
			return nil, fmt.Errorf("datasets: %s: not a gzip file: %w", name, err)
		}
		defer zr.Close()
		src = zr
		sizeHint = 0 // the compressed size says little about the rows
	}
	var d *Dataset
	var err error
	switch format {
	case FormatCSV:
		d, err = readCSV(src, name, CSVOptions{Label: opt.Label, Delimiter: opt.Delimiter, DropInvalid: opt.DropInvalid}, sizeHint)
	case FormatARFF:
		d, err = readARFF(src, name, opt)
	case FormatSVMLight:
		d, err = readSVMLight(src, name, opt)
	}
	if err != nil {
		return nil, err
	}
	if err := dr.drain(src); err != nil {
		return nil, fmt.Errorf("datasets: read %s: %w", name, err)
	}
	d.Source.SHA256 = dr.sum()
	return d, nil
}

// check refuses options that do not apply to the format.
func (o LoadOptions) check(name string, f Format) error {
	bad := func(what string, only Format) error {
		return fmt.Errorf("datasets: %s: %s applies to %s files only, not %s", name, what, only, f)
	}
	switch {
	case o.Delimiter != 0 && f != FormatCSV:
		return bad("a delimiter", FormatCSV)
	case o.Label != "" && f == FormatSVMLight:
		return fmt.Errorf("datasets: %s: svmlight files carry the label as the first token of a line; a label column cannot be named", name)
	case o.IndexBase != OneBased && f != FormatSVMLight:
		return bad("an index base", FormatSVMLight)
	case o.MaxDenseBytes != 0 && f != FormatSVMLight:
		return bad("a dense size limit", FormatSVMLight)
	case o.IndexBase < OneBased || o.IndexBase > AutoBase:
		return fmt.Errorf("datasets: %s: invalid index base %d", name, o.IndexBase)
	case o.MaxDenseBytes < 0:
		return fmt.Errorf("datasets: %s: negative dense size limit %d", name, o.MaxDenseBytes)
	}
	return nil
}

// lineReader yields the lines of a text stream with their 1-based
// numbers, without the line ending ("\n" or "\r\n"), after a leading UTF-8
// byte order mark. The returned slice is valid until the next call.
type lineReader struct {
	br   *bufio.Reader
	line int
	buf  []byte
}

func newLineReader(r io.Reader) *lineReader {
	br := bufio.NewReaderSize(r, 64<<10)
	if b, _ := br.Peek(len(utf8BOM)); bytes.Equal(b, utf8BOM) {
		br.Discard(len(utf8BOM))
	}
	return &lineReader{br: br}
}

// next returns the next line, or io.EOF after the last one.
func (lr *lineReader) next() ([]byte, error) {
	lr.buf = lr.buf[:0]
	for {
		chunk, err := lr.br.ReadSlice('\n')
		lr.buf = append(lr.buf, chunk...)
		if err == bufio.ErrBufferFull {
			continue
		}
		if err == io.EOF && len(lr.buf) > 0 {
			err = nil
		}
		if err != nil {
			return nil, err
		}
		lr.line++
		b := bytes.TrimSuffix(lr.buf, []byte("\n"))
		return bytes.TrimSuffix(b, []byte("\r")), nil
	}
}

// userProvenance is the provenance of a user file (SHA256 is filled in
// by readData).
func userProvenance(name, note string) Provenance {
	return Provenance{Name: name, Title: filepath.Base(name), Origin: "user file", File: name, Note: note}
}
