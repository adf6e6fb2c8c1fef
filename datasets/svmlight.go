package datasets

import (
	"bytes"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"

	"gonum.org/v1/gonum/mat"
)

// ReadSVMLight reads a dataset from r in the svmlight / LIBSVM sparse text
// format; name stands for the file in messages and becomes the dataset's
// Name and Provenance.File. Only opt.DropInvalid, opt.IndexBase and
// opt.MaxDenseBytes apply.
//
// Every line is "LABEL INDEX:VALUE INDEX:VALUE ...", tokens separated by
// spaces or tabs; '#' starts a comment to the end of the line; blank
// lines are skipped. The label is taken as a class name, as written
// ("+1" and "1" are two classes); class order is the order of first
// appearance, as for CSV files. Indices are whole numbers, strictly
// increasing along a line, counted by opt.IndexBase (default OneBased, the
// LIBSVM convention; AutoBase takes the file as zero-based if any index is
// 0, as scikit-learn's zero_based="auto" does). Values are numbers as
// ReadCSV reads them; NaN and infinities are refused (or, with
// DropInvalid, the row is dropped). Query ids (qid:N) and multi-label
// rows (labels joined by commas) are refused (ErrUnsupported).
//
// The rows are densified: the matrix has one column per index up to the
// largest one in the file, columns named f1, f2, ... (fj is column j: file
// index j in a one-based file, j-1 in a zero-based one); indices that do
// not occur on a line are 0. The dense matrix, rows x columns x 8 bytes,
// must not exceed opt.MaxDenseBytes (DefaultMaxDenseBytes, 2 GiB, when 0):
// a larger one is refused with ErrTooLarge as soon as the lines read so far
// imply it, naming the size.
func ReadSVMLight(r io.Reader, name string, opt LoadOptions) (*Dataset, error) {
	opt.Format = FormatSVMLight
	return ReadData(r, name, opt)
}

func readSVMLight(r io.Reader, name string, opt LoadOptions) (*Dataset, error) {
	limit := opt.MaxDenseBytes
	if limit == 0 {
		limit = DefaultMaxDenseBytes
	}
	limit = min(limit, 1<<60) // keeps rows x columns x 8 within int64 below

	lr := newLineReader(r)
	fail := func(line, col int, colName string, err error) error {
		return &CSVError{File: name, Line: line, Column: col, ColumnName: colName, Err: err}
	}
	var (
		start   []int     // offset of each kept row's entries in cols/vals
		cols    []int32   // raw file indices
		vals    []float64 // values
		labels  []string
		rowIDs  []int
		lines   []int
		dropped []RowError
		first   = map[string]int{} // class -> line of first appearance
		minIdx  = int64(math.MaxInt64)
		maxIdx  = int64(-1)
		rowCols []int32
		rowVals []float64
		dataRow int
	)
	// The widest index counts as column maxIdx (one-based) or maxIdx+1
	// (zero-based); AutoBase is settled at the end, so bound it by the
	// larger.
	width := func(maxIdx int64) int64 {
		if opt.IndexBase == OneBased {
			return maxIdx
		}
		return maxIdx + 1
	}
	tooLarge := func(line, col int, rows, w int64) error {
		return fail(line, col, "", fmt.Errorf("%w: %d rows x %d columns of float64 would take %d bytes, above the limit of %d bytes", ErrTooLarge, rows, w, rows*w*8, limit))
	}
	for {
		raw, err := lr.next()
		if err == io.EOF {
			break
		}
		if err != nil {
			return nil, fmt.Errorf("datasets: read %s: %w", name, err)
		}
		if i := bytes.IndexByte(raw, '#'); i >= 0 {
			raw = raw[:i]
		}
		toks := bytes.Fields(raw)
		if len(toks) == 0 {
			continue
		}
		id := dataRow
		dataRow++
		lines = append(lines, lr.line)
		label := string(toks[0])
		if strings.Contains(label, ":") {
			return nil, fail(lr.line, 1, "label", fmt.Errorf("%w: the line starts with %q, not a label", ErrSyntax, label))
		}
		if strings.Contains(label, ",") {
			return nil, fail(lr.line, 1, "label", fmt.Errorf("multi-label rows (%q): %w", label, ErrUnsupported))
		}
		rowCols, rowVals = rowCols[:0], rowVals[:0]
		var bad error
		prev := int64(-1)
		for t, tok := range toks[1:] {
			col := t + 2 // 1-based token number on the line
			is, vs, ok := bytes.Cut(tok, []byte(":"))
			if !ok {
				return nil, fail(lr.line, col, "", fmt.Errorf("%w: %q is not INDEX:VALUE", ErrSyntax, tok))
			}
			if string(is) == "qid" {
				return nil, fail(lr.line, col, "", fmt.Errorf("query ids (%s): %w", tok, ErrUnsupported))
			}
			idx, err := svmIndex(is)
			if err != nil {
				return nil, fail(lr.line, col, "", err)
			}
			if idx == 0 && opt.IndexBase == OneBased {
				return nil, fail(lr.line, col, "", fmt.Errorf("%w: index 0 in a one-based file (LIBSVM counts from 1; set the index base to zero-based or auto)", ErrBadIndex))
			}
			if idx <= prev {
				return nil, fail(lr.line, col, "", fmt.Errorf("%w: index %d after %d (indices must increase along a line)", ErrBadIndex, idx, prev))
			}
			prev = idx
			if w := width(idx); w*8 > limit || int64(len(start)+1)*w*8 > limit {
				return nil, tooLarge(lr.line, col, int64(len(start)+1), w)
			}
			v, err := csvParseValue(string(vs), ' ')
			if err != nil && bad == nil {
				bad = fail(lr.line, col, "", fmt.Errorf("index %d: %w", idx, err))
			}
			rowCols = append(rowCols, int32(idx))
			rowVals = append(rowVals, v)
		}
		if bad != nil {
			if !opt.DropInvalid {
				return nil, bad
			}
			dropped = append(dropped, RowError{Row: id, Err: bad})
			continue
		}
		if len(rowCols) > 0 {
			minIdx = min(minIdx, int64(rowCols[0]))
			maxIdx = max(maxIdx, int64(rowCols[len(rowCols)-1]))
		}
		if maxIdx >= 0 && int64(len(start)+1)*width(maxIdx)*8 > limit {
			return nil, tooLarge(lr.line, 0, int64(len(start)+1), width(maxIdx))
		}
		start = append(start, len(cols))
		cols = append(cols, rowCols...)
		vals = append(vals, rowVals...)
		if _, ok := first[label]; !ok {
			first[label] = lr.line
		}
		labels = append(labels, label)
		rowIDs = append(rowIDs, id)
	}
	headLine := max(lr.line, 1)
	if len(labels) == 0 {
		if dataRow == 0 {
			return nil, fail(1, 0, "", fmt.Errorf("%w: no data lines", ErrEmptyFile))
		}
		return nil, fail(headLine, 0, "", fmt.Errorf("%w: all %d rows dropped as invalid, first: %v", ErrNoRows, len(dropped), dropped[0].Err))
	}
	if maxIdx < 0 {
		return nil, fail(headLine, 0, "", fmt.Errorf("%w: no line holds an INDEX:VALUE pair", ErrNoFeatures))
	}
	shift := int64(1) // one-based: index i is column i-1 (0-based)
	if opt.IndexBase == ZeroBased || opt.IndexBase == AutoBase && minIdx == 0 {
		shift = 0
	}
	d := int(maxIdx - shift + 1)
	n := len(labels)
	X := mat.NewDense(n, d, nil)
	for i := range n {
		end := len(cols)
		if i+1 < n {
			end = start[i+1]
		}
		row := X.RawRowView(i)
		for e := start[i]; e < end; e++ {
			row[int64(cols[e])-shift] = vals[e]
		}
	}
	features := make([]string, d)
	for j := range features {
		features[j] = "f" + strconv.Itoa(j+1)
	}
	var classes []string
	classOf := map[string]int{}
	Y := make([]int, n)
	for i, l := range labels {
		k, ok := classOf[l]
		if !ok {
			k = len(classes)
			classOf[l] = k
			classes = append(classes, l)
		}
		Y[i] = k
	}
	for _, c := range classes {
		if err := checkText("label", c); err != nil {
			return nil, fail(first[c], 1, "label", err)
		}
	}
	if len(classes) < 2 {
		return nil, fail(headLine, 1, "label", fmt.Errorf("%w: every one of the %d rows has label %q", ErrTooFewClasses, n, classes[0]))
	}
	base := "one-based"
	if shift == 0 {
		base = "zero-based"
	}
	return &Dataset{
		Name:     name,
		Features: features,
		Classes:  classes,
		X:        X,
		Y:        Y,
		Rows:     rowIDs,
		Source:   userProvenance(name, "svmlight file, "+base+" indices, densified"),
		Dropped:  dropped,
		Lines:    lines,
	}, nil
}

// svmIndex parses a feature index: decimal digits only, below 2^31.
func svmIndex(b []byte) (int64, error) {
	if len(b) == 0 {
		return 0, fmt.Errorf("%w: empty index", ErrBadIndex)
	}
	for _, c := range b {
		if c < '0' || c > '9' {
			return 0, fmt.Errorf("%w: %q is not a whole number", ErrBadIndex, b)
		}
	}
	v, err := strconv.ParseInt(string(b), 10, 64)
	if err != nil || v >= 1<<31 {
		return 0, fmt.Errorf("%w: %s is too large: %w", ErrTooLarge, b, ErrBadIndex)
	}
	return v, nil
}
