package datasets

import (
	"errors"
	"fmt"
	"unicode/utf8"
)

// ErrBadText marks a column or attribute name, or a class label, that holds
// bytes that are not valid UTF-8, or a control character: C0 (U+0000 to
// U+001F, which includes NUL, tab and line breaks), DEL (U+007F) or C1
// (U+0080 to U+009F). Such text would be written differently by the CSV,
// JSON and LaTeX writers (raw bytes in one file, U+FFFD in another), so
// every loader refuses it with a located *CSVError.
var ErrBadText = errors.New("invalid text")

// textProblem returns a description of the first character of s that
// ErrBadText refuses, and its byte offset, or ok = false if s is clean.
func textProblem(s string) (desc string, at int, bad bool) {
	for i := 0; i < len(s); {
		r, size := utf8.DecodeRuneInString(s[i:])
		switch {
		case r == utf8.RuneError && size <= 1:
			return fmt.Sprintf("byte 0x%02x is not valid UTF-8", s[i]), i, true
		case r == 0:
			return "NUL character", i, true
		case r < 0x20 || r == 0x7f:
			return fmt.Sprintf("control character U+%04X", r), i, true
		case r >= 0x80 && r <= 0x9f:
			return fmt.Sprintf("C1 control character U+%04X", r), i, true
		}
		i += size
	}
	return "", 0, false
}

// checkText returns nil if s is clean, or an error wrapping ErrBadText that
// names what, the offending character and its byte offset, and shows s
// with Go escapes (so the message itself is clean text).
func checkText(what, s string) error {
	desc, at, bad := textProblem(s)
	if !bad {
		return nil
	}
	return fmt.Errorf("%s %q: %w: %s at byte %d", what, s, ErrBadText, desc, at+1)
}
