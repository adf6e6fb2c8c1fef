package modelkit

import (
	"bytes"
	"encoding/csv"
	"fmt"
	"io"
	"os"
	"strconv"
	"strings"

	"fringe/bench/input"
	"fringe/qkernel"
)

// CalibrationColumns are the columns of a calibration counts file (key
// calibration of an interference or counts model), in any order:
//
//	qubit,prepared,read0,read1
//	ancilla,0,9790,210
//	ancilla,1,330,9670
//	class[0],0,9850,150
//	class[0],1,280,9720
//
// Each line holds the shots of one calibration circuit: qubit prepared in
// |prepared> (0 or 1) and measured, read0 shots reading 0 and read1 shots
// reading 1. qubit names a measured bit of the exported circuits (ancilla,
// the bit ancilla_out[0]; class[j], the bit class_out[j]), and then the
// same matrices serve every test instance, or a physical qubit of the
// model's device by its number (0, 1, ...), and then each instance takes
// the matrices of the qubits its bits are measured on. One form per file;
// every qubit needs both preparations, once each; bits class[0] up to the
// largest class register of the run's datasets, or every qubit of the
// device. The confusion matrix is estimated by the observed frequencies
// (qkernel.ConfusionFromCounts) and must be invertible (p01 + p10 < 1).
var CalibrationColumns = []string{"qubit", "prepared", "read0", "read1"}

// ReadCalibration reads a calibration counts file (CalibrationColumns).
// Errors are *input.Error values naming the file and, where there is one,
// the line.
func ReadCalibration(path string) (*Calibration, error) {
	data, err := os.ReadFile(path)
	if err != nil {
		return nil, &input.Error{File: path, Err: fmt.Errorf("read calibration file: %w", err)}
	}
	cal := &Calibration{File: path, SHA256: sha256Hex(data)}
	data = bytes.TrimPrefix(data, []byte("\xef\xbb\xbf"))
	bad := func(line int, format string, args ...any) error {
		return &input.Error{File: path, Line: line, Err: fmt.Errorf(format, args...)}
	}
	cr := csv.NewReader(bytes.NewReader(data))
	cr.FieldsPerRecord = -1
	head, err := cr.Read()
	if err == io.EOF {
		return nil, bad(0, "empty calibration file (want a header %s)", strings.Join(CalibrationColumns, ","))
	}
	if err != nil {
		return nil, input.CSV(path, err)
	}
	col := map[string]int{}
	for j, h := range head {
		h = strings.TrimSpace(h)
		known := false
		for _, c := range CalibrationColumns {
			known = known || h == c
		}
		if !known {
			return nil, bad(1, "unexpected column %q (want %s)", h, strings.Join(CalibrationColumns, ","))
		}
		if _, dup := col[h]; dup {
			return nil, bad(1, "column %q appears twice", h)
		}
		col[h] = j
	}
	for _, c := range CalibrationColumns {
		if _, ok := col[c]; !ok {
			return nil, bad(1, "header lacks column %s (want %s)", c, strings.Join(CalibrationColumns, ","))
		}
	}
	// A qubit key: -1 ancilla, -2 - j class[j], k >= 0 physical qubit k.
	type prep struct {
		counts [2]int
		line   int
	}
	seen := map[int]*[2]*prep{}
	var order []int
	form := "" // "bits" or "physical"
	formLine := 0
	for {
		rec, err := cr.Read()
		if err == io.EOF {
			break
		}
		if err != nil {
			return nil, input.CSV(path, err)
		}
		line, _ := cr.FieldPos(0)
		if len(rec) == 1 && strings.TrimSpace(rec[0]) == "" {
			continue
		}
		if len(rec) != len(head) {
			return nil, bad(line, "%d fields, the header has %d", len(rec), len(head))
		}
		field := func(c string) string { return strings.TrimSpace(rec[col[c]]) }
		name := field("qubit")
		key, f := 0, "bits"
		switch {
		case name == "ancilla":
			key = -1
		case strings.HasPrefix(name, "class[") && strings.HasSuffix(name, "]"):
			j, err := strconv.Atoi(name[len("class[") : len(name)-1])
			if err != nil || j < 0 || j > 30 {
				return nil, bad(line, "column qubit: %q is not a class bit class[0], class[1], ...", name)
			}
			key = -2 - j
		default:
			k, err := strconv.Atoi(name)
			if err != nil || k < 0 || k >= 1<<16 {
				return nil, bad(line, "column qubit: %q is neither a measured bit (ancilla, class[0], class[1], ...) nor a physical qubit number", name)
			}
			key, f = k, "physical"
		}
		if form == "" {
			form, formLine = f, line
		} else if form != f {
			return nil, bad(line, "qubit %q: this file names %s since line %d; give measured bits (ancilla, class[j]) or physical qubits, not both", name, map[string]string{"bits": "measured bits", "physical": "physical qubits"}[form], formLine)
		}
		var pr int
		switch field("prepared") {
		case "0":
		case "1":
			pr = 1
		default:
			return nil, bad(line, "column prepared: %q is not a prepared state (0 or 1)", field("prepared"))
		}
		var n [2]int
		for i, c := range []string{"read0", "read1"} {
			v, err := strconv.Atoi(field(c))
			if err != nil || v < 0 {
				return nil, bad(line, "column %s: %q is not a non-negative integer", c, field(c))
			}
			n[i] = v
		}
		s := seen[key]
		if s == nil {
			s = &[2]*prep{}
			seen[key] = s
			order = append(order, key)
		}
		if s[pr] != nil {
			return nil, bad(line, "qubit %s prepared in %d is also on line %d", name, pr, s[pr].line)
		}
		s[pr] = &prep{counts: n, line: line}
	}
	if len(order) == 0 {
		return nil, bad(0, "no calibration lines after the header")
	}
	nameOf := func(key int) string {
		switch {
		case key == -1:
			return "ancilla"
		case key <= -2:
			return fmt.Sprintf("class[%d]", -2-key)
		}
		return strconv.Itoa(key)
	}
	conf := map[int]qkernel.Confusion{}
	for _, key := range order {
		s := seen[key]
		for pr := range 2 {
			if s[pr] == nil {
				return nil, bad(0, "qubit %s has no line prepared in %d (every qubit needs both preparations)", nameOf(key), pr)
			}
		}
		for pr := range 2 {
			if s[pr].counts[0]+s[pr].counts[1] == 0 {
				return nil, bad(s[pr].line, "qubit %s prepared in %d: no shots (read0 and read1 are both 0)", nameOf(key), pr)
			}
		}
		c, err := qkernel.ConfusionFromCounts(s[0].counts, s[1].counts)
		if err != nil {
			panic(err) // counts checked above: non-negative, with shots
		}
		if err := c.Validate(); err != nil {
			return nil, bad(s[1].line, "qubit %s: P(read 1 | 0) = %.4g and P(read 0 | 1) = %.4g: %v (the reading carries no information to invert)", nameOf(key), c[1][0], c[0][1], err)
		}
		conf[key] = c
	}
	if form == "physical" {
		top := 0
		for _, key := range order {
			top = max(top, key)
		}
		cal.Physical = make([]qkernel.Confusion, top+1)
		for k := 0; k <= top; k++ {
			c, ok := conf[k]
			if !ok {
				return nil, bad(0, "physical qubit %d is missing (the file calibrates qubits up to %d; every qubit of the device needs its lines)", k, top)
			}
			cal.Physical[k] = c
		}
		return cal, nil
	}
	anc, ok := conf[-1]
	if !ok {
		return nil, bad(0, "the ancilla is missing (lines qubit = ancilla, prepared 0 and 1)")
	}
	cal.Ancilla = anc
	for j := 0; ; j++ {
		c, ok := conf[-2-j]
		if !ok {
			break
		}
		cal.Class = append(cal.Class, c)
	}
	if len(cal.Class)+1 != len(conf) {
		return nil, bad(0, "class bits must run from class[0] without gaps; class[%d] is missing", len(cal.Class))
	}
	return cal, nil
}
