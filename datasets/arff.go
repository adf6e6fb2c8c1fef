package datasets

import (
	"bytes"
	"fmt"
	"io"
	"strings"

	"gonum.org/v1/gonum/mat"
)

// ReadARFF reads a dataset from r in Weka's ARFF format; name stands for
// the file in messages and becomes the dataset's Name and
// Provenance.File. Only opt.Label and opt.DropInvalid apply.
//
// The header declares the relation (@relation, once, first), then the
// attributes (@attribute NAME TYPE), then @data. Keywords and the types
// numeric, real and integer are case-insensitive. Names and nominal
// values may be quoted with '...' or "..." (a backslash takes the next
// character literally; \n, \r and \t stand for those control characters,
// which names refuse); '%' outside quotes starts a comment to the end of
// the line; blank lines are skipped. Every attribute but the class must
// be numeric; the class is a nominal attribute, {v1, v2, ...}: the one
// opt.Label names, else the last nominal one. String, date and relational
// attributes, other nominal attributes, sparse rows ({i v, ...}) and
// instance weights are refused (ErrUnsupported).
//
// Data rows hold one comma-separated value per attribute. Numbers are
// read as ReadCSV reads them; '?' (and the CSV loader's other
// missing-value spellings) is a missing value, which fails the load, or
// drops the row with opt.DropInvalid, as in ReadCSV. A class value must be
// declared (ErrUndeclaredLabel). The class order is the declared order;
// declared values without any row are left out (and named in
// Provenance.Note). Rows are the 0-based data rows and Lines their lines.
// Names and class values must be clean text (ErrBadText).
//
// Problems are *CSVError values: Column is the attribute's 1-based
// position and ColumnName its name.
func ReadARFF(r io.Reader, name string, opt LoadOptions) (*Dataset, error) {
	opt.Format = FormatARFF
	return ReadData(r, name, opt)
}

// arffAttr is one declared attribute.
type arffAttr struct {
	name    string
	nominal []string // declared values; nil for numeric
	line    int
}

func readARFF(r io.Reader, name string, opt LoadOptions) (*Dataset, error) {
	lr := newLineReader(r)
	fail := func(line, col int, colName string, err error) error {
		return &CSVError{File: name, Line: line, Column: col, ColumnName: colName, Err: err}
	}
	var (
		attrs    []arffAttr
		relation string
		relLine  int
	)
	// Header.
	for {
		raw, err := lr.next()
		if err == io.EOF {
			if lr.line == 0 {
				return nil, fail(1, 0, "", ErrEmptyFile)
			}
			return nil, fail(lr.line, 0, "", fmt.Errorf("%w: end of file before @data", ErrSyntax))
		}
		if err != nil {
			return nil, fmt.Errorf("datasets: read %s: %w", name, err)
		}
		line := arffStripComment(raw)
		if len(line) == 0 {
			continue
		}
		kw, rest := arffKeyword(line)
		switch kw {
		case "@relation":
			if relLine != 0 {
				return nil, fail(lr.line, 0, "", fmt.Errorf("%w: second @relation (the first is on line %d)", ErrSyntax, relLine))
			}
			rel, tail, err := arffToken(rest)
			if err != nil || rel == "" || strings.TrimSpace(tail) != "" {
				return nil, fail(lr.line, 0, "", fmt.Errorf("%w: expected @relation NAME", ErrSyntax))
			}
			if err := checkText("relation name", rel); err != nil {
				return nil, fail(lr.line, 0, "", err)
			}
			relation, relLine = rel, lr.line
		case "@attribute":
			col := len(attrs) + 1
			if relLine == 0 {
				return nil, fail(lr.line, col, "", fmt.Errorf("%w: @attribute before @relation", ErrSyntax))
			}
			a, err := arffAttribute(rest)
			if err != nil {
				return nil, fail(lr.line, col, a.name, err)
			}
			for k, b := range attrs {
				if b.name == a.name {
					return nil, fail(lr.line, col, a.name, fmt.Errorf("%w (also attribute %d, line %d)", ErrDuplicateColumn, k+1, b.line))
				}
			}
			a.line = lr.line
			attrs = append(attrs, a)
		case "@data":
			if strings.TrimSpace(rest) != "" {
				return nil, fail(lr.line, 0, "", fmt.Errorf("%w: text after @data", ErrSyntax))
			}
			if relLine == 0 {
				return nil, fail(lr.line, 0, "", fmt.Errorf("%w: @data without @relation", ErrSyntax))
			}
			return arffData(lr, name, relation, attrs, opt, fail)
		case "@end":
			return nil, fail(lr.line, 0, "", fmt.Errorf("relational attributes (@end): %w", ErrUnsupported))
		default:
			return nil, fail(lr.line, 0, "", fmt.Errorf("%w: expected @relation, @attribute or @data, got %q", ErrSyntax, arffShort(line)))
		}
	}
}

// arffData chooses the class attribute and reads the data section.
func arffData(lr *lineReader, name, relation string, attrs []arffAttr, opt LoadOptions, fail func(int, int, string, error) error) (*Dataset, error) {
	headLine := lr.line // the @data line
	class := -1
	if opt.Label != "" {
		want := strings.TrimSpace(opt.Label)
		for k, a := range attrs {
			if a.name == want {
				class = k
			}
		}
		if class < 0 {
			names := make([]string, len(attrs))
			for k, a := range attrs {
				names[k] = a.name
			}
			return nil, fail(headLine, 0, opt.Label, fmt.Errorf("class attribute: %w (attributes: %s)", ErrUnknownColumn, strings.Join(names, ", ")))
		}
		if attrs[class].nominal == nil {
			return nil, fail(attrs[class].line, class+1, want, fmt.Errorf("a numeric class attribute (regression): %w; the class must be nominal ({a, b, ...})", ErrUnsupported))
		}
	} else {
		for k, a := range attrs {
			if a.nominal != nil {
				class = k
			}
		}
		if class < 0 {
			return nil, fail(headLine, 0, "", fmt.Errorf("%w: no nominal attribute to take as the class", ErrNoFeatures))
		}
	}
	var featCols []int
	var features []string
	for k, a := range attrs {
		if k == class {
			continue
		}
		if a.nominal != nil {
			return nil, fail(a.line, k+1, a.name, fmt.Errorf("nominal attribute besides the class %q (features must be numeric): %w", attrs[class].name, ErrUnsupported))
		}
		featCols = append(featCols, k)
		features = append(features, a.name)
	}
	if len(features) == 0 {
		return nil, fail(headLine, 0, "", ErrNoFeatures)
	}
	declared := attrs[class].nominal
	classIdx := make(map[string]int, len(declared))
	for k, v := range declared {
		classIdx[v] = k
	}

	var (
		vals    []float64
		codes   []int
		rowIDs  []int
		lines   []int
		dropped []RowError
		fields  []string
	)
	row := make([]float64, len(featCols))
	for dataRow := 0; ; {
		raw, err := lr.next()
		if err == io.EOF {
			break
		}
		if err != nil {
			return nil, fmt.Errorf("datasets: read %s: %w", name, err)
		}
		line := arffStripComment(raw)
		if len(line) == 0 {
			continue
		}
		if line[0] == '{' {
			return nil, fail(lr.line, 0, "", fmt.Errorf("sparse ARFF rows ({index value, ...}): %w; write the rows out in full", ErrUnsupported))
		}
		if line[0] == '@' {
			return nil, fail(lr.line, 0, "", fmt.Errorf("%w: %q in the data section", ErrSyntax, arffShort(line)))
		}
		fields, err = arffFields(fields[:0], line)
		if err != nil {
			return nil, fail(lr.line, 0, "", err)
		}
		if len(fields) == len(attrs)+1 && strings.HasPrefix(fields[len(attrs)], "{") {
			return nil, fail(lr.line, len(attrs)+1, "", fmt.Errorf("instance weights ({w} after the values): %w", ErrUnsupported))
		}
		if len(fields) != len(attrs) {
			return nil, fail(lr.line, 0, "", fmt.Errorf("%w: row has %d values, the header declares %d attributes", ErrRaggedRow, len(fields), len(attrs)))
		}
		lines = append(lines, lr.line)
		id := dataRow
		dataRow++
		code, bad := -1, error(nil)
		for q, k := range featCols {
			v, err := csvParseValue(fields[k], ',')
			if err != nil {
				bad = fail(lr.line, k+1, attrs[k].name, err)
				break
			}
			row[q] = v
		}
		if bad == nil {
			label := fields[class]
			if csvIsMissing(label) {
				bad = fail(lr.line, class+1, attrs[class].name, fmt.Errorf("%w (label)", ErrMissingValue))
			} else if c, ok := classIdx[label]; ok {
				code = c
			} else {
				return nil, fail(lr.line, class+1, attrs[class].name, fmt.Errorf("%w: %q (declared: %s)", ErrUndeclaredLabel, label, strings.Join(declared, ", ")))
			}
		}
		if bad != nil {
			if !opt.DropInvalid {
				return nil, bad
			}
			dropped = append(dropped, RowError{Row: id, Err: bad})
			continue
		}
		vals = append(vals, row...)
		codes = append(codes, code)
		rowIDs = append(rowIDs, id)
	}
	if len(codes) == 0 {
		err := ErrNoRows
		if len(dropped) > 0 {
			err = fmt.Errorf("%w: all %d rows dropped as invalid, first: %v", ErrNoRows, len(dropped), dropped[0].Err)
		}
		return nil, fail(headLine, 0, "", err)
	}
	// Keep the declared classes that have rows, in declared order.
	count := make([]int, len(declared))
	for _, c := range codes {
		count[c]++
	}
	remap := make([]int, len(declared))
	var classes, empty []string
	for k, v := range declared {
		remap[k] = -1
		if count[k] > 0 {
			remap[k] = len(classes)
			classes = append(classes, v)
		} else {
			empty = append(empty, v)
		}
	}
	if len(classes) < 2 {
		return nil, fail(attrs[class].line, class+1, attrs[class].name, fmt.Errorf("%w: every one of the %d rows has class %q", ErrTooFewClasses, len(codes), classes[0]))
	}
	Y := make([]int, len(codes))
	for i, c := range codes {
		Y[i] = remap[c]
	}
	note := fmt.Sprintf("ARFF relation %q, class attribute %q", relation, attrs[class].name)
	if len(empty) > 0 {
		note += fmt.Sprintf("; declared classes without rows left out: %s", strings.Join(empty, ", "))
	}
	return &Dataset{
		Name:     name,
		Features: features,
		Classes:  classes,
		X:        mat.NewDense(len(codes), len(features), vals),
		Y:        Y,
		Rows:     rowIDs,
		Source:   userProvenance(name, note),
		Dropped:  dropped,
		Lines:    lines,
	}, nil
}

// arffAttribute parses the text after "@attribute".
func arffAttribute(rest string) (arffAttr, error) {
	nm, tail, err := arffToken(rest)
	if err != nil {
		return arffAttr{}, err
	}
	a := arffAttr{name: nm}
	if nm == "" {
		return a, ErrEmptyColumnName
	}
	if err := checkText("attribute name", nm); err != nil {
		return arffAttr{}, err
	}
	typ := strings.TrimSpace(tail)
	if strings.HasPrefix(typ, "{") {
		if !strings.HasSuffix(typ, "}") {
			return a, fmt.Errorf("%w: nominal values must be closed by '}'", ErrSyntax)
		}
		vals, err := arffFields(nil, []byte(typ[1:len(typ)-1]))
		if err != nil {
			return a, err
		}
		if len(vals) == 1 && vals[0] == "" {
			return a, fmt.Errorf("%w: no nominal values", ErrSyntax)
		}
		for k, v := range vals {
			if v == "" {
				return a, fmt.Errorf("%w: empty nominal value %d", ErrSyntax, k+1)
			}
			if err := checkText("nominal value", v); err != nil {
				return a, err
			}
			if indexOf(vals[:k], v) >= 0 {
				return a, fmt.Errorf("%w: nominal value %q declared twice", ErrSyntax, v)
			}
		}
		a.nominal = vals
		return a, nil
	}
	word, _, _ := strings.Cut(typ, " ")
	switch strings.ToLower(strings.TrimSpace(word)) {
	case "numeric", "real", "integer":
		if strings.TrimSpace(typ[len(word):]) != "" {
			return a, fmt.Errorf("%w: text after the type %s", ErrSyntax, word)
		}
		return a, nil
	case "string", "date", "relational":
		return a, fmt.Errorf("%s attributes: %w (features must be numeric)", strings.ToLower(word), ErrUnsupported)
	case "":
		return a, fmt.Errorf("%w: attribute without a type", ErrSyntax)
	}
	return a, fmt.Errorf("%w: unknown attribute type %q (numeric, real, integer or {values})", ErrSyntax, word)
}

// arffKeyword splits a header line into its lower-cased first word and
// the rest.
func arffKeyword(line []byte) (string, string) {
	s := string(line)
	i := strings.IndexAny(s, " \t{")
	if i < 0 {
		return strings.ToLower(s), ""
	}
	return strings.ToLower(s[:i]), s[i:]
}

// arffToken reads one name from s after leading white space: quoted with
// ' or " (backslash escapes), or a run of characters up to white space or
// '{'. It returns the name and the text after it.
func arffToken(s string) (string, string, error) {
	s = strings.TrimLeft(s, " \t")
	if s == "" {
		return "", "", nil
	}
	if q := s[0]; q == '\'' || q == '"' {
		var b strings.Builder
		for i := 1; i < len(s); i++ {
			switch c := s[i]; {
			case c == '\\' && i+1 < len(s):
				i++
				b.WriteByte(arffEscape(s[i]))
			case c == q:
				return b.String(), s[i+1:], nil
			default:
				b.WriteByte(c)
			}
		}
		return "", "", fmt.Errorf("%w: unterminated quote", ErrSyntax)
	}
	i := strings.IndexAny(s, " \t{")
	if i < 0 {
		return s, "", nil
	}
	return s[:i], s[i:], nil
}

// arffEscape returns the character a backslash escape stands for.
func arffEscape(c byte) byte {
	switch c {
	case 'n':
		return '\n'
	case 'r':
		return '\r'
	case 't':
		return '\t'
	}
	return c
}

// arffFields splits a data line (or a nominal value list) at commas
// outside quotes, trims each field and removes its quotes, appending to
// dst.
func arffFields(dst []string, line []byte) ([]string, error) {
	var b strings.Builder
	quoted := false
	flush := func() {
		f := b.String()
		if !quoted {
			f = strings.TrimSpace(f)
		}
		dst = append(dst, f)
		b.Reset()
		quoted = false
	}
	i := 0
	for {
		for i < len(line) && (line[i] == ' ' || line[i] == '\t') {
			i++
		}
		if i < len(line) && (line[i] == '\'' || line[i] == '"') {
			q := line[i]
			i++
			closed := false
			for i < len(line) {
				c := line[i]
				i++
				if c == '\\' && i < len(line) {
					b.WriteByte(arffEscape(line[i]))
					i++
					continue
				}
				if c == q {
					closed = true
					break
				}
				b.WriteByte(c)
			}
			if !closed {
				return dst, fmt.Errorf("%w: unterminated quote", ErrSyntax)
			}
			quoted = true
			for i < len(line) && (line[i] == ' ' || line[i] == '\t') {
				i++
			}
			if i < len(line) && line[i] != ',' {
				return dst, fmt.Errorf("%w: text after a closing quote", ErrSyntax)
			}
		} else {
			j := bytes.IndexByte(line[i:], ',')
			if j < 0 {
				j = len(line) - i
			}
			b.Write(line[i : i+j])
			i += j
		}
		flush()
		if i >= len(line) {
			return dst, nil
		}
		i++ // the comma
	}
}

// arffStripComment removes a '%' comment (outside quotes) and surrounding
// white space.
func arffStripComment(line []byte) []byte {
	var q byte
	for i := 0; i < len(line); i++ {
		c := line[i]
		switch {
		case q != 0 && c == '\\':
			i++
		case q != 0 && c == q:
			q = 0
		case q != 0:
		case c == '\'' || c == '"':
			q = c
		case c == '%':
			return bytes.TrimSpace(line[:i])
		}
	}
	return bytes.TrimSpace(line)
}

// arffShort returns the start of a line for messages.
func arffShort(line []byte) string {
	if len(line) > 40 {
		return string(line[:40]) + "..."
	}
	return string(line)
}
