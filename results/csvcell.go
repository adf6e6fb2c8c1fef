package results

// Text cells of the CSV files are neutralised against spreadsheet formula
// injection as the OWASP "CSV Injection" guidance recommends: a cell whose
// first character is '=', '+', '-', '@', a tab or a carriage return is
// written with a leading apostrophe, which spreadsheets take as "this is
// text" and do not display. Two exceptions keep the rule exact and
// reversible:
//
//   - A cell that is entirely a plain decimal number — an optional sign,
//     one or more ASCII digits, and optionally a '.' followed by one or
//     more digits, nothing else ("-1", "+1", "-0.5") — is written as it
//     is. Such text cannot call a function or reference a cell: a
//     spreadsheet reads it as a number constant, which is what a class
//     labelled "-1" means anyway.
//   - A cell that already starts with an apostrophe is escaped again (one
//     more apostrophe) when the reader would otherwise take its
//     apostrophe for one added by the writer.
//
// UnescapeCSVCell undoes EscapeCSVCell exactly, so every string survives a
// write and a read (up to encoding/csv's own normalisation of "\r\n"
// inside a quoted field to "\n"). Numeric columns are written by Fmt and
// never start with a trigger other than '-' followed by digits.

// csvTrigger reports whether c makes a spreadsheet read a cell as a formula.
func csvTrigger(c byte) bool {
	switch c {
	case '=', '+', '-', '@', '\t', '\r':
		return true
	}
	return false
}

// plainDecimal reports whether s is [+-]?[0-9]+(\.[0-9]+)?.
func plainDecimal(s string) bool {
	if s != "" && (s[0] == '+' || s[0] == '-') {
		s = s[1:]
	}
	digits := func(t string) int {
		n := 0
		for n < len(t) && t[n] >= '0' && t[n] <= '9' {
			n++
		}
		return n
	}
	n := digits(s)
	if n == 0 {
		return false
	}
	s = s[n:]
	if s == "" {
		return true
	}
	if s[0] != '.' {
		return false
	}
	m := digits(s[1:])
	return m > 0 && m == len(s)-1
}

// FormulaLike reports whether a spreadsheet could read s as a formula: it
// starts with '=', '+', '-', '@', a tab or a carriage return and is not a
// plain decimal number. Spec names for which it is true are refused by
// the spec parser; text read from data is neutralised by EscapeCSVCell.
func FormulaLike(s string) bool {
	return s != "" && csvTrigger(s[0]) && !plainDecimal(s)
}

// needsEscape reports whether EscapeCSVCell prefixes s.
func needsEscape(s string) bool {
	for s != "" && s[0] == '\'' {
		s = s[1:]
	}
	return FormulaLike(s)
}

// EscapeCSVCell returns s as written into a text cell of a CSV file: with
// a leading apostrophe when FormulaLike(s), or when s starts with
// apostrophes followed by such text; unchanged otherwise.
func EscapeCSVCell(s string) string {
	if needsEscape(s) {
		return "'" + s
	}
	return s
}

// UnescapeCSVCell returns the string that EscapeCSVCell wrote as s: one
// leading apostrophe is removed when what follows needs escaping.
func UnescapeCSVCell(s string) string {
	if len(s) > 1 && s[0] == '\'' && needsEscape(s[1:]) {
		return s[1:]
	}
	return s
}

// csvTexts escapes every cell of a record in place and returns it.
func csvTexts(rec ...string) []string {
	for i, s := range rec {
		rec[i] = EscapeCSVCell(s)
	}
	return rec
}
